// plateau_population_bench: virtual patients per second per core and the scaling with threads, for the demo
// population (model zelmarin-renal, three regimens, the zelmarin-adults cohort); what reusing the model's tape in
// the steady-state solve saves; and the same patients integrated by Boost.Odeint's rkf78 at matched accuracy.
// Speed is reported as ratios within one run; never run as a test.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <functional>
#include <string>
#include <thread>
#include <vector>

#include <boost/numeric/odeint.hpp>

#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "population/run.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"
#include "sim/steady_state.hpp"
#include "taylor/stepper.hpp"

using namespace plateau;

namespace {

double cpu_now() { return static_cast<double>(std::clock()) / CLOCKS_PER_SEC; }

// One patient under one regimen: its parameter values and the regimen's events.
struct Job {
    const regimen::Regimen* regimen;
    std::vector<double> params;
    std::vector<sim::Event> events;
    std::vector<double> grid;   // where the concentrations are compared (the band grid)
};

// The output `series` on the grid, by the Taylor engine at tolerance tol (one stepper per regimen, reused).
std::vector<double> taylor_values(const Job& j, taylor::Stepper& st, int series, double tol, bool check_mass = true) {
    sim::Options o;
    o.tol = tol;
    o.check_mass = check_mass;
    st.set_params(j.params);
    const std::vector<double> x0(j.regimen->model.compartments.size(), 0.0);
    const sim::Simulation s = sim::integrate_events(j.regimen->model, st, j.events, x0, j.regimen->horizon.until, o);
    std::vector<double> v;
    v.reserve(j.grid.size());
    for (double t : j.grid) v.push_back(s.trajectory.value(series, t));
    return v;
}

// The same with rkf78 (controlled, absolute and relative tolerance tol), from event to event, landing on every
// grid point; the right-hand side evaluated by the model's own expression tape (an order-1 expansion). The
// output is evaluated at the grid's states the same way (order 0).
std::vector<double> rkf78_values(const Job& j, taylor::Expander& ex, int output, double tol, long& steps) {
    namespace ode = boost::numeric::odeint;
    using State = std::vector<double>;
    const std::size_t n = j.regimen->model.compartments.size(), ns = static_cast<std::size_t>(ex.n_series());
    ex.set_params(j.params);
    State x(n, 0.0);
    std::vector<double> u(n, 0.0), coef(ns * 2), out(static_cast<std::size_t>(ex.n_outputs()));
    auto rhs = [&](const State& s, State& dx, double t) {
        ex.expand(t, s, u, coef);
        for (std::size_t i = 0; i < n; ++i) dx[i] = coef[i * 2 + 1];
    };
    std::vector<double> v(j.grid.size(), 0.0);
    auto stepper = ode::make_controlled(tol, tol, ode::runge_kutta_fehlberg78<State>());
    const double t_end = j.regimen->horizon.until;
    std::size_t g = 0, e = 0;
    double t = 0.0;
    while (true) {
        for (; e < j.events.size() && j.events[e].time <= t; ++e)
            for (std::size_t i = 0; i < n; ++i) {
                x[i] += j.events[e].bolus[i];
                u[i] += j.events[e].rate_change[i];
            }
        const double stop = e < j.events.size() ? std::min(j.events[e].time, t_end) : t_end;
        std::vector<double> times{t};
        std::vector<std::size_t> idx{static_cast<std::size_t>(-1)};
        // A grid point at t takes the value after the events there (the bolus-time convention).
        for (; g < j.grid.size() && (j.grid[g] < stop || (stop == t_end && j.grid[g] <= stop)); ++g) {
            if (j.grid[g] == t) idx[0] = g;
            else {
                times.push_back(j.grid[g]);
                idx.push_back(g);
            }
        }
        if (times.back() != stop) {
            times.push_back(stop);
            idx.push_back(static_cast<std::size_t>(-1));
        }
        std::size_t k = 0;
        auto observe = [&](const State& s, double tt) {
            if (idx[k] != static_cast<std::size_t>(-1)) {
                ex.outputs_at(tt, s, out);
                v[idx[k]] = out[static_cast<std::size_t>(output)];
            }
            ++k;
        };
        if (times.size() > 1)
            steps += static_cast<long>(ode::integrate_times(stepper, std::ref(rhs), x, times.begin(), times.end(), 0.1, observe));
        else
            observe(x, t);
        t = stop;
        if (t >= t_end) break;
    }
    return v;
}

double max_rel_error(const std::vector<double>& a, const std::vector<double>& ref) {
    double peak = 0.0, err = 0.0;
    for (double r : ref) peak = std::max(peak, std::abs(r));
    for (std::size_t i = 0; i < a.size(); ++i) err = std::max(err, std::abs(a[i] - ref[i]));
    return peak > 0.0 ? err / peak : err;
}

}  // namespace

