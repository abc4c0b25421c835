// A subject's parameter values as functions of the random effects, with exact first derivatives (forward mode:
// each value carries its gradient in η). Follows model::individualize step by step: varied fixed parameters
// first, then derived parameters in order, each then varied by its own random effect if it has one.
// The derivative of a derived parameter's expression is taken here by forward-mode evaluation of the
// expression tree (the symbolic derivative of the expression engine gives the same numbers).
#include <cmath>
#include <stdexcept>

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

Dual binary(expr::Op op, const Dual& a, const Dual& b) {
    switch (op) {
    case expr::Op::Add: return {a.v + b.v, combine(1.0, a.d, 1.0, b.d)};
    case expr::Op::Sub: return {a.v - b.v, combine(1.0, a.d, -1.0, b.d)};
    case expr::Op::Mul: return {a.v * b.v, combine(b.v, a.d, a.v, b.d)};
    case expr::Op::Div: {
        const double q = a.v / b.v;
        return {q, combine(1.0 / b.v, a.d, -q / b.v, b.d)};
    }
    case expr::Op::Pow: {
        const double v = std::pow(a.v, b.v);
        if (is_zero(b.d)) return {v, scale(b.v == 0.0 ? 0.0 : b.v * std::pow(a.v, b.v - 1.0), a.d)};
        return {v, combine(v * b.v / a.v, a.d, v * std::log(a.v), b.d)};
    }
    default: throw std::logic_error("fit: not a binary operation");
    }
}

Dual eval(const expr::Node& e, const std::vector<Dual>& values, const model::Model& m) {
    const std::size_t n = values.empty() ? 0 : values.front().d.size();
    switch (e.op) {
    case expr::Op::Num: return constant(e.num, n);
    case expr::Op::Var: {
        const int i = m.parameter_index(e.name);
        if (i < 0) throw std::logic_error("fit: '" + e.name + "' is not a parameter");
        return values[static_cast<std::size_t>(i)];
    }
    case expr::Op::Neg: {
        const Dual a = eval(*e.a, values, m);
        return {-a.v, scale(-1.0, a.d)};
    }
    case expr::Op::Exp: {
        const Dual a = eval(*e.a, values, m);
        const double v = std::exp(a.v);
        return {v, scale(v, a.d)};
    }
    case expr::Op::Log: {
        const Dual a = eval(*e.a, values, m);
        return {std::log(a.v), scale(1.0 / a.v, a.d)};
    }
    case expr::Op::Sqrt: {
        const Dual a = eval(*e.a, values, m);
        const double v = std::sqrt(a.v);
        return {v, scale(0.5 / v, a.d)};
    }
    case expr::Op::Add:
    case expr::Op::Sub:
    case expr::Op::Mul:
    case expr::Op::Div: {
        // Loop down the left chain of a long sum or product instead of recursing once per term.
        std::vector<const expr::Node*> chain;
        const expr::Node* bottom = expr::left_chain(e, chain);
        Dual acc = eval(*bottom, values, m);
        for (auto it = chain.rbegin(); it != chain.rend(); ++it) acc = binary((*it)->op, acc, eval(*(*it)->b, values, m));
        return acc;
    }
    case expr::Op::Pow: return binary(expr::Op::Pow, eval(*e.a, values, m), eval(*e.b, values, m));
    }
    throw std::logic_error("fit: unknown operation");
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
        const Dual typical = eval(*q.expr, values, m);
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
