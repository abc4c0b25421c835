#include "metrics/steady_state.hpp"

#include <algorithm>
#include <cmath>

#include <Eigen/Dense>

namespace plateau::metrics {

std::optional<Period> final_period(const regimen::Regimen& r) {
    int best = -1;
    double best_last = 0.0;
    for (std::size_t i = 0; i < r.doses.size(); ++i) {
        const auto& d = r.doses[i];
        if (d.count < 2 || !(d.every > 0.0)) continue;
        const double last = d.at + static_cast<double>(d.count - 1) * d.every;
        if (best < 0 || last >= best_last) {
            best = static_cast<int>(i);
            best_last = last;
        }
    }
    if (best < 0) return std::nullopt;
    Period p;
    p.entry = best;
    p.tau = r.doses[static_cast<std::size_t>(best)].every;
    p.start = best_last;
    const double eps = 1e-9 * std::max(1.0, p.tau);
    for (std::size_t i = 0; i < r.doses.size(); ++i) {
        const auto& d = r.doses[i];
        if (d.count < 2 || std::abs(d.every - p.tau) > eps) continue;
        const double last = d.at + static_cast<double>(d.count - 1) * d.every;
        if (last <= p.start - p.tau + eps) continue;  // this series stopped before the final period
        double offset = std::fmod(last - p.start, p.tau);
        if (offset < -eps) offset += p.tau;
        if (offset < eps || offset > p.tau - eps) offset = 0.0;
        p.doses.push_back(sim::Dose{offset, d.route_index, d.amount, d.over, static_cast<int>(i)});
    }
    std::stable_sort(p.doses.begin(), p.doses.end(),
                     [](const sim::Dose& a, const sim::Dose& b) { return a.time < b.time; });
    return p;
}

namespace {

// Events of the steady-state period: each dose repeated in earlier periods, so that infusions still running
// and doses delayed past the period end (lag) carry over; only what happens inside [0, tau) is kept, and rate
// changes from earlier periods add up at 0.
std::vector<sim::Event> periodic_events(const model::Model& m, std::span<const double> params, const Period& p,
                                        bool carry_over) {
    const std::vector<double> pv(params.begin(), params.end());
    double reach = 0.0;
    for (const auto& d : p.doses) {
        const auto& route = m.routes[static_cast<std::size_t>(d.route)];
        const double lag = route.lag ? model::evaluate_constant(m, *route.lag, pv) : 0.0;
        reach = std::max(reach, d.time + lag + d.duration);
    }
    const long copies = carry_over ? std::min(100000L, static_cast<long>(std::ceil(reach / p.tau)) + 1) : 0;
    std::vector<sim::Dose> doses;
    for (long k = 0; k <= copies; ++k)
        for (auto d : p.doses) {
            d.time -= static_cast<double>(k) * p.tau;
            doses.push_back(d);
        }
    std::stable_sort(doses.begin(), doses.end(), [](const sim::Dose& a, const sim::Dose& b) { return a.time < b.time; });
    std::vector<sim::Event> all = sim::build_events(m, params, doses), kept;
    const double eps = 1e-9 * std::max(1.0, p.tau);
    for (auto& e : all) {
        if (e.time >= p.tau - eps) continue;            // belongs to the next period
        if (e.time < -eps) {
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

}  // namespace

PeriodicSolution solve_periodic(const model::Model& m, std::span<const double> params, const Period& p,
                                std::span<const double> guess, const sim::Options& opt) {
    PeriodicSolution out;
    const std::size_t n = m.compartments.size();
    taylor::Stepper stepper(sim::model_tape(m), params, opt.tol, opt.order);
    const std::vector<sim::Event> events = periodic_events(m, params, p, true);

    bool failed = false;
    auto phi = [&](const std::vector<double>& x) {
        sim::Simulation s = sim::integrate_events(m, stepper, events, x, p.tau, opt);
        if (s.outcome != taylor::Outcome::Ok) {
            failed = true;
            return std::vector<double>(n, 0.0);
        }
        return sim::final_state(s);
    };

    double dosed = 0.0;
    for (const auto& d : p.doses) dosed += d.amount;
    std::vector<double> x(n, 0.0);
    if (guess.size() == n)
        for (std::size_t i = 0; i < n; ++i) x[i] = std::max(0.0, guess[i]);

    auto residual = [&](const std::vector<double>& xs, std::vector<double>& fx) {
        fx = phi(xs);
        for (std::size_t i = 0; i < n; ++i) fx[i] -= xs[i];
        return inf_norm(fx);
    };
    std::vector<double> f;
    double r = residual(x, f);
    const int max_iter = 60;
    for (out.iterations = 0; out.iterations < max_iter && !failed; ++out.iterations) {
        const double scale = std::max({1e-300, inf_norm(x), dosed});
        if (r <= 1e-13 * dosed + 1e-15 * inf_norm(x)) break;
        // Jacobian of Φ by forward differences (exact up to round-off for the affine maps of linear models).
        Eigen::MatrixXd jac(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
        const std::vector<double> phix = phi(x);
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
        std::vector<double> xn(n), fn;
        for (int k = 0; k < 30 && !failed; ++k, lambda *= 0.5) {
            for (std::size_t i = 0; i < n; ++i)
                xn[i] = std::max(0.0, x[i] + lambda * delta(static_cast<Eigen::Index>(i)));
            const double rn = residual(xn, fn);
            if (!failed && rn < r) {
                x = xn;
                f = fn;
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
    // The residual is judged against the amount dosed per period: near saturation the amounts can be huge
    // while each period still adds a fixed excess, which is no steady state at all.
    if (!(r <= 1e-9 * dosed + 1e-13 * inf_norm(x))) {
        out.why_not = "no periodic steady state found: the amounts keep rising from one dose to the next "
                      "(the dose rate may exceed the maximum elimination rate)";
        return out;
    }
    out.found = true;
    out.period = sim::integrate_events(m, stepper, events, x, p.tau, opt);
    const std::vector<double> zero(n, 0.0);
    out.first_dose = sim::integrate_events(m, stepper, periodic_events(m, params, p, false), zero, p.tau, opt);
    return out;
}

}  // namespace plateau::metrics
