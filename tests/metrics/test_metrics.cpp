// Exposure figures against published check values and closed forms. Sources are named beside each check.
#include <catch2/catch.hpp>

#include <cmath>

#include "support.hpp"

using plateau::testing::run_text;
using Catch::Matchers::WithinRel;

namespace {
const double kLn2 = std::log(2.0);
}

TEST_CASE("metrics: repeated IV bolus, peaks, troughs and steady state", "[metrics]") {
    // Bourne, Basic Pharmacokinetics, ch. 14: V = 10 L, t1/2 = 4 h, 100 mg every 6 h (k = ln 2 / 4, CL = k V).
    const auto r = run_text("bolus-q6h.toml", R"(
id = "bolus-q6h"
model = "one-compartment-iv"
[parameters]
cl = "1.7328679513998632 L/h"
v = "10 L"
[[doses]]
route = "iv"
amount = "100 mg"
every = "6 h"
count = 12
[targets]
above = "8 mg/L"
[horizon]
until = "72 h"
)");
    const auto& e = r.exposure;
    REQUIRE(e.intervals.size() == 12);
    // Bourne, ch. 14: peak after dose 2 = 13.5355339059, after dose 3 = 14.7855339059 mg/L (computed).
    CHECK_THAT(e.intervals[1].peak.value, WithinRel(13.5355339059, 1e-9));
    CHECK(e.intervals[1].peak.time == Approx(6.0).margin(1e-12));
    CHECK_THAT(e.intervals[2].peak.value, WithinRel(14.7855339059, 1e-9));
    // C(6 h) = 3.5355339059 mg/L is the first trough (Bourne, ch. 14, computed).
    CHECK_THAT(e.intervals[0].trough, WithinRel(3.5355339059, 1e-9));
    REQUIRE(e.steady);
    REQUIRE(e.steady->found);
    // Bourne, ch. 14: Css,max = 15.4691816068, Css,min = 5.4691816068, Cavg,ss = 9.6179669393 mg/L (computed).
    CHECK_THAT(e.steady->peak.value, WithinRel(15.4691816068, 1e-9));
    CHECK(e.steady->peak.time == Approx(0.0).margin(1e-12));
    CHECK_THAT(e.steady->trough, WithinRel(5.4691816068, 1e-9));
    CHECK_THAT(e.steady->average, WithinRel(9.6179669393, 1e-9));
    // Accumulation 1/(1 - exp(-k tau)) = 1.5469181607 (Bourne, ch. 14, computed).
    CHECK_THAT(e.steady->accumulation, WithinRel(1.5469181607, 1e-9));
    // Time above 8 mg/L per interval at steady state ln(Css,max/8)/k = 3.8052998731 h (computed from the
    // closed form of case 2).
    CHECK_THAT(e.steady->above_hours, WithinRel(3.8052998731, 1e-9));
    // After the first dose alone: ln(C0/T)/k = 1.2877123795 h (computed from the closed form).
    CHECK_THAT(e.intervals[0].above_hours, WithinRel(1.2877123795, 1e-9));
    // The first up-crossing is the second dose (the first dose jumps from 0 to 10 mg/L at t = 0, above 8).
    REQUIRE(e.first_reached);
    CHECK(*e.first_reached == Approx(0.0).margin(1e-12));
    REQUIRE_FALSE(e.crossings.empty());
    CHECK_FALSE(e.crossings[0].up);
    CHECK_THAT(e.crossings[0].time, WithinRel(1.2877123795, 1e-9));
    // Trough of interval k: Css,min (1 - exp(-k tau k)) — interval 12 within 10 % of steady state; the within
    // times are dose times (common practice, no source).
    REQUIRE(e.steady->within_10pct);
    REQUIRE(e.steady->within_5pct);
    CHECK(*e.steady->within_10pct <= *e.steady->within_5pct);
    // Peaks approach Css,max as 1 - exp(-k tau n); within 10 % once exp(-k 6 n) <= 0.1 * ..., check directly.
    const double k = kLn2 / 4.0, tau = 6.0;
    auto trough_n = [&](int n) { return 5.4691816068 * (1 - std::exp(-k * tau * n)); };  // closed form, computed
    int first = 0;
    for (int n = 1; n <= 12; ++n)
        if (std::abs(trough_n(n) - 5.4691816068) <= 0.1 * 5.4691816068) { first = n; break; }
    CHECK(*e.steady->within_10pct == Approx(6.0 * (first - 1)).margin(1e-9));
}

