// The HTML report of a population run and its figures: the bands (median, 25–75 %, 5–95 %) per regimen, and the
// PTA against the threshold. Self-contained, printable; the caution at the top and the bottom.
#include <cmath>
#include <sstream>

#include "core/escape.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/population_model.hpp"
#include "report/population_report.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::report {

std::string variability_line(const model::Model& m);   // population_text.cpp

namespace {

const model::Output& output_of(const regimen::Regimen& r) {
    const int i = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    return r.model.outputs[static_cast<std::size_t>(std::max(0, i))];
}

std::string letter_for(std::size_t r) { return verdict::letter_for(r); }

std::string esc(const std::string& s) { return xml_escape(s); }

plot::Curve band_curve(const PopulationRun& p, std::size_t r, std::size_t q, const std::string& label) {
    const model::Output& o = output_of((*p.regimens)[r]);
    plot::Curve c{label, {}, {}};
    const auto& s = p.summaries[r];
    for (std::size_t k = 0; k < s.band.size(); ++k) {
        if (!std::isfinite(s.band[k][q])) continue;
        c.t.push_back(p.result->band_times[r][k]);
        c.y.push_back(in_output_unit(o, s.band[k][q]));
    }
    return c;
}

void threshold_line(const PopulationRun& p, plot::Figure& f) {
    const auto& r0 = p.regimens->front();
    if (!r0.targets.above) return;
    const model::Output& o = output_of(r0);
    f.threshold = in_output_unit(o, *r0.targets.above);
    f.threshold_label = "target " + num(*f.threshold) + " " + o.unit_text;
}

}  // namespace

plot::Figure band_figure(const PopulationRun& p, std::size_t r) {
    const auto& reg = (*p.regimens)[r];
    const model::Output& o = output_of(reg);
    plot::Figure f;
    f.title = letter_for(r) + "  " + reg.id + ": median, 25–75 % and 5–95 % of " + std::to_string(p.size) + " patients";
    f.ylabel = o.name + " (" + o.unit_text + ")";
    const char* labels[] = {"5 %", "25 %", "median", "75 %", "95 %"};
    for (std::size_t q = 0; q < 5; ++q) f.curves.push_back(band_curve(p, r, q, labels[q]));
    threshold_line(p, f);
    return f;
}

plot::Figure overview_figure(const PopulationRun& p) {
    const model::Output& o = output_of(p.regimens->front());
    plot::Figure f;
    f.title = "Median and 5–95 % of " + std::to_string(p.size) + " virtual patients";
    f.ylabel = o.name + " (" + o.unit_text + ")";
    // With more than two regimens the 5–95 % lines would hide the medians: medians only (the report has the bands).
    const bool ranges = p.regimens->size() <= 2;
    if (!ranges) f.title = "Median of " + std::to_string(p.size) + " virtual patients";
    for (std::size_t r = 0; r < p.regimens->size(); ++r) {
        f.curves.push_back(band_curve(p, r, 2, letter_for(r) + " median"));
        if (!ranges) continue;
        f.curves.push_back(band_curve(p, r, 0, letter_for(r) + " 5 %"));
        f.curves.push_back(band_curve(p, r, 4, letter_for(r) + " 95 %"));
    }
    threshold_line(p, f);
    return f;
}

plot::Figure pta_figure(const PopulationRun& p) {
    const model::Output& o = output_of(p.regimens->front());
    plot::Figure f;
    f.title = "PTA by threshold";
    f.xlabel = "threshold, log2 of " + o.unit_text;
    f.ylabel = "PTA (%)";
    for (std::size_t r = 0; r < p.regimens->size(); ++r) {
        plot::Curve c{letter_for(r), {}, {}};
        for (const auto& pt : p.summaries[r].curve) {
            c.t.push_back(std::log2(in_output_unit(o, pt.threshold)));
            c.y.push_back(100.0 * pt.pta);
        }
        f.curves.push_back(c);
    }
    return f;
}

