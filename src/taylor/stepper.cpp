#include "taylor/stepper.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace plateau::taylor {

int order_for_tolerance(double tol) {
    if (!(tol > 0.0) || !(tol < 1.0)) return 2;
    const int p = static_cast<int>(std::ceil(-0.5 * std::log(tol) + 1.0));
    return std::max(2, p);
}

namespace {

// ‖x[j]‖∞ over all series; NaN propagates (a NaN coefficient must not read as zero).
double norm(std::span<const double> coeffs, std::size_t n_series, std::size_t stride, std::size_t j) {
    double m = 0.0;
    for (std::size_t s = 0; s < n_series; ++s) {
        const double a = std::abs(coeffs[s * stride + j]);
        m = a > m || a != a ? a : m;
    }
    return m;
}

// The Jorba–Zou step with the order's constants precomputed: inv_j[j] = 1/j, inv_jm1[j] = 1/(j−1),
// safety = e^{−2}·e^{−0.7/(p−1)}. `floor` ≥ 0 bounds N from below when some series is non-zero.
double step_rule(std::span<const double> coeffs, std::size_t n_series, int order, double floor, double safety,
                 const double* inv_j, const double* inv_jm1) {
    const std::size_t stride = static_cast<std::size_t>(order) + 1;
    // Relative control: N = ‖x[0]‖∞. The mixed form N = max(1, ‖x[0]‖∞) turns absolute once all amounts fall
    // below 1 mg, and the steps then grow until the polynomial of a fast series (an emptied gut) no longer
    // decays: the terminal phase would stall at round-off level. When everything starts at zero (an infusion
    // into an empty model) the scale is the linear growth term instead: ρ_j = (‖x[1]‖/‖x[j]‖)^{1/(j−1)}.
    double n0 = norm(coeffs, n_series, stride, 0);
    if (n0 > 0.0) n0 = std::max(n0, floor);
    const double n1 = n0 > 0.0 ? 0.0 : norm(coeffs, n_series, stride, 1);
    const double inf = std::numeric_limits<double>::infinity();
    auto rho = [&](int j) {
        const double nj = norm(coeffs, n_series, stride, static_cast<std::size_t>(j));
        if (nj != nj) return 0.0;  // NaN: no step
        if (!(nj > 0.0)) return inf;
        if (n0 > 0.0) return std::pow(n0 / nj, inv_j[j]);
        if (n1 > 0.0 && j > 1) return std::pow(n1 / nj, inv_jm1[j]);
        return std::pow(1.0 / nj, inv_j[j]);
    };
    const double r = std::min(rho(order - 1), rho(order));
    if (r == inf) return inf;
    return r * safety;
}

double safety_factor(int order) { return std::exp(-2.0) * std::exp(-0.7 / static_cast<double>(order - 1)); }

}  // namespace

double jorba_zou_step(std::span<const double> coeffs, int n_series, int order) {
    std::vector<double> ij(static_cast<std::size_t>(order) + 1, 0.0), ijm1(static_cast<std::size_t>(order) + 1, 0.0);
    for (int j = 1; j <= order; ++j) ij[static_cast<std::size_t>(j)] = 1.0 / static_cast<double>(j);
    for (int j = 2; j <= order; ++j) ijm1[static_cast<std::size_t>(j)] = 1.0 / static_cast<double>(j - 1);
    return step_rule(coeffs, static_cast<std::size_t>(n_series), order, 0.0, safety_factor(order), ij.data(),
                     ijm1.data());
}

const char* outcome_name(Outcome o) {
    switch (o) {
        case Outcome::Ok: return "ok";
        case Outcome::NonFinite: return "non-finite state";
        case Outcome::StepLimit: return "step limit reached";
        case Outcome::NegativeAmount: return "negative amount";
        case Outcome::MassBalance: return "mass balance";
    }
    return "?";
}

Stepper::Stepper(const Tape& tape, std::span<const double> params, double tol, int order)
    : expander_(tape, order > 0 ? order : order_for_tolerance(tol)) {
    expander_.set_params(params);
    const int p = expander_.order();
    safety_ = safety_factor(p);
    inv_j_.assign(static_cast<std::size_t>(p) + 1, 0.0);
    inv_jm1_.assign(static_cast<std::size_t>(p) + 1, 0.0);
    for (int j = 1; j <= p; ++j) inv_j_[static_cast<std::size_t>(j)] = 1.0 / static_cast<double>(j);
    for (int j = 2; j <= p; ++j) inv_jm1_[static_cast<std::size_t>(j)] = 1.0 / static_cast<double>(j - 1);
}

StepResult Stepper::step(double t0, std::span<const double> x0, std::span<const double> u, double h_max,
                         std::vector<double>& coeffs) {
    const std::size_t stride = static_cast<std::size_t>(order()) + 1;
    const std::size_t ns = static_cast<std::size_t>(n_series());
    coeffs.resize(ns * stride);
    expander_.expand(t0, x0, u, coeffs);
    StepResult r;
    // Non-finite values show in order 0 (a log or division at the expansion point) or spread to the highest
    // orders; the caller also checks the state at the end of the step, which sums every coefficient.
    for (std::size_t s = 0; s < ns; ++s) {
        const double* c = coeffs.data() + s * stride;
        if (!std::isfinite(c[0]) || !std::isfinite(c[stride - 1]) || !std::isfinite(c[stride - 2])) {
            r.outcome = Outcome::NonFinite;
            return r;
        }
    }
    const double h = step_rule(coeffs, ns, order(), floor_, safety_, inv_j_.data(), inv_jm1_.data());
    if (h >= h_max) {
        r.h = h_max;
        r.clipped = true;
    } else {
        r.h = h;
    }
    if (!(r.h > 0.0) || !std::isfinite(r.h)) r.outcome = Outcome::NonFinite;
    return r;
}

}  // namespace plateau::taylor
