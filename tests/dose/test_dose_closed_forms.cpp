// The dose search against closed forms: the dose it finds must be the dose the textbook formula gives.
#include <catch2/catch.hpp>

#include <cmath>

#include "dose_support.hpp"
#include "../support/temp_dir.hpp"

namespace {

using namespace plateau;
using dosetest::g17;

// One compartment, V = 10 L, t½ = 4 h (Bourne, Basic Pharmacokinetics, ch. 14; /work case 1): k = ln 2 / 4.
const double kK = std::log(2.0) / 4.0;
const double kV = 10.0;
const double kCl = kK * kV;

std::string bolus_regimen(const test::TempDir& d, const std::string& targets, double cl = kCl, double v = kV,
                          double over = 0.0) {
    return d.write("template.toml", "id = \"template\"\nmodel = \"one-compartment-iv\"\n[parameters]\ncl = \"" +
                                        g17(cl) + " L/h\"\nv = \"" + g17(v) +
                                        " L\"\n[[doses]]\nroute = \"iv\"\namount = \"100 mg\"\nevery = \"6 h\"\n"
                                        "count = 12\n" +
                                        (over > 0 ? "over = \"" + g17(over) + " h\"\n" : std::string()) +
                                        "[targets]\noutput = \"conc\"\n" + targets);
}

}  // namespace

TEST_CASE("dose: bolus every tau, the dose giving a steady-state trough", "[dose]") {
    test::TempDir d("dose");
    cli::TargetOverrides t;
    t.above = "5mg/L";
    const auto s = dosetest::search(bolus_regimen(d, ""), t, {{6.0, 0.0}, {8.0, 0.0}});
    REQUIRE(s.found.size() == 2);
    for (const auto& f : s.found) {
        const double tau = f.shape.tau;
        // C_min = D·e^{−kτ} / (V(1 − e^{−kτ})) solved for D (computed from the closed form).
        const double expected = 5.0 * kV * (1.0 - std::exp(-kK * tau)) / std::exp(-kK * tau);
        CHECK(f.outcome == dose::Outcome::Meets);
        CHECK(f.exact == Approx(expected).epsilon(1e-9));
        CHECK(f.dose == f.exact);  // no rounding asked
        CHECK(f.deciding == "threshold");
    }
    // τ = 6 h: 50·(2^1.5 − 1) = 91.42135624 mg (computed from the closed form).
    CHECK(s.found[0].exact == Approx(91.421356237).epsilon(1e-9));
}

TEST_CASE("dose: bolus every tau, the dose giving an exact steady-state AUC24", "[dose]") {
    test::TempDir d("dose");
    cli::TargetOverrides t;
    t.auc24 = "400..400";  // one value: hit it exactly
    const auto s = dosetest::search(bolus_regimen(d, ""), t, {{6.0, 0.0}, {12.0, 0.0}});
    for (const auto& f : s.found) {
        // AUC24 = 24·D/(τ·CL) solved for D (computed from the closed form).
        CHECK(f.exact == Approx(400.0 * f.shape.tau * kCl / 24.0).epsilon(1e-9));
        CHECK(f.deciding == "AUC24 =");
        CHECK(f.at->exposure.steady->auc24 == Approx(400.0).epsilon(1e-9));
    }
}

TEST_CASE("dose: bolus every tau, the dose giving a time above a threshold per interval", "[dose]") {
    test::TempDir d("dose");
    cli::TargetOverrides t;
    t.above = "8mg/L";
    t.above_for = "50%";
    const auto s = dosetest::search(bolus_regimen(d, ""), t, {{6.0, 0.0}});
    const auto& f = s.found.at(0);
    // ln(C_peak/C_thr)/k = T with T = 3 h and C_peak = D/(V(1 − e^{−kτ})) (case 9 of the references, solved for
    // D; computed from the closed form).
    const double expected = 8.0 * std::exp(kK * 3.0) * kV * (1.0 - std::exp(-kK * 6.0));
    CHECK(f.outcome == dose::Outcome::Meets);
    CHECK(f.exact == Approx(expected).epsilon(1e-9));
    CHECK(f.at->exposure.steady->above_hours == Approx(3.0).epsilon(1e-9));
}