TEST_CASE("metrics: repeated 2-h infusions against the printed table", "[metrics]") {
    // Shargel, Wu-Pong & Yu, Applied Biopharmaceutics & Pharmacokinetics, Table 9-5 (k = 0.2 /h and
    // k0/CL = 10 mg/L inferred from the table): V = 10 L, CL = 2 L/h, k0 = 20 mg/h for 2 h every 10 h.
    const auto r = run_text("inf-q10h.toml", R"(
id = "inf-q10h"
model = "one-compartment-iv"
[parameters]
cl = "2 L/h"
v = "10 L"
[[doses]]
route = "iv"
amount = "40 mg"
every = "10 h"
count = 10
over = "2 h"
[horizon]
until = "100 h"
)");
    const double table[] = {0, 1.8127, 3.2968, 2.6992, 2.2099, 1.8093, 1.4813, 1.2128,
                            0.9930, 0.8130, 0.6656, 2.3576, 3.7430, 3.0645, 2.5090, 2.0542};
    for (int t = 0; t <= 15; ++t)  // half a unit in the last printed digit
        CHECK(r.sim.trajectory.value(r.sim.output_series(0), t) == Approx(table[t]).margin(0.5e-4));
    REQUIRE(r.exposure.steady);
    REQUIRE(r.exposure.steady->found);
    // Css,max = 3.8128068322, Css,min = 0.7697924232 mg/L (computed from the closed form).
    CHECK_THAT(r.exposure.steady->peak.value, WithinRel(3.8128068322, 1e-9));
    CHECK(r.exposure.steady->peak.time == Approx(2.0).margin(1e-9));
    CHECK_THAT(r.exposure.steady->trough, WithinRel(0.7697924232, 1e-9));
}

TEST_CASE("metrics: AUC24 of 1-h infusions is exact, not the two-level trapezoid", "[metrics]") {
    // 1000 mg over 1 h every 12 h, CL = 4 L/h, V = 50 L (computed from the closed form): Css,max = 31.1468025024,
    // Css,min = 12.9191614315 mg/L; AUC24 = 2 D / CL = 500 mg h/L exactly; the "linear up, log down" estimate
    // from peak and trough is 499.7569907 (computed).
    const auto r = run_text("inf-q12h.toml", R"(
id = "inf-q12h"
model = "one-compartment-iv"
[parameters]
cl = "4 L/h"
v = "50 L"
[[doses]]
route = "iv"
amount = "1000 mg"
every = "12 h"
count = 14
over = "1 h"
[targets]
window = ["10 mg/L", "20 mg/L"]
[horizon]
until = "168 h"
)");
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    CHECK_THAT(st.peak.value, WithinRel(31.1468025024, 1e-9));
    CHECK_THAT(st.trough, WithinRel(12.9191614315, 1e-9));
    CHECK_THAT(st.auc24, WithinRel(500.0, 1e-9));
    CHECK(std::abs(st.auc24 - 499.7569907) > 0.2);
    // Published target for this exposure: AUC24 400-600 mg h/L (Rybak et al., Am J Health-Syst Pharm 2020;77:835-864).
    CHECK(st.auc24 >= 400.0);
    CHECK(st.auc24 <= 600.0);
    // Identity (common practice, no source): AUC over one interval at steady state = single-dose AUC0-inf = D/CL.
    CHECK_THAT(st.auc, WithinRel(250.0, 1e-9));
    // The last day of the actual regimen (doses 13 and 14 at 144 h and 156 h) is near steady state: 499.x.
    REQUIRE(r.exposure.days.size() == 7);
    CHECK(r.exposure.days[6].auc == Approx(500.0).epsilon(0.01));
    // Time inside 10..20 mg/L + time above 20 + time at or below 10 = the horizon (common practice, no source).
    const double below10 = r.exposure.end - r.exposure.window_hours - r.exposure.above_window_hours;
    CHECK(below10 > 0.0);
    CHECK(st.window_hours + st.above_window_hours <= 12.0 + 1e-12);
}

