// Forward sensitivities: the model augmented with s = ∂x/∂p, integrated by the Taylor engine through the same
// events as the plain run; and the finite-difference version the tests check them against.
#include "sim/sensitivity.hpp"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <stdexcept>
#include <string>

#include "expr/build.hpp"
#include "expr/derivative.hpp"
#include "regimen/time.hpp"
#include "taylor/series.hpp"

namespace plateau::sim {

namespace {

// At most this tolerance: the derivatives are as accurate as the values (same as the finite-difference check).
constexpr double kSensitivityTolerance = 1e-13;

void check_arguments(const model::Model& m, std::span<const double> params, int output, std::span<const int> wrt) {
    if (params.size() != m.parameters.size())
        throw std::invalid_argument("output_sensitivities: one value per model parameter is required");
    if (output < 0 || static_cast<std::size_t>(output) >= m.outputs.size())
        throw std::invalid_argument("output_sensitivities: output index " + std::to_string(output) +
                                    " is not an output of model '" + m.id + "'");
    for (int i : wrt)
        if (i < 0 || static_cast<std::size_t>(i) >= m.parameters.size())
            throw std::invalid_argument("output_sensitivities: parameter index " + std::to_string(i) +
                                        " is not a parameter of model '" + m.id + "'");
}

// The sensitivity of compartment c to parameter j is state nc + c·np + j of the augmented system. It is carried
// scaled, s̃ = scale_j·∂x/∂p_j with scale_j = |p_j| (1 when p_j = 0), so that it has the amounts' magnitude and
// joins the step rule's norm on an equal footing; the results are divided by the scale again.
struct Augmented {
    model::Model model;            // compartments and rates: the amounts, then the scaled sensitivities
    std::vector<double> scale;     // per parameter of wrt
};

Augmented augment(const model::Model& m, std::span<const double> params, int output, std::span<const int> wrt) {
    const std::size_t nc = m.compartments.size(), np = wrt.size();
    Augmented a;
    a.model.id = m.id + " (sensitivities)";
    a.model.parameters = m.parameters;
    a.model.compartments = m.compartments;
    a.model.rates = m.rates;
    for (int w : wrt) {
        const double p = params[static_cast<std::size_t>(w)];
        a.scale.push_back(p != 0.0 ? std::abs(p) : 1.0);
    }
    auto s_name = [&](std::size_t c, std::size_t j) {
        return "d " + m.compartments[c].name + " / d " + m.parameters[static_cast<std::size_t>(wrt[j])].name;
    };
    // ∂f_i/∂x_k and ∂f_i/∂p_j, once each.
    std::vector<expr::Ptr> jac(nc * nc), dfp(nc * np);
    const expr::Ptr zero = expr::num(0.0);
    for (std::size_t i = 0; i < nc; ++i) {
        const expr::Ptr& f = m.rates[i].expr;
        for (std::size_t k = 0; k < nc; ++k) jac[i * nc + k] = f ? expr::derivative(f, m.compartments[k].name) : zero;
        for (std::size_t j = 0; j < np; ++j)
            dfp[i * np + j] =
                f ? expr::derivative(f, m.parameters[static_cast<std::size_t>(wrt[j])].name) : zero;
    }
    // Sensitivity compartments: ds̃_ij/dt = Σ_k ∂f_i/∂x_k·s̃_kj + scale_j·∂f_i/∂p_j.
    for (std::size_t c = 0; c < nc; ++c)
        for (std::size_t j = 0; j < np; ++j) {
            model::Compartment comp = m.compartments[c];
            comp.name = s_name(c, j);
            a.model.compartments.push_back(comp);
        }
    for (std::size_t i = 0; i < nc; ++i)
        for (std::size_t j = 0; j < np; ++j) {
            expr::Ptr r = expr::mul(expr::num(a.scale[j]), dfp[i * np + j]);
            for (std::size_t k = 0; k < nc; ++k)
                r = expr::add(r, expr::mul(jac[i * nc + k], expr::var(s_name(k, j))));
            model::Rate rate = m.rates[i];
            rate.expr = expr::is_number(r, 0.0) ? nullptr : r;
            a.model.rates.push_back(rate);
        }
    // Outputs: y, then scale_j·∂y/∂p_j = Σ_k ∂g/∂x_k·s̃_kj + scale_j·∂g/∂p_j.
    const model::Output& y = m.outputs[static_cast<std::size_t>(output)];
    a.model.outputs.push_back(y);
    for (std::size_t j = 0; j < np; ++j) {
        expr::Ptr d = expr::mul(expr::num(a.scale[j]),
                                expr::derivative(y.expr, m.parameters[static_cast<std::size_t>(wrt[j])].name));
        for (std::size_t k = 0; k < nc; ++k)
            d = expr::add(d, expr::mul(expr::derivative(y.expr, m.compartments[k].name), expr::var(s_name(k, j))));
        model::Output o = y;
        o.name = "d " + y.name + " / d " + m.parameters[static_cast<std::size_t>(wrt[j])].name;
        o.expr = d;
        a.model.outputs.push_back(o);
    }
    return a;
}

// The event of `events` at time t (one instant by regimen/time.hpp; build_events made one for every input).
Event& event_at(std::vector<Event>& events, double t) {
    auto it = std::lower_bound(events.begin(), events.end(), t, [](const Event& e, double v) { return e.time < v; });
    Event* best = nullptr;
    if (it != events.end() && regimen::same_instant(it->time, t)) best = &*it;
    if (it != events.begin() && regimen::same_instant(std::prev(it)->time, t))
        if (!best || std::abs(std::prev(it)->time - t) < std::abs(best->time - t)) best = &*std::prev(it);
    if (!best) throw std::logic_error("output_sensitivities: no event at a dose time");
    return *best;
}

// The plain run's events, widened to the augmented states, plus what the doses do to the sensitivities.
std::vector<Event> augmented_events(const model::Model& m, std::span<const double> params,
                                    const std::vector<Dose>& doses, std::span<const int> wrt,
                                    const std::vector<double>& scale) {
    const std::size_t nc = m.compartments.size(), np = wrt.size(), nx = nc * (1 + np);
    std::vector<Event> events = build_events(m, params, doses);
    for (Event& e : events) {
        e.bolus.resize(nx, 0.0);
        e.rate_change.resize(nx, 0.0);
    }
    const std::vector<double> pv(params.begin(), params.end());
    // A of the rates when they are linear in the compartments (needed only for a lag that depends on p).
    taylor::Expander linear(model_tape(m), 1);
    linear.set_params(params);
    for (const Dose& d : doses) {
        const model::Route& route = m.routes[static_cast<std::size_t>(d.route)];
        const auto into = static_cast<std::size_t>(route.into);
        const double f = route.fraction ? model::evaluate_constant(m, *route.fraction, pv) : 1.0;
        const double lag = route.lag ? model::evaluate_constant(m, *route.lag, pv) : 0.0;
        const double t = d.time + lag;
        const bool infusion = d.duration > 0.0 && regimen::before(t, t + d.duration);
        for (std::size_t j = 0; j < np; ++j) {
            const std::string& pname = m.parameters[static_cast<std::size_t>(wrt[j])].name;
            const double df =
                route.fraction ? model::evaluate_constant(m, *expr::derivative(route.fraction, pname), pv) : 0.0;
            const double dlag = route.lag ? model::evaluate_constant(m, *expr::derivative(route.lag, pname), pv) : 0.0;
            const std::size_t s_into = nc + into * np + j;
            // The amount (or rate) given depends on p through F.
            if (infusion) {
                const double dr = scale[j] * d.amount / d.duration * df;
                event_at(events, t).rate_change[s_into] += dr;
                event_at(events, t + d.duration).rate_change[s_into] -= dr;
            } else {
                event_at(events, t).bolus[s_into] += scale[j] * d.amount * df;
            }
            if (dlag == 0.0) continue;
            // The dose moves with p: s jumps by (f(t⁻) − f(t⁺))·∂τ/∂p = −(A·Δx + Δu)·∂τ/∂p for rates linear in
            // the compartments (Δx, Δu: this dose's jump and input-rate change).
            if (!linear.linear())
                throw std::invalid_argument(
                    "derivatives with respect to parameter '" + pname + "' are not available: the lag of route '" +
                    route.name + "' depends on it and the rates of model '" + m.id +
                    "' are not linear in the compartments (the jump a moved dose causes then depends on the state)");
            const auto a = linear.linear_matrix();
            if (infusion) {
                const double rate = f * d.amount / d.duration;
                event_at(events, t).bolus[s_into] -= scale[j] * rate * dlag;
                event_at(events, t + d.duration).bolus[s_into] += scale[j] * rate * dlag;
            } else {
                Event& e = event_at(events, t);
                for (std::size_t i = 0; i < nc; ++i) e.bolus[nc + i * np + j] -= scale[j] * a[i * nc + into] * f * d.amount * dlag;
            }
        }
    }
    return events;
}

std::vector<double> values_at(const model::Model& m, std::span<const double> params, const std::vector<Dose>& doses,
                              int output, std::span<const double> times, double t_end, const Options& opt,
                              taylor::Outcome& outcome) {
    const Simulation s = simulate(m, params, doses, t_end, opt);
    std::vector<double> v;
    if (s.outcome != taylor::Outcome::Ok) {
        outcome = s.outcome;
        v.assign(times.size(), 0.0);  // not read: the caller sees the outcome (a failed run may have no step)
        return v;
    }
    v.reserve(times.size());
    for (double t : times) v.push_back(s.trajectory.value(s.output_series(output), t));
    return v;
}

}  // namespace

OutputSensitivity output_sensitivities(const model::Model& m, std::span<const double> params,
                                       const std::vector<Dose>& doses, int output, std::span<const double> times,
                                       std::span<const int> wrt, double t_end, const Options& opt) {
    check_arguments(m, params, output, wrt);
    Options tight = opt;
    tight.tol = std::min(opt.tol, kSensitivityTolerance);
    tight.sensitivities = static_cast<int>(wrt.size());
    const Augmented aug = augment(m, params, output, wrt);
    const std::vector<Event> events = augmented_events(m, params, doses, wrt, aug.scale);
    taylor::Stepper stepper(model_tape(aug.model), params, tight.tol, tight.order);
    const std::vector<double> x0(aug.model.compartments.size(), 0.0);
    const Simulation s = integrate_events(m, stepper, events, x0, t_end, tight);

    OutputSensitivity r;
    r.outcome = s.outcome;
    if (s.outcome != taylor::Outcome::Ok) return r;  // a failed run has no values to read (it may have no step)
    const int ns = static_cast<int>(x0.size());
    r.value.reserve(times.size());
    r.d.assign(times.size(), std::vector<double>(wrt.size(), 0.0));
    for (std::size_t k = 0; k < times.size(); ++k) {
        r.value.push_back(s.trajectory.value(ns, times[k]));
        for (std::size_t j = 0; j < wrt.size(); ++j)
            r.d[k][j] = s.trajectory.value(ns + 1 + static_cast<int>(j), times[k]) / aug.scale[j];
    }
    return r;
}

OutputSensitivity output_sensitivities_fd(const model::Model& m, std::span<const double> params,
                                          const std::vector<Dose>& doses, int output, std::span<const double> times,
                                          std::span<const int> wrt, double t_end, const Options& opt) {
    check_arguments(m, params, output, wrt);
    Options tight = opt;
    tight.tol = std::min(opt.tol, kSensitivityTolerance);
    OutputSensitivity r;
    r.value = values_at(m, params, doses, output, times, t_end, tight, r.outcome);
    r.d.assign(times.size(), std::vector<double>(wrt.size(), 0.0));
    std::vector<double> p(params.begin(), params.end());
    for (std::size_t j = 0; j < wrt.size(); ++j) {
        const auto i = static_cast<std::size_t>(wrt[j]);
        const double h = 1e-5 * std::max(std::abs(params[i]), 1e-8);
        p[i] = params[i] + h;
        const auto up = values_at(m, p, doses, output, times, t_end, tight, r.outcome);
        p[i] = params[i] - h;
        const auto down = values_at(m, p, doses, output, times, t_end, tight, r.outcome);
        p[i] = params[i];
        for (std::size_t k = 0; k < times.size(); ++k) r.d[k][j] = (up[k] - down[k]) / (2.0 * h);
    }
    return r;
}

}  // namespace plateau::sim
