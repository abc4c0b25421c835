// The MAP objective, its gradient and its Gauss–Newton Hessian. Predictions and ∂f/∂params come from
// sim::output_sensitivities; ∂params/∂η from parameter_jacobian; the chain rule joins them.
#include <boost/math/distributions/normal.hpp>
#include <cmath>
#include <stdexcept>

#include "fit/fit.hpp"
#include "fit/residual.hpp"
#include "sim/sensitivity.hpp"

namespace plateau::fit {

namespace {

constexpr double kLn2Pi = 1.8378770664093454836;

// Φ(z) for z < kTail is below 1e-200: there −2 ln Φ comes from the asymptotic series of the Mills ratio
// (Abramowitz & Stegun 26.2.12), φ(z)/Φ(z) = −z / (1 − 1/z² + 3/z⁴ − 15/z⁶ ...).
constexpr double kTail = -30.0;

double tail_series(double z) {
    const double u = 1.0 / (z * z);
    return 1.0 - u + 3.0 * u * u - 15.0 * u * u * u;
}

// φ(z)/Φ(z), the inverse Mills ratio of the lower tail.
double hazard(double z) {
    if (z < kTail) return -z / tail_series(z);
    static const boost::math::normal_distribution<double> unit;
    return boost::math::pdf(unit, z) / boost::math::cdf(unit, z);
}

// Ω⁻¹ (Cholesky of Ω, then inverted column by column).
std::vector<double> omega_inverse(const model::Model& m) {
    const std::size_t n = m.variability.size();
    const std::vector<double> l = model::cholesky(model::omega_matrix(m), n);
    std::vector<double> inv(n * n, 0.0);
    if (l.empty()) return inv;
    for (std::size_t c = 0; c < n; ++c) {
        std::vector<double> x(n, 0.0);
        for (std::size_t i = 0; i < n; ++i) {   // L y = e_c
            double s = i == c ? 1.0 : 0.0;
            for (std::size_t k = 0; k < i; ++k) s -= l[i * n + k] * x[k];
            x[i] = s / l[i * n + i];
        }
        for (std::size_t i = n; i-- > 0;) {     // Lᵀ x = y
            double s = x[i];
            for (std::size_t k = i + 1; k < n; ++k) s -= l[k * n + i] * x[k];
            x[i] = s / l[i * n + i];
        }
        for (std::size_t i = 0; i < n; ++i) inv[i * n + c] = x[i];
    }
    return inv;
}

}  // namespace

double minus_two_log_cdf(double z) {
    if (z < kTail) return z * z + 2.0 * std::log(-z) + kLn2Pi - 2.0 * std::log(tail_series(z));
    static const boost::math::normal_distribution<double> unit;
    return -2.0 * std::log(boost::math::cdf(unit, z));
}

double minus_two_log_cdf_slope(double z) { return -2.0 * hazard(z); }

Term term(const model::Residual& r, const Observation& o, double f) {
    const double v = residual_variance(r, f);
    const double dv = residual_variance_slope(r, f);
    Term t;
    if (!o.below) {
        const double e = o.y - f;
        t.value = e * e / v + std::log(v);
        t.slope = -2.0 * e / v - e * e * dv / (v * v) + dv / v;
        t.weight = 2.0 / v + dv * dv / (v * v);   // E[∂²/∂f²] for y ~ N(f, σ²(f))
        return t;
    }
    // M3: −2 ln Φ(z), z = (L − f)/σ; dz/df = −(1 + z·σ')/σ with σ' = dσ/df = dv/(2σ).
    const double s = std::sqrt(v);
    const double z = (o.y - f) / s;
    const double dz = -(1.0 + z * dv / (2.0 * s)) / s;
    const double h = hazard(z);
    t.value = minus_two_log_cdf(z);
    t.slope = -2.0 * h * dz;
    t.weight = 2.0 * h * (z + h) * dz * dz;   // the exact second derivative in z (≥ 0), times (dz/df)²
    return t;
}

Evaluation evaluate(const Problem& p, const std::vector<double>& eta, bool derivatives) {
    const model::Model& m = *p.model;
    const std::size_t n = eta.size(), levels = p.obs.size();
    Evaluation ev;
    const std::vector<double> values = individual_values(p, eta);
    std::vector<double> times;
    for (const auto& o : p.obs) times.push_back(o.t);
    std::vector<int> wrt;
    std::vector<double> pj;
    if (derivatives) {
        pj = parameter_jacobian(m, p.base, eta);
        for (std::size_t i = 0; i < values.size(); ++i)
            for (std::size_t k = 0; k < n; ++k)
                if (pj[i * n + k] != 0.0) {
                    wrt.push_back(static_cast<int>(i));
                    break;
                }
    }
    // The forward sensitivities refuse (by name) a lag that varies in a nonlinear model: central differences
    // of the engine stand in for that case.
    sim::OutputSensitivity s;
    try {
        s = sim::output_sensitivities(m, values, p.doses, p.output, times, wrt, p.t_end, p.options);
    } catch (const std::invalid_argument&) {
        s = sim::output_sensitivities_fd(m, values, p.doses, p.output, times, wrt, p.t_end, p.options);
    }
    if (s.outcome != taylor::Outcome::Ok) return ev;
    ev.f = s.value;
    for (double f : ev.f)
        if (!std::isfinite(f)) return ev;
    const std::vector<double> oinv = omega_inverse(m);
    ev.objective = 0.0;
    ev.gradient.assign(n, 0.0);
    ev.hessian.assign(n * n, 0.0);
    if (derivatives) ev.jac.assign(levels * n, 0.0);
    for (std::size_t i = 0; i < levels; ++i) {
        const Term t = term(p.residual, p.obs[i], ev.f[i]);
        ev.objective += t.value;
        if (!derivatives) continue;
        std::vector<double> row(n, 0.0);
        for (std::size_t j = 0; j < wrt.size(); ++j)
            for (std::size_t k = 0; k < n; ++k) row[k] += s.d[i][j] * pj[static_cast<std::size_t>(wrt[j]) * n + k];
        for (std::size_t k = 0; k < n; ++k) {
            ev.jac[i * n + k] = row[k];
            ev.gradient[k] += t.slope * row[k];
            for (std::size_t l = 0; l < n; ++l) ev.hessian[k * n + l] += t.weight * row[k] * row[l];
        }
    }
    for (std::size_t k = 0; k < n; ++k)
        for (std::size_t l = 0; l < n; ++l) {
            ev.objective += eta[k] * oinv[k * n + l] * eta[l];
            if (!derivatives) continue;
            ev.gradient[k] += 2.0 * oinv[k * n + l] * eta[l];
            ev.hessian[k * n + l] += 2.0 * oinv[k * n + l];
        }
    ev.ok = std::isfinite(ev.objective);
    return ev;
}

}  // namespace plateau::fit
