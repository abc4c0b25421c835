// plateau_sampling: what a sampled concentration grid (every 15 min, every 1 h) gets wrong about peak, trough,
// time above a threshold and AUC for a fast-absorbing oral regimen, against the exact figures plateau computes
// from its step polynomials. The exact figures are first checked against the Bateman function superposed over
// the doses (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory), evaluated here in closed form
// without the engine. Prints Markdown tables; exits 1 if plateau and the closed form disagree.
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <fstream>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "input/load.hpp"
#include "metrics/exposure.hpp"
#include "metrics/level.hpp"
#include "sim/simulate.hpp"

namespace plateau::bench {

namespace {

// ---------------------------------------------------------------------------------------------------------
// The two regimens

struct Case {
    const char* id = "";
    const char* title = "";
    double ka = 1.0;      // 1/h
    double tlag = 0.0;    // h
    double cl = 8.0;    // L/h
    double v = 40.0;    // L
    double f = 0.9;
    double dose = 500.0;  // mg
    double tau = 8.0;     // h
    int count = 9;        // 3 days
    double threshold = 4.0;  // mg/L
    double horizon() const { return tau * count; }
    double k() const { return cl / v; }
};

std::string regimen_text(const Case& c) {
    char buf[1024];
    std::snprintf(buf, sizeof buf,
                  "id = \"%s\"\n"
                  "about = \"%s\"\n"
                  "model = \"one-compartment-oral\"\n"
                  "[parameters]\n"
                  "ka = \"%g 1/h\"\ncl = \"%g L/h\"\nv = \"%g L\"\nf = \"%g\"\ntlag = \"%g h\"\n"
                  "[[doses]]\nroute = \"oral\"\namount = \"%g mg\"\nevery = \"%g h\"\ncount = %d\n"
                  "[targets]\noutput = \"conc\"\nabove = \"%g mg/L\"\n"
                  "[horizon]\nuntil = \"%g h\"\n",
                  c.id, c.title, c.ka, c.cl, c.v, c.f, c.tlag, c.dose, c.tau, c.count, c.threshold, c.horizon());
    return buf;
}

// ---------------------------------------------------------------------------------------------------------
// Figures read off a sampled grid

struct Sample {
    double t = 0.0, c = 0.0;
};

// Values at a, a + h, ..., b (b − a a multiple of h). The trajectory is continuous for oral doses, so the
// value at a dose time is the same from either side.
std::vector<Sample> sample(const traj::Trajectory& tr, int s, double a, double b, double h) {
    const int n = static_cast<int>(std::lround((b - a) / h));
    std::vector<Sample> g;
    for (int i = 0; i <= n; ++i) {
        const double t = i == n ? b : a + h * i;
        g.push_back({t, tr.value(s, t)});
    }
    return g;
}

metrics::Extreme grid_max(const std::vector<Sample>& g) {
    metrics::Extreme e{g.front().c, g.front().t};
    for (const auto& p : g)
        if (p.c > e.value) e = {p.c, p.t};
    return e;
}

double grid_min(const std::vector<Sample>& g) {
    double m = g.front().c;
    for (const auto& p : g) m = std::min(m, p.c);
    return m;
}

// Number of points in [a, b) above the level, times the step.
double above_count(const std::vector<Sample>& g, double level, double h) {
    int n = 0;
    for (std::size_t i = 0; i + 1 < g.size(); ++i) n += g[i].c > level ? 1 : 0;
    return n * h;
}

// Crossing times by linear interpolation between neighbouring points.
std::vector<metrics::Crossing> interp_crossings(const std::vector<Sample>& g, double level) {
    std::vector<metrics::Crossing> x;
    for (std::size_t i = 0; i + 1 < g.size(); ++i) {
        const bool a = g[i].c > level, b = g[i + 1].c > level;
        if (a == b) continue;
        const double t = g[i].t + (level - g[i].c) / (g[i + 1].c - g[i].c) * (g[i + 1].t - g[i].t);
        x.push_back({t, b});
    }
    return x;
}

// Time above with the crossings placed by linear interpolation.
double above_interp(const std::vector<Sample>& g, double level) {
    double sum = 0.0;
    for (std::size_t i = 0; i + 1 < g.size(); ++i) {
        const double h = g[i + 1].t - g[i].t;
        const bool a = g[i].c > level, b = g[i + 1].c > level;
        if (a && b) sum += h;
        else if (a != b) {
            const double frac = (level - g[i].c) / (g[i + 1].c - g[i].c);
            sum += a ? frac * h : (1.0 - frac) * h;
        }
    }
    return sum;
}

double auc_linear(const std::vector<Sample>& g) {
    double sum = 0.0;
    for (std::size_t i = 0; i + 1 < g.size(); ++i) sum += 0.5 * (g[i].c + g[i + 1].c) * (g[i + 1].t - g[i].t);
    return sum;
}

// Linear trapezoid while the concentration rises or stays level, logarithmic while it falls.
double auc_lin_up_log_down(const std::vector<Sample>& g) {
    double sum = 0.0;
    for (std::size_t i = 0; i + 1 < g.size(); ++i) {
        const double c1 = g[i].c, c2 = g[i + 1].c, h = g[i + 1].t - g[i].t;
        if (c2 < c1 && c2 > 0.0) sum += h * (c1 - c2) / std::log(c1 / c2);
        else sum += 0.5 * (c1 + c2) * h;
    }
    return sum;
}

std::optional<double> first_crossing(const std::vector<metrics::Crossing>& x, bool up, double a, double b) {
    for (const auto& c : x)
        if (c.up == up && c.time >= a && c.time < b) return c.time;
    return std::nullopt;
}

// ---------------------------------------------------------------------------------------------------------
// The closed form: Bateman function superposed over the doses (and its infinite sum at steady state)

struct Bateman {
    double a = 0.0;   // F·D·ka / (V·(ka − k)), mg/L
    double ka = 0.0, k = 0.0, lag = 0.0, tau = 0.0;
    int count = 0;

