// Reductions over subjects: the Wilson interval, percentiles, the PTA curve and the expected attainment.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>

#include "population/reduce.hpp"

using namespace plateau;

TEST_CASE("population: Wilson score interval", "[population]") {
    // 81 of 263: 0.2553 to 0.3662 (Newcombe, Statistics in Medicine 1998, the Wilson score method; from memory).
    const auto [lo, hi] = population::wilson95(81, 263);
    CHECK(lo == Approx(0.2553).margin(5e-5));
    CHECK(hi == Approx(0.3662).margin(5e-5));
    // 0 of n: the lower end is 0 and the upper z²/(n + z²) (computed from the closed form).
    const double z = 1.959963984540054;
    const auto [lo0, hi0] = population::wilson95(0, 10);
    CHECK(lo0 == 0.0);
    CHECK(hi0 == Approx(z * z / (10.0 + z * z)).epsilon(1e-12));
    const auto [lo1, hi1] = population::wilson95(10, 10);
    CHECK(lo1 == Approx(10.0 / (10.0 + z * z)).epsilon(1e-12));   // by symmetry (computed from the closed form)
    CHECK(hi1 == Approx(1.0).epsilon(1e-12));
}

TEST_CASE("population: percentiles, PTA curve and expected attainment", "[population]") {
    // Percentile definition 7 of Hyndman & Fan (Am Stat 1996): h = (n − 1)p, linear between order statistics.
    const std::vector<double> v{1, 2, 3, 4, 5, 6, 7, 8, 9, 10};
    CHECK(population::percentile(v, 50) == Approx(5.5));
    CHECK(population::percentile(v, 5) == Approx(1.45));
    CHECK(population::percentile(v, 95) == Approx(9.55));
    CHECK(population::doubling(0.25, 64).size() == 9);   // 0.25, 0.5, ..., 64 (common practice, no source)

    // Ten subjects whose highest attained thresholds are 0.5, 1, ..., 5 mg/L; one failed, one without a steady
    // state: both count in the denominator.
    std::vector<population::Figures> fs(12);
    for (std::size_t i = 0; i < 10; ++i) {
        fs[i].level = 0.5 * static_cast<double>(i + 1);
        fs[i].met = {static_cast<signed char>(fs[i].level >= 2.0 ? 1 : 0)};
    }
    const double nan = std::numeric_limits<double>::quiet_NaN();
    for (std::size_t i = 10; i < 12; ++i) {
        fs[i].status = i == 10 ? population::Status::Failed : population::Status::NoSteadyState;
        fs[i].level = nan;
        fs[i].met = {-1};
        fs[i].first_peak = fs[i].ss_peak = fs[i].ss_trough = fs[i].ss_average = fs[i].ss_auc24 = nan;
        fs[i].above_pct = fs[i].first_reached = nan;
    }
    population::ThresholdDist dist;
    dist.thresholds = {1.0, 2.0, 4.0};
    dist.weights = {1.0, 2.0, 1.0};
    const std::vector<float> bands(12 * 2, 1.0f);
    const auto s = population::summarize(fs, bands, 2, {{"above", "above 2 mg/L"}}, population::doubling(1, 4), &dist);
    CHECK(s.total == 12);
    CHECK(s.failed == 1);
    CHECK(s.no_steady_state == 1);
    REQUIRE(s.targets.size() == 1);
    CHECK(s.targets[0].attained == 7);    // levels 2 .. 5 (computed by hand)
    CHECK(s.targets[0].assessed == 10);
    CHECK(s.targets[0].pta == Approx(7.0 / 12.0));
    REQUIRE(s.curve.size() == 3);
    CHECK(s.curve[0].attained == 9);      // levels ≥ 1: 1 .. 5 (computed by hand)
    CHECK(s.curve[1].attained == 7);
    CHECK(s.curve[2].attained == 3);      // 4, 4.5, 5
    // Σ w·PTA / Σ w = (9 + 2·7 + 3)/(12·4) (computed by hand).
    REQUIRE(s.expected);
    CHECK(*s.expected == Approx((9.0 + 14.0 + 3.0) / 48.0));
    CHECK(s.spreads[0].n == 10);
}
