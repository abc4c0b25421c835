// The HTML report of an individual fit and its figure: the fitted curve with its 90 % band (Laplace posterior
// draws), the population curve of the same patient, the measured levels. Self-contained, printable; the
// caution at the top and the bottom.
#include <cmath>
#include <sstream>

#include "core/escape.hpp"
#include "fit/report.hpp"
#include "fit/residual.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"

namespace plateau::fit {

namespace {

std::string esc(const std::string& s) { return xml_escape(s); }

const model::Output& output_of(const Report& r) {
    return r.regimen->model.outputs[static_cast<std::size_t>(r.problem->output)];
}

}  // namespace

plot::Figure figure(const Report& rep) {
    const model::Output& o = output_of(rep);
    const Band& b = *rep.band;
    plot::Figure f;
    f.title = rep.regimen->id + ": individual fit, 90 % band of " + std::to_string(b.draws - b.failed) + " posterior draws";
    f.ylabel = o.name + " (" + o.unit_text + ")";
    auto curve = [&](const std::string& label, const std::vector<double>& y) {
        plot::Curve c;
        c.label = label;
        for (std::size_t i = 0; i < b.times.size(); ++i) {
            c.t.push_back(b.times[i]);
            c.y.push_back(report::in_output_unit(o, y[i]));
        }
        return c;
    };
    f.curves.push_back(curve("fitted", b.fitted));
    f.curves.push_back(curve("5 %", b.low));
    f.curves.push_back(curve("95 %", b.high));
    f.curves.push_back(curve("population", b.population));
    plot::Curve measured;
    measured.label = "measured";
    measured.points = true;
    for (const auto& l : rep.levels->levels)
        if (!l.below) {
            measured.t.push_back(l.t);
            measured.y.push_back(report::in_output_unit(o, l.value));
        }
    f.curves.push_back(measured);
    plot::Curve limits;
    limits.label = "quantification limit (level below it)";
    limits.points = true;
    for (const auto& l : rep.levels->levels)
        if (l.below) {
            limits.t.push_back(l.t);
            limits.y.push_back(report::in_output_unit(o, l.value));
        }
    if (!limits.t.empty()) f.curves.push_back(limits);
    return f;
}

std::string html(const Report& rep) {
    const regimen::Regimen& r = *rep.regimen;
    const model::Model& m = r.model;
    const Result& res = *rep.result;
    const model::Output& o = output_of(rep);
    std::ostringstream h;
    h << "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Individual fit: " << esc(r.id)
      << "</title>\n<style>body{font-family:sans-serif;max-width:60em;margin:1em auto;}"
      << "table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:.2em .5em;text-align:right}"
      << "th:first-child,td:first-child{text-align:left}.caution{border:2px solid #a00;padding:.5em;background:#fee}"
      << "svg{max-width:100%;height:auto}@media print{.fig{page-break-inside:avoid}}</style></head><body>\n";
    const std::string caution = "<p class=\"caution\"><strong>Caution.</strong> " + esc(report::kCaution) + "</p>\n";
    h << caution << "<h1>Individual fit: " << esc(r.id) << "</h1>\n";
    h << "<p>Model " << esc(m.id) << ", output " << esc(o.name) << " (" << esc(o.unit_text) << "); levels from "
      << esc(rep.levels->path) << "; residual error " << esc(residual_text(m)) << "; tolerance " << report::num(rep.tol, 3)
      << "; " << esc(rep.date) << ". Maximum a posteriori estimate of the random effects; covariates fixed.</p>\n";
    h << "<h2>Parameters</h2>\n<table><tr><th>parameter</th><th>estimate</th><th>population</th><th>change</th>"
         "<th>approx. SE</th></tr>\n";
    for (const Estimate& e : res.estimates) {
        const model::Parameter& p = m.parameters[static_cast<std::size_t>(e.index)];
        const double change = e.population != 0.0 ? e.value / e.population - 1.0 : NAN;
        h << "<tr><td>" << esc(p.name) << "</td><td>" << esc(parameter_text(p, e.value)) << "</td><td>"
          << esc(parameter_text(p, e.population)) << "</td><td>"
          << (std::isfinite(change) ? report::num(100.0 * change, 3) + " %" : "—") << "</td><td>"
          << esc(parameter_text(p, e.se)) << "</td></tr>\n";
    }
    h << "</table>\n<p>Population: the model's typical values for this patient's covariates. Standard errors from the "
         "curvature of the objective at the optimum (Laplace approximation).</p>\n";
    h << "<h2>Levels</h2>\n<table><tr><th>time (h)</th><th>measured</th><th>predicted</th><th>residual</th>"
         "<th>residual / σ</th></tr>\n";
    for (std::size_t i = 0; i < rep.levels->levels.size(); ++i) {
        const input::Level& l = rep.levels->levels[i];
        const double f = res.pred[i];
        h << "<tr><td>" << report::num(l.t, 6) << "</td><td>" << (l.below ? "&lt; " : "")
          << report::num(report::in_output_unit(o, l.value), 4) << "</td><td>" << report::num(report::in_output_unit(o, f), 4)
          << "</td><td>" << (l.below ? "censored" : report::num(report::in_output_unit(o, l.value - f), 3)) << "</td><td>"
          << (l.below ? "" : report::num((l.value - f) / res.sd[i], 3)) << "</td></tr>\n";
    }
    h << "</table>\n<p>Objective (−2 log posterior, constants left out): " << report::num(res.objective, 10) << "; "
      << res.iterations << " Levenberg–Marquardt iterations, " << (res.converged ? "converged" : "not converged") << ", "
      << res.starts.size() << " starts.</p>\n";
    for (const auto& n : res.notes) h << "<p>Note: " << esc(n) << "</p>\n";
    if (rep.band != nullptr) h << "<h2>Fitted curve</h2>\n<div class=\"fig\">" << plot::render_svg(figure(rep)) << "</div>\n";
    h << caution << "</body></html>\n";
    return h.str();
}

}  // namespace plateau::fit