    explicit Bateman(const Case& c)
        : a(c.f * c.dose * c.ka / (c.v * (c.ka - c.k()))), ka(c.ka), k(c.k()), lag(c.tlag), tau(c.tau),
          count(c.count) {}

    double conc(double t) const {
        double sum = 0.0;
        for (int j = 0; j < count; ++j) {
            const double s = t - j * tau - lag;
            if (s > 0.0) sum += a * (std::exp(-k * s) - std::exp(-ka * s));
        }
        return sum;
    }
    double slope(double t) const {
        double sum = 0.0;
        for (int j = 0; j < count; ++j) {
            const double s = t - j * tau - lag;
            if (s > 0.0) sum += a * (ka * std::exp(-ka * s) - k * std::exp(-k * s));
        }
        return sum;
    }
    // Exact integral over [t0, t1].
    double auc(double t0, double t1) const {
        auto prim = [&](double s) { return s <= 0.0 ? 0.0 : a * ((1.0 - std::exp(-k * s)) / k - (1.0 - std::exp(-ka * s)) / ka); };
        double sum = 0.0;
        for (int j = 0; j < count; ++j) sum += prim(t1 - j * tau - lag) - prim(t0 - j * tau - lag);
        return sum;
    }
    // Steady state, t in [0, tau] after a dose: the geometric sums of every earlier dose.
    double ss_phase(double t) const {
        double s = t - lag;
        if (s < 0.0) s += tau;
        return s;
    }
    double ss_conc(double t) const {
        const double s = ss_phase(t);
        return a * (std::exp(-k * s) / (1.0 - std::exp(-k * tau)) - std::exp(-ka * s) / (1.0 - std::exp(-ka * tau)));
    }
    double ss_slope(double t) const {
        const double s = ss_phase(t);
        return a * (ka * std::exp(-ka * s) / (1.0 - std::exp(-ka * tau)) - k * std::exp(-k * s) / (1.0 - std::exp(-k * tau)));
    }
    // Peak times from C'(t) = 0, solved by hand: one dose alone, and steady state.
    double single_tmax() const { return lag + std::log(ka / k) / (ka - k); }
    double ss_tmax() const {
        return lag + std::log(ka * (1.0 - std::exp(-k * tau)) / (k * (1.0 - std::exp(-ka * tau)))) / (ka - k);
    }
};

struct Exact {
    metrics::Extreme peak, minimum;
    double trough = 0.0, above = 0.0;
    std::vector<metrics::Crossing> crossings;
};

// Bisection to the sign change of f in [u, w] (f(u), f(w) of opposite signs).
double bisect(const std::function<double(double)>& f, double u, double w) {
    const bool fu = f(u) > 0.0;
    for (int i = 0; i < 200 && w - u > 1e-15 * std::max(1.0, std::fabs(w)); ++i) {
        const double m = 0.5 * (u + w);
        if ((f(m) > 0.0) == fu) u = m;
        else w = m;
    }
    return 0.5 * (u + w);
}

// Peak, trough, minimum, crossings and time above of c on [a, b], from a fine scan (1e-3 h) of the signs of
// the slope and of c − level, refined by bisection; `kinks` are the absorption starts (slope discontinuous).
Exact closed_form_figures(const std::function<double(double)>& c, const std::function<double(double)>& dc, double a,
                          double b, const std::vector<double>& kinks, double level) {
    Exact e;
    std::vector<double> cand{a, b};
    for (double t : kinks)
        if (t > a && t < b) cand.push_back(t);
    const int n = static_cast<int>(std::ceil((b - a) / 1e-3));
    const double h = (b - a) / n;
    auto gap = [&](double t) { return c(t) - level; };
    for (int i = 0; i < n; ++i) {
        const double u = a + h * i, w = i + 1 == n ? b : a + h * (i + 1);
        if ((dc(u) > 0.0) != (dc(w) > 0.0)) cand.push_back(bisect(dc, u, w));
        if ((gap(u) > 0.0) != (gap(w) > 0.0)) e.crossings.push_back({bisect(gap, u, w), gap(w) > 0.0});
    }
    std::sort(cand.begin(), cand.end());
    e.peak = {c(cand.front()), cand.front()};
    e.minimum = e.peak;
    for (double t : cand) {
        const double v = c(t);
        if (v > e.peak.value) e.peak = {v, t};
        if (v < e.minimum.value) e.minimum = {v, t};
    }
    e.trough = c(b);
    double prev = a;
    for (std::size_t i = 0; i <= e.crossings.size(); ++i) {
        const double next = i < e.crossings.size() ? e.crossings[i].time : b;
        if (c(0.5 * (prev + next)) > level) e.above += next - prev;
        prev = next;
    }
    return e;
}

// ---------------------------------------------------------------------------------------------------------
// Table output

enum class Kind { Level, Moment, Span };  // a concentration or AUC; a time after the dose; a duration

struct Row {
    std::string figure;
    Kind kind = Kind::Level;
    double exact = 0.0;
    std::optional<double> g15, g60;
};

// printf of one number; a value that rounds to zero prints without a minus sign.
std::string fmt(const char* f, double x) {
    char buf[64];
    std::snprintf(buf, sizeof buf, f, x);
    std::string out = buf;
    if (out.find_first_of("123456789") == std::string::npos && !out.empty() && out[0] == '-') out[0] = '+';
    return out;
}

std::string error_text(const Row& r, const std::optional<double>& g) {
    if (!g) return "—";
    std::string s;
    if (r.exact != 0.0) s = fmt("%+.2f %%", 100.0 * (*g - r.exact) / r.exact);
    if (r.kind != Kind::Level) s += (s.empty() ? "" : " (") + fmt("%+.0f min", 60.0 * (*g - r.exact)) + (s.empty() ? "" : ")");
    return s;
}

void print_table(const std::vector<Row>& rows) {
    std::printf("| figure | exact | 15-min grid | error | 1-h grid | error |\n");
    std::printf("|---|---:|---:|---:|---:|---:|\n");
    for (const auto& r : rows) {
        const char* f = "%.3f";
        auto val = [&](const std::optional<double>& g) { return g ? fmt(f, *g) : std::string("none"); };
        std::printf("| %s | %s | %s | %s | %s | %s |\n", r.figure.c_str(), fmt(f, r.exact).c_str(), val(r.g15).c_str(),
                    error_text(r, r.g15).c_str(), val(r.g60).c_str(), error_text(r, r.g60).c_str());
    }
}

// Every dosing interval on the aligned grids: peak error (%) and time-above error (min), count and interpolated.
void print_intervals(const traj::Trajectory& tr, int s, const metrics::Exposure& e, double level) {
    std::printf("Each dosing interval, aligned grids (peak error in %%, time-above error in min, count / interp.):\n\n");
    std::printf("| interval (h) | peak | 15-min | 1-h | above (h) | 15-min | 1-h |\n|---|---:|---:|---:|---:|---:|---:|\n");
    for (const auto& iv : e.intervals) {
        std::string pk[2], ab[2];
        const double steps[2] = {0.25, 1.0};
        for (int k = 0; k < 2; ++k) {
            const std::vector<Sample> g = sample(tr, s, iv.start, iv.end, steps[k]);
            pk[k] = fmt("%+.2f", 100.0 * (grid_max(g).value - iv.peak.value) / iv.peak.value);
            ab[k] = fmt("%+.0f", 60.0 * (above_count(g, level, steps[k]) - iv.above_hours)) + " / " +
                    fmt("%+.0f", 60.0 * (above_interp(g, level) - iv.above_hours));
        }
        std::printf("| %g-%g | %.3f | %s | %s | %.3f | %s | %s |\n", iv.start, iv.end, iv.peak.value, pk[0].c_str(),
                    pk[1].c_str(), iv.above_hours, ab[0].c_str(), ab[1].c_str());
    }
    std::printf("\n");
}

// ---------------------------------------------------------------------------------------------------------
// The same steady-state figures when the grid does not start at the dose: points at δ, δ + h, ... for 60
// phases δ in [0, h); the figures are read off one period, the last point before the next dose being the
// "pre-dose" sample.

struct Spread {
    double lo = 1e300, hi = -1e300;
    void add(double x) {
        lo = std::min(lo, x);
        hi = std::max(hi, x);
    }
};

struct PhaseFigures {
    metrics::Extreme peak;
    double trough = 0.0, lowest = 0.0, above_count = 0.0, above_interp = 0.0, auc_lin = 0.0, auc_log = 0.0;
};

PhaseFigures phase_figures(const traj::Trajectory& period, int s, double tau, double h, double delta, double level) {
    const int n = static_cast<int>(std::lround(tau / h));
    std::vector<Sample> g;
    for (int j = 0; j < n; ++j) {
        const double t = delta + h * j;
        g.push_back({t, period.value(s, t)});
    }
    g.push_back({g.front().t + tau, g.front().c});  // the periodic solution repeats
    PhaseFigures f;
    f.peak = grid_max(g);
    if (f.peak.time >= tau) f.peak.time -= tau;
    // The last point at or before the next dose: the dose time itself when the grid starts on it.
    f.trough = delta == 0.0 ? g.front().c : g[static_cast<std::size_t>(n - 1)].c;
    f.lowest = grid_min(g);
    f.above_count = above_count(g, level, h);
    f.above_interp = above_interp(g, level);
    f.auc_lin = auc_linear(g) * 24.0 / tau;
    f.auc_log = auc_lin_up_log_down(g) * 24.0 / tau;
    return f;
}

void print_phase_table(const traj::Trajectory& period, int s, double tau, double level, const metrics::Steady& st) {
    struct Item {
        const char* name;
        Kind kind;
        double exact;
        double (*get)(const PhaseFigures&);
    };
    const Item items[] = {
        {"steady: peak", Kind::Level, st.peak.value, [](const PhaseFigures& f) { return f.peak.value; }},
        {"steady: time of peak", Kind::Moment, st.peak.time, [](const PhaseFigures& f) { return f.peak.time; }},
        {"steady: pre-dose sample", Kind::Level, st.trough, [](const PhaseFigures& f) { return f.trough; }},
        {"steady: lowest sample", Kind::Level, st.minimum.value, [](const PhaseFigures& f) { return f.lowest; }},
        {"steady: above 4 mg/L, count", Kind::Span, st.above_hours, [](const PhaseFigures& f) { return f.above_count; }},
        {"steady: above 4 mg/L, interp.", Kind::Span, st.above_hours, [](const PhaseFigures& f) { return f.above_interp; }},
        {"steady AUC24, linear", Kind::Level, st.auc24, [](const PhaseFigures& f) { return f.auc_lin; }},
        {"steady AUC24, lin-up/log-down", Kind::Level, st.auc24, [](const PhaseFigures& f) { return f.auc_log; }},
    };
    const int phases = 60;
    std::printf("Grid not aligned with the dose (60 phases from 0 to one step): range of the error.\n\n");
    std::printf("| figure | exact | 15-min grid | 1-h grid |\n|---|---:|---:|---:|\n");
    for (const Item& it : items) {
        Spread sp[2];
        const double steps[2] = {0.25, 1.0};
        for (int k = 0; k < 2; ++k)
            for (int i = 0; i < phases; ++i) {
                const PhaseFigures f = phase_figures(period, s, tau, steps[k], steps[k] * i / phases, level);
                const double d = it.get(f) - it.exact;
                sp[k].add(it.kind == Kind::Level ? 100.0 * d / it.exact : 60.0 * d);
            }
        auto range = [&](const Spread& r) {
            const char* f = it.kind == Kind::Level ? "%+.2f" : "%+.0f";
            return fmt(f, r.lo) + " to " + fmt(f, r.hi) + (it.kind == Kind::Level ? " %" : " min");
        };
        std::printf("| %s | %.3f | %s | %s |\n", it.name, it.exact, range(sp[0]).c_str(), range(sp[1]).c_str());
    }
    std::printf("\n");
}

// ---------------------------------------------------------------------------------------------------------
// One case

struct Check {
    int figures = 0;
    double worst = 0.0;       // relative to max(1, |closed form|)
    std::string worst_name;
    bool print = true;
    void add(const std::string& name, double plateau, double closed) {
        const double d = std::fabs(plateau - closed) / std::max(1.0, std::fabs(closed));
        ++figures;
        if (d >= worst) {
            worst = d;
            worst_name = name;
        }
        if (print)
            std::printf("    %-36s plateau %17.12f   closed form %17.12f   |diff| %.1e\n", name.c_str(), plateau, closed,
                        std::fabs(plateau - closed));
    }
};

bool run_case(const Case& cs, const std::filesystem::path& dir) {
    const std::filesystem::path file = dir / (std::string(cs.id) + ".toml");
    std::ofstream(file, std::ios::binary) << regimen_text(cs);
    const regimen::Regimen r = input::load_regimen(file.string(), input::default_model_dirs());
    const sim::Options opt;  // plateau's defaults (tol 1e-10)
    const sim::Simulation sim = sim::simulate(r, opt);
    const metrics::Request req = metrics::request_from(r, opt);
    const metrics::Exposure e = metrics::compute(r, sim, req);
    if (!e.steady || !e.steady->found || e.intervals.size() != static_cast<std::size_t>(cs.count) || e.days.size() != 3) {
        std::fprintf(stderr, "%s: plateau did not return the expected figures\n", cs.id);
        return false;
    }
    const metrics::Steady& st = *e.steady;
    const metrics::Interval& d1 = e.intervals.front();
    const int s = sim.output_series(req.output);
    const double thr = cs.threshold, tau = cs.tau, T = cs.horizon();

    std::printf("## %s\n\n", cs.title);
    std::printf("ka = %g 1/h, lag %g h, CL = %g L/h, V = %g L (k = %g 1/h), F = %g; %g mg every %g h, %d doses; "
                "threshold %g mg/L. Steps: %ld, order %d.\n\n",
                cs.ka, cs.tlag, cs.cl, cs.v, cs.k(), cs.f, cs.dose, cs.tau, cs.count, thr, sim.steps, sim.order);

    // --- independent check of the exact figures
    const Bateman bt(cs);
    std::vector<double> kinks;
    for (int j = 0; j < cs.count; ++j) kinks.push_back(j * tau + cs.tlag);
    auto c = [&](double t) { return bt.conc(t); };
    auto dc = [&](double t) { return bt.slope(t); };
    auto css = [&](double t) { return bt.ss_conc(t); };
    auto dcss = [&](double t) { return bt.ss_slope(t); };
    const Exact b1 = closed_form_figures(c, dc, 0.0, tau, kinks, thr);
    const Exact bss = closed_form_figures(css, dcss, 0.0, tau, {cs.tlag}, thr);
    const Exact bh = closed_form_figures(c, dc, 0.0, T, kinks, thr);
    const metrics::LevelResult ss_level = metrics::level(st.period, s, thr, 0.0, tau);

    std::printf("Closed-form check (Bateman function superposed over the doses; steady state from its geometric "
                "sums):\n\n```\n");
    Check ck;
    ck.add("dose 1 peak (mg/L)", d1.peak.value, b1.peak.value);
    ck.add("dose 1 peak time (h)", d1.peak.time, b1.peak.time);
    ck.add("dose 1 peak time, formula (h)", d1.peak.time, bt.single_tmax());
    ck.add("dose 1 trough (mg/L)", d1.trough, b1.trough);
    ck.add("dose 1 time above (h)", d1.above_hours, b1.above);
    ck.add("steady peak (mg/L)", st.peak.value, bss.peak.value);
    ck.add("steady peak time (h)", st.peak.time, bss.peak.time);
    ck.add("steady peak time, formula (h)", st.peak.time, bt.ss_tmax());
    ck.add("steady trough (mg/L)", st.trough, bss.trough);
    ck.add("steady minimum (mg/L)", st.minimum.value, bss.minimum.value);
    ck.add("steady time above / interval (h)", st.above_hours, bss.above);
    ck.add("horizon time above (h)", e.above_hours, bh.above);
    ck.add("AUC 0-24 (mg.h/L)", e.days[0].auc, bt.auc(0.0, 24.0));
    ck.add("AUC 48-72 (mg.h/L)", e.days[2].auc, bt.auc(48.0, 72.0));
    ck.add("steady AUC24 = (24/tau) F.D/CL", st.auc24, 24.0 / tau * cs.f * cs.dose / cs.cl);
    bool crossings_ok = e.crossings.size() == bh.crossings.size() && ss_level.crossings.size() == bss.crossings.size();
    Check cx;
    cx.print = false;
    for (std::size_t i = 0; crossings_ok && i < e.crossings.size(); ++i) {
        crossings_ok = e.crossings[i].up == bh.crossings[i].up;
        cx.add("crossing", e.crossings[i].time, bh.crossings[i].time);
    }
    for (std::size_t i = 0; crossings_ok && i < ss_level.crossings.size(); ++i) {
        crossings_ok = ss_level.crossings[i].up == bss.crossings[i].up;
        cx.add("steady crossing", ss_level.crossings[i].time, bss.crossings[i].time);
    }
    std::printf("    %-36s %zu over 0-72 h and %zu at steady state, same directions; largest |diff| %.1e h\n",
                "crossings of 4 mg/L", e.crossings.size(), ss_level.crossings.size(), cx.worst);
    ck.figures += cx.figures;
    if (cx.worst > ck.worst) {
        ck.worst = cx.worst;
        ck.worst_name = "a crossing time";
    }
    const bool ok = crossings_ok && ck.worst < 1e-8;
    std::printf("```\n\nAgreement: %d figures, largest relative difference %.1e (%s), crossings %s: %s.\n\n", ck.figures, ck.worst,
                ck.worst_name.c_str(), crossings_ok ? "paired one to one" : "NOT paired", ok ? "agree" : "DISAGREE");

    // --- grids
    struct Grid {
        std::vector<Sample> d1, ss, day1, all;
        std::vector<metrics::Crossing> x_all, x_ss;
    };
    auto make = [&](double h) {
        Grid g;
        g.d1 = sample(sim.trajectory, s, 0.0, tau, h);
        g.ss = sample(st.period, s, 0.0, tau, h);
        g.day1 = sample(sim.trajectory, s, 0.0, 24.0, h);
        g.all = sample(sim.trajectory, s, 0.0, T, h);
        g.x_all = interp_crossings(g.all, thr);
        g.x_ss = interp_crossings(g.ss, thr);
        return g;
    };
    const double h15 = 0.25, h60 = 1.0;
    const Grid q = make(h15), o = make(h60);
    std::vector<Row> rows;
    auto both = [&](const std::string& name, Kind kind, double exact, const std::function<std::optional<double>(const Grid&, double)>& f) {
        rows.push_back({name, kind, exact, f(q, h15), f(o, h60)});
    };
    auto ex_x = [&](const std::vector<metrics::Crossing>& x, bool up, double a, double b) {
        return first_crossing(x, up, a, b).value_or(std::nan(""));
    };
    both("dose 1: peak (mg/L)", Kind::Level, d1.peak.value, [](const Grid& g, double) { return grid_max(g.d1).value; });
    both("dose 1: time of peak (h)", Kind::Moment, d1.peak.time, [](const Grid& g, double) { return grid_max(g.d1).time; });
    both("dose 1: trough at 8 h (mg/L)", Kind::Level, d1.trough, [](const Grid& g, double) { return g.d1.back().c; });
    both("dose 1: above 4 mg/L, count (h)", Kind::Span, d1.above_hours, [&](const Grid& g, double h) { return above_count(g.d1, thr, h); });
    both("dose 1: above 4 mg/L, interp. (h)", Kind::Span, d1.above_hours, [&](const Grid& g, double) { return above_interp(g.d1, thr); });
    both("dose 1: rises past 4 mg/L (h)", Kind::Moment, ex_x(e.crossings, true, 0.0, tau),
         [&](const Grid& g, double) { return first_crossing(g.x_all, true, 0.0, tau); });
    both("dose 1: falls below 4 mg/L (h)", Kind::Moment, ex_x(e.crossings, false, 0.0, tau),
         [&](const Grid& g, double) { return first_crossing(g.x_all, false, 0.0, tau); });
    both("steady: peak (mg/L)", Kind::Level, st.peak.value, [](const Grid& g, double) { return grid_max(g.ss).value; });
    both("steady: time of peak (h)", Kind::Moment, st.peak.time, [](const Grid& g, double) { return grid_max(g.ss).time; });
    both("steady: trough, pre-dose (mg/L)", Kind::Level, st.trough, [](const Grid& g, double) { return g.ss.back().c; });
    both("steady: lowest value (mg/L)", Kind::Level, st.minimum.value, [](const Grid& g, double) { return grid_min(g.ss); });
    both("steady: above 4 mg/L, count (h)", Kind::Span, st.above_hours, [&](const Grid& g, double h) { return above_count(g.ss, thr, h); });
    both("steady: above 4 mg/L, interp. (h)", Kind::Span, st.above_hours, [&](const Grid& g, double) { return above_interp(g.ss, thr); });
    both("steady: rises past 4 mg/L (h)", Kind::Moment, ex_x(ss_level.crossings, true, 0.0, tau),
         [&](const Grid& g, double) { return first_crossing(g.x_ss, true, 0.0, tau); });
    both("steady: falls below 4 mg/L (h)", Kind::Moment, ex_x(ss_level.crossings, false, 0.0, tau),
         [&](const Grid& g, double) { return first_crossing(g.x_ss, false, 0.0, tau); });
    both("0-72 h: above 4 mg/L, count (h)", Kind::Span, e.above_hours, [&](const Grid& g, double h) { return above_count(g.all, thr, h); });
    both("0-72 h: above 4 mg/L, interp. (h)", Kind::Span, e.above_hours, [&](const Grid& g, double) { return above_interp(g.all, thr); });
    both("AUC 0-24, linear (mg.h/L)", Kind::Level, e.days[0].auc, [](const Grid& g, double) { return auc_linear(g.day1); });
    both("AUC 0-24, lin-up/log-down", Kind::Level, e.days[0].auc, [](const Grid& g, double) { return auc_lin_up_log_down(g.day1); });
    both("steady AUC24, linear", Kind::Level, st.auc24, [&](const Grid& g, double) { return auc_linear(g.ss) * 24.0 / tau; });
    both("steady AUC24, lin-up/log-down", Kind::Level, st.auc24,
         [&](const Grid& g, double) { return auc_lin_up_log_down(g.ss) * 24.0 / tau; });
    std::printf("Times of peak and crossings are hours after the dose. Grid points at 0, h, 2h, ... from the first "
                "dose; steady-state rows sample plateau's periodic solution.\n\n");
    print_table(rows);
    std::printf("\n");
    print_intervals(sim.trajectory, s, e, thr);
    print_phase_table(st.period, s, tau, thr, st);
    return ok;
}

}  // namespace

int run() {
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / ("plateau-sampling-" + std::to_string(::getpid()));
    bool ok = true;
    try {
        fs::create_directories(dir);
        Case a;
        a.id = "sampling-fast";
        a.title = "Case A: fast absorption, ka = 3 1/h, no lag";
        a.ka = 3.0;
        Case b;
        b.id = "sampling-lag";
        b.title = "Case B: ka = 1.2 1/h, lag 0.3 h";
        b.ka = 1.2;
        b.tlag = 0.3;
        std::printf("# Sampling error against exact figures (plateau_sampling)\n\n");
        ok = run_case(a, dir) && ok;
        ok = run_case(b, dir) && ok;
    } catch (const std::exception& ex) {
        std::fprintf(stderr, "plateau_sampling: %s\n", ex.what());
        ok = false;
    }
    std::error_code ec;
    fs::remove_all(dir, ec);
    return ok ? 0 : 1;
}

}  // namespace plateau::bench

int main() { return plateau::bench::run(); }
