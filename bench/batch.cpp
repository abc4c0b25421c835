// plateau_batch_bench: what advancing several virtual patients together (one per SIMD lane) would gain on the
// population workload's integration. Never run as a test; every ratio compares runs made in this process.
//
// The population workload (bench/README.md): two compartments, 1 g IV over 30 min every 8 h for 14 days, at
// tol 1e-10; here 4 096 patients with log-normal CL, V1, Q, V2 (30 % CV; fixed seed). Three ways to integrate
// them, all to the same end state:
//   engine       sim::integrate_events, one patient at a time (the product's path: events, dense output,
//                mass balance, emptied compartments and every check);
//   kernel L=1   the bare Taylor step of a linear model (x[n+1] = (A·x[n] + u·[n = 0])/(n+1), the Jorba–Zou
//                step from the last two coefficients, Horner to the step's end, every step's coefficients
//                stored) for one patient at a time;
//   kernel L>1   the same kernel for L patients at once, structure of arrays (coef[order][state][lane]), each
//                lane with its own step length, time and next event; a lane that has finished idles.
// The kernel does per lane exactly the operations of L=1 in the same order, so its end states are bit for bit
// those of L=1 (checked below). The gain of L>1 over L=1 is what a batch mode can buy on the step itself; the
// engine/kernel ratio is what the product's per-step bookkeeping costs on top of the bare step.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <functional>
#include <random>
#include <string>
#include <vector>

#include "sim/schedule.hpp"
#include "sim/simulate.hpp"
#include "taylor/stepper.hpp"
#include "workload.hpp"

