// The engine against the closed form of Michaelis–Menten elimination after an IV bolus, through the Lambert W
// function: C(t) = Km·W0[(C0/Km)·exp((C0 − Vmax·t/V)/Km)] (Schnell & Mendoza, J Theor Biol 1997; Goudar,
// Sonnad & Duggleby, Biochim Biophys Acta 1999 — both from memory). Boost.Math's lambert_w0 evaluates it.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <boost/math/special_functions/lambert_w.hpp>

#include "../support/build_model.hpp"
#include "input/load.hpp"
#include "sim/simulate.hpp"
#include "units/units.hpp"

using namespace plateau;

namespace {

// Vmax = 490 mg/day, Km = 4 mg/L, V = 49 L, 1000 mg (the population values taught for phenytoin in Bauer,
// Applied Clinical Pharmacokinetics, ch. 10 — from memory). 490 mg/day = 490/24 mg/h (common practice, no source).
const double kVmax = 490.0 / 24.0, kKm = 4.0, kV = 49.0, kDose = 1000.0, kC0 = kDose / kV;

model::Model michaelis_menten() {
    return test::build_model({{{"vmax", kVmax}, {"km", kKm}, {"v", kV}},
                              {{"central", "-vmax*(central/v)/(km + central/v)"}},
                              {{"conc", "central/v"}},
                              {{"iv", "central"}}});
}

// Computed from the closed form with Boost.Math's lambert_w0.
double exact(double t) {
    return kKm * boost::math::lambert_w0((kC0 / kKm) * std::exp((kC0 - kVmax * t / kV) / kKm));
}

sim::Simulation run(double t_end, double tol) {
    const model::Model m = michaelis_menten();
    sim::Options opt;
    opt.tol = tol;
    sim::Simulation s = sim::simulate(m, m.default_values(), {test::dose(0, kDose, 0.0)}, t_end, opt);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    return s;
}

double rel(double got, double want) { return std::abs(got - want) / std::abs(want); }

std::vector<double> times_to(double t_end) {
    std::vector<double> t;
    for (int i = 1; i <= 400; ++i) t.push_back(t_end * i / 400.0);
    for (double x = 0.01; x < 1.0; x *= 1.3) t.push_back(x);
    return t;
}

double max_rel_error(const sim::Simulation& s, const std::vector<double>& times) {
    double worst = 0.0;
    for (double t : times) worst = std::max(worst, rel(s.trajectory.value(s.output_series(0), t), exact(t)));
    return worst;
}

}  // namespace

TEST_CASE("engine: Michaelis-Menten bolus against the Lambert W closed form", "[numeric]") {
    const double T = 500.0;
    const auto s = run(T, 1e-10);
    const int conc = s.output_series(0);
    const auto& tr = s.trajectory;

    // The test's closed form reproduces the printed values (Schnell & Mendoza 1997; Goudar, Sonnad & Duggleby
    // 1999 — both from memory; parameter values from Bauer, Applied Clinical Pharmacokinetics, ch. 10 — from
    // memory).
    CHECK(exact(6.0) == Approx(18.336359419940).epsilon(1e-11));
    CHECK(exact(96.0) == Approx(0.146794330315).epsilon(1e-10));

    // Schnell & Mendoza, J Theor Biol 1997; Goudar, Sonnad & Duggleby, Biochim Biophys Acta 1999 — both from memory:
    CHECK(rel(tr.value(conc, 6.0), 18.336359419940) < 1e-9);
    CHECK(rel(tr.value(conc, 12.0), 16.305815817591) < 1e-9);
    CHECK(rel(tr.value(conc, 24.0), 12.400844793574) < 1e-9);
    CHECK(rel(tr.value(conc, 48.0), 5.588826116516) < 1e-9);
    CHECK(rel(tr.value(conc, 72.0), 1.330296322783) < 1e-9);
    CHECK(rel(tr.value(conc, 96.0), 0.146794330315) < 1e-9);
    CHECK(rel(tr.value(conc, 0.0), kC0) < 1e-14);  // D/V, computed from the closed form

    // At many times against lambert_w0 (computed from the closed form), while the amount is above ~1e-3 mg.
    CHECK(max_rel_error(s, times_to(130.0)) < 1e-9);

    // Falls to 10 mg/L at 31.8277507604 h and to 1 mg/L at 75.5325676531 h (Schnell & Mendoza, J Theor Biol 1997;
    // Goudar, Sonnad & Duggleby, Biochim Biophys Acta 1999 — both from memory).
    const auto ten = tr.level_roots(conc, 10.0, 0.0, T);
    REQUIRE(ten.size() == 1);
    CHECK(rel(ten[0], 31.8277507604) < 1e-9);
    const auto one = tr.level_roots(conc, 1.0, 0.0, T);
    REQUIRE(one.size() == 1);
    CHECK(rel(one[0], 75.5325676531) < 1e-9);
    // The crossing time from the closed form inverted: t = (V/Vmax)·(C0 − C + Km·ln(C0/C)) (computed).
    for (double c : {15.0, 5.0, 2.0, 0.5, 0.1}) {
        const auto r = tr.level_roots(conc, c, 0.0, T);
        REQUIRE(r.size() == 1);
        CHECK(rel(r[0], kV / kVmax * (kC0 - c + kKm * std::log(kC0 / c))) < 1e-9);
    }
    CHECK(tr.critical_points(conc, 0.0, 130.0).empty());  // monotone decline

    // AUC0–∞ = (V/Vmax)·(Km·C0 + C0²/2) = 695.7101207830 mg·h/L (Wagner 1973, from memory). The tail from T on
    // is the same identity started from C(T).
    const double cT = tr.value(conc, T);
    const double tail = kV / kVmax * (kKm * cT + cT * cT / 2);
    CHECK(rel(tr.integral(conc, 0.0, T) + tail, 695.7101207830) < 1e-9);  // Wagner 1973, from memory
    // AUC0–48 against the same identity between C0 and C(48) (computed from the closed form).
    const double c48 = exact(48.0);
    CHECK(rel(tr.integral(conc, 0.0, 48.0), kV / kVmax * (kKm * (kC0 - c48) + (kC0 * kC0 - c48 * c48) / 2)) < 1e-9);
}

