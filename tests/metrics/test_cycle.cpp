// The steady state of whole dosing patterns: several series with different intervals, doses at clock times,
// weekly patterns, and missed/late/doubled doses. Linear one-compartment IV bolus throughout, so every value has
// a closed form by superposition of the multiple-dosing function of each series (Gibaldi & Perrier,
// Pharmacokinetics, 2nd ed., ch. 3; the principle of superposition for linear models).
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "support.hpp"

using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;
using plateau::testing::run_text;

namespace {

// One series at steady state: dose D every tau, the last dose `since` hours ago (Gibaldi & Perrier, ch. 3).
struct Series {
    double dose, tau, offset;
};

constexpr double kCl = 4.0, kV = 40.0, kK = kCl / kV;

// Steady-state concentration at time t of the cycle (right limit: a dose at t counts), by superposition.
double css(const std::vector<Series>& ss, double t, bool left_limit = false) {
    double c = 0.0;
    for (const auto& s : ss) {
        double since = std::fmod(t - s.offset, s.tau);
        if (since < 0) since += s.tau;
        if (left_limit && since < 1e-12) since = s.tau;
        c += s.dose / kV * std::exp(-kK * since) / (1.0 - std::exp(-kK * s.tau));
    }
    return c;
}

std::string series_toml(double dose, double at, double every, long count) {
    return "[[doses]]\nroute = \"iv\"\namount = \"" + std::to_string(dose) + " mg\"\nat = \"" + std::to_string(at) +
           " h\"\nevery = \"" + std::to_string(every) + " h\"\ncount = " + std::to_string(count) + "\n";
}

const char* kHead = "model = \"one-compartment-iv\"\n[parameters]\ncl = \"4 L/h\"\nv = \"40 L\"\n";

}  // namespace

TEST_CASE("cycle: 8-hourly and 12-hourly series together have a 24-h steady state", "[metrics][cycle]") {
    const auto r = run_text("q8-q12.toml", std::string("id = \"q8-q12\"\n") + kHead + series_toml(100, 0, 8, 30) +
                                               series_toml(150, 0, 12, 20));
    const std::vector<Series> ss{{100, 8, 0}, {150, 12, 0}};
    REQUIRE(r.schedule.cycle);
    CHECK(r.schedule.cycle->period == 24.0);          // lcm(8 h, 12 h), common practice, no source
    CHECK(r.schedule.cycle->doses.size() == 5);       // 3 + 2 doses per 24 h
    REQUIRE(r.exposure.steady);
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    // Average = (100/8 + 150/12) mg/h / CL = 6.25 mg/L; AUC24 = 150 mg·h/L (superposition, computed).
    CHECK_THAT(st.average, WithinRel(6.25, 1e-9));
    CHECK_THAT(st.auc24, WithinRel(150.0, 1e-9));
    CHECK_THAT(st.auc, WithinRel(150.0, 1e-9));
    // Peak: both series dose at 0 h (superposition, computed: 9.906 mg/L).
    CHECK_THAT(st.peak.value, WithinRel(css(ss, 0.0), 1e-9));
    CHECK(st.peak.time == Approx(0.0).margin(1e-9));
    CHECK(std::abs(css(ss, 0.0) - 9.906) < 5e-4);
    // The value just before each dose time of the cycle: 0, 8, 12, 16 h (superposition, computed).
    REQUIRE(st.troughs.size() == 4);
    const double offs[] = {0, 8, 12, 16};
    double lowest = 1e300;
    for (std::size_t i = 0; i < 4; ++i) {
        CHECK(st.troughs[i].offset == Approx(offs[i]).margin(1e-9));
        const double expect = css(ss, offs[i], true);
        CHECK_THAT(st.troughs[i].value, WithinRel(expect, 1e-9));
        lowest = std::min(lowest, expect);
    }
    CHECK_THAT(st.trough, WithinRel(lowest, 1e-9));
    // "Within 10 %" is dated inside the regimen, before its last cycle ends.
    REQUIRE(st.within_10pct);
    CHECK(*st.within_10pct < r.schedule.cycle->start + 24.0);
}

