// Run-time mass balance of a linear model: every compartment must hold what its doses and the integral of its
// rate expression give it. For x' = A·x + c + u (the linear executor's form), compartment i at time t holds
//   x_i(0) + boluses_i + ∫u_i + Σ_j A_ij·∫x_j + c_i·t,
// and ∫x_j is exact from the step polynomials. Summed over the compartments this is the whole-body balance:
// delivered up to t = in the body + eliminated, where the eliminated amount is −Σ_j (Σ_i A_ij)·∫x_j − Σ_i c_i·t,
// the outflows that go to no compartment. A failure means the run lost or created mass (a dose dropped, an
// amount emptied that was not negligible): it is a numerical failure, never a report.
#pragma once

#include <span>
#include <vector>

#include "taylor/series.hpp"

namespace plateau::sim {

// What a failed check found (all amounts in mg, times in h).
struct MassBalanceFailure {
    int compartment = -1;   // the compartment furthest out of balance, relative to its allowance
    double time = 0.0;
    double held = 0.0;      // what the compartment holds
    double expected = 0.0;  // what its doses and its rate's integral give it
    double allowed = 0.0;   // the allowance at that time
    double delivered = 0.0; // whole body: doses delivered up to the time (boluses and infusion so far)
    double in_body = 0.0;   // whole body: the sum of the compartments
    double eliminated = 0.0;// whole body: the integral of the outflows that go to no compartment
};

// Allowance of compartment i:
//   2·ε·(Σ_steps N_k + M) + 64·u·G_i
// - The step rule keeps the last Taylor term of step k below ε·N_k, N_k the largest series value at its start
//   (Jorba & Zou): a linear model's step polynomial differs from the integral of its rate by −(A·x[p])·h^{p+1}/
//   (p+1), which is below ε·N_k, and an amount set to zero because it is negligible (a drained compartment,
//   simulate.cpp) is below ε·N_k as well: at most 2·ε·N_k per step. M is the largest N_k (or starting amount).
// - Round-off in the running sums: u = 2^−53 times G_i, the gross amount through compartment i (what it started
//   with, its doses and Σ_j |A_ij|·∫x_j + |c_i|·t), with a margin for the number of terms.
// The bound is a worst case (every step's error of one sign) and follows the amounts, not the total dosed: a
// dropped dose or an emptied compartment that held a real amount is far above it at any tolerance up to 1e-3,
// even after 100 000 doses.
class MassBalance {
public:
    // Active only when the expander runs the linear executor (and `enabled`). `x0` is the starting state.
    MassBalance(const taylor::Expander& ex, std::span<const double> x0, double tol, bool enabled = true);

    bool active() const { return active_; }
    void add_bolus(std::span<const double> bolus);
    // One step of length h with the inputs u held; `coeffs` are the step's coefficients (n_series × stride,
    // states first), `n_series` all series (outputs join the scale M).
    void add_step(std::span<const double> coeffs, std::size_t stride, std::size_t n_series, double h,
                  std::span<const double> u);
    // Checks the amounts `x` at time t; false (and `failure` filled) when some compartment is out of balance
    // beyond its allowance.
    bool check(double t, std::span<const double> x, MassBalanceFailure& failure) const;

private:
    bool active_ = false;
    std::size_t n_ = 0;
    double tol_ = 0.0;
    std::vector<double> a_, c_;  // A (row-major) and c of x' = A·x + c + u
    std::vector<double> start_, bolus_, infused_, integral_;  // per compartment
    std::vector<double> inv_;  // 1/(k+1)
    double elapsed_ = 0.0;     // Σ h
    double largest_ = 0.0;     // M: the largest step scale N_k (or starting amount)
    double scale_sum_ = 0.0;   // Σ_k N_k
};

}  // namespace plateau::sim
