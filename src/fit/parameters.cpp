// A subject's parameter values as functions of the random effects, with exact first derivatives (forward mode:
// each value carries its gradient in η). Follows model::individualize step by step: varied fixed parameters
// first, then derived parameters in order, each then varied by its own random effect if it has one.
// A derived parameter's derivative comes from the symbolic derivative of its expression (expr::derivative).
#include <cmath>
#include <stdexcept>

#include "expr/derivative.hpp"
#include "fit/fit.hpp"

namespace plateau::fit {

namespace {

struct Dual {
    double v = 0.0;
    std::vector<double> d;
};

Dual constant(double v, std::size_t n) { return Dual{v, std::vector<double>(n, 0.0)}; }

// a·x + b·y on the gradients.
std::vector<double> combine(double a, const std::vector<double>& x, double b, const std::vector<double>& y) {
    std::vector<double> out(x.size());
    for (std::size_t k = 0; k < x.size(); ++k) out[k] = a * x[k] + b * y[k];
    return out;
}

std::vector<double> scale(double a, const std::vector<double>& x) {
    std::vector<double> out(x.size());
    for (std::size_t k = 0; k < x.size(); ++k) out[k] = a * x[k];
    return out;
}

bool is_zero(const std::vector<double>& x) {
    for (double v : x)
        if (v != 0.0) return false;
    return true;
}

// A derived parameter's value and its gradient in η: the chain rule through its expression, with the symbolic
// partial derivative in each parameter it uses (expr::derivative).
Dual derived(const model::Model& m, const expr::Ptr& e, const std::vector<Dual>& values) {
    const std::size_t n = values.empty() ? 0 : values.front().d.size();
    const expr::ValueLookup lookup = [&](std::string_view name) {
        const int i = m.parameter_index(name);
        if (i < 0) throw std::logic_error("fit: '" + std::string(name) + "' is not a parameter");
        return values[static_cast<std::size_t>(i)].v;
    };
    Dual out = constant(expr::evaluate(*e, lookup), n);
    for (const auto& id : expr::identifiers(*e)) {
        const int j = m.parameter_index(id);
        if (j < 0 || is_zero(values[static_cast<std::size_t>(j)].d)) continue;
        const double partial = expr::evaluate(*expr::derivative(e, id), lookup);
        out.d = combine(1.0, out.d, partial, values[static_cast<std::size_t>(j)].d);
    }
    return out;
}

// The spread applied to a typical value (as model/individual.cpp does), with its derivative in the typical
// value and in η.
void spread(model::Spread s, const Dual& typical, double eta, std::size_t k, Dual& out) {
    switch (s) {
    case model::Spread::LogNormal: {
        const double e = std::exp(eta);
        out.v = typical.v * e;
        out.d = scale(e, typical.d);
        out.d[k] += out.v;
        return;
    }
    case model::Spread::LogitNormal: {
        const double z = std::log(typical.v / (1.0 - typical.v)) + eta;
        const double p = 1.0 / (1.0 + std::exp(-z));
        const double dz_dtyp = 1.0 / (typical.v * (1.0 - typical.v));
        out.v = p;
        out.d = scale(p * (1.0 - p) * dz_dtyp, typical.d);
        out.d[k] += p * (1.0 - p);
        return;
    }
    case model::Spread::Normal:
        out.v = typical.v + eta;
        out.d = typical.d;
        out.d[k] += 1.0;
        return;
    }
}

int variability_of(const model::Model& m, std::size_t parameter) {
    for (std::size_t k = 0; k < m.variability.size(); ++k)
        if (static_cast<std::size_t>(m.variability[k].index) == parameter) return static_cast<int>(k);
    return -1;
}

}  // namespace

std::vector<double> individual_values(const Problem& p, const std::vector<double>& eta) {
    std::vector<double> v = p.base;
    model::individualize(*p.model, v, eta);
    return v;
}

std::vector<double> parameter_jacobian(const model::Model& m, const std::vector<double>& base, const std::vector<double>& eta) {
    const std::size_t n = m.variability.size();
    if (eta.size() != n) throw std::invalid_argument("parameter_jacobian: wrong number of random effects");
    std::vector<Dual> values;
    values.reserve(base.size());
    for (double b : base) values.push_back(constant(b, n));
    for (std::size_t i = 0; i < m.parameters.size(); ++i) {
        if (m.parameters[i].kind != model::ParamKind::Fixed) continue;
        const int k = variability_of(m, i);
        if (k < 0) continue;
        const Dual typical = values[i];
        spread(m.variability[static_cast<std::size_t>(k)].spread, typical, eta[static_cast<std::size_t>(k)],
               static_cast<std::size_t>(k), values[i]);
    }
    for (std::size_t i = 0; i < m.parameters.size(); ++i) {
        const model::Parameter& q = m.parameters[i];
        if (q.kind != model::ParamKind::Derived || !q.expr) continue;
        const Dual typical = derived(m, q.expr, values);
        values[i] = typical;
        const int k = variability_of(m, i);
        if (k >= 0)
            spread(m.variability[static_cast<std::size_t>(k)].spread, typical, eta[static_cast<std::size_t>(k)],
                   static_cast<std::size_t>(k), values[i]);
    }
    std::vector<double> jac(base.size() * n, 0.0);
    for (std::size_t i = 0; i < base.size(); ++i)
        for (std::size_t k = 0; k < n; ++k) jac[i * n + k] = values[i].d[k];
    return jac;
}

}  // namespace plateau::fit
