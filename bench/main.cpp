// plateau_bench: the Taylor engine against Boost.Odeint's Runge-Kutta steppers (and SUNDIALS CVODE when built
// with it) on three dosing problems over 30 days. Accuracy is measured against exact solutions at
// hourly check times; time is the median over repeated runs. Nothing here asserts a timing.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "problems.hpp"
#include "runners.hpp"
#include "sim/simulate.hpp"

namespace plateau::bench {
namespace {

struct Config {
    int min_runs = 7;          // per row and pass
    double min_seconds = 0.15; // per row and pass
    int max_runs = 5000;
    int passes = 3;            // the whole measurement is repeated; each row keeps its fastest pass
    bool sweep_table = false;
};

struct Timing {
    double us = 0.0;  // median microseconds per run (of the fastest pass)
    int runs = 0;     // runs over all passes
};

// Keeps the faster of two passes' medians: other work on the machine only ever slows a pass down.
void keep_faster(Timing& best, const Timing& t) {
    const int runs = best.runs + t.runs;
    if (best.runs == 0 || t.us < best.us) best.us = t.us;
    best.runs = runs;
}

volatile double g_sink = 0.0;  // keeps the results of timed runs alive

Timing time_it(const std::function<double()>& run, const Config& cfg) {
    using clock = std::chrono::steady_clock;
    g_sink = g_sink + run();  // warm-up
    std::vector<double> us;
    const auto start = clock::now();
    while (true) {
        const auto a = clock::now();
        const double v = run();
        const auto b = clock::now();
        g_sink = g_sink + v;
        us.push_back(std::chrono::duration<double, std::micro>(b - a).count());
        const double total = std::chrono::duration<double>(b - start).count();
        const int n = static_cast<int>(us.size());
        if ((n >= cfg.min_runs && total >= cfg.min_seconds) || n >= cfg.max_runs) break;
    }
    std::sort(us.begin(), us.end());
    const std::size_t n = us.size();
    const double median = n % 2 == 1 ? us[n / 2] : 0.5 * (us[n / 2 - 1] + us[n / 2]);
    return Timing{median, static_cast<int>(n)};
}

struct Point {
    Method method = Method::Taylor;
    double tol = 0.0;
    double err = 0.0;       // max relative error at the check times
    long steps = 0;         // accepted steps of the job
    int order = 0;
    Timing job;             // integrate and deliver the hourly values
    bool main = false;      // one of the three tabulated tolerances
    long steps_int = 0;     // integrate only
    Timing integ;
};

const std::vector<double> kMainTols = {1e-6, 1e-9, 1e-12};

bool is_main(double tol) {
    for (double t : kMainTols)
        if (std::abs(t / tol - 1.0) < 1e-9) return true;
    return false;
}

std::vector<double> sweep_tols() {
    std::vector<double> t;
    for (int e = 3; e <= 14; ++e) t.push_back(std::pow(10.0, -e));
    return t;
}

double last_value(const Run& r) { return r.conc.empty() ? 0.0 : r.conc.back(); }

std::vector<Point> points_for(const std::vector<Method>& methods) {
    std::vector<Point> out;
    for (Method m : methods) {
        const std::vector<double> tols = m == Method::Taylor ? kMainTols : sweep_tols();
        for (double tol : tols) {
            Point pt;
            pt.method = m;
            pt.tol = tol;
            pt.main = is_main(tol);
            out.push_back(pt);
        }
    }
    return out;
}

// One pass over every point of a problem: errors and steps on the first pass, timings on every pass.
void measure(const Problem& p, std::vector<Point>& points, const Config& cfg, bool first) {
    for (Point& pt : points) {
        const Method m = pt.method;
        const double tol = pt.tol;
        if (first) {
            const Run r = run_job(p, m, tol);
            pt.err = max_relative_error(p, r.conc);
            pt.steps = r.steps;
            pt.order = r.order;
            if (pt.main) pt.steps_int = run_integrate_only(p, m, tol);
        }
        keep_faster(pt.job, time_it([&] { return last_value(run_job(p, m, tol)); }, cfg));
        if (pt.main)
            keep_faster(pt.integ,
                        time_it([&] { return static_cast<double>(run_integrate_only(p, m, tol)); }, cfg));
        std::fprintf(stderr, "  %-10s %-19s tol %.0e: err %.2e, %.1f us\n", p.name.c_str(), method_name(m), tol,
                     pt.err, pt.job.us);
    }
}

std::string method_label(const Point& pt) {
    if (pt.method == Method::Taylor) return std::string("taylor p=") + std::to_string(pt.order);
    return method_name(pt.method);
}

void print_rule(int width) { std::printf("%s\n", std::string(static_cast<std::size_t>(width), '-').c_str()); }

void print_main_table(const std::vector<Problem>& problems, const std::vector<std::vector<Point>>& results,
                      bool all) {
    std::printf("%-10s %-19s %6s %12s %8s %12s %8s %12s\n", "problem", "method", "tol", "max rel err", "steps",
                "us/run job", "steps", "us/run int.");
    print_rule(95);
    for (std::size_t i = 0; i < problems.size(); ++i) {
        for (const Point& pt : results[i]) {
            if (!all && !pt.main) continue;
            char integ[64] = "", steps_int[32] = "";
            if (pt.main) {
                std::snprintf(integ, sizeof integ, "%12.1f", pt.integ.us);
                std::snprintf(steps_int, sizeof steps_int, "%8ld", pt.steps_int);
            }
            std::printf("%-10s %-19s %6.0e %12.2e %8ld %12.1f %8s %12s\n", problems[i].name.c_str(),
                        method_label(pt).c_str(), pt.tol, pt.err, pt.steps, pt.job.us, steps_int, integ);
        }
        print_rule(95);
    }
}

// Time a method needs to reach achieved error `e`, by log-log interpolation between the two sweep points whose
// errors bracket e (the loosest such pair). flag: ' ' interpolated; '>' e is looser than the method's loosest
// point, whose time is given (an upper bound); 'x' the method never got down to e.
struct AtError {
    double us = 0.0;
    char flag = 'x';
};

AtError time_at_error(const std::vector<Point>& pts, Method m, double e) {
    std::vector<const Point*> s;
    for (const Point& pt : pts)
        if (pt.method == m && std::isfinite(pt.err) && pt.err > 0.0) s.push_back(&pt);
    std::sort(s.begin(), s.end(), [](const Point* a, const Point* b) { return a->tol > b->tol; });
    if (s.empty()) return {};
    double loosest = 0.0;
    for (const Point* pt : s) loosest = std::max(loosest, pt->err);
    if (e >= loosest) {
        const Point* best = *std::min_element(s.begin(), s.end(), [](const Point* a, const Point* b) {
            return a->job.us < b->job.us;
        });
        return {best->job.us, '>'};
    }
    for (std::size_t k = 0; k + 1 < s.size(); ++k) {
        const double e0 = s[k]->err, e1 = s[k + 1]->err;
        if ((e0 - e) * (e1 - e) > 0.0) continue;  // not bracketed
        const double w = e0 == e1 ? 0.0 : (std::log(e) - std::log(e0)) / (std::log(e1) - std::log(e0));
        const double lt = std::log(s[k]->job.us) + w * (std::log(s[k + 1]->job.us) - std::log(s[k]->job.us));
        return {std::exp(lt), ' '};
    }
    return {};
}

bool is_odeint(Method m) { return m == Method::Dopri5 || m == Method::Fehlberg78 || m == Method::Dopri5Dense; }
bool is_controlled(Method m) { return m == Method::Dopri5 || m == Method::Fehlberg78; }

std::string ratio_text(double ratio, char flag) {
    if (flag == 'x') return "not reached";
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.2f%c", ratio, flag);
    return buf;
}

void print_matched(const std::vector<Problem>& problems, const std::vector<std::vector<Point>>& results,
                   const std::vector<Method>& others) {
    const int width = 46 + 21 * static_cast<int>(others.size()) + 24;
    std::printf("%-10s %6s %10s %10s", "problem", "tol", "taylor err", "taylor us");
    for (Method m : others) std::printf(" %20s", (std::string(method_name(m)) + " us").c_str());
    std::printf(" %11s %11s\n", "ratio ctrl", "ratio all");
    print_rule(width);
    for (std::size_t i = 0; i < problems.size(); ++i) {
        for (const Point& t : results[i]) {
            if (t.method != Method::Taylor) continue;
            std::printf("%-10s %6.0e %10.2e %10.1f", problems[i].name.c_str(), t.tol, t.err, t.job.us);
            AtError best_ctrl, best_all;
            best_ctrl.us = best_all.us = std::numeric_limits<double>::infinity();
            for (Method m : others) {
                const AtError a = time_at_error(results[i], m, t.err);
                if (a.flag == 'x')
                    std::printf(" %20s", "not reached");
                else
                    std::printf(" %19.1f%c", a.us, a.flag);
                if (a.flag == 'x' || !is_odeint(m)) continue;
                if (a.us < best_all.us) best_all = a;
                if (is_controlled(m) && a.us < best_ctrl.us) best_ctrl = a;
            }
            std::printf(" %11s %11s\n", ratio_text(best_ctrl.us / t.job.us, best_ctrl.flag).c_str(),
                        ratio_text(best_all.us / t.job.us, best_all.flag).c_str());
        }
    }
    print_rule(width);
    std::printf("ratio = time of the fastest odeint method at Taylor's achieved error / Taylor's time (> 1: Taylor\n"
                "is faster). ctrl = the controlled steppers dopri5 and rkf78; all = also dopri5 with dense output.\n"
                "'>' = even the method's loosest run (tol 1e-3) is more accurate than Taylor's run; its fastest run\n"
                "is used, so that time and the ratio are upper bounds.\n");
}

struct DenseRow {
    double tol = 0.0;
    int order = 0;
    long steps = 0;
    double kib = 0.0;  // coefficients and step times kept by the trajectory
    Timing setup, bare, sim, job;
};

std::vector<DenseRow> dense_rows(const Problem& p) {
    std::vector<DenseRow> rows;
    for (double tol : kMainTols) {
        DenseRow r;
        r.tol = tol;
        sim::Options opt;
        opt.tol = tol;
        const sim::Simulation s = sim::simulate(p.model, p.params, p.doses, p.t_end, opt);
        r.order = s.order;
        r.steps = s.steps;
        const auto& tr = s.trajectory;
        r.kib = static_cast<double>(tr.size()) * (static_cast<double>(tr.n_series() * (tr.order() + 1)) + 2.0) *
                8.0 / 1024.0;
        rows.push_back(r);
    }
    return rows;
}

void measure_dense(const Problem& p, std::vector<DenseRow>& rows, const Config& cfg) {
    for (DenseRow& r : rows) {
        const double tol = r.tol;
        keep_faster(r.setup, time_it(
                                 [&] {
                                     std::size_t n = 0;
                                     return static_cast<double>(taylor_setup(p, tol, n)) + static_cast<double>(n);
                                 },
                                 cfg));
        keep_faster(r.bare, time_it(
                                [&] {
                                    double c = 0.0;
                                    return static_cast<double>(run_taylor_no_store(p, tol, c)) + c;
                                },
                                cfg));
        keep_faster(r.sim, time_it([&] { return static_cast<double>(taylor_integrate_only(p, tol)); }, cfg));
        keep_faster(r.job, time_it([&] { return last_value(taylor_job(p, tol)); }, cfg));
    }
}

void print_dense_cost(const std::vector<Problem>& problems, const std::vector<std::vector<DenseRow>>& rows) {
    std::printf("%-10s %6s %5s %7s %9s %14s %14s %14s %10s\n", "problem", "tol", "order", "steps", "us setup",
                "us no store", "us simulate", "us +720 values", "KiB kept");
    print_rule(98);
    for (std::size_t i = 0; i < problems.size(); ++i)
        for (const DenseRow& r : rows[i])
            std::printf("%-10s %6.0e %5d %7ld %9.1f %14.1f %14.1f %14.1f %10.1f\n", problems[i].name.c_str(), r.tol,
                        r.order, r.steps, r.setup.us, r.bare.us, r.sim.us, r.job.us, r.kib);
    print_rule(98);
}

std::string load_average() {
    std::FILE* f = std::fopen("/proc/loadavg", "r");
    if (f == nullptr) return "unknown";
    char buf[128] = "";
    const bool ok = std::fgets(buf, sizeof buf, f) != nullptr;
    std::fclose(f);
    if (!ok) return "unknown";
    std::string s(buf);
    std::size_t cut = 0;
    for (int field = 0; field < 3 && cut != std::string::npos; ++field) cut = s.find(' ', cut + 1);
    return s.substr(0, cut);
}

void print_reference_check(const std::vector<Problem>& problems) {
    std::printf("%-10s %-44s %14s %14s\n", "problem", "exact values from", "taylor 1e-15", "rkf78 1e-14");
    print_rule(86);
    for (const Problem& p : problems) {
        const double a = max_relative_error(p, run_job(p, Method::Taylor, 1e-15).conc);
        const double b = max_relative_error(p, run_job(p, Method::Fehlberg78, 1e-14).conc);
        std::printf("%-10s %-44s %14.2e %14.2e\n", p.name.c_str(), p.reference.c_str(), a, b);
    }
    print_rule(86);
}

int run(int argc, char** argv) {
    Config cfg;
    for (int i = 1; i < argc; ++i) {
        if (std::strcmp(argv[i], "--quick") == 0) {
            cfg.min_runs = 3;
            cfg.min_seconds = 0.02;
            cfg.passes = 1;
        } else if (std::strcmp(argv[i], "--sweep") == 0) {
            cfg.sweep_table = true;
        } else if (std::strcmp(argv[i], "--passes") == 0 && i + 1 < argc) {
            cfg.passes = std::atoi(argv[++i]);
            if (cfg.passes < 1 || cfg.passes > 100) {
                std::fprintf(stderr, "plateau_bench: --passes expects a count from 1 to 100, got '%s'\n", argv[i]);
                return 2;
            }
        } else {
            std::fprintf(stderr, "plateau_bench: unknown option '%s' (expected --quick, --sweep or --passes N)\n",
                         argv[i]);
            return 2;
        }
    }
    const std::vector<Problem> problems = {oral_one_compartment(), two_compartment_iv(), michaelis_menten()};
    std::vector<Method> methods = {Method::Taylor, Method::Dopri5, Method::Fehlberg78, Method::Dopri5Dense};
    if (available(Method::Cvode)) methods.push_back(Method::Cvode);
    const std::vector<Method> others(methods.begin() + 1, methods.end());

    const std::string load_before = load_average();
    std::vector<std::vector<Point>> results(problems.size(), points_for(methods));
    std::vector<std::vector<DenseRow>> dense;
    for (const Problem& p : problems) dense.push_back(dense_rows(p));
    for (int pass = 0; pass < cfg.passes; ++pass) {
        std::fprintf(stderr, "pass %d of %d\n", pass + 1, cfg.passes);
        for (std::size_t i = 0; i < problems.size(); ++i) {
            measure(problems[i], results[i], cfg, pass == 0);
            measure_dense(problems[i], dense[i], cfg);
        }
    }
    const std::string load_after = load_average();

    std::printf("plateau_bench: 30 days; concentration checked every hour (%zu check times) against the exact\n"
                "solution; time = median of repeated runs (>= %d runs and >= %.2f s per row and pass), fastest of\n"
                "%d passes. Load average before: %s, after: %s.\n"
                "job = integrate through every dose and deliver the hourly values; int. = integrate only.\n"
                "Odeint: abs = rel = tol, restarted at each dose; controlled steppers land a step on every check\n"
                "time, the dense-output stepper interpolates%s.\n\n",
                problems[0].checks.size(), cfg.min_runs, cfg.min_seconds, cfg.passes, load_before.c_str(),
                load_after.c_str(),
                available(Method::Cvode) ? "; CVODE: BDF, dense solver, re-initialised at each dose" : "");
    print_main_table(problems, results, false);
    std::printf("\nMatched achieved error (odeint times interpolated log-log over tol 1e-3 ... 1e-14):\n\n");
    print_matched(problems, results, others);
    std::printf("\nCost of the dense output (Taylor): the same loop without storing the steps, simulate() (stores\n"
                "every step's polynomial), and simulate() plus the 720 hourly values:\n\n");
    print_dense_cost(problems, dense);
    std::printf("\nReference check: max rel. difference of tight runs from the exact values used above:\n\n");
    print_reference_check(problems);
    if (cfg.sweep_table) {
        std::printf("\nAll runs (odeint tolerance sweep):\n\n");
        print_main_table(problems, results, true);
    }
    return 0;
}

}  // namespace
}  // namespace plateau::bench

int main(int argc, char** argv) {
    try {
        return plateau::bench::run(argc, argv);
    } catch (const std::exception& e) {
        std::fprintf(stderr, "plateau_bench: %s\n", e.what());
        return 1;
    }
}
