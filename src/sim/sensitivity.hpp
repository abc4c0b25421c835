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
//
// Forward sensitivities s = ∂x/∂p integrated with the states by the same Taylor engine: the model is augmented
// with ds/dt = (∂f/∂x)·s + ∂f/∂p (derived symbolically from its expressions, expr/derivative.hpp) and the output's
// derivative ∂y/∂p = (∂g/∂x)·s + ∂g/∂p is one more output. Every other parameter is held fixed, derived ones
// included (chain a derived parameter's own derivative in with expr::derivative). Doses: a route's fraction F(p)
// adds D·∂F/∂p to s at a bolus (and to its input rate during an infusion); a lag τ(p) moves the dose, which
// changes s by (f(t⁻) − f(t⁺))·∂τ/∂p at the dose and at an infusion's end — handled when the rates are linear in
// the compartments; otherwise std::invalid_argument names the parameter (never a silently wrong derivative).
// At a dose time the derivative is that of the right-continuous value (the value just after the dose).
// Throws std::invalid_argument for an unknown output or parameter index.
OutputSensitivity output_sensitivities(const model::Model& m, std::span<const double> params,
                                       const std::vector<Dose>& doses, int output, std::span<const double> times,
                                       std::span<const int> wrt, double t_end, const Options& opt = {});

// The same by central finite differences of the Taylor engine (relative step 1e-5, tolerance at most 1e-13),
// one pair of runs per parameter: the independent check of the tests, and a fallback.
OutputSensitivity output_sensitivities_fd(const model::Model& m, std::span<const double> params,
                                          const std::vector<Dose>& doses, int output, std::span<const double> times,
                                          std::span<const int> wrt, double t_end, const Options& opt = {});

}  // namespace plateau::sim