TEST_CASE("metrics: Michaelis-Menten steady state under constant input", "[metrics]") {
    // Css = Km R / (Vmax - R); Vmax = 490 mg/day, Km = 4 mg/L, V = 49 L, R = 300 mg/day -> 6.3157894737 mg/L
    // (Bauer, Applied Clinical Pharmacokinetics, ch. 10, from memory; Css computed). A 24-h infusion every 24 h
    // is a constant input.
    const auto r = run_text("mm-const.toml", R"(
id = "mm-const"
model = "one-compartment-mm-iv"
[parameters]
vmax = "490 mg/d"
km = "4 mg/L"
v = "49 L"
[[doses]]
route = "iv"
amount = "300 mg"
every = "24 h"
count = 30
over = "24 h"
[targets]
above = "5.684210526315789 mg/L"
[horizon]
until = "30 d"
)");
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    CHECK_THAT(st.peak.value, WithinRel(6.3157894737, 1e-9));
    CHECK_THAT(st.trough, WithinRel(6.3157894737, 1e-9));
    CHECK_THAT(st.average, WithinRel(6.3157894737, 1e-9));
    // 90 % of Css is reached after Km V (Vmax ln 10 - 0.9 R)/(Vmax - R)^2 = 4.6598413388 days (computed from the
    // integrated form).
    REQUIRE(r.exposure.first_reached);
    CHECK_THAT(*r.exposure.first_reached, WithinRel(4.6598413388 * 24.0, 1e-8));
}

TEST_CASE("metrics: Michaelis-Menten repeated boluses approach Km R / (Vmax - R)", "[metrics]") {
    // R = 350 mg/day as 350/24 mg every hour: the steady-state average approaches Km R/(Vmax - R) = 10 mg/L
    // (computed), the fluctuation being small; within 1 % (common practice, no source).
    const auto r = run_text("mm-q1h.toml", R"(
id = "mm-q1h"
model = "one-compartment-mm-iv"
[parameters]
vmax = "490 mg/d"
km = "4 mg/L"
v = "49 L"
[[doses]]
route = "iv"
amount = "14.583333333333334 mg"
every = "1 h"
count = 48
[horizon]
until = "48 h"
)");
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    CHECK(st.average == Approx(10.0).epsilon(0.01));
    CHECK(st.trough < 10.0);
    CHECK(st.peak.value > 10.0);
}

TEST_CASE("metrics: no steady state when doses exceed the maximum elimination rate", "[metrics]") {
    // 600 mg/day against Vmax = 490 mg/day: amounts grow without bound (common practice, no source).
    const auto r = run_text("mm-over.toml", R"(
id = "mm-over"
model = "one-compartment-mm-iv"
[parameters]
vmax = "490 mg/d"
km = "4 mg/L"
v = "49 L"
[[doses]]
route = "iv"
amount = "300 mg"
every = "12 h"
count = 10
[horizon]
until = "5 d"
)");
    REQUIRE(r.exposure.steady);
    CHECK_FALSE(r.exposure.steady->found);
    CHECK(r.exposure.steady->why_not.find("keep rising") != std::string::npos);
}