std::string population_html(const PopulationRun& p) {
    const auto& rs = *p.regimens;
    const model::Output& o = output_of(rs.front());
    std::ostringstream h;
    h << "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Population: "
      << esc(rs.front().model.id) << "</title>\n<style>body{font-family:sans-serif;max-width:60em;margin:1em auto;}"
      << "table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:.2em .5em;text-align:right}"
      << "th:first-child,td:first-child{text-align:left}.caution{border:2px solid #a00;padding:.5em;background:#fee}"
      << "svg{max-width:100%;height:auto}@media print{.fig{page-break-inside:avoid}}</style></head><body>\n";
    const std::string caution = "<p class=\"caution\"><strong>Caution.</strong> " + esc(kCaution) + "</p>\n";
    h << caution;
    h << "<h1>Virtual population: " << p.size << " patients, model " << esc(rs.front().model.id) << "</h1>\n";
    h << "<p>Output " << esc(o.name) << " (" << esc(o.unit_text) << "); seed " << p.seed << "; tolerance " << tolerance_text(p.tol)
      << "; " << esc(p.date) << ". Every regimen runs on the same patients.</p>\n";
    h << "<h2>Who</h2>\n";
    if (p.cohort != nullptr) {
        h << "<p>Cohort <b>" << esc(p.cohort->id) << "</b>: " << esc(p.cohort->about) << "</p>\n";
        if (!p.cohort->covariates.empty()) {
            h << "<table><tr><th>covariate</th><th>distribution</th><th>centre</th><th>spread</th><th>range</th></tr>\n";
            for (const auto& c : p.cohort->covariates) {
                const char* d = c.dist == population::Dist::Normal ? "normal" : c.dist == population::Dist::LogNormal ? "log-normal" : "uniform";
                const std::string u = " " + c.unit_text;
                h << "<tr><td>" << esc(c.name) << "</td><td>" << d << "</td><td>"
                  << (c.dist == population::Dist::Uniform ? "" : num(c.mean / c.unit_factor) + esc(u)) << "</td><td>"
                  << (c.dist == population::Dist::Normal ? "sd " + num(c.sd / c.unit_factor) + esc(u)
                      : c.dist == population::Dist::LogNormal ? "σ(log) " + num(c.sd) : "")
                  << "</td><td>" << num(c.low / c.unit_factor) << " – " << num(c.high / c.unit_factor) << esc(u) << "</td></tr>\n";
            }
            h << "</table>\n";
        } else {
            h << "<p>Rows resampled from " << esc(p.cohort->table_path) << " (" << p.cohort->rows.size() << " rows).</p>\n";
        }
    } else {
        h << "<p>No cohort: every patient has the regimen's covariates; only the parameters vary.</p>\n";
    }
    h << "<p>Between-subject variability: " << esc(variability_line(rs.front().model)) << ".</p>\n";
    const Node doc = population_model(p);
    const Node& regs = doc.at("regimens");
    {
        const Node& s0 = regs.items.front().at("subjects");
        h << "<h2>Regimens</h2>\n<table><tr><th></th><th>regimen</th><th>about</th><th>patients " << esc(s0.at("ok").label)
          << "</th><th>" << esc(s0.at("no_steady_state").label) << "</th><th>" << esc(s0.at("failed").label) << "</th></tr>\n";
    }
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const Node& s = regs.items[r].at("subjects");
        h << "<tr><td>" << letter_for(r) << "</td><td style=\"text-align:left\">" << esc(rs[r].id) << "</td><td style=\"text-align:left\">"
          << esc(rs[r].about) << "</td><td>" << shown(s.at("ok")) << "</td><td>" << shown(s.at("no_steady_state")) << "</td><td>"
          << shown(s.at("failed")) << "</td></tr>\n";
    }
    h << "</table>\n";
    const Node& t0 = regs.items.front().at("targets");
    if (!t0.items.empty()) {
        h << "<h2>" << esc(t0.label) << "</h2>\n<p>Share of all patients (those without a steady state or "
             "with a failed run count as not attaining), with the Wilson score 95 % interval.</p>\n<table><tr><th>target</th>";
        for (std::size_t r = 0; r < rs.size(); ++r) h << "<th>" << letter_for(r) << "</th>";
        h << "</tr>\n";
        for (std::size_t k = 0; k < t0.items.size(); ++k) {
            h << "<tr><td>" << esc(shown(t0.items[k].at("what"))) << "</td>";
            for (std::size_t r = 0; r < rs.size(); ++r) {
                const Node& a = regs.items[r].at("targets").items[k];
                h << "<td>" << shown(a.at("pta")) << "<br><small>" << shown(a.at("ci95/0")) << " – " << shown(a.at("ci95/1"))
                  << "</small></td>";
            }
            h << "</tr>\n";
        }
        h << "</table>\n";
    }
    h << "<h2>" << esc(regs.items.front().at("percentiles").label) << "</h2>\n";
    for (std::size_t r = 0; r < rs.size(); ++r) {
        h << "<table><tr><th>" << letter_for(r) << " " << esc(rs[r].id) << "</th>";
        for (double q : population::kPercentiles) h << "<th>" << num(q) << " %</th>";
        h << "<th>n</th></tr>\n";
        for (const Node& f : regs.items[r].at("percentiles").items) {
            if (f.at("n").value.number == 0) continue;
            h << "<tr><td>" << esc(label_with_unit(f.label, f.unit)) << "</td>";
            for (std::size_t j = 1; j < f.items.size(); ++j) h << "<td>" << shown(f.items[j]) << "</td>";
            h << "<td>" << shown(f.at("n")) << "</td></tr>\n";
        }
        h << "</table>\n";
    }
    const Node& c0 = regs.items.front().at("pta_curve");
    if (!c0.items.empty()) {
        h << "<h2>" << esc(c0.label) << "</h2>\n<table><tr><th>threshold (" << esc(o.unit_text) << ")</th>";
        for (std::size_t r = 0; r < rs.size(); ++r) h << "<th>" << letter_for(r) << "</th>";
        h << "</tr>\n";
        for (std::size_t j = 0; j < c0.items.size(); ++j) {
            h << "<tr><td>" << shown(c0.items[j].at("threshold")) << "</td>";
            for (std::size_t r = 0; r < rs.size(); ++r)
                h << "<td>" << shown(regs.items[r].at("pta_curve").items[j].at("pta")) << "</td>";
            h << "</tr>\n";
        }
        h << "</table>\n";
    }
    if (p.thresholds != nullptr) {
        h << "<p>" << esc(regs.items.front().at("expected_attainment").label) << " " << esc(p.thresholds->path)
          << " (cumulative fraction of response):";
        for (std::size_t r = 0; r < rs.size(); ++r)
            h << " " << letter_for(r) << " " << shown(regs.items[r].at("expected_attainment")) << ";";
        h << "</p>\n";
    }
    if (plot::gnuplot_available()) {
        h << "<h2>Figures</h2>\n";
        for (std::size_t r = 0; r < rs.size(); ++r) h << "<div class=\"fig\">" << plot::render_svg(band_figure(p, r)) << "</div>\n";
        if (!c0.items.empty()) h << "<div class=\"fig\">" << plot::render_svg(pta_figure(p)) << "</div>\n";
    } else {
        h << "<p>(Figures need gnuplot, which was not found.)</p>\n";
    }
    h << caution << "</body></html>\n";
    return h.str();
}

}  // namespace plateau::report