TEST_CASE("engine: Michaelis-Menten error falls as the tolerance tightens", "[numeric]") {
    const std::vector<double> times = times_to(120.0);
    std::vector<double> err;
    for (double tol : {1e-6, 1e-9, 1e-12}) err.push_back(max_rel_error(run(130.0, tol), times));
    INFO("max relative error at 1e-6, 1e-9, 1e-12: " << err[0] << " " << err[1] << " " << err[2]);
    // Computed from the closed form with lambert_w0.
    CHECK(err[1] < err[0]);
    CHECK(err[2] < err[1]);
    CHECK(err[0] < 1e-5);
    CHECK(err[2] < 1e-10);
    // The crossing times tighten too.
    const auto s = run(130.0, 1e-12);
    const auto ten = s.trajectory.level_roots(s.output_series(0), 10.0, 0.0, 130.0);
    REQUIRE(ten.size() == 1);
    CHECK(rel(ten[0], 31.8277507604) < 1e-10);  // Schnell & Mendoza 1997; Goudar, Sonnad & Duggleby 1999 — from memory
}

TEST_CASE("numeric: near zero-order elimination empties the compartment exactly, never below zero", "[numeric]") {
    // km far below the concentrations: elimination runs at vmax until the amount is gone, so 100 mg at
    // vmax = 20 mg/h empties at 5 h and the AUC is the triangle C0·5 h/2 = 2.5 mg/L · 2.5 h = 6.25 mg·h/L
    // (the zero-order limit of the closed form in REFERENCES case 7, Wagner 1973, from memory; computed). The
    // error of the limit is of order km·V/vmax, below 1e-11 here.
    for (const char* km : {"1e-11 mg/L", "1e-14 mg/L"}) {
        INFO("km " << km);
        const auto m = plateau::input::load_model(std::string(PLATEAU_SOURCE_DIR) + "/models/one-compartment-mm-iv.toml");
        std::vector<double> p = m.default_values();
        p[static_cast<std::size_t>(m.parameter_index("km"))] = plateau::units::parse_quantity(km).value;
        const plateau::sim::Simulation s =
            plateau::sim::simulate(m, p, {plateau::sim::Dose{0.0, 0, 100.0, 0.0, 0}}, 24.0);
        REQUIRE(s.outcome == plateau::taylor::Outcome::Ok);
        const int c = s.output_series(m.output_index("conc"));
        CHECK(s.trajectory.integral(c, 0.0, 24.0) == Approx(6.25).epsilon(1e-9));
        CHECK(s.trajectory.value(0, 24.0) == 0.0);
        for (double t = 0.0; t <= 24.0; t += 0.25) CHECK(s.trajectory.value(0, t) >= 0.0);
    }
}
