// The engine against closed-form solutions of linear compartment models, driven through sim::simulate: values,
// peaks (critical points of the concentration polynomials), level crossings and exact AUC, at the default
// tolerance and as the tolerance tightens.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <functional>
#include <vector>

#include <boost/math/tools/toms748_solve.hpp>

#include "../support/build_model.hpp"
#include "sim/simulate.hpp"

using namespace plateau;
using test::build_model;
using test::dose;

namespace {

sim::Simulation run(const model::Model& m, std::vector<sim::Dose> doses, double t_end, double tol = 1e-10) {
    sim::Options opt;
    opt.tol = tol;
    sim::Simulation s = sim::simulate(m, m.default_values(), std::move(doses), t_end, opt);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    return s;
}

double rel(double got, double want) { return std::abs(got - want) / std::abs(want); }

// Largest relative error of the concentration (output 0) against `exact` over `times`.
double max_rel_error(const sim::Simulation& s, const std::function<double(double)>& exact,
                     const std::vector<double>& times) {
    double worst = 0.0;
    for (double t : times) worst = std::max(worst, rel(s.trajectory.value(s.output_series(0), t), exact(t)));
    return worst;
}

// 0.05 h to `t_end` on a geometric-ish grid plus a uniform one: early and late times both covered. The checks
// stop while the amounts are still above ~1e-3 mg: below 1 mg the step rule controls absolute error.
std::vector<double> check_times(double t_end) {
    std::vector<double> t;
    for (double x = 0.05; x < t_end; x *= 1.17) t.push_back(x);
    for (int i = 1; i < 97; ++i) t.push_back(t_end * i / 97.0);
    std::sort(t.begin(), t.end());
    return t;
}

// Root of g on [a, b] by TOMS 748 on the closed form (an independent solve).
double solve(const std::function<double(double)>& g, double a, double b) {
    std::uintmax_t iters = 200;
    auto r = boost::math::tools::toms748_solve(g, a, b, boost::math::tools::eps_tolerance<double>(52), iters);
    return 0.5 * (r.first + r.second);
}

// ---- case models -------------------------------------------------------------------------------------------

// One compartment, IV bolus 100 mg, V = 10 L, t½ = 4 h.
const double kHalfLife = 4.0, kV1 = 10.0, kK1 = std::log(2.0) / kHalfLife;
model::Model one_compartment() {
    return build_model({{{"cl", kK1 * kV1}, {"v", kV1}},
                        {{"central", "-cl/v*central"}},
                        {{"conc", "central/v"}},
                        {{"iv", "central"}}});
}

// First-order absorption: F, D, V, ka, k.
model::Model oral(double ka, double cl, double v, double f) {
    return build_model({{{"ka", ka}, {"cl", cl}, {"v", v}, {"f", f}},
                        {{"gut", "-ka*gut"}, {"central", "ka*gut - cl/v*central"}},
                        {{"conc", "central/v"}},
                        {{"oral", "gut", "f"}}});
}

// Two compartments with micro-constants.
const double k10 = 0.192, k12 = 1.86, k21 = 1.68, kV2 = 35.295, kD2 = 500.0;
model::Model two_compartment() {
    return build_model({{{"k10", k10}, {"k12", k12}, {"k21", k21}, {"v1", kV2}},
                        {{"central", "-(k10 + k12)*central + k21*periph"}, {"periph", "k12*central - k21*periph"}},
                        {{"conc", "central/v1"}},
                        {{"iv", "central"}}});
}

struct BiExp {
    double alpha, beta, A, B;
    double operator()(double t) const { return A * std::exp(-alpha * t) + B * std::exp(-beta * t); }
};

// α, β are the roots of s² − (k10 + k12 + k21)s + k10·k21; A = C0(α − k21)/(α − β), B = C0(k21 − β)/(α − β).
BiExp two_compartment_closed_form() {
    const double sum = k10 + k12 + k21, prod = k10 * k21;
    const double disc = std::sqrt(sum * sum - 4 * prod);
    const double alpha = 0.5 * (sum + disc), beta = prod / alpha;  // β from the product: no cancellation
    const double c0 = kD2 / kV2;
    return {alpha, beta, c0 * (alpha - k21) / (alpha - beta), c0 * (k21 - beta) / (alpha - beta)};
}

// Bateman function and its integral over [0, T].
struct Bateman {
    double fd, v, ka, k;
    double operator()(double t) const { return fd * ka / (v * (ka - k)) * (std::exp(-k * t) - std::exp(-ka * t)); }
    double auc(double T) const {
        return fd * ka / (v * (ka - k)) * ((1 - std::exp(-k * T)) / k - (1 - std::exp(-ka * T)) / ka);
    }
};

}  // namespace

