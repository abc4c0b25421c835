// plateau_engine_bench: engine figures that the peer comparison (plateau_bench) does not show. Nothing here
// asserts a timing; every ratio compares runs made in the same process.
//   (default)          exact-propagation limit for the linear problems; population workload (simulate + every
//                      figure, steady state included) in subjects per second
//   --memory N         problem (a) with N doses every 12 h at tol 1e-10: steps, bytes per step, peak RSS
//   --population       the population workload only
//   --history clean|churn  median time of problem (b)'s job (tol 1e-10), in a fresh heap or after a churn of
//                      allocations of many sizes (what a process that did other work first looks like)
#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "problems.hpp"
#include "runners.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"
#include "sim/steady_state.hpp"
#include "workload.hpp"

namespace plateau::bench {
namespace {

volatile double g_sink = 0.0;

// Median microseconds per run over at least 15 runs and 0.3 s, after one warm-up run.
double median_us(const std::function<double()>& run) {
    using clock = std::chrono::steady_clock;
    g_sink = g_sink + run();
    std::vector<double> us;
    const auto start = clock::now();
    while (true) {
        const auto a = clock::now();
        g_sink = g_sink + run();
        const auto b = clock::now();
        us.push_back(std::chrono::duration<double, std::micro>(b - a).count());
        if ((us.size() >= 15 && std::chrono::duration<double>(b - start).count() >= 0.3) || us.size() >= 20000) break;
    }
    std::sort(us.begin(), us.end());
    return us[us.size() / 2];
}

long peak_rss_kib() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return u.ru_maxrss;
}

// ---- exact exponential propagation (the limit for linear problems) ---------------------------------------

using Mat = std::vector<double>;  // n × n, row-major

Mat multiply(const Mat& a, const Mat& b, std::size_t n) {
    Mat c(n * n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
        for (std::size_t k = 0; k < n; ++k)
            for (std::size_t j = 0; j < n; ++j) c[i * n + j] += a[i * n + k] * b[k * n + j];
    return c;
}

// e^{A·h} by scaling and squaring with a degree-20 Taylor polynomial (exact to rounding for these small A·h).
Mat expm(const Mat& a, std::size_t n, double h) {
    double norm = 0.0;
    for (double v : a) norm = std::max(norm, std::abs(v) * h);
    int squarings = 0;
    double scale = h;
    while (norm > 0.5) { norm *= 0.5; scale *= 0.5; ++squarings; }
    Mat x(n * n), term(n * n, 0.0), sum(n * n, 0.0);
    for (std::size_t i = 0; i < n * n; ++i) x[i] = a[i] * scale;
    for (std::size_t i = 0; i < n; ++i) term[i * n + i] = sum[i * n + i] = 1.0;
    for (int k = 1; k <= 20; ++k) {
        term = multiply(term, x, n);
        for (double& v : term) v /= k;
        for (std::size_t i = 0; i < n * n; ++i) sum[i] += term[i];
    }
    for (int s = 0; s < squarings; ++s) sum = multiply(sum, sum, n);
    return sum;
}

Mat system_matrix(const Problem& p) {
    const Rhs& r = p.rhs;
    if (r.kind == Kind::OralOneCompartment) return {-r.p1, 0.0, r.p1, -r.p2};
    return {-(r.p1 + r.p2), r.p3, r.p2, -r.p3};  // (k10, k12, k21)
}

// The hourly concentrations by x(t + 1 h) = e^{A·1 h}·x(t), doses added at their (whole-hour) times: one
// matrix-vector product per check time, the matrix exponential computed inside the timed run.
std::vector<double> exact_propagation(const Problem& p) {
    const std::size_t n = static_cast<std::size_t>(p.n_states);
    const Mat e = expm(system_matrix(p), n, 1.0);
    std::vector<double> x(n, 0.0), y(n), conc;
    conc.reserve(p.checks.size());
    std::size_t next = 0;
    auto dose_now = [&](double t) {
        while (next < p.dose_times.size() && p.dose_times[next] <= t + 1e-9) {
            x[static_cast<std::size_t>(p.dose_state)] += p.dose_amount;
            ++next;
        }
    };
    dose_now(0.0);
    for (double t : p.checks) {
        for (std::size_t i = 0; i < n; ++i) {
            double v = 0.0;
            for (std::size_t j = 0; j < n; ++j) v += e[i * n + j] * x[j];
            y[i] = v;
        }
        x.swap(y);
        dose_now(t);
        conc.push_back(x[static_cast<std::size_t>(p.conc_state)] / p.conc_volume);
    }
    return conc;
}

void limit_table() {
    std::printf("Exact exponential propagation (the limit for linear problems) against the Taylor job:\n\n");
    std::printf("%-10s %8s %12s %10s %12s %10s %8s\n", "problem", "tol", "taylor err", "taylor us", "limit err",
                "limit us", "ratio");
    for (const Problem& p : {oral_one_compartment(), two_compartment_iv()}) {
        const double lim_err = max_relative_error(p, exact_propagation(p));
        const double lim_us = median_us([&] { return exact_propagation(p).back(); });
        for (double tol : {1e-6, 1e-10, 1e-12}) {
            const double err = max_relative_error(p, taylor_job(p, tol).conc);
            const double us = median_us([&] { return taylor_job(p, tol).conc.back(); });
            std::printf("%-10s %8.0e %12.2e %10.1f %12.2e %10.1f %7.1fx\n", p.name.c_str(), tol, err, us, lim_err,
                        lim_us, us / lim_us);
        }
    }
    std::printf("ratio = Taylor time / limit time (how much slower than one matrix-vector product per hour)\n\n");
}

// ---- population workload ---------------------------------------------------------------------------------

void population() {
    const regimen::Regimen r = population_workload();
    const sim::Options opt;
    const metrics::Request req = metrics::request_from(r, opt);
    sim::Simulation s = sim::simulate(r, opt);
    const double sim_us = median_us([&] { return static_cast<double>(sim::simulate(r, opt).steps); });
    const double fig_us = median_us([&] { return metrics::compute(r, s, req).auc; });
    const double all_us = median_us([&] {
        const sim::Simulation t = sim::simulate(r, opt);
        return metrics::compute(r, t, req).auc;
    });
    // The figures split: the schedule, the steady-state solve (it integrates the cycle several times) and the
    // figures read from the trajectories (metrics::compute given the schedule and the solved steady state).
    const sim::Schedule sched = sim::make_schedule(r);
    const auto steady = sim::steady_state(r.model, r.parameter_values(), sched, s, req.options);
    const double sched_us = median_us([&] { return static_cast<double>(sim::make_schedule(r).dose_times.size()); });
    const double steady_us = median_us([&] {
        const auto p = sim::steady_state(r.model, r.parameter_values(), sched, s, req.options);
        return p ? static_cast<double>(p->iterations) : 0.0;
    });
    const double read_us = median_us([&] { return metrics::compute(sched, s, steady, req).auc; });
    std::printf("Population workload (2 compartments, 1 g IV over 30 min every 8 h, 14 days, threshold and window,\n"
                "every figure including the steady state; tol 1e-10, %ld steps):\n\n", s.steps);
    std::printf("  simulate %8.1f us   figures %8.1f us   both %8.1f us   = %7.0f subjects/s on one core\n", sim_us,
                fig_us, all_us, 1e6 / all_us);
    std::printf("  figures: schedule %8.1f us   steady state %8.1f us   figures from the trajectories %8.1f us\n\n",
                sched_us, steady_us, read_us);
}

// ---- memory and allocation history ----------------------------------------------------------------------

int memory(long doses) {
    Problem p = oral_one_compartment();
    p.doses.clear();
    for (long i = 0; i < doses; ++i) p.doses.push_back(sim::Dose{12.0 * static_cast<double>(i), 0, 500.0, 0.0, 0});
    const double t_end = 12.0 * static_cast<double>(doses);
    const long before = peak_rss_kib();
    sim::Options opt;
    opt.tol = 1e-10;
    const sim::Simulation s = sim::simulate(p.model, p.params, p.doses, t_end, opt);
    std::printf("memory: %ld doses of problem (a), tol 1e-10: %s, %ld steps, %zu bytes per step, peak RSS %.1f MB "
                "(%.1f MB before the run)\n", doses, taylor::outcome_name(s.outcome), s.steps,
                s.trajectory.bytes_per_step(), static_cast<double>(peak_rss_kib()) / 1024.0,
                static_cast<double>(before) / 1024.0);
    return s.outcome == taylor::Outcome::Ok ? 0 : 1;
}

int history(const char* kind) {
    if (std::strcmp(kind, "churn") == 0) {
        // Allocate ~400 MB in blocks of many sizes, free every other one, then the rest: the heap is fragmented
        // and much of it returned to the system, as in a process that did other work first.
        std::vector<std::unique_ptr<char[]>> blocks;
        std::size_t size = 1000;
        for (int i = 0; i < 4000; ++i) {
            size = size * 7 % 200003 + 64;
            blocks.emplace_back(new char[size]);
            std::memset(blocks.back().get(), 1, size);
        }
        for (std::size_t i = 0; i < blocks.size(); i += 2) blocks[i].reset();
        blocks.clear();
    } else if (std::strcmp(kind, "clean") != 0) {
        std::fprintf(stderr, "plateau_engine_bench: --history expects clean or churn\n");
        return 2;
    }
    const Problem p = two_compartment_iv();
    const double us = median_us([&] { return taylor_job(p, 1e-10).conc.back(); });
    std::printf("history %-5s: problem (b) job at tol 1e-10, median %.1f us\n", kind, us);
    return 0;
}

}  // namespace
}  // namespace plateau::bench

int main(int argc, char** argv) {
    using namespace plateau::bench;
    try {
        if (argc == 3 && std::strcmp(argv[1], "--memory") == 0) return memory(std::atol(argv[2]));
        if (argc == 3 && std::strcmp(argv[1], "--history") == 0) return history(argv[2]);
        if (argc == 2 && std::strcmp(argv[1], "--population") == 0) {
            population();
            return 0;
        }
        if (argc != 1) {
            std::fprintf(stderr, "usage: plateau_engine_bench [--memory DOSES | --history clean|churn | --population]\n");
            return 2;
        }
        limit_table();
        population();
        return 0;
    } catch (const std::exception& e) {
        std::fprintf(stderr, "plateau_engine_bench: %s\n", e.what());
        return 1;
    }
}