TEST_CASE("cycle: doses at clock times, written as three daily series or as daily times", "[metrics][cycle]") {
    // 200 mg at 08:00, 14:00 and 22:00 with t = 0 at 08:00.
    const std::vector<Series> ss{{200, 24, 0}, {200, 24, 6}, {200, 24, 14}};
    auto check = [&](const plateau::testing::Run& r) {
        REQUIRE(r.exposure.steady);
        const auto& st = *r.exposure.steady;
        REQUIRE(st.found);
        CHECK(st.interval == 24.0);
        REQUIRE(st.troughs.size() == 3);
        // The lowest trough is before the 08:00 dose, after the 10-h night gap (superposition, computed).
        CHECK(st.trough_time == Approx(0.0).margin(1e-9));
        CHECK_THAT(st.trough, WithinRel(css(ss, 0.0, true), 1e-9));
        CHECK_THAT(st.troughs[1].value, WithinRel(css(ss, 6.0, true), 1e-9));
        CHECK_THAT(st.troughs[2].value, WithinRel(css(ss, 14.0, true), 1e-9));
        CHECK_THAT(st.average, WithinRel(600.0 / 24.0 / kCl, 1e-9));  // daily dose / 24 h / CL, computed
        return st.trough;
    };
    const double a = check(run_text("clock-series.toml", std::string("id = \"clock-series\"\n") + kHead +
                                                             series_toml(200, 0, 24, 7) + series_toml(200, 6, 24, 7) +
                                                             series_toml(200, 14, 24, 7)));
    // One more 08:00 dose must not change the steady state (it did when the last series set the pattern).
    const double b = check(run_text("clock-series-plus.toml", std::string("id = \"clock-series-plus\"\n") + kHead +
                                                                  series_toml(200, 0, 24, 8) + series_toml(200, 6, 24, 7) +
                                                                  series_toml(200, 14, 24, 7)));
    const double c = check(run_text("clock-times.toml", std::string("id = \"clock-times\"\nstart_clock = \"08:00\"\n") +
                                                            kHead + R"(
[[doses]]
route = "iv"
amount = "200 mg"
times = ["22:00", "08:00", "14:00"]
days = 7
)"));
    CHECK(a == b);
    CHECK(a == c);
}

TEST_CASE("cycle: a weekly pattern, five days on and two off", "[metrics][cycle]") {
    std::string text = std::string("id = \"weekly\"\n") + kHead;
    std::vector<Series> ss;
    for (int d = 0; d < 5; ++d) {
        text += series_toml(300, 24.0 * d, 168, 6);
        ss.push_back({300, 168, 24.0 * d});
    }
    const auto r = run_text("weekly.toml", text);
    REQUIRE(r.exposure.steady);
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    CHECK(st.interval == 168.0);
    // Average over the week = 5·300 mg / 168 h / CL (superposition, computed).
    CHECK_THAT(st.average, WithinRel(1500.0 / 168.0 / kCl, 1e-9));
    // Peak right after the fifth dose of the week; lowest trough before the first (after the 2-day gap).
    CHECK_THAT(st.peak.value, WithinRel(css(ss, 96.0), 1e-9));
    CHECK(st.peak.time == Approx(96.0).margin(1e-9));
    CHECK_THAT(st.trough, WithinRel(css(ss, 0.0, true), 1e-9));
    CHECK(st.trough_time == Approx(0.0).margin(1e-9));
}

TEST_CASE("cycle: series with no common period within 28 days say so", "[metrics][cycle]") {
    const auto r = run_text("no-period.toml", std::string("id = \"no-period\"\n") + kHead + series_toml(100, 0, 7, 100) +
                                                  series_toml(100, 0, 9.7, 72));
    REQUIRE(r.exposure.steady);
    CHECK_FALSE(r.exposure.steady->found);
    CHECK(r.exposure.steady->why_not.find("28 days") != std::string::npos);
}

TEST_CASE("cycle: a loading series that stopped early is not part of the steady state", "[metrics][cycle]") {
    // 6-hourly for a day, then 12-hourly: the steady state is the 12-hourly one alone (Gibaldi & Perrier, ch. 3).
    const auto r = run_text("load-then-q12.toml", std::string("id = \"load-then-q12\"\n") + kHead +
                                                      series_toml(200, 0, 6, 4) + series_toml(300, 24, 12, 20));
    REQUIRE(r.exposure.steady);
    const auto& st = *r.exposure.steady;
    REQUIRE(st.found);
    CHECK(st.interval == 12.0);
    const std::vector<Series> ss{{300, 12, 0}};
    CHECK_THAT(st.peak.value, WithinRel(css(ss, 0.0), 1e-9));
    CHECK_THAT(st.trough, WithinRel(css(ss, 0.0, true), 1e-9));
}

TEST_CASE("cycle: missed, late and doubled doses change the run, not the steady state", "[metrics][cycle]") {
    const std::string base = std::string(kHead) + R"(
[[doses]]
route = "iv"
amount = "100 mg"
every = "8 h"
count = 12
)";
    const auto plain = run_text("adh-plain.toml", "id = \"adh-plain\"\n" + base);
    const auto missed = run_text("adh-missed.toml", "id = \"adh-missed\"\n" + base + "missed = [6]\n");
    const auto late = run_text("adh-late.toml", "id = \"adh-late\"\n" + base + "late = [{ dose = 6, by = \"3 h\" }]\n");
    const auto doubled = run_text("adh-doubled.toml", "id = \"adh-doubled\"\n" + base + "doubled = [7]\n");
    CHECK(missed.schedule.doses.size() == 11);
    CHECK_THAT(missed.exposure.steady->peak.value, WithinRel(plain.exposure.steady->peak.value, 1e-12));
    // Dose 6 is due at 40 h; taken at 43 h the 40..43 h interval has no dose: the concentration just before it
    // is the 32-h value decayed for 11 h (superposition of the first five doses, computed).
    double c43 = 0.0;
    for (int i = 0; i < 5; ++i) c43 += 100.0 / kV * std::exp(-kK * (43.0 - 8.0 * i));
    const auto& tr = late.sim.trajectory;
    const int s = late.sim.output_series(0);
    CHECK_THAT(tr.left_limit(s, 43.0), WithinRel(c43, 1e-9));
    CHECK_THAT(tr.value(s, 43.0), WithinRel(c43 + 100.0 / kV, 1e-9));
    // A doubled 7th dose at 48 h adds 200 mg (computed).
    double c48 = 0.0;
    for (int i = 0; i < 6; ++i) c48 += 100.0 / kV * std::exp(-kK * (48.0 - 8.0 * i));
    CHECK_THAT(doubled.sim.trajectory.value(s, 48.0), WithinRel(c48 + 200.0 / kV, 1e-9));
    // Missing the 6th dose: its interval merges with the 5th, and the AUC over the run drops by exactly the
    // missed dose's exposure up to the horizon end, D/CL·(1 − e^{−k(T − 40)}) (superposition, computed).
    const double T = plain.exposure.end;
    CHECK_THAT(plain.exposure.auc - missed.exposure.auc,
               WithinRel(100.0 / kCl * (1.0 - std::exp(-kK * (T - 40.0))), 1e-9));
}

