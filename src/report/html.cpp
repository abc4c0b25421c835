#include "report/html.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <optional>

#include "core/escape.hpp"
#include "plot/plot.hpp"
#include "plot/sample.hpp"
#include "report/caution.hpp"
#include "report/compare_model.hpp"
#include "report/cycle_words.hpp"
#include "report/format.hpp"
#include "report/run_model.hpp"

namespace plateau::report {

namespace {

std::string esc(std::string_view s) { return xml_escape(s); }

using verdict::output_of;

// Times a drawn curve must pass through exactly: every step boundary (doses, infusion ends, lags) and every
// interior peak or trough; the evenly spaced points fill in between.
std::vector<double> key_times(const traj::Trajectory& tr, int s, double a, double b) {
    std::vector<double> t = tr.boundaries(a, b);
    const std::vector<double> crit = tr.critical_points(s, a, b);
    t.insert(t.end(), crit.begin(), crit.end());
    std::sort(t.begin(), t.end());
    return t;
}

std::vector<double> dose_times(const Candidate& c) {
    std::vector<double> t;
    for (const auto& d : c.sim.doses) t.push_back(d.time);
    return t;
}

const char* kStyle = R"(
  :root { --ink: #1d232b; --muted: #5b6672; --rule: #cfd6dd; --band: #eef3f7; }
  body { font: 14px/1.45 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: var(--ink);
         max-width: 1000px; margin: 24px auto; padding: 0 16px; }
  h1 { font-size: 22px; margin: 8px 0 4px; } h2 { font-size: 17px; margin: 26px 0 8px; border-bottom: 1px solid var(--rule); }
  h3 { font-size: 15px; margin: 18px 0 6px; }
  .caution { border: 2px solid #b3261e; background: #fdf1f0; color: #5c1410; padding: 10px 14px; font-weight: bold;
             border-radius: 4px; }
  .meta { color: var(--muted); }
  table { border-collapse: collapse; margin: 6px 0 12px; font-variant-numeric: tabular-nums; }
  th, td { border-bottom: 1px solid var(--rule); padding: 3px 9px; text-align: right; vertical-align: top; }
  th:first-child, td:first-child, td.t, th.t { text-align: left; }
  td.meets, td.short, td.na { white-space: nowrap; }
  thead th { background: var(--band); }
  td.meets { color: #11612b; font-weight: bold; } td.short { color: #9b1c12; font-weight: bold; }
  figure { margin: 8px 0 16px; } figure svg { max-width: 100%; height: auto; }
  figcaption { color: var(--muted); font-size: 12.5px; }
  ul.plain li { margin: 2px 0; }
  .small { font-size: 12.5px; }
  @page { size: auto; margin: 14mm; }
  @media print {
    body { max-width: none; margin: 0; padding: 0; font-size: 11pt; }
    h2, h3, section.regimen > p { break-after: avoid; } figure, tr, .caution { break-inside: avoid; }
    thead { display: table-header-group; }
    section.regimen > h2 { break-before: auto; }
    table { width: 100%; }
  }
)";

void table_rows(std::ostream& out, const std::vector<Candidate>& cs) {
    out << "<table><thead><tr><th>Figure</th><th>Unit</th>";
    for (const auto& c : cs) out << "<th>" << esc(c.letter) << "</th>";
    out << "</tr></thead><tbody>\n";
    for (const auto& r : comparison_table(cs).rows) {
        out << "<tr><td>" << esc(r.label) << "</td><td class=\"t\">" << esc(r.unit) << "</td>";
        for (std::size_t i = 0; i < r.cells.size(); ++i) out << "<td>" << esc(shown(r, i)) << "</td>";
        out << "</tr>\n";
    }
    out << "</tbody></table>\n";
}

void figure(std::ostream& out, const plot::Figure& f, const std::string& caption, bool draw) {
    out << "<figure>";
    if (draw) out << plot::render_svg(f);
    else out << "<p class=\"meta\">(figure not drawn: gnuplot is not available)</p>";
    out << "<figcaption>" << esc(caption) << "</figcaption></figure>\n";
}

plot::Figure interval_figure(const Candidate& c) {
    const auto& o = output_of(c);
    const int s = c.sim.output_series(c.exposure.output);
    plot::Figure f;
    const std::string noun = c.exposure.steady ? cycle_noun(*c.exposure.steady) : std::string("interval");
    f.title = c.letter + ": first " + noun + " and steady-state " + noun;
    f.xlabel = noun == "cycle" ? "time after the cycle's first dose (h)" : "time after the dose (h)";
    f.ylabel = o.name + " (" + o.unit_text + ")";
    const auto& e = c.exposure;
    // The first interval of the repeating series (after any loading dose), else the first dosing interval.
    std::optional<metrics::Interval> first;
    if (const auto& cy = c.schedule.cycle) {
        double from = e.end;
        for (const auto& d : c.schedule.doses)
            if (std::find(cy->entries.begin(), cy->entries.end(), d.entry) != cy->entries.end()) {
                from = d.time;
                break;
            }
        metrics::Interval iv;
        iv.start = from;
        iv.end = std::min(from + cy->period, e.end);
        if (iv.end > iv.start) first = iv;
    }
    if (!first && !e.intervals.empty()) first = e.intervals.front();
    if (first) {
        const auto& iv = *first;
        plot::Curve cv = plot::sample(c.sim.trajectory, s, iv.start, iv.end, 400, o.unit.factor,
                                      key_times(c.sim.trajectory, s, iv.start, iv.end), "first " + noun);
        for (double& t : cv.t) t -= iv.start;
        f.curves.push_back(std::move(cv));
    }
    if (e.steady && e.steady->found && !e.steady->period.empty()) {
        f.curves.push_back(plot::sample(e.steady->period, s, 0.0, e.steady->interval, 400, o.unit.factor,
                                        key_times(e.steady->period, s, 0.0, e.steady->interval), "steady state"));
    }
    if (e.above) {
        f.threshold = in_output_unit(o, *e.above);
        f.threshold_label = "threshold " + num(*f.threshold) + " " + o.unit_text;
    }
    if (e.window) f.band = std::make_pair(in_output_unit(o, e.window->first), in_output_unit(o, e.window->second));
    f.width = 900;
    f.height = 360;
    return f;
}

void inputs(std::ostream& out, const Candidate& c) {
    const auto& r = c.regimen;
    const auto& m = r.model;
    const std::vector<double> values = r.parameter_values();
    out << "<h3>Inputs</h3>\n<p class=\"small\">Regimen file <code>" << esc(r.path) << "</code>; model <code>"
        << esc(m.id) << "</code> — " << esc(m.summary) << "</p>\n";
    out << "<table class=\"small\"><thead><tr><th>Parameter</th><th>Value used</th><th>Model default</th><th class=\"t\">About</th></tr></thead><tbody>\n";
    for (std::size_t i = 0; i < m.parameters.size(); ++i) {
        const auto& p = m.parameters[i];
        const bool changed = values[i] != p.value;
        out << "<tr><td>" << esc(p.name) << "</td><td>" << (changed ? "<b>" : "") << num(values[i] / p.unit.factor, 6)
            << " " << esc(p.unit_text) << (changed ? "</b> (set by the regimen)" : "") << "</td><td>"
            << num(p.value / p.unit.factor, 6) << " " << esc(p.unit_text) << "</td><td>" << esc(p.about) << "</td></tr>\n";
    }
    out << "</tbody></table>\n";
    out << "<table class=\"small\"><thead><tr><th>Dose entry</th><th>Route</th><th>Amount</th><th class=\"t\">When</th>"
           "<th>Doses</th><th>Given over</th><th class=\"t\">As taken</th></tr></thead><tbody>\n";
    for (std::size_t i = 0; i < r.doses.size(); ++i) {
        const auto& d = r.doses[i];
        auto clock = [&](double t) { return r.start_clock ? " (" + day_clock(t, *r.start_clock) + ")" : std::string(); };
        std::string when;
        if (d.offsets.size() > 1 || (r.start_clock && d.every == 24.0 && d.count > 1)) {
            when = "daily at";
            for (std::size_t k = 0; k < d.offsets.size(); ++k)
                when += (k ? ", " : " ") + (r.start_clock ? day_clock(d.offsets[k], *r.start_clock).substr(6)
                                                          : "+" + num(d.offsets[k], 6) + " h");
            when += ", " + std::to_string(d.count) + " days";
        } else if (d.count > 1) {
            when = "from " + num(d.first_time(), 6) + " h" + clock(d.first_time()) + ", every " + num(d.every, 6) + " h";
        } else {
            when = "at " + num(d.first_time(), 6) + " h" + clock(d.first_time());
        }
        std::string changes;
        for (const auto& dev : d.deviations) {
            std::string one = "dose " + std::to_string(dev.number);
            switch (dev.kind) {
                case regimen::Deviation::Kind::Missed: one += " missed"; break;
                case regimen::Deviation::Kind::Late: one += " " + num(dev.delay, 6) + " h late"; break;
                case regimen::Deviation::Kind::Doubled: one += " doubled"; break;
            }
            changes += (changes.empty() ? "" : "; ") + one;
        }
        out << "<tr><td>" << i + 1 << "</td><td>" << esc(d.route) << "</td><td>" << num(d.amount, 6) << " mg</td><td>"
            << esc(when) << "</td><td>" << d.doses() << "</td><td>"
            << (d.over > 0 ? num(d.over, 6) + " h" : "at once") << "</td><td>" << esc(changes.empty() ? "as prescribed" : changes)
            << "</td></tr>\n";
    }
    out << "</tbody></table>\n";
}

// The figures of one regimen as a two-column table (the terminal's exposure block, for the page), from the
// regimen's report model.
void figures_table(std::ostream& out, const Candidate& c, const Node& doc) {
    const auto& e = c.exposure;
    const std::string u = doc.at("unit").value.text, au = doc.at("auc_unit").value.text;
    auto num_of = [](const Node& n) { return n.value.number; };
    auto v = [&](const Node& n) { return num(num_of(n), 6) + " " + u; };
    auto t = [](double h) { return num(h, 6) + " h"; };
    std::vector<std::pair<std::string, std::string>> rows;
    for (const char* k : {"peak", "minimum"}) {
        const Node& g = doc.at(k);
        rows.push_back({g.label, v(g.at("value")) + " at " + t(num_of(g.at("time")))});
    }
    const Node& auc = doc.at("auc");
    rows.push_back({"AUC " + num(num_of(auc.at("from")), 6) + "–" + num(num_of(auc.at("to")), 6) + " h",
                    num(num_of(auc.at("value")), 6) + " " + au});
    for (const Node& w : doc.at("auc_windows").items)
        rows.push_back({"AUC " + num(num_of(w.at("from")), 6) + "–" + num(num_of(w.at("to")), 6) + " h",
                        num(num_of(w.at("value")), 6) + " " + au});
    if (const Node* above = doc.find("above")) {
        const std::string threshold = v(above->at("threshold"));
        rows.push_back({above->at("hours").label + " " + threshold,
                        shown(above->at("hours")) + " h (" + shown(above->at("fraction")) + " of the horizon)"});
        const Node& first = above->at("first_reached");
        rows.push_back({first.label + " " + threshold, first.value.present() ? "at " + t(num_of(first)) : shown(first)});
        rows.push_back({doc.at("crossings").label + " of the threshold", std::to_string(doc.at("crossings").items.size())});
    }
    if (const Node* window = doc.find("window")) {
        rows.push_back({window->at("hours").label + " the window",
                        shown(window->at("hours")) + " h (" + shown(window->at("fraction")) + ")"});
        rows.push_back({window->at("above_high_hours").label + " the window",
                        shown(window->at("above_high_hours")) + " h (" + shown(window->at("above_high_fraction")) + ")"});
    }
    if (const Node* ss = doc.find("steady_state")) {
        const auto& st = *e.steady;
        if (const Node* reason = ss->find("reason")) rows.push_back({ss->label, reason->value.text});
        if (st.found) {
            const std::string noun = cycle_noun(st);
            const std::string head = ss->label + ": ";
            auto lower = [](std::string l) {
                // "Peak" -> "peak", but "AUC per" stays.
                if (l.size() > 1 && std::isupper(static_cast<unsigned char>(l[0])) && std::islower(static_cast<unsigned char>(l[1])))
                    l[0] = static_cast<char>(std::tolower(static_cast<unsigned char>(l[0])));
                return l;
            };
            auto label = [&](const char* k) { return head + lower(ss->at(k).label); };
            rows.push_back({head + "pattern", cycle_description(st, c.regimen.model)});
            if (ss->at("constant").value.flag) {
                rows.push_back({head + "level", v(ss->at("peak")) + ", constant"});
            } else {
                rows.push_back({label("peak"), v(ss->at("peak")) + ", " + t(num_of(ss->at("peak_time"))) + " " +
                                                   after_cycle_start(st)});
                if (multi_dose_cycle(st)) {
                    rows.push_back({label("trough") + " (lowest before a dose)",
                                    v(ss->at("trough")) + ", before the dose at +" + t(num_of(ss->at("trough_time")))});
                    for (const Node& tr : ss->at("troughs").items)
                        rows.push_back({head + "before the dose at +" + t(num_of(tr.at("offset"))), v(tr.at("value"))});
                } else {
                    rows.push_back({label("trough"), v(ss->at("trough"))});
                }
                if (st.dips_below_trough())
                    rows.push_back({label("minimum"), v(ss->at("minimum")) + ", " + t(num_of(ss->at("minimum_time"))) +
                                                          " " + after_cycle_start(st)});
            }
            rows.push_back({label("average"), v(ss->at("average"))});
            rows.push_back({label("auc") + " " + noun + " / 24 h", num(num_of(ss->at("auc")), 6) + " / " +
                                                                      num(num_of(ss->at("auc24")), 6) + " " + au});
            if (ss->find("above_fraction"))
                rows.push_back({label("above_hours") + " the threshold", shown(ss->at("above_fraction")) + " of each " + noun});
            if (ss->find("window_fraction"))
                rows.push_back({label("window_hours"), shown(ss->at("window_fraction")) + " of each " + noun});
            rows.push_back({ss->at("accumulation").label, shown(ss->at("accumulation"))});
            auto from = [&](const char* k) {
                const Node& w = ss->at(k);
                return w.value.present() ? "from " + t(num_of(w)) : shown(w);
            };
            rows.push_back({"Within 10 % / 5 % of steady state", from("within_10pct") + " / " + from("within_5pct")});
        }
    }
    out << "<h3>Figures</h3>\n<table class=\"small\"><tbody>\n";
    for (const auto& [label, value] : rows)
        out << "<tr><td>" << esc(label) << "</td><td class=\"t\">" << esc(value) << "</td></tr>\n";
    out << "</tbody></table>\n";
}

void interval_table(std::ostream& out, const Node& doc) {
    const bool above = doc.find("above") != nullptr, window = doc.find("window") != nullptr;
    const Node& ivs = doc.at("intervals");
    out << "<h3>" << esc(ivs.label) << "</h3>\n<table class=\"small\"><thead><tr><th>#</th><th>Start (h)</th><th>End (h)</th>"
        << "<th>Peak (" << esc(doc.at("unit").value.text) << ")</th><th>at (h)</th><th>Trough</th><th>Minimum</th><th>AUC ("
        << esc(doc.at("auc_unit").value.text) << ")</th>";
    if (above) out << "<th>Above threshold (h)</th>";
    if (window) out << "<th>In window (h)</th>";
    out << "</tr></thead><tbody>\n";
    for (std::size_t i = 0; i < ivs.items.size(); ++i) {
        const Node& iv = ivs.items[i];
        out << "<tr><td>" << i + 1 << "</td>";
        for (const char* k : {"start", "end", "peak", "peak_time", "trough", "minimum", "auc"})
            out << "<td>" << shown(iv.at(k)) << "</td>";
        if (above) out << "<td>" << shown(iv.at("above_hours")) << "</td>";
        if (window) out << "<td>" << shown(iv.at("window_hours")) << "</td>";
        out << "</tr>\n";
    }
    out << "</tbody></table>\n";
}

}  // namespace

plot::Figure overlay_figure(const std::vector<Candidate>& cs) {
    plot::Figure f;
    if (cs.empty()) return f;
    const auto& o = output_of(cs.front());
    f.title = cs.size() > 1 ? "All regimens" : cs.front().regimen.id;
    f.ylabel = o.name + " (" + o.unit_text + ")";
    for (const auto& c : cs) {
        const int s = c.sim.output_series(c.exposure.output);
        const int n = static_cast<int>(std::clamp((c.exposure.end - c.exposure.start) * 12.0, 600.0, 4000.0));
        f.curves.push_back(plot::sample(c.sim.trajectory, s, c.exposure.start, c.exposure.end, n, o.unit.factor,
                                        key_times(c.sim.trajectory, s, c.exposure.start, c.exposure.end),
                                        c.letter + ": " + c.regimen.id));
        f.dose_marks.push_back(dose_times(c));
    }
    const auto& e = cs.front().exposure;
    if (e.above) {
        f.threshold = in_output_unit(o, *e.above);
        f.threshold_label = "threshold " + num(*f.threshold) + " " + o.unit_text;
    }
    if (e.window) f.band = std::make_pair(in_output_unit(o, e.window->first), in_output_unit(o, e.window->second));
    return f;
}

void write_html(std::ostream& out, const std::vector<Candidate>& cs, const HtmlOptions& opt) {
    const bool draw = opt.figures;
    const std::string title = cs.size() == 1 ? "plateau report: " + cs.front().regimen.id
                                             : "plateau comparison of " + std::to_string(cs.size()) + " regimens";
    out << "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n<title>" << esc(title)
        << "</title>\n<style>" << kStyle << "</style></head><body>\n";
    out << "<p class=\"caution\">CAUTION: " << esc(kCaution) << "</p>\n";
    out << "<h1>" << esc(title) << "</h1>\n";
    if (cs.empty()) {
        out << "</body></html>\n";
        return;
    }
    const auto& first = cs.front();
    const auto& o = output_of(first);
    const std::string tol = tolerance_text(opt.tolerance);
    const std::string models = models_line(cs);
    out << "<p class=\"meta\">" << esc(models.substr(0, 1) == "m" ? "M" + models.substr(1) : models) << " ("
        << esc(first.regimen.model.summary) << (models.rfind("models", 0) == 0 ? ", ..." : "") << "); output <b>" << esc(o.name) << "</b> in " << esc(o.unit_text) << "; integration tolerance " << tol
        << (opt.date.empty() ? "" : "; " + esc(opt.date))
        << ". Every figure comes from the exact step polynomials of a Taylor-series integration, not from a sampled grid.</p>\n";
    out << "<table><thead><tr><th>Letter</th><th class=\"t\">Regimen</th><th class=\"t\">Description</th>"
           "<th class=\"t\">Model</th></tr></thead><tbody>\n";
    for (const auto& c : cs)
        out << "<tr><td><b>" << esc(c.letter) << "</b></td><td class=\"t\">" << esc(c.regimen.id) << "</td><td class=\"t\">"
            << esc(c.regimen.about) << "</td><td class=\"t\">" << esc(c.regimen.model.id) << "</td></tr>\n";
    out << "</tbody></table>\n";

    out << (cs.size() > 1 ? "<h2>Figures side by side</h2>\n" : "<h2>Key figures</h2>\n");
    table_rows(out, cs);

    const auto checks = verdict::target_checks(cs);
    if (!checks.empty()) {
        out << "<h2>Targets</h2>\n<table><thead><tr><th>Target</th>";
        for (const auto& c : cs) out << "<th>" << esc(c.letter) << "</th>";
        out << "</tr></thead><tbody>\n";
        for (const auto& tc : checks) {
            out << "<tr><td class=\"t\">" << esc(tc.what) << "</td>";
            for (const auto& m : tc.met) {
                if (!m) out << "<td class=\"na\">not assessed</td>";
                else if (*m) out << "<td class=\"meets\">meets</td>";
                else out << "<td class=\"short\">falls short</td>";
            }
            out << "</tr>\n";
        }
        out << "</tbody></table>\n";
    }
    const auto sentences = verdict::summary_sentences(cs);
    if (!sentences.empty()) {
        out << "<h2>In plain words</h2>\n<ul class=\"plain\">\n";
        for (const auto& s : sentences) out << "<li>" << esc(s) << "</li>\n";
        out << "</ul>\n";
    }

    out << "<h2>Concentration over time</h2>\n";
    {
        std::string caption = cs.size() > 1 ? "All regimens over the horizon." : "The regimen over the horizon.";
        if (first.exposure.above) caption += " Dashed line: threshold.";
        if (first.exposure.window) caption += " Shaded band: window.";
        caption += cs.size() > 1 ? " Ticks below the axis: doses, one row per regimen in the order of the key."
                                 : " Ticks below the axis: doses.";
        figure(out, overlay_figure(cs), caption, draw);
    }

    for (const auto& c : cs) {
        out << "<section class=\"regimen\"><h2>" << esc(c.letter) << ": " << esc(c.regimen.id) << "</h2>\n<p>"
            << esc(c.regimen.about) << "</p>\n";
        figure(out, interval_figure(c),
               "The first interval of the repeating series (after any loading dose) and one interval at steady "
               "state, from the dose.",
               draw);
        const Node doc = run_model(c.regimen, c.sim, c.exposure, opt.tolerance);
        figures_table(out, c, doc);
        interval_table(out, doc);
        inputs(out, c);
        out << "</section>\n";
    }
    out << "<p class=\"caution\">CAUTION: " << esc(kCaution) << "</p>\n";
    out << "<p class=\"meta small\">Made by plateau.</p>\n</body></html>\n";
}

}  // namespace plateau::report
