#include <algorithm>
#include <cmath>
#include <cstdio>

#include "dose/print.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/json.hpp"

namespace plateau::dose {

namespace {

// The JSON writers' own string and number forms, so every JSON file escapes and rounds alike.
std::string q(std::string_view s) { return report::json_string(s); }
std::string n(double v) { return report::json_number(v); }

const char* side_name(Side s) {
    switch (s) {
        case Side::Lower:
            return "at least";
        case Side::Upper:
            return "at most";
        case Side::Exact:
            return "exactly";
    }
    return "";
}

const model::Output& output_of(const regimen::Regimen& t) {
    const int oi = t.targets.output.empty() ? 0 : std::max(0, t.model.output_index(t.targets.output));
    return t.model.outputs[static_cast<std::size_t>(oi)];
}

// Everything before the candidates: template, model, output, units, goals, rounding, rule, recommended.
void head(std::ostream& out, const Report& r, const std::string& rule_text) {
    const regimen::Regimen& t = r.tmpl->regimen;
    const model::Output& o = output_of(t);
    out << "{\n  \"template\": " << q(t.path) << ",\n  \"model\": " << q(t.model.id) << ",\n  \"output\": " << q(o.name)
        << ",\n  \"unit\": " << q(o.unit_text) << ",\n  \"auc_unit\": " << q(report::auc_unit(o.unit_text))
        << ",\n  \"tolerance\": " << n(r.tolerance) << ",\n  \"goals\": [";
    for (std::size_t i = 0; i < r.goals.size(); ++i) {
        const Goal& g = r.goals[i];
        out << (i ? ",\n" : "\n") << "    {\"name\": " << q(g.name) << ", \"what\": " << q(g.label)
            << ", \"figure\": " << q(figure_name(g.figure)) << ", \"side\": " << q(side_name(g.side)) << "}";
    }
    out << "\n  ],\n  \"round_mg\": " << (r.request.round_step > 0 ? n(r.request.round_step) : "null")
        << ",\n  \"rule\": " << q(rule_text)
        << ",\n  \"recommended\": " << (r.recommended >= 0 ? std::to_string(r.recommended) : "null");
}

}  // namespace

void write_json(std::ostream& out, const Report& r, const std::vector<Found>& fs) {
    const model::Output& o = output_of(r.tmpl->regimen);
    auto conc = [&](double v) { return n(report::in_output_unit(o, v)); };
    head(out, r, rule(r.goals));
    out << ",\n  \"candidates\": [";
    for (std::size_t i = 0; i < fs.size(); ++i) {
        const Found& f = fs[i];
        out << (i ? ",\n" : "\n") << "    {\n      \"interval\": " << n(f.shape.tau)
            << ",\n      \"over\": " << n(f.shape.over) << ",\n      \"dose_mg\": " << n(f.dose)
            << ",\n      \"solved_mg\": " << n(f.exact) << ",\n      \"daily_mg\": " << n(f.daily())
            << ",\n      \"outcome\": " << q(outcome_name(f.outcome)) << ",\n      \"set_by\": " << q(f.deciding)
            << ",\n      \"message\": " << q(f.message)
            << ",\n      \"recommended\": " << (static_cast<int>(i) == r.recommended ? "true" : "false");
        const metrics::Steady* s =
            f.at && f.at->exposure.steady && f.at->exposure.steady->found ? &*f.at->exposure.steady : nullptr;
        out << ",\n      \"steady_state\": ";
        if (s)
            out << "{\"peak\": " << conc(s->peak.value) << ", \"trough\": " << conc(s->trough)
                << ", \"minimum\": " << conc(s->minimum.value) << ", \"average\": " << conc(s->average)
                << ", \"auc24\": " << conc(s->auc24) << ", \"above_hours\": " << n(s->above_hours)
                << ", \"above_fraction\": " << n(s->above_hours / s->interval)
                << ", \"window_hours\": " << n(s->window_hours) << "}";
        else
            out << "null";
        out << ",\n      \"targets\": [";
        for (std::size_t k = 0; k < f.verdicts.size(); ++k) {
            const auto& v = f.verdicts[k];
            out << (k ? ", " : "") << "{\"kind\": " << q(v.kind) << ", \"what\": " << q(v.what)
                << ", \"met\": " << (v.met ? (*v.met ? "true" : "false") : "null") << "}";
        }
        out << "],\n      \"loading\": ";
        if (f.loading && f.loading->problem.empty()) {
            const bool trough = f.loading->figure == "trough";
            out << "{\"dose_mg\": " << n(f.loading->dose) << ", \"solved_mg\": " << n(f.loading->exact)
                << ", \"figure\": " << q(trough ? "trough" : "above_hours")
                << ", \"first_interval\": " << (trough ? conc(f.loading->first_value) : n(f.loading->first_value))
                << ", \"steady_state\": " << (trough ? conc(f.loading->steady_value) : n(f.loading->steady_value))
                << "}";
        } else if (f.loading) {
            out << "{\"problem\": " << q(f.loading->problem) << "}";
        } else {
            out << "null";
        }
        out << "\n    }";
    }
    out << "\n  ],\n  \"caution\": " << q(report::kCaution) << "\n}\n";
}

void write_json(std::ostream& out, const Report& r, const std::vector<PopulationDose>& ds) {
    head(out, r, population_rule(r.population->share));
    const PopulationRequest& p = *r.population;
    auto point = [&](const PtaPoint& x) {
        return "{\"dose_mg\": " + n(x.dose) + ", \"attained\": " + std::to_string(x.attained) +
               ", \"total\": " + std::to_string(x.total) + ", \"pta\": " + n(x.pta) + ", \"ci95\": [" +
               n(x.ci95.first) + ", " + n(x.ci95.second) + "]}";
    };
    out << ",\n  \"population\": {\"cohort\": " << (p.cohort ? q(p.cohort->path) : "null")
        << ", \"size\": " << p.size << ", \"seed\": " << p.seed << ", \"share\": " << n(p.share) << "}"
        << ",\n  \"candidates\": [";
    for (std::size_t i = 0; i < ds.size(); ++i) {
        const PopulationDose& d = ds[i];
        out << (i ? ",\n" : "\n") << "    {\n      \"interval\": " << n(d.shape.tau)
            << ",\n      \"over\": " << n(d.shape.over) << ",\n      \"found\": " << (d.found ? "true" : "false")
            << ",\n      \"dose_mg\": " << (d.found ? n(d.at.dose) : "null")
            << ",\n      \"solved_mg\": " << (d.found ? n(d.exact) : "null")
            << ",\n      \"daily_mg\": " << (d.found ? n(d.daily()) : "null")
            << ",\n      \"recommended\": " << (static_cast<int>(i) == r.recommended ? "true" : "false")
            << ",\n      \"pta\": " << point(d.at)
            << ",\n      \"step_lower\": " << (d.step_down ? point(*d.step_down) : "null")
            << ",\n      \"median_own_mg\": " << (std::isnan(d.median) ? "null" : n(d.median))
            << ",\n      \"cannot\": {\"no_dose\": " << d.no_dose << ", \"no_steady_state\": " << d.no_steady_state
            << ", \"not_monotone\": " << d.not_monotone << ", \"failed\": " << d.failed << "}\n    }";
    }
    out << "\n  ],\n  \"caution\": " << q(report::kCaution) << "\n}\n";
}

}  // namespace plateau::dose
