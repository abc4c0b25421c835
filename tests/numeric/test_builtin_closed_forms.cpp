// The shipped one- and two-compartment model files against closed forms, through regimen files that set the
// parameters of published examples: values at the printed times, peaks, AUC and level crossings. The default
// integration tolerance (1e-10) is used throughout; the closed forms are re-evaluated here beside the printed
// values.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <string>
#include <vector>

#include <boost/math/special_functions/lambert_w.hpp>

#include "../metrics/support.hpp"

using namespace plateau;
using Catch::Matchers::WithinRel;

namespace {

std::string num(double x) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", x);
    return buf;
}

std::string model_file(const std::string& id) { return std::string(PLATEAU_SOURCE_DIR) + "/models/" + id + ".toml"; }

// One dose at 0 h of `amount` mg on `route`, with `parameters` (TOML lines), up to `until` h.
testing::Run single_dose(const std::string& id, const std::string& model, const std::string& parameters,
                         const std::string& route, double amount, double until) {
    const std::string text = "id = \"" + id + "\"\nmodel = \"" + model_file(model) + "\"\n[parameters]\n" +
                             parameters + "[[doses]]\nroute = \"" + route + "\"\namount = \"" + num(amount) +
                             " mg\"\nat = \"0 h\"\n[targets]\noutput = \"conc\"\n[horizon]\nuntil = \"" + num(until) +
                             " h\"\n";
    testing::Run r = testing::run_text(id + ".toml", text);
    REQUIRE(r.sim.outcome == taylor::Outcome::Ok);
    return r;
}

double conc(const testing::Run& r, double t) {
    return r.sim.trajectory.value(r.sim.output_series(r.regimen.model.output_index("conc")), t);
}

double auc(const testing::Run& r) {
    return r.sim.trajectory.integral(r.sim.output_series(r.regimen.model.output_index("conc")), 0.0, r.sim.end);
}

// Largest relative difference to `exact` on a 0.05-h grid over (0, t_max]; t_max is chosen where the amount in
// the body is still above 1 mg (below it the step rule controls the absolute error).
double worst_on_grid(const testing::Run& r, const std::function<double(double)>& exact, double t_max) {
    double worst = 0.0;
    for (int i = 1; 0.05 * i <= t_max + 1e-12; ++i) {
        const double t = 0.05 * i;
        worst = std::max(worst, std::abs(conc(r, t) - exact(t)) / exact(t));
    }
    return worst;
}

}  // namespace

TEST_CASE("models: one-compartment-iv file against the monoexponential", "[models]") {
    // Bourne, Basic Pharmacokinetics, ch. 14: 100 mg IV bolus, V = 10 L, t1/2 = 4 h, so CL = 10·ln 2/4 L/h.
    const double v = 10.0, k = std::log(2.0) / 4.0, dose = 100.0;
    const auto r = single_dose("builtin-cf-iv", "one-compartment-iv",
                               "v = \"10 L\"\ncl = \"" + num(k * v) + " L/h\"\n", "iv", dose, 300.0);
    const auto exact = [&](double t) { return dose / v * std::exp(-k * t); };  // computed from the closed form
    CHECK_THAT(conc(r, 6.0), WithinRel(3.5355339059, 1e-9));  // Bourne, ch. 14 (computed)
    CHECK_THAT(conc(r, 6.0), WithinRel(exact(6.0), 1e-9));    // computed from the closed form
    CHECK_THAT(conc(r, 0.0), WithinRel(10.0, 1e-12));         // D/V, computed from the closed form
    const double grid = worst_on_grid(r, exact, 24.0);
    INFO("largest relative difference on the grid: " << grid);
    CHECK(grid < 1e-9);  // computed from the closed form
    // The horizon is 75 half-lives: the tail beyond it is below 1e-22 of the AUC (computed from the closed form).
    CHECK_THAT(auc(r), WithinRel(57.7078016356, 1e-9));  // D/CL, Bourne, ch. 14 (computed)
}

