// The steady state of whole dosing patterns and the time-resolution warnings, through `plateau run` as a user
// meets them. Closed forms by superposition of the multiple-dosing function of each series (Gibaldi & Perrier,
// Pharmacokinetics, 2nd ed., ch. 3).
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <string>

#include "cli/commands.hpp"
#include "cli_support.hpp"

using namespace plateau;
using namespace plateau::clitest;

namespace {

std::string write(const std::string& name, const std::string& text) {
    const auto p = temp_dir() / name;
    std::ofstream(p) << text;
    return p.string();
}

Result run_file(const std::string& name, const std::string& text, double tol = 1e-10) {
    cli::RunOptions o;
    o.regimen = write(name, text);
    o.tol = tol;
    return run(o);
}

const char* kHead = "model = \"one-compartment-iv\"\n[parameters]\ncl = \"4 L/h\"\nv = \"40 L\"\n";

std::string series(double dose, double at, double every, int count) {
    return "[[doses]]\nroute = \"iv\"\namount = \"" + std::to_string(dose) + " mg\"\nat = \"" + std::to_string(at) +
           " h\"\nevery = \"" + std::to_string(every) + " h\"\ncount = " + std::to_string(count) + "\n";
}

}  // namespace

TEST_CASE("cli: two series of 8 h and 12 h have the steady state of the whole pattern", "[cli][cycle]") {
    const Result r = run_file("q8-q12.toml", std::string("id = \"q8-q12\"\n") + kHead + series(100, 0, 8, 30) +
                                                 series(150, 0, 12, 20));
    REQUIRE(r.code == cli::kExitOk);
    CHECK(contains(r.out, "a 24-h cycle of 5 doses: 100 mg iv at +0, +8, +16 h; 150 mg iv at +0, +12 h"));
    // Average (100/8 + 150/12)/CL = 6.25 mg/L; AUC24 = 150 mg·h/L; peak at 0 h
    // 10/(1 − e^{−0.8}) + 3.75/(1 − e^{−1.2}) = 9.90621 mg/L (superposition, computed).
    CHECK(number_after(r.out, "Average") == Approx(6.25).epsilon(1e-6));
    const double peak = 2.5 / (1 - std::exp(-0.8)) + 3.75 / (1 - std::exp(-1.2));
    CHECK(number_after(r.out, "Peak                              ") == Approx(peak).epsilon(1e-5));
    CHECK(contains(r.out, "AUC per cycle / per 24 h          150 / 150 mg·h/L"));
}

TEST_CASE("cli: three daily clock-time series give the trough before the morning dose", "[cli][cycle]") {
    const Result r = run_file("clock3.toml", std::string("id = \"clock3\"\n") + kHead + series(200, 0, 24, 7) +
                                                 series(200, 6, 24, 7) + series(200, 14, 24, 7));
    REQUIRE(r.code == cli::kExitOk);
    // Before 08:00 the doses of 08:00, 14:00 and 22:00 have decayed for 24, 18 and 10 h:
    // 5·(e^{−2.4} + e^{−1.8} + e^{−1.0}) / (1 − e^{−2.4}) mg/L (superposition, computed).
    const double k = 0.1, d = 5.0, q = std::exp(-24 * k);
    const double trough = d * (q + std::exp(-18 * k) + std::exp(-10 * k)) / (1 - q);
    CHECK(number_after(r.out, "Trough (lowest before a dose)") == Approx(trough).epsilon(1e-5));
    CHECK(contains(r.out, "before the dose at +0 h"));
}

TEST_CASE("cli: a linear model has a steady state at the loosest tolerance", "[cli][cycle]") {
    const std::string text = "id = \"oral\"\nmodel = \"one-compartment-oral\"\n[[doses]]\nroute = \"oral\"\n"
                             "amount = \"400 mg\"\nevery = \"12 h\"\ncount = 20\n";
    for (double tol : {1e-3, 5e-4}) {
        INFO("tol " << tol);
        const Result r = run_file("oral-loose.toml", text, tol);
        REQUIRE(r.code == cli::kExitOk);
        CHECK_FALSE(contains(r.out, "Not reached"));
        // AUC over one interval at steady state = F·D/CL = 0.8·400/5 = 64 mg·h/L (common practice, no source).
        CHECK(contains(r.out, "AUC per interval / per 24 h       64 / 128 mg·h/L"));
    }
}

TEST_CASE("cli: times one instant apart and too-short infusions are warned about, and run", "[cli][cycle]") {
    const Result r = run_file("resolution.toml", std::string("id = \"resolution\"\n") + kHead + R"(
[[doses]]
route = "iv"
amount = "100 mg"
at = "10 h"
[[doses]]
route = "iv"
amount = "100 mg"
at = "10.000000005 h"
[[doses]]
route = "iv"
amount = "6000 mg"
rate = "1e12 mg/h"
at = "20 h"
)");
    REQUIRE(r.code == cli::kExitOk);
    INFO(r.err);
    CHECK(contains(r.err, "resolution.toml:18:9: warning: [[doses]] entry 3: the infusion lasts 6e-09 h, shorter than "
                          "the time resolution (2e-08 h): each dose is given as a bolus"));
    CHECK(contains(r.err, "resolution.toml:14:7: warning: doses at 10 h and 10.000000005 h are closer than the time "
                          "resolution"));
    // No dose is lost: 6200 mg in all (common practice, no source).
    CHECK(contains(r.out, "6200 mg in total"));
    // The 6 g bolus at 20 h: C just after = 6000/40 + the two 100 mg doses decayed 10 h (closed form, computed).
    CHECK(number_after(r.out, "Peak") == Approx(150.0 + 5.0 * std::exp(-1.0)).epsilon(1e-5));
}

TEST_CASE("cli: run --clock shows times as day and clock time", "[cli][cycle]") {
    cli::RunOptions o;
    o.regimen = std::string(PLATEAU_SOURCE_DIR) + "/examples/zelmarin-missed-dose/missed-evening.toml";
    o.clock = true;
    Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    // t = 0 is 06:00 on day 1: the last peak, 30 min into the 22:00 infusion of day 4, is at 88.5 h.
    CHECK(contains(r.out, "at 88.5 h (day 4 22:30)"));
    CHECK(contains(r.out, "day 4 22:00"));
    // Without start_clock in the file, --clock is refused.
    o.regimen = write("no-clock.toml", std::string("id = \"no-clock\"\n") + kHead + series(100, 0, 8, 3));
    r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "--clock needs the clock time at t = 0"));
}