namespace {

using namespace plateau;

constexpr int kStates = 2;

struct Patient {
    double cl, v1, q, v2;
};

// The shared schedule: infusion starts (+rate) and stops (−rate) into the central compartment.
struct Schedule {
    std::vector<double> time, rate_change;
    double end = 0.0;
};

// The regimen's events as the kernel reads them (every event of this workload changes the central infusion rate).
Schedule kernel_schedule(const std::vector<sim::Event>& events, double end) {
    Schedule s;
    for (const sim::Event& e : events) {
        s.time.push_back(e.time);
        s.rate_change.push_back(e.rate_change[0]);
    }
    s.end = end;
    return s;
}

std::vector<Patient> draw_patients(std::size_t n) {
    std::mt19937_64 rng(20261202);
    const double sd = std::sqrt(std::log(1.0 + 0.3 * 0.3));  // 30 % CV, log-normal
    std::normal_distribution<double> z(0.0, 1.0);
    std::vector<Patient> out;
    for (std::size_t i = 0; i < n; ++i)
        out.push_back({5.0 * std::exp(sd * z(rng)), 15.0 * std::exp(sd * z(rng)), 8.0 * std::exp(sd * z(rng)),
                       30.0 * std::exp(sd * z(rng))});
    return out;
}

struct Result {
    double x[kStates];
    long steps;
};

// L patients from `first` (fewer at the end of the list: the missing lanes copy the last patient and idle).
template <int L>
void kernel(const std::vector<Patient>& pts, std::size_t first, const Schedule& sch, int p, double safety,
            std::vector<std::vector<double>>& store, std::vector<Result>& out) {
    alignas(64) double a[kStates][kStates][L];
    alignas(64) double x[kStates][L], u[kStates][L];
    double t[L], h[L];
    std::size_t next[L];
    bool done[L];
    const std::size_t stride = static_cast<std::size_t>(p) + 1;
    std::vector<double> coef(stride * kStates * L);
    auto c = [&](std::size_t n, int s) { return coef.data() + (n * kStates + static_cast<std::size_t>(s)) * L; };
    std::vector<double> inv(stride + 1);
    for (std::size_t n = 1; n <= stride; ++n) inv[n] = 1.0 / static_cast<double>(n);
    long steps[L];
    for (int l = 0; l < L; ++l) {
        const Patient& pt = pts[std::min(first + static_cast<std::size_t>(l), pts.size() - 1)];
        a[0][0][l] = -(pt.cl + pt.q) / pt.v1;
        a[0][1][l] = pt.q / pt.v2;
        a[1][0][l] = pt.q / pt.v1;
        a[1][1][l] = -pt.q / pt.v2;
        x[0][l] = x[1][l] = u[0][l] = u[1][l] = 0.0;
        t[l] = 0.0;
        next[l] = 0;
        steps[l] = 0;
        done[l] = first + static_cast<std::size_t>(l) >= pts.size();
        store[static_cast<std::size_t>(l)].clear();
    }
    auto apply_events = [&](int l) {
        while (next[l] < sch.time.size() && sch.time[next[l]] <= t[l]) u[0][l] += sch.rate_change[next[l]++];
        if (t[l] >= sch.end) done[l] = true;
    };
    for (int l = 0; l < L; ++l)
        if (!done[l]) apply_events(l);
    const double ip = 1.0 / p, ipm1 = 1.0 / (p - 1);
    while (true) {
        bool any = false;
        for (int l = 0; l < L; ++l) any = any || !done[l];
        if (!any) break;
        // The expansion, every lane at once.
        for (int s = 0; s < kStates; ++s)
            for (int l = 0; l < L; ++l) c(0, s)[l] = x[s][l];
        for (std::size_t n = 0; n < static_cast<std::size_t>(p); ++n) {
            const double in = inv[n + 1];
            for (int s = 0; s < kStates; ++s) {
                double* dst = c(n + 1, s);
                for (int l = 0; l < L; ++l) {
                    double f = 0.0;
                    for (int j = 0; j < kStates; ++j) f += a[s][j][l] * c(n, j)[l];
                    if (n == 0) f += u[s][l];
                    dst[l] = f * in;
                }
            }
        }
        // The step rule, per lane.
        for (int l = 0; l < L; ++l) {
            double n0 = 0.0, np = 0.0, npm1 = 0.0;
            for (int s = 0; s < kStates; ++s) {
                n0 = std::max(n0, std::abs(c(0, s)[l]));
                npm1 = std::max(npm1, std::abs(c(stride - 2, s)[l]));
                np = std::max(np, std::abs(c(stride - 1, s)[l]));
            }
            const double n1 = n0 > 0.0 ? n0 : 1.0;
            const double r1 = npm1 > 0.0 ? std::pow(n1 / npm1, ipm1) : HUGE_VAL;
            const double r2 = np > 0.0 ? std::pow(n1 / np, ip) : HUGE_VAL;
            double hl = std::min(r1, r2) * safety;
            const double stop = next[l] < sch.time.size() ? std::min(sch.time[next[l]], sch.end) : sch.end;
            const bool lands = hl >= stop - t[l];
            if (lands) hl = stop - t[l];
            h[l] = done[l] ? 0.0 : hl;
        }
        // Horner to the end of the step, every lane at once (an idle lane has h = 0 and keeps its state).
        for (int s = 0; s < kStates; ++s)
            for (int l = 0; l < L; ++l) {
                double v = 0.0;
                for (std::size_t k = stride; k-- > 0;) v = v * h[l] + c(k, s)[l];
                x[s][l] = v;
            }
        // Dense output and events, per lane.
        for (int l = 0; l < L; ++l) {
            if (done[l]) continue;
            auto& st = store[static_cast<std::size_t>(l)];
            st.push_back(t[l]);
            st.push_back(h[l]);
            for (int s = 0; s < kStates; ++s)
                for (std::size_t k = 0; k < stride; ++k) st.push_back(c(k, s)[l]);
            ++steps[l];
            const double stop = next[l] < sch.time.size() ? std::min(sch.time[next[l]], sch.end) : sch.end;
            t[l] = h[l] == stop - t[l] ? stop : t[l] + h[l];
            apply_events(l);
        }
    }
    for (int l = 0; l < L; ++l) {
        const std::size_t i = first + static_cast<std::size_t>(l);
        if (i >= pts.size()) continue;
        out[i] = {{x[0][l], x[1][l]}, steps[l]};
    }
}

template <int L>
std::vector<Result> run_kernel(const std::vector<Patient>& pts, const Schedule& sch, int p, double safety) {
    std::vector<Result> out(pts.size());
    std::vector<std::vector<double>> store(L);
    for (std::size_t i = 0; i < pts.size(); i += L) kernel<L>(pts, i, sch, p, safety, store, out);
    return out;
}

double seconds(const std::function<void()>& f) {
    const auto a = std::chrono::steady_clock::now();
    f();
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - a).count();
}