TEST_CASE("models: one-compartment-oral file against the Bateman function", "[models]") {
    // Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1 (from memory): F = 0.8, D = 500 mg, V = 40 L,
    // ka = 1.2 /h, CL = 6 L/h (k = 0.15 /h).
    const double f = 0.8, dose = 500.0, v = 40.0, ka = 1.2, k = 0.15;
    const auto r = single_dose("builtin-cf-oral", "one-compartment-oral",
                               "f = \"0.8\"\nv = \"40 L\"\nka = \"1.2 1/h\"\ncl = \"6 L/h\"\ntlag = \"0 h\"\n", "oral",
                               dose, 400.0);
    const auto exact = [&](double t) {  // computed from the closed form
        return f * dose * ka / (v * (ka - k)) * (std::exp(-k * t) - std::exp(-ka * t));
    };
    // Gibaldi & Perrier, ch. 1, from memory (values computed):
    CHECK_THAT(conc(r, 0.5), WithinRel(4.3306497170, 1e-9));
    CHECK_THAT(conc(r, 1.0), WithinRel(6.3944430230, 1e-9));
    CHECK_THAT(conc(r, 2.0), WithinRel(7.4297173416, 1e-9));
    CHECK_THAT(conc(r, 8.0), WithinRel(3.4414455220, 1e-9));
    CHECK_THAT(conc(r, 24.0), WithinRel(0.3122711137, 1e-9));
    const double grid = worst_on_grid(r, exact, 24.0);
    INFO("largest relative difference on the grid: " << grid);
    CHECK(grid < 1e-9);  // computed from the closed form
    // Tmax = ln(ka/k)/(ka - k) and Cmax (Gibaldi & Perrier, ch. 1, from memory; computed).
    CHECK_THAT(r.exposure.peak.time, WithinRel(1.9804205159, 1e-9));
    CHECK_THAT(r.exposure.peak.value, WithinRel(7.4299714457, 1e-9));
    CHECK_THAT(r.exposure.peak.time, WithinRel(std::log(ka / k) / (ka - k), 1e-9));  // computed from the closed form
    // AUC0-inf = F·D/CL (Gibaldi & Perrier, from memory); the horizon is 86 elimination half-lives.
    CHECK_THAT(auc(r), WithinRel(66.6666666667, 1e-9));
    CHECK_THAT(r.exposure.auc, WithinRel(f * dose / 6.0, 1e-9));  // common practice, no source
}

TEST_CASE("models: one-compartment-oral file in the ka = k limit", "[models]") {
    // Gibaldi & Perrier (from memory): C = F·D·k·t·exp(-k t)/V with F = 1, D = 100 mg, V = 10 L, ka = k = 0.5 /h
    // (CL = k·V = 5 L/h).
    const double dose = 100.0, v = 10.0, k = 0.5;
    const auto r = single_dose("builtin-cf-oral-limit", "one-compartment-oral",
                               "f = \"1\"\nv = \"10 L\"\nka = \"0.5 1/h\"\ncl = \"5 L/h\"\ntlag = \"0 h\"\n", "oral",
                               dose, 200.0);
    const auto exact = [&](double t) { return dose * k * t * std::exp(-k * t) / v; };  // computed from the closed form
    CHECK_THAT(conc(r, 1.0), WithinRel(3.0326532986, 1e-9));  // Gibaldi & Perrier, from memory
    CHECK_THAT(conc(r, 4.0), WithinRel(2.7067056647, 1e-9));  // Gibaldi & Perrier, from memory
    const double grid = worst_on_grid(r, exact, 16.0);
    INFO("largest relative difference on the grid: " << grid);
    CHECK(grid < 1e-9);  // computed from the closed form
    CHECK_THAT(r.exposure.peak.time, WithinRel(2.0, 1e-9));             // Tmax = 1/k, Gibaldi & Perrier, from memory
    CHECK_THAT(r.exposure.peak.value, WithinRel(3.6787944117, 1e-9));  // Cmax, Gibaldi & Perrier, from memory
    CHECK_THAT(auc(r), WithinRel(20.0, 1e-9));                          // F·D/CL, Gibaldi & Perrier, from memory
}

TEST_CASE("models: two-compartment-iv file against the biexponential", "[models]") {
    // Bourne, ch. 19.2: k10 = 0.192, k12 = 1.86, k21 = 1.68 /h, V1 = 35.295 L, 500 mg IV bolus; the file's
    // parameters are clearances: CL = k10·V1, Q = k12·V1, V2 = Q/k21.
    const double k10 = 0.192, k12 = 1.86, k21 = 1.68, v1 = 35.295, dose = 500.0;
    const double q = k12 * v1;
    const auto r = single_dose("builtin-cf-two", "two-compartment-iv",
                               "v1 = \"" + num(v1) + " L\"\ncl = \"" + num(k10 * v1) + " L/h\"\nq = \"" + num(q) +
                                   " L/h\"\nv2 = \"" + num(q / k21) + " L\"\n",
                               "iv", dose, 500.0);
    // alpha, beta: roots of s^2 - (k10 + k12 + k21) s + k10 k21; A, B the coefficients (computed from the
    // closed form).
    const double sum = k10 + k12 + k21, disc = std::sqrt(sum * sum - 4.0 * k10 * k21);
    const double alpha = 0.5 * (sum + disc), beta = 0.5 * (sum - disc);
    const double a = dose / v1 * (alpha - k21) / (alpha - beta), b = dose / v1 * (k21 - beta) / (alpha - beta);
    CHECK_THAT(alpha, WithinRel(3.6434689871, 1e-9));  // Bourne, ch. 19.2 (computed)
    CHECK_THAT(beta, WithinRel(0.0885310129, 1e-9));   // Bourne, ch. 19.2 (computed)
    CHECK_THAT(b, WithinRel(6.3419522881, 1e-9));      // Bourne, ch. 19.2 (computed)
    const auto exact = [&](double t) { return a * std::exp(-alpha * t) + b * std::exp(-beta * t); };
    // Bourne, ch. 19.2 (computed):
    CHECK_THAT(conc(r, 0.25), WithinRel(9.3498936784, 1e-9));
    CHECK_THAT(conc(r, 1.0), WithinRel(6.0093251094, 1e-9));
    CHECK_THAT(conc(r, 4.0), WithinRel(4.4507090684, 1e-9));
    CHECK_THAT(conc(r, 12.0), WithinRel(2.1920002821, 1e-9));
    CHECK_THAT(conc(r, 24.0), WithinRel(0.7576318803, 1e-9));
    CHECK_THAT(conc(r, 48.0), WithinRel(0.0905093637, 1e-9));
    const double grid = worst_on_grid(r, exact, 48.0);
    INFO("largest relative difference on the grid: " << grid);
    CHECK(grid < 1e-9);  // computed from the closed form
    // AUC = D/(V1·k10), Bourne, ch. 19.2 (computed); the horizon is 64 terminal half-lives.
    CHECK_THAT(auc(r), WithinRel(73.7828776503, 1e-9));
}