TEST_CASE("engine: one compartment IV bolus against its closed form", "[numeric]") {
    const auto s = run(one_compartment(), {dose(0, 100.0, 0.0)}, 240.0);
    const int conc = s.output_series(0);
    const auto exact = [](double t) { return 100.0 / kV1 * std::exp(-kK1 * t); };  // computed from the closed form
    CHECK(kK1 == Approx(0.1732867951).epsilon(1e-9));              // Bourne, Basic Pharmacokinetics, ch. 14
    CHECK(rel(s.trajectory.value(conc, 6.0), 3.5355339059) < 1e-9);  // Bourne, Basic Pharmacokinetics, ch. 14
    CHECK(rel(s.trajectory.value(conc, 0.0), 10.0) < 1e-12);         // D/V, computed from the closed form
    CHECK(max_rel_error(s, exact, check_times(60.0)) < 1e-9);        // computed from the closed form

    // Half the initial concentration at t½ = 4 h, a tenth at ln 10/k (computed from the closed form).
    const auto half = s.trajectory.level_roots(conc, 5.0, 0.0, 240.0);
    REQUIRE(half.size() == 1);
    CHECK(rel(half[0], kHalfLife) < 1e-9);
    const auto tenth = s.trajectory.level_roots(conc, 1.0, 0.0, 240.0);
    REQUIRE(tenth.size() == 1);
    CHECK(rel(tenth[0], std::log(10.0) / kK1) < 1e-9);

    // A bolus decays monotonically: no interior peak while the amount is well above round-off.
    CHECK(s.trajectory.critical_points(conc, 0.0, 96.0).empty());

    // AUC0–∞ = D/CL = 57.7078016356 mg·h/L (computed); the tail past 240 h is C(240)/k.
    const double auc = s.trajectory.integral(conc, 0.0, 240.0) + s.trajectory.value(conc, 240.0) / kK1;
    CHECK(rel(auc, 57.7078016356) < 1e-9);                                     // computed
    CHECK(rel(s.trajectory.integral(conc, 0.0, 12.0), 10.0 / kK1 * (1 - std::exp(-12 * kK1))) < 1e-9);  // closed form
}

