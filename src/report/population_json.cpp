// JSON and CSV of a population run. JSON: every summary figure per regimen; CSV: one row per subject and regimen
// with the covariates, the random effects, every parameter and every figure, for R or Python.
#include <cmath>
#include <cstdio>

#include "report/caution.hpp"
#include "report/compare.hpp"
#include "report/format.hpp"
#include "report/json.hpp"
#include "report/population_report.hpp"

namespace plateau::report {

namespace {

const model::Output& output_of(const regimen::Regimen& r) {
    const int i = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    return r.model.outputs[static_cast<std::size_t>(std::max(0, i))];
}

double display(const model::Output& o, const std::string& unit, double v) {
    return unit == "conc" || unit == "auc" ? in_output_unit(o, v) : v;
}

const char* status_name(population::Status s) {
    switch (s) {
    case population::Status::Ok: return "ok";
    case population::Status::NoSteadyState: return "no_steady_state";
    case population::Status::Failed: return "failed";
    }
    return "?";
}

// "_mg_per_L" for "mg/L" (column names that R and pandas take as they are); "" for no unit.
std::string unit_suffix(const std::string& unit) {
    if (unit.empty()) return "";
    std::string s = "_";
    for (char ch : unit) {
        if (ch == '/') s += "_per_";
        else if (ch == '*' || ch == ' ' || ch == '^') s += '_';
        else if (ch == '%') s += "pct";
        else s += ch;
    }
    return s;
}

std::string csv_number(double v) {
    if (!std::isfinite(v)) return "";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.10g", v);
    return buf;
}

}  // namespace

void write_population_json(std::ostream& out, const PopulationRun& p) {
    const auto& rs = *p.regimens;
    const model::Output& o = output_of(rs.front());
    out << "{\n  \"population\": {\"size\": " << p.size << ", \"seed\": " << p.seed
        << ", \"model\": " << json_string(rs.front().model.id) << ", \"output\": " << json_string(o.name)
        << ", \"unit\": " << json_string(o.unit_text) << ", \"auc_unit\": " << json_string(auc_unit(o.unit_text))
        << ", \"tolerance\": " << json_number(p.tol) << ", \"cohort\": "
        << (p.cohort ? json_string(p.cohort->id) : std::string("null")) << ", \"cohort_file\": "
        << (p.cohort ? json_string(p.cohort->path) : std::string("null")) << "},\n  \"regimens\": [";
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const auto& s = p.summaries[r];
        out << (r ? "," : "") << "\n    {\"letter\": " << json_string(letter_for(r)) << ", \"regimen\": " << json_string(rs[r].id)
            << ", \"about\": " << json_string(rs[r].about) << ", \"file\": " << json_string(rs[r].path)
            << ",\n     \"subjects\": {\"total\": " << s.total << ", \"ok\": " << s.ok << ", \"no_steady_state\": "
            << s.no_steady_state << ", \"failed\": " << s.failed << "},\n     \"targets\": [";
        for (std::size_t k = 0; k < s.targets.size(); ++k) {
            const auto& a = s.targets[k];
            out << (k ? ", " : "") << "{\"kind\": " << json_string(a.kind) << ", \"what\": " << json_string(a.what)
                << ", \"attained\": " << a.attained << ", \"assessed\": " << a.assessed << ", \"pta\": " << json_number(a.pta)
                << ", \"ci95\": [" << json_number(a.ci95.first) << ", " << json_number(a.ci95.second) << "]}";
        }
        out << "],\n     \"percentiles\": {";
        for (std::size_t k = 0; k < s.spreads.size(); ++k) {
            const auto& q = s.spreads[k];
            out << (k ? ", " : "") << "\n       " << json_string(q.key) << ": {\"n\": " << q.n;
            for (std::size_t j = 0; j < q.values.size(); ++j)
                out << ", \"p" << static_cast<int>(population::kPercentiles[j]) << "\": " << json_number(display(o, q.unit, q.values[j]));
            out << "}";
        }
        out << "},\n     \"pta_curve\": [";
        for (std::size_t k = 0; k < s.curve.size(); ++k) {
            const auto& c = s.curve[k];
            out << (k ? ", " : "") << "{\"threshold\": " << json_number(in_output_unit(o, c.threshold))
                << ", \"attained\": " << c.attained << ", \"pta\": " << json_number(c.pta) << ", \"ci95\": ["
                << json_number(c.ci95.first) << ", " << json_number(c.ci95.second) << "]}";
        }
        out << "],\n     \"expected_attainment\": " << (s.expected ? json_number(*s.expected) : std::string("null")) << "}";
    }
    out << "\n  ],\n  \"caution\": " << json_string(kCaution) << "\n}\n";
}

void write_population_csv(std::ostream& out, const PopulationRun& p) {
    const auto& rs = *p.regimens;
    const auto& res = *p.result;
    const model::Model& m = rs.front().model;
    const model::Output& o = output_of(rs.front());
    out << "subject,regimen,status";
    for (std::size_t k = 0; k < res.covariate_names.size(); ++k)
        out << ",cohort_" << res.covariate_names[k] << unit_suffix(p.cohort->unit_of(k));
    for (const auto& v : m.variability) out << ",eta_" << v.name;
    for (const auto& prm : m.parameters) out << "," << prm.name << unit_suffix(prm.unit_text);
    out << ",weight_kg,first_peak,ss_peak,ss_trough,ss_average,ss_auc24,above_pct,first_reached_h";
    const std::size_t n_targets = p.summaries.front().targets.size();
    for (std::size_t k = 0; k < n_targets; ++k) out << ",met_" << p.summaries.front().targets[k].kind;
    out << "\n";
    for (std::size_t i = 0; i < res.subjects.size(); ++i) {
        const auto& sub = res.subjects[i];
        for (std::size_t r = 0; r < rs.size(); ++r) {
            const auto& f = res.figures[r][i];
            out << i + 1 << "," << rs[r].id << "," << status_name(f.status);
            for (std::size_t k = 0; k < sub.covariates.size(); ++k)
                out << "," << csv_number(sub.covariates[k] / p.cohort->factor_of(k));
            for (double e : sub.eta) out << "," << csv_number(e);
            for (std::size_t k = 0; k < m.parameters.size(); ++k)
                out << "," << csv_number(units::to_unit(sub.parameters[r][k], m.parameters[k].unit));
            out << "," << csv_number(sub.weight_kg[r]);
            for (double v : {f.first_peak, f.ss_peak, f.ss_trough, f.ss_average})
                out << "," << csv_number(in_output_unit(o, v));
            out << "," << csv_number(in_output_unit(o, f.ss_auc24)) << "," << csv_number(f.above_pct) << ","
                << csv_number(f.first_reached);
            for (std::size_t k = 0; k < n_targets; ++k)
                out << "," << (k < f.met.size() && f.met[k] >= 0 ? (f.met[k] ? "1" : "0") : "");
            out << "\n";
        }
    }
}

}  // namespace plateau::report
