#include "sim/simulate.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "regimen/time.hpp"
#include "sim/schedule.hpp"
#include "trajectory/poly.hpp"

namespace plateau::sim {

taylor::Tape model_tape(const model::Model& m) {
    taylor::SystemSpec spec;
    for (const auto& c : m.compartments) spec.states.push_back(c.name);
    for (const auto& p : m.parameters) spec.params.push_back(p.name);
    for (const auto& r : m.rates) spec.rhs.push_back(r.expr);
    for (const auto& o : m.outputs) spec.outputs.push_back(o.expr);
    return taylor::compile(spec);
}

long step_budget(const Options& opt, int n_series, int order) {
    return step_budget(opt, 8.0 * static_cast<double>(n_series) * static_cast<double>(order + 1) + 16.0);
}

long step_budget(const Options& opt, double bytes_per_step) {
    return std::max(1L, std::min(opt.max_steps, static_cast<long>(opt.max_bytes / bytes_per_step)));
}

namespace {

// Dense output as compact as the model allows (trajectory.hpp): outputs affine in the states are derived from
// them, and a linear model keeps only x[0] and x[1] of each step.
void choose_storage(traj::Trajectory& tr, taylor::Stepper& stepper) {
    const taylor::Expander& ex = stepper.expander();
    const int ns = ex.n_states(), no = ex.n_outputs();
    std::vector<char> affine(static_cast<std::size_t>(no));
    std::vector<double> w, d;
    for (int j = 0; j < no; ++j) {
        affine[static_cast<std::size_t>(j)] = ex.output_affine(j) ? 1 : 0;
        const auto wj = ex.output_weights(j);
        w.insert(w.end(), wj.begin(), wj.end());
        d.push_back(ex.output_offset(j));
    }
    std::vector<double> a;
    if (ex.linear()) a.assign(ex.linear_matrix().begin(), ex.linear_matrix().end());
    tr.set_compact(ns, std::move(a), std::move(affine), std::move(w), std::move(d));
}

// States whose right-hand side is −k·x of themselves alone (k > 0, linear models only).
std::vector<char> drain_only_states(const taylor::Expander& ex) {
    const std::size_t ns = static_cast<std::size_t>(ex.n_states());
    std::vector<char> out(ns, 0);
    if (!ex.linear()) return out;
    const auto a = ex.linear_matrix();
    const auto c = ex.linear_offset();
    for (std::size_t s = 0; s < ns; ++s) {
        bool only = a[s * ns + s] < 0.0 && c[s] == 0.0;
        for (std::size_t j = 0; j < ns && only; ++j)
            if (j != s && a[s * ns + j] != 0.0) only = false;
        out[s] = only ? 1 : 0;
    }
    return out;
}

double dose_scale(const std::vector<Event>& events) {
    double big = 0.0;
    for (const Event& e : events) {
        for (double b : e.bolus) big = std::max(big, std::abs(b));
        for (double r : e.rate_change) big = std::max(big, std::abs(r) * 1.0);  // an hour of the input rate
    }
    return big;
}

// At the step budget: when the last free step is more than twice the time constant of the fastest
// compartment (linear models: the largest loss rate −A_ss), the step is held by the method's stability, not by
// accuracy (accurate steps of a mode with content keep h·rate below ~1; the order-p polynomial's real stability
// limit is h·rate ≈ 4–7 for p = 8–15). A looser tolerance then does not help.
void note_stiffness(Simulation& sim, const model::Model& m, const taylor::Expander& ex, double h) {
    if (!ex.linear() || !(h > 0.0)) return;
    const std::size_t ns = static_cast<std::size_t>(ex.n_states());
    const auto a = ex.linear_matrix();
    std::size_t fast = 0;
    for (std::size_t s = 1; s < ns; ++s)
        if (-a[s * ns + s] > -a[fast * ns + fast]) fast = s;
    const double rate = -a[fast * ns + fast];
    if (!(rate * h > 2.0) || fast >= m.compartments.size()) return;
    sim.stiff_state = m.compartments[fast].name;
    sim.stiff_rate = rate;
    sim.stiff_step = h;
}

}  // namespace

namespace {

// Every series' polynomial at the step's end h, by Horner.
void step_end(const std::vector<double>& coeffs, std::size_t stride, double h, std::vector<double>& end) {
    for (std::size_t c = 0; c < end.size(); ++c) end[c] = traj::horner({coeffs.data() + c * stride, stride}, h);
}

// The first time in (0, h) at which a compartment that starts the step above zero reaches zero, when it ends
// the step (`end`, at h) below zero; h otherwise. `which` is that compartment (−1 when none).
double emptying_time(const std::vector<double>& coeffs, const std::vector<double>& end, std::size_t nc,
                     std::size_t stride, double h, int& which) {
    double first = h;
    which = -1;
    for (std::size_t c = 0; c < nc; ++c) {
        const std::span<const double> p(coeffs.data() + c * stride, stride);
        if (!(p[0] > 0.0) || end[c] >= 0.0) continue;
        const std::vector<double> roots = traj::roots_in(p, 0.0, h);
        if (!roots.empty() && roots.front() < first) {
            first = roots.front();
            which = static_cast<int>(c);
        }
    }
    return first;
}

}  // namespace

Simulation integrate_events(const model::Model& m, taylor::Stepper& stepper, const std::vector<Event>& events,
                            std::span<const double> x0, double t_end, const Options& opt) {
    Simulation sim;
    sim.n_states = static_cast<int>(m.compartments.size());
    sim.end = t_end;
    sim.order = stepper.order();
    sim.trajectory = traj::Trajectory(stepper.n_series(), stepper.order());
    choose_storage(sim.trajectory, stepper);

    // The first nc states are amounts; a sensitivity run (sim/sensitivity.cpp) appends opt.sensitivities states
    // per amount, x[nc + c·m + j], which may take any sign and are zeroed with their amount.
    const std::size_t nc = m.compartments.size();
    const std::size_t nx = x0.size();
    const std::size_t per = static_cast<std::size_t>(std::max(0, opt.sensitivities));
    auto set_empty = [&](std::vector<double>& v, std::size_t c) {
        v[c] = 0.0;
        for (std::size_t j = 0; j < per; ++j) v[nc + c * per + j] = 0.0;
    };
    std::vector<double> x(x0.begin(), x0.end()), u(nx, 0.0), coeffs, end(nx);
    const std::size_t stride = static_cast<std::size_t>(stepper.order()) + 1;
    const long budget = step_budget(opt, static_cast<double>(sim.trajectory.bytes_per_step()));
    sim.budget = budget;
    double scale = dose_scale(events);
    for (double v : x0) scale = std::max(scale, std::abs(v));
    const double floor = opt.empty_decayed ? opt.dose_floor * scale : 0.0;
    const std::vector<char> drain_only = drain_only_states(stepper.expander());
    double last_h = 0.0, window_start = 0.0;
    const double saved_floor = stepper.floor();
    stepper.set_floor(floor);
    struct Restore {  // the stepper is the caller's: leave its floor as it was
        taylor::Stepper& s;
        double f;
        ~Restore() { s.set_floor(f); }
    } restore{stepper, saved_floor};
    // A sensitivity run's extra states are not amounts: its balance is not checked (the plain run's is).
    MassBalance balance(stepper.expander(), x0, opt.tol, opt.check_mass && opt.sensitivities == 0);
    // At each dose time (before its doses) and at the end: a linear model's run out of balance stops here.
    auto balanced = [&](double at) {
        if (balance.check(at, x, sim.mass)) return true;
        sim.outcome = taylor::Outcome::MassBalance;
        sim.failed_at = sim.mass.time;
        sim.failed_state = sim.mass.compartment;
        return false;
    };
    double t = 0.0;
    std::size_t next = 0;
    while (true) {
        if (t > 0.0 && !balanced(t)) return sim;
        // Apply every event due now (events before 0 are applied at 0).
        while (next < events.size() && !regimen::before(t, events[next].time)) {
            balance.add_bolus(events[next].bolus);
            for (std::size_t c = 0; c < nx; ++c) {
                x[c] += events[next].bolus[c];
                u[c] += events[next].rate_change[c];
                // Round-off in summing opposite rate changes must not leave a tiny phantom infusion.
                if (std::abs(u[c]) < 1e-12 * std::abs(events[next].rate_change[c])) u[c] = 0.0;
            }
            ++next;
        }
        if (t >= t_end) break;
        const double stop = next < events.size() ? std::min(events[next].time, t_end) : t_end;
        while (t < stop) {
            // Fail fast: past an eighth of the budget, stop when the recent step length says the horizon
            // would need more than four budgets.
            bool hopeless = false;
            if (sim.steps > 0 && sim.steps % 4096 == 0) {
                const double recent = (t - window_start) / 4096.0;
                hopeless = sim.steps >= budget / 8 && recent > 0.0 &&
                           static_cast<double>(sim.steps) + (t_end - t) / recent > 4.0 * static_cast<double>(budget);
                window_start = t;
            }
            if (sim.steps >= budget || hopeless) {
                sim.outcome = taylor::Outcome::StepLimit;
                sim.failed_at = t;
                sim.projected = hopeless;
                note_stiffness(sim, m, stepper.expander(), last_h);
                return sim;
            }
            const double h_max = stop - t;
            taylor::StepResult r = stepper.step(t, x, u, h_max, coeffs);
            if (r.outcome != taylor::Outcome::Ok) {
                sim.outcome = r.outcome;
                sim.failed_at = t;
                return sim;
            }
            double h = r.h;
            if (!r.clipped) last_h = h;
            bool lands = r.clipped || h_max - h <= 1e-12 * std::max(1.0, stop);
            if (lands) h = h_max;
            // Amounts cannot fall below zero. A compartment that starts the step with something in it and ends
            // it below zero was emptied inside the step (saturable elimination far above km is a straight line
            // down, and the drop from km to zero takes an instant the series cannot see): the step ends where
            // the amount reaches zero, and the amount is zero from there.
            step_end(coeffs, stride, h, end);
            int emptied = -1;
            if (const double cut = emptying_time(coeffs, end, nc, stride, h, emptied); cut < h) {
                h = cut;
                lands = false;
                step_end(coeffs, stride, h, end);
            }
            sim.trajectory.append(t, h, coeffs);
            balance.add_step(coeffs, stride, static_cast<std::size_t>(stepper.n_series()), h, u);
            ++sim.steps;
            double largest = 0.0;
            for (std::size_t c = 0; c < nx; ++c) {
                const double v = end[c];
                x[c] = v;
                if (!std::isfinite(v)) {
                    sim.outcome = taylor::Outcome::NonFinite;
                    sim.failed_at = t + h;
                    return sim;
                }
                if (c < nc) largest = std::max(largest, std::abs(v));
            }
            if (emptied >= 0) set_empty(x, static_cast<std::size_t>(emptied));
            // Below zero by more than the tolerance allows, from a start at or below zero: no amount can do
            // that, so no figure is reported (the model's rates let an empty compartment lose mass).
            for (std::size_t c = 0; c < nc; ++c)
                if (x[c] < -std::max(10.0 * opt.tol, 1e-12) * std::max(largest, scale)) {
                    sim.outcome = taylor::Outcome::NegativeAmount;
                    sim.failed_at = t + h;
                    sim.failed_state = static_cast<int>(c);
                    return sim;
                }
            // Emptied compartments: an amount below the dose floor, or below the rounding unit of the largest
            // amount (it changes no other amount by more than that rounding), is set to zero. Otherwise an
            // emptied fast compartment (a gut after absorption) is followed down to 1e-300 mg, or hovers at
            // round-off where only the explicit method's stability keeps its steps short.
            // A compartment that only drains (x' = −k·x, nothing flowing in, no input running) cannot grow: when
            // its amount grows over a step the step is beyond the method's stability for it, its content is
            // below the error the step allows, and the exact solution tends to zero: it is set to zero, and the
            // steps are again set by accuracy (an emptied absorption compartment, ka·h past the stability limit).
            if (opt.empty_decayed) {
                const double empty_below = std::max(floor, 0x1p-53 * largest);
                for (std::size_t c = 0; c < nc; ++c)
                    if (std::abs(x[c]) < empty_below ||
                        (drain_only[c] && u[c] == 0.0 && std::abs(x[c]) > std::abs(coeffs[c * stride])))
                        set_empty(x, c);
            }
            t = lands ? stop : t + h;
        }
    }
    return sim;
}

Simulation simulate(const model::Model& m, std::span<const double> params, std::vector<Dose> doses, double t_end,
                    const Options& opt) {
    const std::vector<Event> events = build_events(m, params, doses);
    taylor::Stepper stepper(model_tape(m), params, opt.tol, opt.order);
    const std::vector<double> x0(m.compartments.size(), 0.0);
    Simulation sim = integrate_events(m, stepper, events, x0, t_end, opt);
    for (const auto& c : m.compartments) sim.series.push_back(c.name);
    for (const auto& o : m.outputs) sim.series.push_back(o.name);
    sim.doses = std::move(doses);
    return sim;
}

std::vector<double> final_state(const Simulation& sim) {
    std::vector<double> x(static_cast<std::size_t>(sim.n_states), 0.0);
    if (sim.trajectory.empty()) return x;
    const double te = sim.trajectory.end();
    for (int s = 0; s < sim.n_states; ++s) x[static_cast<std::size_t>(s)] = sim.trajectory.left_limit(s, te);
    return x;
}

Simulation simulate(const regimen::Regimen& r, const Options& opt) {
    return simulate(r.model, r.parameter_values(), make_schedule(r).doses, r.horizon.until, opt);
}

}  // namespace plateau::sim
