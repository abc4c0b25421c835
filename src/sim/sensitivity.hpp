// Values of one model output at given times and their derivatives with respect to chosen parameters: what an
// individual fit needs (predictions and the exact Jacobian of the residuals).
#pragma once

#include <span>
#include <vector>

#include "model/model.hpp"
#include "sim/events.hpp"
#include "sim/simulate.hpp"

namespace plateau::sim {

struct OutputSensitivity {
    std::vector<double> value;            // value[k]: the output at times[k] (the run's convention at a dose time)
    std::vector<std::vector<double>> d;   // d[k][j]: ∂ value[k] / ∂ params[wrt[j]]
    taylor::Outcome outcome = taylor::Outcome::Ok;  // Ok, or why the run (or a perturbed run) failed
};

// `params` are the subject's final parameter values (after individualize); `wrt` are parameter indices in the
// model. Times must lie in [0, t_end].
OutputSensitivity output_sensitivities(const model::Model& m, std::span<const double> params,
                                       const std::vector<Dose>& doses, int output, std::span<const double> times,
                                       std::span<const int> wrt, double t_end, const Options& opt = {});

}  // namespace plateau::sim