TEST_CASE("models: one-compartment-mm-iv file against the Lambert W closed form", "[models]") {
    // Michaelis-Menten elimination after a bolus: C(t) = Km·W0[(C0/Km)·exp((C0 - Vmax·t/V)/Km)] (Schnell &
    // Mendoza, J Theor Biol 1997; Goudar, Sonnad & Duggleby, Biochim Biophys Acta 1999 — both from memory),
    // with Vmax = 490 mg/day, Km = 4 mg/L, V = 49 L (Bauer, Applied Clinical Pharmacokinetics, ch. 10 — from
    // memory) and 1000 mg.
    const double vmax = 490.0 / 24.0, km = 4.0, v = 49.0, dose = 1000.0, c0 = dose / v;
    const auto r = single_dose("builtin-cf-mm", "one-compartment-mm-iv",
                               "vmax = \"490 mg/day\"\nkm = \"4 mg/L\"\nv = \"49 L\"\n", "iv", dose, 600.0);
    const auto exact = [&](double t) {  // computed from the closed form
        return km * boost::math::lambert_w0(c0 / km * std::exp((c0 - vmax * t / v) / km));
    };
    // Schnell & Mendoza; Goudar, Sonnad & Duggleby — from memory (values computed):
    CHECK_THAT(conc(r, 6.0), WithinRel(18.336359419940, 1e-9));
    CHECK_THAT(conc(r, 12.0), WithinRel(16.305815817591, 1e-9));
    CHECK_THAT(conc(r, 24.0), WithinRel(12.400844793574, 1e-9));
    CHECK_THAT(conc(r, 48.0), WithinRel(5.588826116516, 1e-9));
    CHECK_THAT(conc(r, 72.0), WithinRel(1.330296322783, 1e-9));
    CHECK_THAT(conc(r, 96.0), WithinRel(0.146794330315, 1e-9));
    const double grid = worst_on_grid(r, exact, 96.0);
    INFO("largest relative difference on the grid: " << grid);
    CHECK(grid < 1e-9);  // computed from the closed form
    // Times to fall to 10 and 1 mg/L: roots of the step polynomials; the integrated form gives
    // t = (V/Vmax)·(C0 - C + Km·ln(C0/C)) (computed from the closed form).
    const int s = r.sim.output_series(r.regimen.model.output_index("conc"));
    const auto at10 = r.sim.trajectory.level_roots(s, 10.0, 0.0, 600.0);
    const auto at1 = r.sim.trajectory.level_roots(s, 1.0, 0.0, 600.0);
    REQUIRE(at10.size() == 1);
    REQUIRE(at1.size() == 1);
    CHECK_THAT(at10[0], WithinRel(31.8277507604, 1e-9));  // computed from the integrated form
    CHECK_THAT(at1[0], WithinRel(75.5325676531, 1e-9));   // computed from the integrated form
    CHECK_THAT(at10[0], WithinRel(v / vmax * (c0 - 10.0 + km * std::log(c0 / 10.0)), 1e-9));  // closed form
    // AUC0-inf = (V/Vmax)·(Km·C0 + C0^2/2) (Wagner 1973, from memory); at 600 h the remaining amount is far
    // below 1e-12 of the dose (the low-concentration phase decays at Vmax/(V·Km) = 0.104 /h).
    CHECK_THAT(auc(r), WithinRel(695.7101207830, 1e-9));
    CHECK_THAT(auc(r), WithinRel(v / vmax * (km * c0 + 0.5 * c0 * c0), 1e-9));  // Wagner 1973, from memory
}