TEST_CASE("metrics: edge cases of thresholds and windows", "[metrics]") {
    // A bolus of 100 mg into 10 L: the curve starts at 10 mg/L and only falls (closed form, computed).
    const char* base = R"(
id = "edge"
model = "one-compartment-iv"
[parameters]
cl = "2 L/h"
v = "10 L"
[[doses]]
route = "iv"
amount = "100 mg"
at = "1 h"
)";
    SECTION("threshold equal to the peak: no time above, no crossing") {
        auto r = run_text("edge1.toml", std::string(base) + "[targets]\nabove = \"10 mg/L\"\n[horizon]\nuntil = \"24 h\"\n");
        CHECK(r.exposure.above_hours == Approx(0.0).margin(1e-12));
        CHECK(r.exposure.crossings.empty());
        CHECK_FALSE(r.exposure.first_reached);
    }
    SECTION("threshold never reached") {
        auto r = run_text("edge2.toml", std::string(base) + "[targets]\nabove = \"50 mg/L\"\n[horizon]\nuntil = \"24 h\"\n");
        CHECK(r.exposure.above_hours == 0.0);
        CHECK(r.exposure.crossings.empty());
        CHECK_FALSE(r.exposure.first_reached);
    }
    SECTION("threshold below everything after the dose: above from the dose to the end") {
        auto r = run_text("edge3.toml", std::string(base) + "[targets]\nabove = \"0.0001 mg/L\"\n[horizon]\nuntil = \"24 h\"\n");
        // Up at the dose (a jump from 0), never down within 24 h: 10 exp(-0.2 t) > 1e-4 until t = 57.6 h.
        CHECK(r.exposure.above_hours == Approx(23.0).margin(1e-9));
        REQUIRE(r.exposure.crossings.size() == 1);
        CHECK(r.exposure.crossings[0].up);
        CHECK(r.exposure.crossings[0].time == Approx(1.0).margin(1e-12));
    }
    SECTION("window with low = high has no time inside") {
        auto r = run_text("edge4.toml", std::string(base) + "[targets]\nwindow = [\"5 mg/L\", \"5 mg/L\"]\n[horizon]\nuntil = \"24 h\"\n");
        CHECK(r.exposure.window_hours == Approx(0.0).margin(1e-12));
        // Above 5 mg/L from 1 h until 1 + ln 2/0.2 h (closed form, computed).
        CHECK(r.exposure.above_window_hours == Approx(kLn2 / 0.2).epsilon(1e-10));
    }
    SECTION("touching threshold at an oral peak") {
        // Bateman peak (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory): Cmax = 7.4299714457 mg/L.
        auto r = run_text("edge5.toml", R"(
id = "edge5"
model = "one-compartment-oral"
[parameters]
ka = "1.2 1/h"
cl = "6 L/h"
v = "40 L"
f = "0.8"
[[doses]]
route = "oral"
amount = "500 mg"
[targets]
above = "7.4299714457 mg/L"
[horizon]
until = "24 h"
)");
        CHECK(r.exposure.above_hours < 1e-3);
        CHECK(r.exposure.crossings.size() % 2 == 0);
        CHECK_THAT(r.exposure.peak.value, WithinRel(7.4299714457, 1e-9));
        CHECK_THAT(r.exposure.peak.time, WithinRel(1.9804205159, 1e-8));
    }
    SECTION("horizon ending mid-infusion") {
        auto r = run_text("edge6.toml", R"(
id = "edge6"
model = "one-compartment-iv"
[parameters]
cl = "2 L/h"
v = "10 L"
[[doses]]
route = "iv"
amount = "100 mg"
over = "4 h"
[horizon]
until = "2 h"
)");
        // C(2) = (k0/CL)(1 - exp(-k 2)) with k0 = 25 mg/h, CL = 2 L/h, k = 0.2 /h (closed form, computed).
        const double c2 = 12.5 * (1 - std::exp(-0.4));
        REQUIRE(r.exposure.intervals.size() == 1);
        CHECK_THAT(r.exposure.intervals[0].trough, WithinRel(c2, 1e-9));
        CHECK_THAT(r.exposure.peak.value, WithinRel(c2, 1e-9));
        CHECK(r.exposure.peak.time == Approx(2.0));
        CHECK_FALSE(r.exposure.steady);
    }
}
