// The terminal report of an individual fit: the caution, the estimates, every level with its prediction and
// residual, the objective, how the starts ended, the caution again.
#include <cmath>
#include <sstream>

#include "fit/report.hpp"
#include "fit/residual.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"
#include "units/units.hpp"

namespace plateau::fit {

using report::num;
using report::pad_left;
using report::pad_right;

std::string parameter_text(const model::Parameter& p, double canonical) {
    const double v = units::to_unit(canonical, p.unit);
    return p.unit_text.empty() ? num(v, 4) : num(v, 4) + " " + p.unit_text;
}

namespace {

void table(std::ostream& out, const std::vector<std::vector<std::string>>& rows) {
    std::vector<std::size_t> w;
    for (const auto& r : rows)
        for (std::size_t c = 0; c < r.size(); ++c) {
            if (w.size() <= c) w.push_back(0);
            w[c] = std::max(w[c], report::display_width(r[c]));
        }
    for (const auto& r : rows) {
        std::string line = " ";
        for (std::size_t c = 0; c < r.size(); ++c)
            line += " " + (c == 0 ? pad_right(r[c], w[c]) : pad_left(r[c], w[c])) + (c + 1 < r.size() ? " " : "");
        while (!line.empty() && line.back() == ' ') line.pop_back();
        out << line << '\n';
    }
}

void caution(std::ostream& out) {
    out << "CAUTION: " << report::kCaution << '\n';
}

}  // namespace

void write_text(std::ostream& out, const Report& rep) {
    const regimen::Regimen& r = *rep.regimen;
    const model::Model& m = r.model;
    const Result& res = *rep.result;
    const model::Output& o = m.outputs[static_cast<std::size_t>(rep.problem->output)];
    caution(out);
    out << "\nIndividual fit (maximum a posteriori) — regimen '" << r.id << "', model '" << m.id << "', output '"
        << o.name << "' (" << o.unit_text << ")\n";
    std::size_t below = 0;
    for (const auto& l : rep.levels->levels) below += l.below ? 1 : 0;
    out << "Levels: " << rep.levels->levels.size() << " from " << rep.levels->path;
    if (below > 0) out << " (" << below << " below the quantification limit, by Beal's M3 likelihood)";
    out << "\nResidual error: " << residual_text(m) << "\n\n";

    std::vector<std::vector<std::string>> rows{{"parameter", "estimate", "population", "change", "approx SE", "RSE"}};
    for (const Estimate& e : res.estimates) {
        const model::Parameter& p = m.parameters[static_cast<std::size_t>(e.index)];
        const double change = e.population != 0.0 ? e.value / e.population - 1.0 : NAN;
        rows.push_back({p.name, parameter_text(p, e.value), parameter_text(p, e.population),
                        std::isfinite(change) ? (change >= 0 ? "+" : "") + num(100.0 * change, 3) + " %" : "—",
                        parameter_text(p, e.se), e.value != 0.0 ? num(100.0 * e.se / std::abs(e.value), 2) + " %" : "—"});
    }
    table(out, rows);
    out << "  (population: the model's typical values with this patient's covariates; SE from the curvature at the\n"
           "  optimum, a Laplace approximation)\n\n";

    rows = {{"time (h)", "measured", "predicted", "residual", "residual / σ"}};
    for (std::size_t i = 0; i < rep.levels->levels.size(); ++i) {
        const input::Level& l = rep.levels->levels[i];
        const double f = res.pred[i];
        const std::string u = " " + o.unit_text;
        if (l.below) {
            rows.push_back({num(l.t, 6), "< " + num(report::in_output_unit(o, l.value), 4) + u,
                            num(report::in_output_unit(o, f), 4) + u, "(censored)", ""});
            continue;
        }
        rows.push_back({num(l.t, 6), num(report::in_output_unit(o, l.value), 4) + u, num(report::in_output_unit(o, f), 4) + u,
                        num(report::in_output_unit(o, l.value - f), 3) + u, num((l.value - f) / res.sd[i], 3)});
    }
    table(out, rows);

    std::ostringstream eta;
    for (std::size_t k = 0; k < res.eta.size(); ++k)
        eta << (k ? ", " : "") << m.variability[k].name << " " << num(res.eta[k], 4) << " ± " << num(res.eta_se[k], 3);
    out << "\nObjective: " << num(res.objective, 10) << " (−2 log posterior, constants left out)\n"
        << "Random effects: " << eta.str() << '\n'
        << "Optimiser: Levenberg–Marquardt, " << res.iterations << " iterations, "
        << (res.converged ? "converged" : "NOT converged") << "; " << res.starts.size() << " starts"
        << (res.notes.empty() ? ", all ending at this optimum" : "") << '\n';
    for (const auto& n : res.notes) out << "Note: " << n << '\n';
    if (rep.band != nullptr && rep.band->failed > 0)
        out << "Note: " << rep.band->failed << " of " << rep.band->draws << " band draws could not be simulated\n";
    out << rep.trailer << '\n';
    caution(out);
}

}  // namespace plateau::fit
