#include "sim/steady_state.hpp"

#include <algorithm>
#include <cmath>
#include <utility>

#include <Eigen/Dense>

#include "regimen/time.hpp"

namespace plateau::sim {

namespace {

// Events of the steady-state cycle: each dose repeated in earlier cycles, so that infusions still running and
// doses delayed past the cycle end (lag) carry over; only what happens inside [0, period) is kept, and rate
// changes from earlier cycles add up at 0.
std::vector<Event> cycle_events(const model::Model& m, std::span<const double> params, const Cycle& c,
                                bool carry_over) {
    const std::vector<double> pv(params.begin(), params.end());
    double reach = 0.0;
    for (const auto& d : c.doses) {
        const auto& route = m.routes[static_cast<std::size_t>(d.route)];
        const double lag = route.lag ? model::evaluate_constant(m, *route.lag, pv) : 0.0;
        reach = std::max(reach, d.time + lag + d.duration);
    }
    // Bounded: the loader refuses lags and infusions that make this overflow; 100 000 copies is the dose limit.
    const double need = std::ceil(reach / c.period) + 1.0;
    const long copies = carry_over ? static_cast<long>(std::min(100000.0, std::isfinite(need) ? need : 0.0)) : 0;
    std::vector<Dose> doses;
    for (long k = 0; k <= copies; ++k)
        for (auto d : c.doses) {
            d.time -= static_cast<double>(k) * c.period;
            doses.push_back(d);
        }
    std::stable_sort(doses.begin(), doses.end(), [](const Dose& a, const Dose& b) { return a.time < b.time; });
    std::vector<Event> all = build_events(m, params, doses), kept;
    for (auto& e : all) {
        if (!regimen::before(e.time, c.period)) continue;  // belongs to the next cycle
        if (regimen::before(e.time, 0.0)) {
            std::fill(e.bolus.begin(), e.bolus.end(), 0.0);  // already in the state
            e.time = 0.0;
        }
        kept.push_back(std::move(e));
    }
    return kept;
}

double inf_norm(const std::vector<double>& v) {
    double m = 0.0;
    for (double x : v) m = std::max(m, std::abs(x));
    return m;
}

double total(const std::vector<double>& v) {
    double s = 0.0;
    for (double x : v) s += x;
    return s;
}

}  // namespace

PeriodicSolution solve_cycle(const model::Model& m, std::span<const double> params, const Cycle& c,
                             std::span<const double> guess, const Options& user_opt) {
    PeriodicSolution out;
    Options opt = user_opt;
    opt.tol = std::min(user_opt.tol, kSteadyStateTolerance);
    opt.order = 0;
    const std::size_t n = m.compartments.size();
    std::optional<taylor::Tape> built;
    if (opt.tape == nullptr) built = model_tape(m);
    taylor::Stepper stepper(opt.tape != nullptr ? *opt.tape : *built, params, opt.tol, opt.order);
    const std::vector<Event> events = cycle_events(m, params, c, true);

    bool failed = false;
    // Φ(x): the state one cycle after x. `keep`, when given, receives the cycle's simulation.
    auto phi = [&](const std::vector<double>& x, Simulation* keep = nullptr) {
        Simulation s = integrate_events(m, stepper, events, x, c.period, opt);
        if (s.outcome != taylor::Outcome::Ok) {
            failed = true;
            return std::vector<double>(n, 0.0);
        }
        std::vector<double> end = final_state(s);
        if (keep != nullptr) *keep = std::move(s);
        return end;
    };

    double dosed = 0.0;
    for (const auto& d : c.doses) dosed += d.amount;
    std::vector<double> x(n, 0.0);
    if (guess.size() == n)
        for (std::size_t i = 0; i < n; ++i) x[i] = std::max(0.0, guess[i]);
    const std::vector<double> start = x;

    // Each residual keeps Φ(xs) and the cycle's simulation: the Newton step's Jacobian starts from Φ(x), and
    // the converged state's cycle is the steady state's trajectory, so neither is integrated twice.
    auto residual = [&](const std::vector<double>& xs, std::vector<double>& fx, std::vector<double>& phix,
                        Simulation& cycle) {
        phix = phi(xs, &cycle);
        fx = phix;
        for (std::size_t i = 0; i < n; ++i) fx[i] -= xs[i];
        return inf_norm(fx);
    };
    // Converged: what one cycle changes is round-off against the dose and the amounts (the solve's tolerance
    // of the amounts), and in any case a millionth of the dose: near saturation the amounts can be huge while
    // each cycle still adds a fixed excess, which is no steady state at all.
    auto converged = [&](double r, const std::vector<double>& xs) {
        return r <= 1e-9 * dosed + 1e-12 * inf_norm(xs) && r <= 1e-6 * dosed;
    };
    std::vector<double> f, phix;
    Simulation cycle;
    double r = residual(x, f, phix, cycle);
    const int max_iter = 60;
    for (out.iterations = 0; out.iterations < max_iter && !failed; ++out.iterations) {
        const double scale = std::max({1e-300, inf_norm(x), dosed});
        if (r <= 1e-13 * dosed + 1e-15 * inf_norm(x)) break;
        // Jacobian of Φ by forward differences (exact up to round-off for the affine maps of linear models).
        Eigen::MatrixXd jac(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
        for (std::size_t j = 0; j < n; ++j) {
            std::vector<double> xp = x;
            const double h = 1e-6 * std::max(std::abs(x[j]), scale);
            xp[j] += h;
            const std::vector<double> pj = phi(xp);
            for (std::size_t i = 0; i < n; ++i)
                jac(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = (pj[i] - phix[i]) / h;
        }
        if (failed) break;
        Eigen::MatrixXd a = jac - Eigen::MatrixXd::Identity(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
        Eigen::VectorXd rhs(static_cast<Eigen::Index>(n));
        for (std::size_t i = 0; i < n; ++i) rhs(static_cast<Eigen::Index>(i)) = -f[i];
        Eigen::VectorXd delta = a.fullPivLu().solve(rhs);
        // Damped update: halve the step until the residual falls; amounts stay non-negative.
        double lambda = 1.0;
        bool improved = false;
        std::vector<double> xn(n), fn, pn;
        Simulation cn;
        for (int k = 0; k < 30 && !failed; ++k, lambda *= 0.5) {
            for (std::size_t i = 0; i < n; ++i)
                xn[i] = std::max(0.0, x[i] + lambda * delta(static_cast<Eigen::Index>(i)));
            const double rn = residual(xn, fn, pn, cn);
            if (!failed && rn < r) {
                x = xn;
                f = fn;
                phix = pn;
                cycle = std::move(cn);
                r = rn;
                improved = true;
                break;
            }
        }
        if (!improved) break;
        if (inf_norm(x) > 1e12 * std::max(1.0, dosed)) break;
    }
    out.residual = r;
    out.state = x;
    if (failed) {
        out.why_not = "the integration failed while solving for the periodic state";
        return out;
    }
    if (!converged(r, x)) {
        // "No steady state" only when the body keeps gaining a sizeable share of each cycle's dose, cycle after
        // cycle, without slowing down: run the actual cycles from the starting state and look.
        std::vector<double> y = start;
        double prev_gain = 0.0;
        bool rising = true;
        for (int k = 0; k < 6 && rising && !failed; ++k) {
            std::vector<double> next = phi(y);
            const double gain = total(next) - total(y);
            rising = gain > 1e-3 * dosed && (k == 0 || gain > 0.9 * prev_gain);
            prev_gain = gain;
            y = std::move(next);
        }
        out.why_not = rising && !failed
                          ? "no periodic steady state: the amounts keep rising from one cycle to the next (the dose "
                            "rate may exceed the maximum elimination rate)"
                          : "the periodic steady state could not be solved to the required accuracy (Newton's method "
                            "did not converge)";
        return out;
    }
    out.found = true;
    out.period = std::move(cycle);  // the cycle from x, integrated by the last accepted residual
    const std::vector<double> zero(n, 0.0);
    out.first_cycle = integrate_events(m, stepper, cycle_events(m, params, c, false), zero, c.period, opt);
    return out;
}

namespace {

bool uses_time(const model::Model& m) {
    auto has_t = [](const expr::Ptr& p) {
        if (!p) return false;
        const auto ids = expr::identifiers(*p);
        return std::find(ids.begin(), ids.end(), "t") != ids.end();
    };
    for (const auto& r : m.rates)
        if (has_t(r.expr)) return true;
    for (const auto& o : m.outputs)
        if (has_t(o.expr)) return true;
    return false;
}

}  // namespace

std::optional<PeriodicSolution> steady_state(const model::Model& m, std::span<const double> params,
                                             const Schedule& s, const Simulation& actual, const Options& opt) {
    if (!s.repeats) return std::nullopt;
    PeriodicSolution none;
    if (!s.cycle) {
        none.why_not = s.no_cycle.empty() ? "no dosing pattern repeats at the end of the regimen" : s.no_cycle;
        return none;
    }
    if (uses_time(m)) {
        // Rates that change with t: one cycle is not like the next, so there is no periodic state.
        none.why_not = "the model's expressions depend on the time t, so the cycles never repeat exactly";
        return none;
    }
    std::vector<double> guess;
    const traj::Trajectory& tr = actual.trajectory;
    if (!tr.empty() && s.cycle->start <= tr.end())
        for (int k = 0; k < actual.n_states; ++k) guess.push_back(tr.left_limit(k, std::max(s.cycle->start, tr.start())));
    return solve_cycle(m, params, *s.cycle, guess, opt);
}

}  // namespace plateau::sim