TEST_CASE("engine: first-order absorption (Bateman) against its closed form", "[numeric]") {
    const double F = 0.8, D = 500.0, V = 40.0, ka = 1.2, k = 0.15;
    const auto s = run(oral(ka, k * V, V, F), {dose(0, D, 0.0)}, 400.0);
    const int conc = s.output_series(0);
    const Bateman exact{F * D, V, ka, k};
    const auto& tr = s.trajectory;
    // Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory:
    CHECK(rel(tr.value(conc, 0.5), 4.3306497170) < 1e-9);
    CHECK(rel(tr.value(conc, 1.0), 6.3944430230) < 1e-9);
    CHECK(rel(tr.value(conc, 2.0), 7.4297173416) < 1e-9);
    CHECK(rel(tr.value(conc, 8.0), 3.4414455220) < 1e-9);
    CHECK(rel(tr.value(conc, 24.0), 0.3122711137) < 1e-9);
    CHECK(max_rel_error(s, exact, check_times(72.0)) < 1e-9);  // computed from the closed form

    // Peak: Tmax = ln(ka/k)/(ka − k) = 1.9804205159 h, Cmax = 7.4299714457 mg/L
    // (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory).
    const auto peaks = tr.critical_points(conc, 0.0, 72.0);
    REQUIRE(peaks.size() == 1);
    CHECK(rel(peaks[0], 1.9804205159) < 1e-9);
    CHECK(rel(tr.value(conc, peaks[0]), 7.4299714457) < 1e-9);

    // Crossings of 4 mg/L, one on each side of the peak (computed from the closed form).
    const auto up = tr.level_roots(conc, 4.0, 0.0, 400.0);
    REQUIRE(up.size() == 2);
    CHECK(rel(up[0], solve([&](double t) { return exact(t) - 4.0; }, 0.0, 1.98)) < 1e-9);
    CHECK(rel(up[1], solve([&](double t) { return exact(t) - 4.0; }, 1.99, 50.0)) < 1e-9);

    // AUC0–∞ = F·D/CL = 66.6666666667 mg·h/L (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory);
    // after 400 h the tail is below 1e-24 of it.
    CHECK(rel(tr.integral(conc, 0.0, 400.0), 66.6666666667) < 1e-9);
    CHECK(rel(tr.integral(conc, 0.0, 10.0), exact.auc(10.0)) < 1e-9);             // computed from the closed form
    CHECK(rel(tr.integral(conc, 3.0, 30.0), exact.auc(30.0) - exact.auc(3.0)) < 1e-9);  // computed from the closed form
}

TEST_CASE("engine: the ka = k limit of first-order absorption", "[numeric]") {
    // C = F·D·k·t·e^{−kt}/V with F = 1, D = 100 mg, V = 10 L, ka = k = 0.5 /h (Gibaldi & Perrier, from memory).
    const double k = 0.5, V = 10.0, D = 100.0;
    const auto s = run(oral(k, k * V, V, 1.0), {dose(0, D, 0.0)}, 200.0);
    const int conc = s.output_series(0);
    const auto& tr = s.trajectory;
    const auto exact = [&](double t) { return D * k * t * std::exp(-k * t) / V; };
    CHECK(rel(tr.value(conc, 1.0), 3.0326532986) < 1e-9);  // Gibaldi & Perrier, from memory
    CHECK(rel(tr.value(conc, 4.0), 2.7067056647) < 1e-9);  // Gibaldi & Perrier, from memory
    CHECK(max_rel_error(s, exact, check_times(30.0)) < 1e-9);  // computed from the closed form
    const auto peaks = tr.critical_points(conc, 0.0, 30.0);
    REQUIRE(peaks.size() == 1);
    CHECK(rel(peaks[0], 2.0) < 1e-9);                                // Tmax = 1/k; Gibaldi & Perrier, from memory
    CHECK(rel(tr.value(conc, peaks[0]), 3.6787944117) < 1e-9);       // Gibaldi & Perrier, from memory
    CHECK(rel(tr.integral(conc, 0.0, 200.0), 20.0) < 1e-9);          // AUC = D/CL; Gibaldi & Perrier, from memory
}

