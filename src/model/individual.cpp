// A subject's parameter values: covariates in, derived parameters recomputed, random effects applied. Runs once
// per subject (never per Taylor coefficient): its results are the tape's constant parameter slots.
#include <cmath>
#include <stdexcept>

#include "model/model.hpp"

namespace plateau::model {

namespace {

double apply(Spread s, double typical, double eta) {
    switch (s) {
    case Spread::LogNormal: return typical * std::exp(eta);
    case Spread::LogitNormal: {
        // logit(p) + η, back through the logistic function; the typical value is inside (0, 1) (checked by input/).
        const double z = std::log(typical / (1.0 - typical)) + eta;
        return 1.0 / (1.0 + std::exp(-z));
    }
    case Spread::Normal: return typical + eta;
    }
    return typical;
}

}  // namespace

void individualize(const Model& m, std::vector<double>& values, std::span<const double> eta) {
    const bool varied = !eta.empty();
    if (varied && eta.size() != m.variability.size()) throw std::invalid_argument("individualize: wrong number of random effects");
    auto eta_of = [&](std::size_t p, double& out) {
        for (std::size_t k = 0; k < m.variability.size(); ++k)
            if (static_cast<std::size_t>(m.variability[k].index) == p) {
                out = eta[k];
                return static_cast<int>(k);
            }
        return -1;
    };
    if (varied)
        for (const auto& v : m.variability) {
            const auto i = static_cast<std::size_t>(v.index);
            if (m.parameters[i].kind != ParamKind::Fixed) continue;
            double e = 0.0;
            if (eta_of(i, e) >= 0) values[i] = apply(v.spread, values[i], e);
        }
    for (std::size_t i = 0; i < m.parameters.size(); ++i) {
        const Parameter& p = m.parameters[i];
        if (p.kind != ParamKind::Derived || !p.expr) continue;
        values[i] = evaluate_constant(m, *p.expr, values);
        double e = 0.0;
        if (varied) {
            const int k = eta_of(i, e);
            if (k >= 0) values[i] = apply(m.variability[static_cast<std::size_t>(k)].spread, values[i], e);
        }
    }
}

std::vector<double> omega_matrix(const Model& m) {
    const std::size_t n = m.variability.size();
    std::vector<double> o(n * n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
        for (std::size_t j = 0; j < n; ++j) {
            const double rho = i == j ? 1.0 : m.correlation.empty() ? 0.0 : m.correlation[i * n + j];
            o[i * n + j] = rho * m.variability[i].omega * m.variability[j].omega;
        }
    return o;
}

std::vector<double> cholesky(const std::vector<double>& a, std::size_t n) {
    std::vector<double> l(n * n, 0.0);
    for (std::size_t j = 0; j < n; ++j) {
        double d = a[j * n + j];
        for (std::size_t k = 0; k < j; ++k) d -= l[j * n + k] * l[j * n + k];
        if (!(d > 0.0)) return {};
        l[j * n + j] = std::sqrt(d);
        for (std::size_t i = j + 1; i < n; ++i) {
            double s = a[i * n + j];
            for (std::size_t k = 0; k < j; ++k) s -= l[i * n + k] * l[j * n + k];
            l[i * n + j] = s / l[j * n + j];
        }
    }
    return l;
}

}  // namespace plateau::model
