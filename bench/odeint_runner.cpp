// Boost.Odeint: controlled steppers (error control, no dense output) and Dormand-Prince 5 with dense output.
// Integrate from dose to dose, restarting at each dose. Values at the check times by integrate_times: a
// controlled stepper lands a step on each of them; the dense-output stepper steps freely and interpolates.
#include <cmath>
#include <functional>
#include <limits>
#include <stdexcept>
#include <vector>

#include <boost/numeric/odeint.hpp>

#include "runners.hpp"

namespace plateau::bench {

namespace {

namespace ode = boost::numeric::odeint;
using State = std::vector<double>;

constexpr double kFirstStep = 0.1;  // h, initial step guess after each dose

auto controlled_dopri5(double tol) { return ode::make_controlled(tol, tol, ode::runge_kutta_dopri5<State>()); }
auto controlled_rkf78(double tol) { return ode::make_controlled(tol, tol, ode::runge_kutta_fehlberg78<State>()); }
auto dense_dopri5(double tol) { return ode::make_dense_output(tol, tol, ode::runge_kutta_dopri5<State>()); }

// Forget the derivative carried over from the last step (the first-same-as-last stepper keeps it): the dose
// changed the state. The dense-output stepper re-initialises itself at the start of each integrate call.
template <class Stepper>
void restart(Stepper& st) {
    if constexpr (requires { st.reset(); }) st.reset();
}

template <class Stepper>
Run job(const Problem& p, Stepper st) {
    Run r;
    r.conc.assign(p.checks.size(), std::numeric_limits<double>::quiet_NaN());
    State x(static_cast<std::size_t>(p.n_states), 0.0);
    const auto conc = static_cast<std::size_t>(p.conc_state);
    std::vector<double> times;
    std::vector<long> which;  // check index of each time, −1 for none
    std::size_t c = 0;
    const std::size_t n = p.dose_times.size();
    for (std::size_t k = 0; k < n; ++k) {
        const double t0 = p.dose_times[k];
        const double t1 = k + 1 < n ? p.dose_times[k + 1] : p.t_end;
        const bool last = k + 1 == n;
        x[static_cast<std::size_t>(p.dose_state)] += p.dose_amount;
        restart(st);
        times.assign(1, t0);
        which.assign(1, -1);
        for (; c < p.checks.size() && (p.checks[c] < t1 || (last && p.checks[c] <= t1)); ++c) {
            if (p.checks[c] < t0) continue;
            if (p.checks[c] == t0) {
                which[0] = static_cast<long>(c);
                continue;
            }
            times.push_back(p.checks[c]);
            which.push_back(static_cast<long>(c));
        }
        if (times.back() != t1) {
            times.push_back(t1);
            which.push_back(-1);
        }
        std::size_t i = 0;
        auto observe = [&](const State& s, double) {
            if (which[i] >= 0) r.conc[static_cast<std::size_t>(which[i])] = s[conc] / p.conc_volume;
            ++i;
        };
        r.steps += static_cast<long>(
            ode::integrate_times(st, std::cref(p.rhs), x, times.begin(), times.end(), kFirstStep, observe));
    }
    return r;
}

template <class Stepper>
long integrate_only(const Problem& p, Stepper st) {
    State x(static_cast<std::size_t>(p.n_states), 0.0);
    long steps = 0;
    const std::size_t n = p.dose_times.size();
    for (std::size_t k = 0; k < n; ++k) {
        const double t0 = p.dose_times[k];
        const double t1 = k + 1 < n ? p.dose_times[k + 1] : p.t_end;
        x[static_cast<std::size_t>(p.dose_state)] += p.dose_amount;
        restart(st);
        steps += static_cast<long>(ode::integrate_adaptive(st, std::cref(p.rhs), x, t0, t1, kFirstStep));
    }
    if (!std::isfinite(x[0])) throw std::runtime_error(p.name + ": odeint run is not finite");
    return steps;
}

}  // namespace

Run odeint_job(const Problem& p, Method m, double tol) {
    if (m == Method::Dopri5) return job(p, controlled_dopri5(tol));
    if (m == Method::Fehlberg78) return job(p, controlled_rkf78(tol));
    if (m == Method::Dopri5Dense) return job(p, dense_dopri5(tol));
    throw std::logic_error("not an odeint method");
}

long odeint_integrate_only(const Problem& p, Method m, double tol) {
    if (m == Method::Dopri5) return integrate_only(p, controlled_dopri5(tol));
    if (m == Method::Fehlberg78) return integrate_only(p, controlled_rkf78(tol));
    if (m == Method::Dopri5Dense) return integrate_only(p, dense_dopri5(tol));
    throw std::logic_error("not an odeint method");
}

}  // namespace plateau::bench