TEST_CASE("engine: two compartments IV bolus against the biexponential", "[numeric]") {
    const BiExp exact = two_compartment_closed_form();
    // The test's own closed form reproduces the book's constants (Bourne, ch. 19.2).
    CHECK(exact.alpha == Approx(3.6434689871).epsilon(1e-9));
    CHECK(exact.beta == Approx(0.0885310129).epsilon(1e-9));
    CHECK(exact.A == Approx(7.8243602208).epsilon(1e-9));
    CHECK(exact.B == Approx(6.3419522881).epsilon(1e-9));

    const double T = 480.0;
    const auto s = run(two_compartment(), {dose(0, kD2, 0.0)}, T);
    const int conc = s.output_series(0);
    const auto& tr = s.trajectory;
    // Bourne, ch. 19.2:
    CHECK(rel(tr.value(conc, 0.25), 9.3498936784) < 1e-9);
    CHECK(rel(tr.value(conc, 1.0), 6.0093251094) < 1e-9);
    CHECK(rel(tr.value(conc, 4.0), 4.4507090684) < 1e-9);
    CHECK(rel(tr.value(conc, 12.0), 2.1920002821) < 1e-9);
    CHECK(rel(tr.value(conc, 24.0), 0.7576318803) < 1e-9);
    CHECK(rel(tr.value(conc, 48.0), 0.0905093637) < 1e-9);
    CHECK(max_rel_error(s, exact, check_times(72.0)) < 1e-9);  // computed from the closed form
    CHECK(tr.critical_points(conc, 0.0, 96.0).empty());         // biexponential decline: no interior peak

    // Crossing of 1 mg/L (computed from the closed form).
    const auto one = tr.level_roots(conc, 1.0, 0.0, T);
    REQUIRE(one.size() == 1);
    CHECK(rel(one[0], solve([&](double t) { return exact(t) - 1.0; }, 1.0, 48.0)) < 1e-9);

    // AUC = D/(V1·k10) = 73.7828776503 (computed); the tail past T is A e^{−αT}/α + B e^{−βT}/β.
    const double tail = exact.A * std::exp(-exact.alpha * T) / exact.alpha + exact.B * std::exp(-exact.beta * T) / exact.beta;
    CHECK(rel(tr.integral(conc, 0.0, T) + tail, 73.7828776503) < 1e-9);  // computed
}

TEST_CASE("engine: closed-form error falls as the tolerance tightens", "[numeric]") {
    const BiExp bi = two_compartment_closed_form();
    const Bateman bat{0.8 * 500.0, 40.0, 1.2, 0.15};
    const std::vector<double> times = check_times(48.0);
    std::vector<double> err_bi, err_bat;
    for (double tol : {1e-6, 1e-9, 1e-12}) {
        err_bi.push_back(max_rel_error(run(two_compartment(), {dose(0, kD2, 0.0)}, 48.0, tol), bi, times));
        err_bat.push_back(max_rel_error(run(oral(1.2, 6.0, 40.0, 0.8), {dose(0, 500.0, 0.0)}, 48.0, tol), bat, times));
    }
    INFO("biexponential: " << err_bi[0] << " " << err_bi[1] << " " << err_bi[2]);
    INFO("Bateman: " << err_bat[0] << " " << err_bat[1] << " " << err_bat[2]);
    // Computed from the closed form: each tighter tolerance gives a smaller error, and 1e-12 is near round-off.
    CHECK(err_bi[1] < err_bi[0]);
    CHECK(err_bi[2] < err_bi[1]);
    CHECK(err_bat[1] < err_bat[0]);
    CHECK(err_bat[2] < err_bat[1]);
    CHECK(err_bi[0] < 1e-5);
    CHECK(err_bat[0] < 1e-5);
    CHECK(err_bi[2] < 1e-11);
    CHECK(err_bat[2] < 1e-11);
}

TEST_CASE("engine: the terminal phase keeps decaying far below 1 mg", "[numeric]") {
    // Bateman function (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory): after the single peak
    // at 1.98 h the concentration falls for ever. Once every amount is far below 1 mg the step rule's
    // N = max(1, ‖x‖) makes the control absolute, the step grows until the Taylor polynomial of the fast gut
    // series stops damping (k_a·h ≈ 6.2 at order 13), and the amounts settle into a ±1e-12 mg oscillation: the
    // concentration stops decaying at ~1e-14 mg/L and spurious extrema appear.
    const auto s = run(oral(1.2, 6.0, 40.0, 0.8), {dose(0, 500.0, 0.0)}, 400.0);
    const int conc = s.output_series(0);
    const auto& tr = s.trajectory;
    CHECK(tr.critical_points(conc, 0.0, 400.0).size() == 1);  // the single peak only
    int rises = 0;
    for (double t = 3.0; t < 399.0; t += 1.0)
        if (!(tr.value(conc, t + 1.0) < tr.value(conc, t))) ++rises;
    CHECK(rises == 0);  // monotone decay after the peak (computed from the closed form)
}