TEST_CASE("dose: short infusions against the infusion steady-state formulas", "[dose]") {
    test::TempDir d("dose");
    // CL = 4 L/h, V = 50 L, 1-h infusions every 12 h: 1000 mg gives Css,min = 12.9191614315 mg/L (Sawchuk &
    // Zaske 1976 formulas; reference case 10, computed), so that trough asks for 1000 mg.
    cli::TargetOverrides t;
    t.window = "12.9191614315mg/L..40mg/L";
    auto s = dosetest::search(bolus_regimen(d, "", 4.0, 50.0, 1.0), t, {{12.0, 1.0}, {8.0, 0.5}});
    CHECK(s.found[0].exact == Approx(1000.0).epsilon(1e-9));
    CHECK(s.found[0].deciding == "window low");
    CHECK(s.found[0].at->exposure.steady->peak.value == Approx(31.1468025024).epsilon(1e-9));  // reference case 10
    // τ = 8 h, t' = 0.5 h: C_min = k0(1 − e^{−kt'})e^{−k(τ−t')} / (CL(1 − e^{−kτ})) with k0 = D/t' (Sawchuk &
    // Zaske 1976), solved for D (computed from the closed form).
    const double k = 4.0 / 50.0;
    const double expected =
        12.9191614315 * 4.0 * 0.5 * (1.0 - std::exp(-k * 8.0)) / ((1.0 - std::exp(-k * 0.5)) * std::exp(-k * 7.5));
    CHECK(s.found[1].exact == Approx(expected).epsilon(1e-9));
    CHECK(s.found[1].outcome == dose::Outcome::Meets);
}

TEST_CASE("dose: Michaelis-Menten constant-rate infusion, the rate giving a steady level", "[dose]") {
    test::TempDir d("dose");
    // Vmax = 490 mg/day, Km = 4 mg/L, V = 49 L (reference case 8); one 24-h infusion a day, back to back.
    const std::string path = d.write(
        "mm.toml",
        "id = \"mm\"\nmodel = \"one-compartment-mm-iv\"\n[parameters]\nvmax = \"490 mg/d\"\nkm = \"4 mg/L\"\n"
        "v = \"49 L\"\n[[doses]]\nroute = \"iv\"\namount = \"300 mg\"\nevery = \"24 h\"\ncount = 10\nover = \"24 h\"\n"
        "[targets]\noutput = \"conc\"\nabove = \"15 mg/L\"\n");
    const auto s = dosetest::search(path, {}, {{24.0, 24.0}});
    const auto& f = s.found.at(0);
    // R = Vmax·C/(Km + C) = 386.8421052632 mg/day for C = 15 mg/L (reference case 8, computed; exact).
    CHECK(f.outcome == dose::Outcome::Meets);
    CHECK(f.exact == Approx(490.0 * 15.0 / 19.0).epsilon(1e-9));
    CHECK(f.exact == Approx(386.8421052632).epsilon(1e-10));
}

TEST_CASE("dose: bolus every tau, the loading dose that starts at the steady-state trough", "[dose]") {
    test::TempDir d("dose");
    cli::TargetOverrides t;
    t.above = "5mg/L";
    const auto s = dosetest::search(bolus_regimen(d, ""), t, {{6.0, 0.0}}, 0.0, true);
    const auto& f = s.found.at(0);
    REQUIRE(f.loading);
    REQUIRE(f.loading->problem.empty());
    // L·e^{−kτ}/V = D·e^{−kτ}/(V(1 − e^{−kτ})): L = D/(1 − e^{−kτ}), the accumulation ratio times the
    // maintenance dose (common practice, no source; computed from the closed form).
    CHECK(f.loading->exact == Approx(f.dose / (1.0 - std::exp(-kK * 6.0))).epsilon(1e-9));
    CHECK(f.loading->first_value == Approx(f.loading->steady_value).epsilon(1e-9));
    CHECK(f.loading->steady_value == Approx(5.0).epsilon(1e-9));  // the trough the search aimed at
}

TEST_CASE("dose: doses above a saturable elimination's maximum have no steady state, and the search goes below",
          "[dose]") {
    test::TempDir d("dose");
    // Vmax = 20 mg/h (the built-in model's value): 186.52 mg every 6 h is 31 mg/h, more than can be eliminated,
    // so the amounts keep rising (common practice, no source). Newton's method once called amounts pushed
    // towards 1e12 mg a steady state here.
    const std::string path =
        d.write("mm.toml",
                "id = \"mm\"\nmodel = \"one-compartment-mm-iv\"\n[[doses]]\nroute = \"iv\"\namount = \"186.52 mg\"\n"
                "every = \"6 h\"\ncount = 10\nover = \"1 h\"\n[targets]\noutput = \"conc\"\nabove = \"8 mg/L\"\n");
    const report::Candidate c = dosetest::pipeline()(cli::load(path, {}, {}));
    REQUIRE(c.exposure.steady);
    CHECK_FALSE(c.exposure.steady->found);
    CHECK_THAT(c.exposure.steady->why_not, Catch::Contains("keep rising"));
    const auto s = dosetest::search(path, {}, {{6.0, 1.0}});
    const auto& f = s.found.at(0);
    CHECK(f.outcome == dose::Outcome::Meets);
    CHECK(f.message.empty());
    CHECK(f.dose < 6.0 * 20.0);                                                // below Vmax·τ
    CHECK(f.at->exposure.steady->minimum.value == Approx(8.0).epsilon(1e-9));  // the threshold it aimed at
}
