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

double jorba_zou_step(std::span<const double> coeffs, int n_series, int order) {
    const std::size_t stride = static_cast<std::size_t>(order) + 1;
    auto norm = [&](int j) {
        double m = 0.0;
        for (std::size_t s = 0; s < static_cast<std::size_t>(n_series); ++s)
            m = std::max(m, std::abs(coeffs[s * stride + static_cast<std::size_t>(j)]));
        return m;
    };
    // Relative control: N = ‖x[0]‖∞. The mixed form N = max(1, ‖x[0]‖∞) turns absolute once all amounts fall
    // below 1 mg, and the steps then grow until the polynomial of a fast series (an emptied gut) no longer
    // decays: the terminal phase would stall at round-off level. When everything starts at zero (an infusion
    // into an empty model) the scale is the linear growth term instead: ρ_j = (‖x[1]‖/‖x[j]‖)^{1/(j−1)}.
    const double n0 = norm(0);
    const double n1 = n0 > 0.0 ? 0.0 : norm(1);
    const double inf = std::numeric_limits<double>::infinity();
    auto rho = [&](int j) {
        const double nj = norm(j);
        if (!(nj > 0.0)) return inf;
        if (n0 > 0.0) return std::pow(n0 / nj, 1.0 / static_cast<double>(j));
        if (n1 > 0.0 && j > 1) return std::pow(n1 / nj, 1.0 / static_cast<double>(j - 1));
        return std::pow(1.0 / nj, 1.0 / static_cast<double>(j));
    };
    const double r = std::min(rho(order - 1), rho(order));
    if (r == inf) return inf;
    return r * std::exp(-2.0) * std::exp(-0.7 / static_cast<double>(order - 1));
}

const char* outcome_name(Outcome o) {
    switch (o) {
        case Outcome::Ok: return "ok";
        case Outcome::NonFinite: return "non-finite state";
        case Outcome::StepLimit: return "step limit reached";
    }
    return "?";
}

Stepper::Stepper(const Tape& tape, std::span<const double> params, double tol, int order)
    : expander_(tape, order > 0 ? order : order_for_tolerance(tol)) {
    expander_.set_params(params);
}

StepResult Stepper::step(double t0, std::span<const double> x0, std::span<const double> u, double h_max,
                         std::vector<double>& coeffs) {
    const std::size_t stride = static_cast<std::size_t>(order()) + 1;
    coeffs.resize(static_cast<std::size_t>(n_series()) * stride);
    expander_.expand(t0, x0, u, coeffs);
    StepResult r;
    for (double c : coeffs)
        if (!std::isfinite(c)) {
            r.outcome = Outcome::NonFinite;
            return r;
        }
    const double h = jorba_zou_step(coeffs, n_series(), order());
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