TEST_CASE("cycle: the steady state of linear models does not depend on the tolerance", "[metrics][cycle]") {
    // Every linear built-in model, oral where it has the route: AUC over one interval at steady state equals
    // F·D/CL — the single-dose AUC0-inf (common practice, no source) — at every allowed tolerance.
    struct M {
        const char* id;
        const char* route;
    };
    const M models[] = {{"one-compartment-iv", "iv"},   {"one-compartment-oral", "oral"}, {"two-compartment-iv", "iv"},
                        {"two-compartment-oral", "oral"}, {"three-compartment-iv", "iv"},  {"transit-oral", "oral"},
                        {"zelmarin", "iv"}};
    for (const auto& m : models)
        for (double tol : {1e-3, 5e-4, 1e-6, 1e-10, 1e-15}) {
            const std::string text = std::string("id = \"tol-sweep\"\nmodel = \"") + m.id +
                                     "\"\n[[doses]]\nroute = \"" + m.route +
                                     "\"\namount = \"400 mg\"\nevery = \"12 h\"\ncount = 20\n";
            INFO(m.id << " at tol " << tol);
            const auto r = run_text("tol-sweep.toml", text, tol);
            REQUIRE(r.exposure.steady);
            REQUIRE(r.exposure.steady->found);
            const auto ref = run_text("tol-sweep.toml", text, 1e-12);
            CHECK_THAT(r.exposure.steady->auc, WithinRel(ref.exposure.steady->auc, 1e-9));
            CHECK_THAT(r.exposure.steady->peak.value, WithinRel(ref.exposure.steady->peak.value, 1e-9));
        }
}

