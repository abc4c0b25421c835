#include <algorithm>
#include <cmath>
#include <utility>

#include "dose/print.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"

namespace plateau::dose {

namespace {

constexpr std::size_t kWidth = 100;

// Greedy word wrap: the first line starts with `first`, the others with `indent`.
void wrap(std::ostream& out, const std::string& text, const std::string& first, const std::string& indent) {
    std::string line = first;
    bool fresh = true;
    std::size_t pos = 0;
    while (pos < text.size()) {
        const std::size_t sp = text.find(' ', pos);
        const std::string word = text.substr(pos, sp == std::string::npos ? std::string::npos : sp - pos);
        pos = sp == std::string::npos ? text.size() : sp + 1;
        if (!fresh && report::display_width(line) + 1 + report::display_width(word) > kWidth) {
            out << line << '\n';
            line = indent;
            fresh = true;
        }
        line += (fresh ? "" : " ") + word;
        fresh = false;
    }
    out << line << '\n';
}

void caution(std::ostream& out) {
    wrap(out, std::string("CAUTION: ") + report::kCaution, "", "         ");
}

const model::Output& output_of(const regimen::Regimen& r) {
    const int i = r.targets.output.empty() ? 0 : std::max(0, r.model.output_index(r.targets.output));
    return r.model.outputs[static_cast<std::size_t>(i)];
}

std::string verdict_cell(const Found& f) {
    if (f.outcome != Outcome::FallsShort) return outcome_name(f.outcome);
    std::string s = "falls short:";
    for (const auto& v : f.verdicts)
        if (v.met != true) s += " " + v.kind;
    return s;
}

// The figures shown: one column per kind of figure the goals use.
std::vector<Figure> shown(const std::vector<Goal>& goals) {
    std::vector<Figure> fs;
    for (Figure k : {Figure::Lowest, Figure::Peak, Figure::AboveShare, Figure::Auc24})
        if (std::any_of(goals.begin(), goals.end(), [&](const Goal& g) { return g.figure == k; })) fs.push_back(k);
    return fs;
}

std::string figure_cell(Figure k, const Found& f, const model::Output& o) {
    if (!f.at || !f.at->exposure.steady || !f.at->exposure.steady->found) return "—";
    const metrics::Steady& s = *f.at->exposure.steady;
    switch (k) {
        case Figure::Lowest:
            return report::num(report::in_output_unit(o, s.minimum.value));
        case Figure::Peak:
            return report::num(report::in_output_unit(o, s.peak.value));
        case Figure::AboveShare:
            return report::percent(s.above_hours / s.interval);
        case Figure::Auc24:
            return report::num(report::in_output_unit(o, s.auc24));
    }
    return "";
}

void table(std::ostream& out, const std::vector<std::vector<std::string>>& rows) {
    std::vector<std::size_t> w;
    for (const auto& r : rows)
        for (std::size_t i = 0; i < r.size(); ++i) {
            if (w.size() <= i) w.resize(i + 1, 0);
            w[i] = std::max(w[i], report::display_width(r[i]));
        }
    for (const auto& r : rows) {
        std::string line = "  ";
        for (std::size_t i = 0; i < r.size(); ++i) line += i + 1 < r.size() ? report::pad_right(r[i], w[i] + 2) : r[i];
        while (!line.empty() && line.back() == ' ') line.pop_back();
        out << line << '\n';
    }
}

}  // namespace

std::string duration_text(double h) {
    return h > 0.0 ? report::num(h) + " h" : "bolus";
}

std::string delivery_text(const Template& t, double over) {
    if (over > 0.0) return " as infusions over " + duration_text(over);
    const std::string& route = t.regimen.doses[t.series].route;
    return route == "iv" ? " as a bolus" : " by route '" + route + "'";
}

namespace {

// Caution, what was searched (`aim`: for what each candidate's dose is the smallest), how doses are rounded.
void heading(std::ostream& out, const Report& r, std::size_t candidates, const std::string& aim,
             const std::string& rounding) {
    caution(out);
    out << '\n';
    const regimen::Regimen& t = r.tmpl->regimen;
    const model::Output& o = output_of(t);
    const regimen::DoseSpec& spec = t.doses[r.tmpl->series];
    wrap(out,
         "Dose search — template " + t.id + " (" + t.path + "), model '" + t.model.id + "', output '" + o.name + "' (" +
             o.unit_text + ")",
         "", "  ");
    std::vector<std::string> labels;
    for (const auto& g : r.goals) labels.push_back(g.label);
    std::string goals;
    for (std::size_t i = 0; i < labels.size(); ++i) goals += (i ? "; " : "") + labels[i];
    wrap(out, goals + " (at steady state)", "Targets   ", "          ");
    if (r.population)
        wrap(out,
             std::to_string(r.population->size) + " virtual patients, " + r.who + ", seed " +
                 std::to_string(r.population->seed) + "; the same patients at every dose",
             "Patients  ", "          ");
    wrap(out,
         "the maintenance series (" + report::num(spec.amount) + " mg every " + duration_text(spec.every) +
             delivery_text(*r.tmpl, spec.over) +
             " in the template): " + std::to_string(candidates) + " candidate" + (candidates == 1 ? "" : "s") + "; " +
             aim,
         "Varied    ", "          ");
    if (r.request.round_step > 0)
        wrap(out, "doses up to a multiple of " + report::num(r.request.round_step) + " mg" + rounding, "Rounded   ",
             "          ");
    out << '\n';
}

// "every 8 h, over 4 h: " or "every 12 h, bolus: ", the start of a candidate's note.
std::string note_prefix(const Shape& shape) {
    return "every " + duration_text(shape.tau) + ", " +
           (shape.over > 0 ? "over " + duration_text(shape.over) : "bolus") + ": ";
}

// The notes (the candidates' own, then the report's), the trailer and the closing caution.
void finish(std::ostream& out, const Report& r, std::vector<std::string> notes) {
    notes.insert(notes.end(), r.notes.begin(), r.notes.end());
    if (!notes.empty()) {
        out << "\nNotes\n";
        for (const auto& n : notes) wrap(out, n, "  - ", "    ");
    }
    out << '\n';
    if (!r.trailer.empty()) out << r.trailer;
    caution(out);
}

}  // namespace

void write_text(std::ostream& out, const Report& r, const std::vector<Found>& fs) {
    heading(out, r, fs.size(), "the smallest dose meeting every target, to 1e-12 relative",
            " (to the nearest for an exact target or a compromise); every figure is at the rounded dose");
    const regimen::Regimen& t = r.tmpl->regimen;
    const model::Output& o = output_of(t);
    const std::vector<Figure> figs = shown(r.goals);
    std::vector<std::vector<std::string>> rows;
    std::vector<std::string> head = {"", "every", "over", "dose (mg)"};
    if (r.request.round_step > 0) head.push_back("solved (mg)");
    head.push_back("mg/day");
    if (r.request.loading) head.push_back("loading (mg)");
    for (Figure k : figs) head.push_back(figure_name(k));
    head.push_back("set by");
    head.push_back("verdict");
    rows.push_back(head);
    for (std::size_t i = 0; i < fs.size(); ++i) {
        const Found& f = fs[i];
        std::vector<std::string> row = {static_cast<int>(i) == r.recommended ? "*" : "", duration_text(f.shape.tau),
                                        duration_text(f.shape.over), report::num(f.dose, 6)};
        if (r.request.round_step > 0) row.push_back(report::num(f.exact, 6));
        row.push_back(report::num(f.daily(), 6));
        if (r.request.loading)
            row.push_back(f.loading && f.loading->problem.empty() ? report::num(f.loading->dose, 6) : "—");
        for (Figure k : figs) row.push_back(figure_cell(k, f, o));
        row.push_back(f.deciding.empty() ? "—" : f.deciding);
        row.push_back(verdict_cell(f));
        rows.push_back(row);
    }
    table(out, rows);
    out << '\n';
    std::vector<std::string> parts;
    for (Figure k : figs) {
        if (k == Figure::Lowest) parts.push_back("ss lowest (the lowest value)");
        if (k == Figure::Peak) parts.push_back("ss peak");
        if (k == Figure::AboveShare) parts.push_back("above (share of each interval above the threshold)");
        if (k == Figure::Auc24) parts.push_back("AUC24 (" + report::auc_unit(o.unit_text) + ")");
    }
    std::string units = "Figures at steady state, at the dose shown:";
    for (std::size_t i = 0; i < parts.size(); ++i) units += (i ? ", " : " ") + parts[i];
    if (std::find(figs.begin(), figs.end(), Figure::Lowest) != figs.end() ||
        std::find(figs.begin(), figs.end(), Figure::Peak) != figs.end())
        units += "; concentrations in " + o.unit_text;
    wrap(out, units + ".", "", "");
    if (r.recommended >= 0) {
        const Found& f = fs[static_cast<std::size_t>(r.recommended)];
        wrap(out,
             "* recommended (" + rule(r.goals) + "): " + report::num(f.dose, 6) + " mg every " +
                 duration_text(f.shape.tau) +
                 delivery_text(*r.tmpl, f.shape.over) + ", " +
                 report::num(f.daily(), 6) + " mg a day.",
             "", "  ");
        if (f.loading && f.loading->problem.empty())
            wrap(out,
                 "  Loading dose: " + report::num(f.loading->dose, 6) + " mg (solved " +
                     report::num(f.loading->exact, 6) + " mg) as the first dose; first-interval " + f.loading->figure +
                     " " +
                     report::num(f.loading->figure == "trough" ? report::in_output_unit(o, f.loading->first_value)
                                                               : f.loading->first_value) +
                     " against " +
                     report::num(f.loading->figure == "trough" ? report::in_output_unit(o, f.loading->steady_value)
                                                               : f.loading->steady_value) +
                     " at steady state" + (f.loading->figure == "trough" ? " (" + o.unit_text + ")." : "."),
                 "", "    ");
    } else {
        wrap(out, "No candidate meets every target: nothing is recommended.", "", "");
    }
    std::vector<std::string> notes;
    for (const Found& f : fs) {
        const std::string who = note_prefix(f.shape);
        if (!f.message.empty()) notes.push_back(who + f.message + ".");
        if (f.loading && !f.loading->problem.empty())
            notes.push_back(who + "no loading dose: " + f.loading->problem + ".");
    }
    finish(out, r, std::move(notes));
}

void write_text(std::ostream& out, const Report& r, const std::vector<PopulationDose>& ds) {
    const std::string share = report::percent(r.population->share);
    const bool rounded = r.request.round_step > 0;
    heading(out, r, ds.size(),
            "the smallest dose whose PTA (every target met at steady state) reaches " + share +
                ": each patient's own smallest dose solved to 1e-12 relative, the PTA at a dose counted from them",
            "; the PTA is counted at the rounded dose and one step lower");
    std::vector<std::string> head = {"", "every", "over", "dose (mg)"};
    if (rounded) head.push_back("solved (mg)");
    for (const char* h : {"mg/day", "PTA", "95 % interval"}) head.push_back(h);
    if (rounded) head.push_back("step lower");
    for (const char* h : {"median own (mg)", "cannot", "verdict"}) head.push_back(h);
    std::vector<std::vector<std::string>> rows = {head};
    for (std::size_t i = 0; i < ds.size(); ++i) {
        const PopulationDose& d = ds[i];
        std::vector<std::string> row = {static_cast<int>(i) == r.recommended ? "*" : "", duration_text(d.shape.tau),
                                        duration_text(d.shape.over), d.found ? report::num(d.at.dose, 6) : "—"};
        if (rounded) row.push_back(d.found ? report::num(d.exact, 6) : "—");
        row.push_back(d.found ? report::num(d.daily(), 6) : "—");
        row.push_back(report::percent(d.at.pta));
        row.push_back(report::percent(d.at.ci95.first) + " – " + report::percent(d.at.ci95.second));
        if (rounded) row.push_back(d.step_down ? report::percent(d.step_down->pta) : "—");
        row.push_back(std::isnan(d.median) ? "—" : report::num(d.median, 6));
        row.push_back(std::to_string(d.cannot()));
        row.push_back(d.found ? "reaches " + share : "out of reach");
        rows.push_back(row);
    }
    table(out, rows);
    out << '\n';
    wrap(out,
         "PTA: the share of all " + std::to_string(r.population->size) +
             " patients meeting every target at the dose shown, with the Wilson score 95 % interval" +
             (rounded ? "; step lower: the PTA one rounding step below" : "") +
             "; median own: the median of the patients' own smallest doses; cannot: patients meeting the targets at "
             "no dose, or without a steady state (counted as not attaining).",
         "", "");
    if (r.recommended >= 0) {
        const PopulationDose& d = ds[static_cast<std::size_t>(r.recommended)];
        wrap(out,
             "* recommended (" + population_rule(r.population->share) + "): " + report::num(d.at.dose, 6) +
                 " mg every " + duration_text(d.shape.tau) +
                 delivery_text(*r.tmpl, d.shape.over) + ", " +
                 report::num(d.daily(), 6) + " mg a day: PTA " + report::percent(d.at.pta) + " (" +
                 std::to_string(d.at.attained) + " of " + std::to_string(d.at.total) + ").",
             "", "  ");
    } else {
        wrap(out, "No candidate reaches a PTA of " + share + ": nothing is recommended.", "", "");
    }
    std::vector<std::string> notes;
    for (const PopulationDose& d : ds) {
        const std::string who = note_prefix(d.shape);
        if (!d.found)
            notes.push_back(who + "no dose reaches a PTA of " + share + "; the most is " + report::percent(d.at.pta) +
                            " (" + std::to_string(d.at.attained) + " of " + std::to_string(d.at.total) + ") at " +
                            report::num(d.at.dose, 6) + " mg.");
        if (d.cannot() == 0) continue;
        std::vector<std::string> parts;
        if (d.no_dose) parts.push_back(std::to_string(d.no_dose) + " meet every target at no dose");
        if (d.no_steady_state) parts.push_back(std::to_string(d.no_steady_state) + " have no steady state");
        if (d.not_monotone)
            parts.push_back(std::to_string(d.not_monotone) +
                            " have a figure that falls while the dose rises (not monotone: not trusted)");
        if (d.failed) parts.push_back(std::to_string(d.failed) + " failed numerically");
        std::string list;
        for (std::size_t i = 0; i < parts.size(); ++i) list += (i ? "; " : "") + parts[i];
        notes.push_back(who + std::to_string(d.cannot()) + " of " + std::to_string(d.at.total) + " patients: " + list +
                        "; they count as not attaining.");
    }
    finish(out, r, std::move(notes));
}

}  // namespace plateau::dose
