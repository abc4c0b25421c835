#include "problems.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <boost/math/special_functions/lambert_w.hpp>

#include "expr/expr.hpp"

namespace plateau::bench {

namespace {

constexpr double kHorizon = 30.0 * 24.0;  // 30 days in h

model::Parameter parameter(const char* name, double value) {
    model::Parameter p;
    p.name = name;
    p.value = value;
    return p;
}

model::Compartment compartment(const char* name) {
    model::Compartment c;
    c.name = name;
    c.unit_text = "mg";
    return c;
}

model::Rate rate(const char* text) {
    model::Rate r;
    r.text = text;
    r.expr = expr::parse(text);
    return r;
}

model::Output output(const char* name, const char* text) {
    model::Output o;
    o.name = name;
    o.text = text;
    o.expr = expr::parse(text);
    o.unit_text = "mg/L";
    return o;
}

model::Route route(const char* name, int into, const char* fraction) {
    model::Route r;
    r.name = name;
    r.into = into;
    if (fraction != nullptr) {
        r.fraction_text = fraction;
        r.fraction = expr::parse(fraction);
    }
    return r;
}

// Doses of `amount` every `every` hours from 0 while the time is before the horizon; hourly check times.
void schedule(Problem& p, double amount, double every) {
    p.t_end = kHorizon;
    for (int k = 0; static_cast<double>(k) * every < kHorizon - 1e-9; ++k) {
        const double t = static_cast<double>(k) * every;
        p.doses.push_back(sim::Dose{t, 0, amount, 0.0, 0});
        p.dose_times.push_back(t);
    }
    for (int h = 1; static_cast<double>(h) <= kHorizon + 1e-9; ++h) p.checks.push_back(static_cast<double>(h));
    p.params = p.model.default_values();
    p.n_states = static_cast<int>(p.model.compartments.size());
    p.conc_series = p.n_states;  // the first output follows the compartments
}

// Doses with time <= t (right-continuous at a dose), as elapsed times t - t_dose.
std::vector<double> elapsed(const Problem& p, double t) {
    std::vector<double> out;
    for (double td : p.dose_times)
        if (td <= t) out.push_back(t - td);
    return out;
}

}  // namespace

void Rhs::eval(const double* x, double* dxdt) const {
    switch (kind) {
        case Kind::OralOneCompartment:  // p1 = ka, p2 = k
            dxdt[0] = -p1 * x[0];
            dxdt[1] = p1 * x[0] - p2 * x[1];
            break;
        case Kind::TwoCompartmentIv:  // p1 = k10, p2 = k12, p3 = k21
            dxdt[0] = -p1 * x[0] - p2 * x[0] + p3 * x[1];
            dxdt[1] = p2 * x[0] - p3 * x[1];
            break;
        case Kind::MichaelisMenten: {  // p1 = vmax (mg/h), p2 = km (mg/L), p3 = v (L)
            const double c = x[0] / p3;
            dxdt[0] = -p1 * c / (p2 + c);
            break;
        }
    }
}

void Rhs::operator()(const std::vector<double>& x, std::vector<double>& dxdt, double /*t*/) const {
    eval(x.data(), dxdt.data());
}

Problem oral_one_compartment() {
    const double ka = 1.2, cl = 5.0, v = 40.0, f = 0.8, dose = 500.0;
    Problem p;
    p.name = "1-cpt oral";
    p.model.id = "bench-one-compartment-oral";
    p.model.parameters = {parameter("ka", ka), parameter("cl", cl), parameter("v", v), parameter("f", f)};
    p.model.compartments = {compartment("gut"), compartment("central")};
    p.model.rates = {rate("-ka*gut"), rate("ka*gut - cl/v*central")};
    p.model.outputs = {output("conc", "central/v")};
    p.model.routes = {route("oral", 0, "f")};
    schedule(p, dose, 12.0);
    const double k = cl / v;
    p.rhs = Rhs{Kind::OralOneCompartment, ka, k, 0.0};
    p.dose_state = 0;
    p.dose_amount = f * dose;
    p.conc_state = 1;
    p.conc_volume = v;
    // Superposition of the single-dose solution F·D·ka/(V(ka−k))·(e^{−kτ} − e^{−kaτ}); every term is >= 0, and
    // e^{−kτ} − e^{−kaτ} = −e^{−kτ}·expm1(−(ka−k)τ) avoids the cancellation at small τ.
    for (double t : p.checks) {
        double c = 0.0;
        for (double tau : elapsed(p, t))
            c += f * dose * ka / (v * (ka - k)) * (-std::exp(-k * tau) * std::expm1(-(ka - k) * tau));
        p.exact.push_back(c);
    }
    p.reference = "closed form, superposed single doses";
    return p;
}

Problem two_compartment_iv() {
    const double k10 = 0.192, k12 = 1.86, k21 = 1.68, v1 = 35.295, dose = 500.0;
    Problem p;
    p.name = "2-cpt IV";
    p.model.id = "bench-two-compartment-iv";
    p.model.parameters = {parameter("k10", k10), parameter("k12", k12), parameter("k21", k21),
                          parameter("v1", v1)};
    p.model.compartments = {compartment("central"), compartment("peripheral")};
    p.model.rates = {rate("-k10*central - k12*central + k21*peripheral"), rate("k12*central - k21*peripheral")};
    p.model.outputs = {output("conc", "central/v1")};
    p.model.routes = {route("iv", 0, nullptr)};
    schedule(p, dose, 12.0);
    p.rhs = Rhs{Kind::TwoCompartmentIv, k10, k12, k21};
    p.dose_state = 0;
    p.dose_amount = dose;
    p.conc_state = 0;
    p.conc_volume = v1;
    // α, β: roots of s² − (k10 + k12 + k21)s + k10·k21; the small root from the product to avoid cancellation.
    const double sum = k10 + k12 + k21, prod = k10 * k21;
    const double alpha = 0.5 * (sum + std::sqrt(sum * sum - 4.0 * prod));
    const double beta = prod / alpha;
    const double a = dose / v1 * (alpha - k21) / (alpha - beta);
    const double b = dose / v1 * (k21 - beta) / (alpha - beta);
    for (double t : p.checks) {
        double c = 0.0;
        for (double tau : elapsed(p, t)) c += a * std::exp(-alpha * tau) + b * std::exp(-beta * tau);
        p.exact.push_back(c);
    }
    p.reference = "closed form, superposed biexponentials";
    return p;
}

Problem michaelis_menten() {
    const double vmax = 490.0 / 24.0, km = 4.0, v = 49.0, dose = 300.0;
    Problem p;
    p.name = "MM IV";
    p.model.id = "bench-michaelis-menten-iv";
    p.model.parameters = {parameter("vmax", vmax), parameter("km", km), parameter("v", v)};
    p.model.compartments = {compartment("central")};
    p.model.rates = {rate("-vmax*(central/v)/(km + central/v)")};
    p.model.outputs = {output("conc", "central/v")};
    p.model.routes = {route("iv", 0, nullptr)};
    schedule(p, dose, 24.0);
    p.rhs = Rhs{Kind::MichaelisMenten, vmax, km, v};
    p.dose_state = 0;
    p.dose_amount = dose;
    p.conc_state = 0;
    p.conc_volume = v;
    // Between doses C(τ) = Km·W0[(C0/Km)·exp((C0 − Vmax·τ/V)/Km)], C0 the concentration just after the dose
    // (Schnell & Mendoza, J Theor Biol 1997); chained from dose to dose. W0's condition number is 1/(1 + W) < 1,
    // so each value carries only the rounding of the exponential: about 1e-15 relative.
    auto after = [&](double c0, double tau) {
        return km * boost::math::lambert_w0((c0 / km) * std::exp((c0 - vmax * tau / v) / km));
    };
    std::vector<double> c0(p.dose_times.size());
    double before = 0.0;
    for (std::size_t i = 0; i < p.dose_times.size(); ++i) {
        c0[i] = before + dose / v;
        const double next = i + 1 < p.dose_times.size() ? p.dose_times[i + 1] : p.t_end;
        before = after(c0[i], next - p.dose_times[i]);
    }
    for (double t : p.checks) {
        std::size_t i = 0;
        while (i + 1 < p.dose_times.size() && p.dose_times[i + 1] <= t) ++i;
        p.exact.push_back(after(c0[i], t - p.dose_times[i]));
    }
    p.reference = "closed form (Lambert W), chained dose to dose";
    return p;
}

double max_relative_error(const Problem& p, const std::vector<double>& conc) {
    if (conc.size() != p.exact.size()) throw std::logic_error("check count mismatch");
    double worst = 0.0;
    for (std::size_t i = 0; i < conc.size(); ++i) {
        const double e = std::abs(conc[i] - p.exact[i]) / std::abs(p.exact[i]);
        if (std::isnan(e)) return e;  // a missing or non-finite value is the worst error
        worst = std::max(worst, e);
    }
    return worst;
}

}  // namespace plateau::bench
