// JSON and CSV of a population run. JSON: every summary figure per regimen; CSV: one row per subject and regimen
// with the covariates, the random effects, every parameter and every figure, for R or Python.
#include <cmath>

#include "report/csv.hpp"
#include "report/format.hpp"
#include "report/json.hpp"
#include "report/population_model.hpp"
#include "report/population_report.hpp"
#include "units/units.hpp"

namespace plateau::report {

namespace {

const char* status_name(population::Status s) {
    switch (s) {
    case population::Status::Ok: return "ok";
    case population::Status::NoSteadyState: return "no_steady_state";
    case population::Status::Failed: return "failed";
    }
    return "?";
}

std::string csv_number(double v) { return std::isfinite(v) ? general(v, kCsvDigits) : std::string(); }

// "_mg_per_L" for "mg/L" (column names that R and pandas take as they are); "" for no unit.
std::string unit_suffix(const std::string& unit) { return unit.empty() ? "" : csv_column_name("", unit); }

}  // namespace

void write_population_json(std::ostream& out, const PopulationRun& p) {
    write_json(out, population_model(p));
    out << '\n';
}

void write_population_csv(std::ostream& out, const PopulationRun& p) {
    const auto& rs = *p.regimens;
    const auto& res = *p.result;
    const model::Model& m = rs.front().model;
    const model::Output& o = population_output(p);
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
