// The fit as JSON: levels with predictions, estimates, random effects, objective, starts (schema in README).
#include <cmath>

#include "fit/report.hpp"
#include "fit/residual.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/json.hpp"
#include "units/units.hpp"

namespace plateau::fit {

namespace {

std::string q(std::string_view s) { return report::json_string(s); }
std::string n(double v) { return report::json_number(v); }

}  // namespace

void write_json(std::ostream& out, const Report& rep) {
    const regimen::Regimen& r = *rep.regimen;
    const model::Model& m = r.model;
    const Result& res = *rep.result;
    const model::Output& o = m.outputs[static_cast<std::size_t>(rep.problem->output)];
    auto c = [&](double v) { return n(report::in_output_unit(o, v)); };
    out << "{\n  \"caution\": " << q(report::kCaution) << ",\n  \"regimen\": " << q(r.id) << ",\n  \"model\": " << q(m.id)
        << ",\n  \"output\": " << q(o.name) << ",\n  \"unit\": " << q(o.unit_text) << ",\n  \"levels_file\": "
        << q(rep.levels->path) << ",\n  \"residual\": " << q(residual_text(m)) << ",\n  \"tolerance\": " << n(rep.tol)
        << ",\n  \"objective\": " << n(res.objective) << ",\n  \"converged\": " << (res.converged ? "true" : "false")
        << ",\n  \"iterations\": " << res.iterations << ",\n  \"parameters\": [";
    for (std::size_t i = 0; i < res.estimates.size(); ++i) {
        const Estimate& e = res.estimates[i];
        const model::Parameter& p = m.parameters[static_cast<std::size_t>(e.index)];
        auto u = [&](double v) { return n(units::to_unit(v, p.unit)); };
        out << (i ? "," : "") << "\n    {\"name\": " << q(p.name) << ", \"unit\": " << q(p.unit_text)
            << ", \"estimate\": " << u(e.value) << ", \"population\": " << u(e.population)
            << ", \"relative_change\": " << n(e.population != 0.0 ? e.value / e.population - 1.0 : NAN)
            << ", \"se\": " << u(e.se) << "}";
    }
    out << "\n  ],\n  \"random_effects\": [";
    for (std::size_t k = 0; k < res.eta.size(); ++k)
        out << (k ? "," : "") << "\n    {\"name\": " << q(m.variability[k].name) << ", \"eta\": " << n(res.eta[k])
            << ", \"se\": " << n(res.eta_se[k]) << ", \"omega\": " << n(m.variability[k].omega) << "}";
    out << "\n  ],\n  \"levels\": [";
    for (std::size_t i = 0; i < rep.levels->levels.size(); ++i) {
        const input::Level& l = rep.levels->levels[i];
        out << (i ? "," : "") << "\n    {\"time_h\": " << n(l.t) << ", \"measured\": " << (l.below ? "null" : c(l.value))
            << ", \"below_limit\": " << (l.below ? c(l.value) : "null") << ", \"predicted\": " << c(res.pred[i])
            << ", \"residual\": " << (l.below ? "null" : c(l.value - res.pred[i]))
            << ", \"weighted_residual\": " << (l.below ? "null" : n((l.value - res.pred[i]) / res.sd[i])) << "}";
    }
    out << "\n  ],\n  \"starts\": [";
    for (std::size_t s = 0; s < res.starts.size(); ++s) {
        const Start& st = res.starts[s];
        out << (s ? "," : "") << "\n    {\"from\": [";
        for (std::size_t k = 0; k < st.from.size(); ++k) out << (k ? ", " : "") << n(st.from[k]);
        out << "], \"eta\": [";
        for (std::size_t k = 0; k < st.eta.size(); ++k) out << (k ? ", " : "") << n(st.eta[k]);
        out << "], \"objective\": " << n(st.objective) << ", \"converged\": " << (st.converged ? "true" : "false") << "}";
    }
    out << "\n  ],\n  \"notes\": [";
    for (std::size_t i = 0; i < res.notes.size(); ++i) out << (i ? ", " : "") << q(res.notes[i]);
    out << "]\n}\n";
}

}  // namespace plateau::fit
