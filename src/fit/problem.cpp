// The fit problem of a regimen and its levels: the doses as given (schedule), the patient's parameter values
// without random effects, the levels in canonical units, simulated to the later of the horizon and the last level.
#include <algorithm>

#include "fit/problem.hpp"
#include "sim/schedule.hpp"

namespace plateau::fit {

Problem make_problem(const regimen::Regimen& r, const input::Levels& levels, double tol) {
    Problem p;
    p.model = &r.model;
    p.base = r.parameter_values();
    p.doses = sim::make_schedule(r).doses;
    p.output = levels.output;
    if (r.model.residual) p.residual = *r.model.residual;
    for (const auto& l : levels.levels) p.obs.push_back({l.t, l.value, l.below});
    p.t_end = r.horizon.until;
    for (const auto& l : levels.levels) p.t_end = std::max(p.t_end, l.t);
    p.options.tol = tol;
    return p;
}

input::LevelContext level_context(const regimen::Regimen& r) {
    input::LevelContext lc;
    lc.first_dose = sim::make_schedule(r).first_dose();
    lc.start_clock = r.start_clock;
    return lc;
}

}  // namespace plateau::fit
