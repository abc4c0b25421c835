// Adaptive Taylor steps: the order from the tolerance and the step length from the last two coefficients
// (Jorba & Zou, Experimental Mathematics 14, 2005), with the outputs joining the norms.
#pragma once

#include <span>
#include <vector>

#include "taylor/series.hpp"

namespace plateau::taylor {

// p = ⌈−½·ln ε + 1⌉, at least 2.
int order_for_tolerance(double tol);

// h = min(ρ_{p−1}, ρ_p)·e^{−2}·e^{−0.7/(p−1)}, ρ_j = (N/‖x[j]‖∞)^{1/j}, N = ‖x[0]‖∞, norms over all series:
// relative error control, so a terminal phase far below 1 mg keeps its accuracy. When every series is zero,
// ρ_j = (‖x[1]‖∞/‖x[j]‖∞)^{1/(j−1)} (relative to the linear growth), and N = 1 if that is zero too. Returns +infinity when both coefficients vanish (the series is then a polynomial of lower degree).
double jorba_zou_step(std::span<const double> coeffs, int n_series, int order);

enum class Outcome { Ok, NonFinite, StepLimit, NegativeAmount, MassBalance };

const char* outcome_name(Outcome o);

struct StepResult {
    Outcome outcome = Outcome::Ok;
    double h = 0.0;              // step taken (≤ h_max)
    bool clipped = false;        // true when h was cut to h_max
};

class Stepper {
public:
    // `tol` sets the order; `order` > 0 forces an order instead.
    Stepper(const Tape& tape, std::span<const double> params, double tol, int order = 0);

    int order() const { return expander_.order(); }
    int n_states() const { return expander_.n_states(); }
    int n_series() const { return expander_.n_series(); }
    void set_params(std::span<const double> params) { expander_.set_params(params); }
    Expander& expander() { return expander_; }
    const Expander& expander() const { return expander_; }

    // Lower bound of N in the step rule while some series is non-zero (0: purely relative). The simulation
    // sets it to a tiny fraction of the largest dose, so amounts far below anything readable stop shrinking
    // the steps.
    void set_floor(double floor) { floor_ = floor; }
    double floor() const { return floor_; }

    // One step from (t0, x0) with constant inputs u, at most h_max long. Fills `coeffs` (n_series × (order+1)).
    StepResult step(double t0, std::span<const double> x0, std::span<const double> u, double h_max,
                    std::vector<double>& coeffs);

private:
    Expander expander_;
    double floor_ = 0.0;
    double safety_ = 0.0;          // e^{−2}·e^{−0.7/(p−1)}
    std::vector<double> inv_j_;    // 1/j
    std::vector<double> inv_jm1_;  // 1/(j−1)
};

}  // namespace plateau::taylor