TEST_CASE("cycle: saturable elimination reaches the same steady state as many cycles", "[metrics][cycle]") {
    // Michaelis-Menten elimination: the direct solve against the state after 150 doses (common practice, no
    // source: a contraction converges to its fixed point).
    const std::string text = R"(id = "mm-cycle"
model = "one-compartment-mm-iv"
[[doses]]
route = "iv"
amount = "100 mg"
every = "12 h"
count = 150
)";
    const auto r = run_text("mm-cycle.toml", text);
    REQUIRE(r.exposure.steady);
    REQUIRE(r.exposure.steady->found);
    const auto& last = r.exposure.intervals.back();
    const auto& prev = r.exposure.intervals[r.exposure.intervals.size() - 2];
    CHECK_THAT(r.exposure.steady->peak.value, WithinRel(prev.peak.value, 1e-7));
    CHECK_THAT(r.exposure.steady->trough, WithinRel(prev.trough, 1e-7));
    (void)last;
}

TEST_CASE("cycle: clock times 8 h apart are one dose every 8 h", "[metrics][cycle]") {
    // The shortest period after which the pattern repeats, not the 24 h of the daily list (common practice, no
    // source); 07:00, 15:00, 23:00 from t = 0 at 06:00 are offsets 1, 9 and 17 h.
    const auto r = run_text("clock-q8.toml", std::string("id = \"clock-q8\"\nstart_clock = \"06:00\"\n") + kHead + R"(
[[doses]]
route = "iv"
amount = "100 mg"
times = ["07:00", "15:00", "23:00"]
days = 5
)");
    REQUIRE(r.schedule.cycle);
    CHECK(r.schedule.cycle->period == Approx(8.0));
    CHECK(r.schedule.cycle->doses.size() == 1);
    const std::vector<Series> ss{{100, 8, 1}};
    CHECK_THAT(r.exposure.steady->trough, WithinRel(css(ss, 1.0, true), 1e-9));
    CHECK(r.schedule.doses.front().time == Approx(1.0));
}

TEST_CASE("cycle: the minimum after the first peak cannot jump above that peak", "[metrics][cycle]") {
    // 500 mg infused over 8 h, then a 500 mg bolus at 8 h (CL 4 L/h, V 40 L, horizon 10 h). The first peak is
    // the end of the infusion, just before the bolus: (R/CL)(1 − e^{−8k}) with R = 62.5 mg/h (closed form,
    // computed). Counting that peak itself keeps the minimum there instead of 2 h later after the bolus, and a
    // slightly shorter infusion gives the same minimum (continuity).
    auto text = [](const std::string& over) {
        return std::string("id = \"min-jump\"\n") + kHead + "[[doses]]\nroute = \"iv\"\namount = \"500 mg\"\nover = \"" +
               over + "\"\n[[doses]]\nroute = \"iv\"\namount = \"500 mg\"\nat = \"8 h\"\n[horizon]\nuntil = \"10 h\"\n";
    };
    const double first_peak = 62.5 / kCl * (1.0 - std::exp(-8.0 * kK));
    const auto a = run_text("min-jump.toml", text("8 h"));
    CHECK_THAT(a.exposure.minimum.value, WithinRel(first_peak, 1e-9));
    const auto b = run_text("min-jump.toml", text("7.9999999 h"));
    CHECK_THAT(b.exposure.minimum.value, WithinRel(first_peak, 1e-6));
}
