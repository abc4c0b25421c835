#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "runners.hpp"
#include "sim/simulate.hpp"

namespace plateau::bench {

namespace {
sim::Simulation simulate(const Problem& p, double tol) {
    sim::Options opt;
    opt.tol = tol;
    sim::Simulation s = sim::simulate(p.model, p.params, p.doses, p.t_end, opt);
    if (s.outcome != taylor::Outcome::Ok)
        throw std::runtime_error(p.name + ": Taylor run stopped at t = " + std::to_string(s.failed_at) + " h (" +
                                 taylor::outcome_name(s.outcome) + ")");
    return s;
}
}  // namespace

Run taylor_job(const Problem& p, double tol) {
    const sim::Simulation s = simulate(p, tol);
    Run r;
    r.steps = s.steps;
    r.order = s.order;
    r.conc.reserve(p.checks.size());
    for (double t : p.checks) r.conc.push_back(s.trajectory.value(p.conc_series, t));
    return r;
}

long taylor_integrate_only(const Problem& p, double tol) { return simulate(p, tol).steps; }

int taylor_setup(const Problem& p, double tol, std::size_t& n_events) {
    const std::vector<sim::Event> events = sim::build_events(p.model, p.params, p.doses);
    const taylor::Stepper stepper(sim::model_tape(p.model), p.params, tol);
    n_events = events.size();
    return stepper.order();
}

long run_taylor_no_store(const Problem& p, double tol, double& conc_end) {
    const std::vector<sim::Event> events = sim::build_events(p.model, p.params, p.doses);
    taylor::Stepper stepper(sim::model_tape(p.model), p.params, tol);
    const std::size_t nc = p.model.compartments.size();
    const std::size_t stride = static_cast<std::size_t>(stepper.order()) + 1;
    std::vector<double> x(nc, 0.0), u(nc, 0.0), coeffs;
    double t = 0.0;
    long steps = 0;
    std::size_t next = 0;
    while (true) {
        while (next < events.size() && events[next].time <= t + 1e-9 * std::max(1.0, std::abs(t))) {
            for (std::size_t c = 0; c < nc; ++c) {
                x[c] += events[next].bolus[c];
                u[c] += events[next].rate_change[c];
            }
            ++next;
        }
        if (t >= p.t_end) break;
        const double stop = next < events.size() ? std::min(events[next].time, p.t_end) : p.t_end;
        while (t < stop) {
            const double h_max = stop - t;
            const taylor::StepResult r = stepper.step(t, x, u, h_max, coeffs);
            if (r.outcome != taylor::Outcome::Ok) throw std::runtime_error(p.name + ": Taylor step failed");
            const bool lands = r.clipped || h_max - r.h <= 1e-12 * std::max(1.0, stop);
            const double h = lands ? h_max : r.h;
            ++steps;
            for (std::size_t c = 0; c < nc; ++c) {
                double v = 0.0;
                for (std::size_t k = stride; k-- > 0;) v = v * h + coeffs[c * stride + k];
                x[c] = v;
            }
            t = lands ? stop : t + h;
        }
    }
    conc_end = x[static_cast<std::size_t>(p.conc_state)] / p.conc_volume;
    return steps;
}

}  // namespace plateau::bench