// Fastest of `passes` timings (other work on the machine only slows a pass down).
double best_of(int passes, const std::function<void()>& f) {
    double best = HUGE_VAL;
    for (int i = 0; i < passes; ++i) best = std::min(best, seconds(f));
    return best;
}

}  // namespace

int main() {
    const std::size_t n = 4096;
    const std::vector<Patient> pts = draw_patients(n);
    // The engine on the same patients: the workload's regimen, one stepper reused for every patient.
    const regimen::Regimen r = bench::population_workload();
    const sim::Options opt;
    std::vector<double> params = r.parameter_values();  // cl, v1, q, v2, fu
    const std::vector<sim::Event> events = sim::build_events(r.model, params, sim::make_schedule(r).doses);
    const Schedule sch = kernel_schedule(events, r.horizon.until);
    taylor::Stepper stepper(sim::model_tape(r.model), params, opt.tol);
    const int p = stepper.order();
    const double safety = std::exp(-2.0) * std::exp(-0.7 / static_cast<double>(p - 1));
    std::vector<Result> engine(n);
    auto run_engine = [&] {
        for (std::size_t i = 0; i < n; ++i) {
            params[0] = pts[i].cl;
            params[1] = pts[i].v1;
            params[2] = pts[i].q;
            params[3] = pts[i].v2;
            stepper.set_params(params);
            const std::vector<double> x0(2, 0.0);
            const sim::Simulation s = sim::integrate_events(r.model, stepper, events, x0, sch.end, opt);
            const std::vector<double> xe = sim::final_state(s);
            engine[i] = {{xe[0], xe[1]}, s.steps};
        }
    };

    std::vector<Result> k1, k2, k4, k8;
    const int passes = 3;
    const double t_engine = best_of(passes, run_engine);
    const double t1 = best_of(passes, [&] { k1 = run_kernel<1>(pts, sch, p, safety); });
    const double t2 = best_of(passes, [&] { k2 = run_kernel<2>(pts, sch, p, safety); });
    const double t4 = best_of(passes, [&] { k4 = run_kernel<4>(pts, sch, p, safety); });
    const double t8 = best_of(passes, [&] { k8 = run_kernel<8>(pts, sch, p, safety); });

    auto steps_of = [](const std::vector<Result>& v) {
        long s = 0;
        for (const auto& res : v) s += res.steps;
        return static_cast<double>(s) / static_cast<double>(v.size());
    };
    auto identical = [&](const std::vector<Result>& v) {
        for (std::size_t i = 0; i < n; ++i)
            if (v[i].x[0] != k1[i].x[0] || v[i].x[1] != k1[i].x[1] || v[i].steps != k1[i].steps) return false;
        return true;
    };
    double engine_diff = 0.0;
    for (std::size_t i = 0; i < n; ++i)
        for (int s = 0; s < kStates; ++s)
            engine_diff = std::max(engine_diff, std::abs(engine[i].x[s] - k1[i].x[s]) / std::abs(engine[i].x[s]));

    std::printf("plateau_batch_bench: %zu patients, 2 compartments, 1 g IV over 30 min every 8 h for 14 days, "
                "tol 1e-10 (order %d); fastest of %d passes\n\n", n, p, passes);
    std::printf("%-14s %12s %12s %14s %10s  %s\n", "integration", "us/patient", "steps", "patients/s", "vs L=1",
                "end state");
    auto row = [&](const char* name, double secs, const std::vector<Result>& v, const char* check) {
        std::printf("%-14s %12.2f %12.1f %14.0f %9.2fx  %s\n", name, 1e6 * secs / static_cast<double>(n),
                    steps_of(v), static_cast<double>(n) / secs, t1 / secs, check);
    };
    char diff[96];
    std::snprintf(diff, sizeof diff, "within %.1e of kernel L=1", engine_diff);
    row("engine", t_engine, engine, diff);
    row("kernel L=1", t1, k1, "reference");
    row("kernel L=2", t2, k2, identical(k2) ? "identical to L=1" : "DIFFERS from L=1");
    row("kernel L=4", t4, k4, identical(k4) ? "identical to L=1" : "DIFFERS from L=1");
    row("kernel L=8", t8, k8, identical(k8) ? "identical to L=1" : "DIFFERS from L=1");
    std::printf("\nvs L=1 = kernel L=1 time / this row's time (above 1: faster than one patient at a time)\n");
    return identical(k2) && identical(k4) && identical(k8) ? 0 : 1;
}