int main(int argc, char** argv) {
    const std::size_t n = argc > 1 ? static_cast<std::size_t>(std::atol(argv[1])) : 400;
    const std::string src = PLATEAU_SOURCE_DIR;
    const std::vector<std::string> dirs{src + "/models"};
    std::vector<regimen::Regimen> rs;
    for (const char* f : {"zelmarin-pop-q8h-30min", "zelmarin-pop-q8h-4h", "zelmarin-pop-continuous"})
        rs.push_back(input::load_regimen(src + "/regimens/" + f + ".toml", dirs));
    const population::Cohort cohort = input::load_cohort(src + "/cohorts/zelmarin-adults.toml");
    const model::Model& m = rs.front().model;

    // What building the tape costs, against one subject-regimen below.
    const auto t0 = std::chrono::steady_clock::now();
    const int reps = 2000;
    std::size_t slots = 0;
    for (int i = 0; i < reps; ++i) slots += sim::model_tape(m).code.size();
    const double tape_us = std::chrono::duration<double, std::micro>(std::chrono::steady_clock::now() - t0).count() / reps;

    std::printf("population benchmark: %zu virtual patients x %zu regimens, model %s, %u hardware threads\n", n, rs.size(),
                m.id.c_str(), std::thread::hardware_concurrency());
    std::printf("tape build: %.1f us (%zu slots)\n\n", tape_us, slots / reps);
    // Wall-clock speed-up needs idle cores; the CPU-time rate (process CPU seconds) is what one core does even on a
    // shared machine.
    std::printf("%8s %10s %10s %14s %26s %10s\n", "threads", "wall s", "CPU s", "patients/s", "patient-regimens/CPU-s", "speed-up");
    double base = 0.0, full_rate = 0.0;
    population::Result first;
    for (int threads : {1, 2}) {
        population::Setup s;
        s.cohort = &cohort;
        s.size = n;
        s.seed = 1;
        s.threads = threads;
        const auto a = std::chrono::steady_clock::now();
        const double c0 = cpu_now();
        population::Result res = population::run(rs, s);
        const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - a).count();
        const double cpu = cpu_now() - c0;
        if (threads == 1) {
            base = secs;
            full_rate = static_cast<double>(n * rs.size()) / cpu;
            first = std::move(res);
        }
        std::printf("%8d %10.3f %10.3f %14.1f %26.1f %10.2f\n", threads, secs, cpu, static_cast<double>(n) / secs,
                    static_cast<double>(n * rs.size()) / cpu, base / secs);
        if (threads == 1 && first.subjects.size() != n) return 1;
    }

    // The patients as jobs: their parameters under each regimen, the regimen's events, the band grid.
    std::vector<Job> jobs;
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const std::vector<sim::Dose> doses = sim::expand_doses(rs[r]);
        for (std::size_t i = 0; i < n; ++i) {
            Job j{&rs[r], first.subjects[i].parameters[r], {}, first.band_times[r]};
            j.events = sim::build_events(m, j.params, doses);
            jobs.push_back(std::move(j));
        }
    }
    const int output = std::max(0, m.output_index(rs.front().targets.output));
    const int series = static_cast<int>(m.compartments.size()) + output;
    const taylor::Tape tape = sim::model_tape(m);

    // Steady-state solve with the tape built per call (as before) and with the population's tape.
    {
        const std::size_t k = std::min<std::size_t>(jobs.size(), 300);
        // Alternating passes, the best of each kept (the machine is shared: single passes vary by ±20 %).
        double per_call[2] = {1e300, 1e300};
        for (int pass = 0; pass < 6; ++pass) {
            const int reuse = pass % 2;
            sim::Options o;
            if (reuse) o.tape = &tape;
            const double c0 = cpu_now();
            for (std::size_t q = 0; q < k; ++q) {
                regimen::Regimen w = *jobs[q].regimen;
                w.subject_values = jobs[q].params;
                const sim::Schedule sch = sim::make_schedule(w);
                const sim::Simulation s = sim::simulate(m, jobs[q].params, sch.doses, sch.end, o);
                (void)sim::steady_state(m, jobs[q].params, sch, s, o);
            }
            per_call[reuse] = std::min(per_call[reuse], 1e6 * (cpu_now() - c0) / static_cast<double>(k));
        }
        std::printf("\nsimulate + steady-state solve, per patient-regimen (CPU us, best of 3): tape built per call %.1f, "
                    "tape reused %.1f (%.1f %% less)\n",
                    per_call[0], per_call[1], 100.0 * (per_call[0] - per_call[1]) / per_call[0]);
    }

    // Integration alone (the regimen's horizon, concentrations on the band grid), Taylor against rkf78.
    std::vector<std::vector<double>> ref;
    {
        taylor::Stepper st(tape, jobs.front().params, 1e-15);
        for (const Job& j : jobs) ref.push_back(taylor_values(j, st, series, 1e-15));
    }
    std::printf("\nintegration and %zu grid values per patient-regimen, %zu patient-regimens; error = max |c - ref| / "
                "max ref (ref: Taylor at 1e-15)\n",
                jobs.front().grid.size(), jobs.size());
    std::printf("%-10s %8s %12s %12s %28s\n", "method", "tol", "max error", "steps/job", "patient-regimens/CPU-s");
    double taylor_rate = 0.0, taylor_err = 0.0;
    // With the run-time mass balance (the default) and without it, alternating, to see what the check costs.
    for (int pass = 0; pass < 4; ++pass) {
        const bool check = pass % 2 == 0;
        const double tol = 1e-10;
        taylor::Stepper st(tape, jobs.front().params, tol);
        double err = 0.0;
        const double c0 = cpu_now();
        for (std::size_t q = 0; q < jobs.size(); ++q)
            err = std::max(err, max_rel_error(taylor_values(jobs[q], st, series, tol, check), ref[q]));
        const double cpu = cpu_now() - c0;
        const double rate = static_cast<double>(jobs.size()) / cpu;
        if (check) {
            taylor_rate = std::max(taylor_rate, rate);
            taylor_err = err;
        }
        std::printf("%-10s %8.0e %12.2e %12s %28.1f\n", check ? "taylor" : "taylor-nmb", tol, err, "-", rate);
    }
    double matched_rate = 0.0, matched_tol = 0.0, matched_err = 0.0;
    taylor::Expander ex(tape, 1);
    for (double tol : {1e-8, 1e-9, 1e-10, 1e-11, 1e-12}) {
        double err = 0.0;
        long steps = 0;
        const double c0 = cpu_now();
        for (std::size_t q = 0; q < jobs.size(); ++q)
            err = std::max(err, max_rel_error(rkf78_values(jobs[q], ex, output, tol, steps), ref[q]));
        const double cpu = cpu_now() - c0;
        const double rate = static_cast<double>(jobs.size()) / cpu;
        std::printf("%-10s %8.0e %12.2e %12.1f %28.1f\n", "rkf78", tol, err,
                    static_cast<double>(steps) / static_cast<double>(jobs.size()), rate);
        // Matched: the loosest rkf78 tolerance whose error is no worse than Taylor's.
        if (matched_rate == 0.0 && err <= taylor_err) {
            matched_rate = rate;
            matched_tol = tol;
            matched_err = err;
        }
    }
    if (matched_rate > 0.0)
        std::printf("\nmatched accuracy: Taylor 1e-10 (error %.2e) %.1f, rkf78 %.0e (error %.2e) %.1f "
                    "patient-regimens/CPU-s: Taylor %.2fx; the whole population run (figures included) %.1f\n",
                    taylor_err, taylor_rate, matched_tol, matched_err, matched_rate, taylor_rate / matched_rate, full_rate);
    else
        std::printf("\nno rkf78 tolerance down to 1e-12 matched Taylor's error %.2e\n", taylor_err);
    return 0;
}
