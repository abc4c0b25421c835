// The root finder of the dose search on functions with known roots: bracketing from a proportional guess,
// TOMS 748 to 1e-12 relative, figures that level off, figures lost above a dose, figures that fall.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>

#include "dose/solve.hpp"

using plateau::dose::RootStatus;
using plateau::dose::solve_rising;

TEST_CASE("dose: a proportional figure is solved at the first guess", "[dose]") {
    int calls = 0;
    const auto r = solve_rising(
        [&](double d) {
            ++calls;
            return 0.025 * d;
        },
        5.0, 100.0);
    CHECK(r.status == RootStatus::Found);
    CHECK(r.high == Approx(200.0).epsilon(1e-12));  // 5 / 0.025 (computed from the closed form)
    CHECK(r.high >= r.low);
    CHECK(0.025 * r.high >= 5.0);  // the high end meets the value
    CHECK(calls <= 6);             // the guess, one step each way, a few TOMS 748 steps
}

TEST_CASE("dose: a non-proportional rising figure is solved to 1e-12 relative", "[dose]") {
    // d²/1000 = 7 at d = sqrt(7000) = 83.66600265 (computed from the closed form).
    const auto r = solve_rising([](double d) { return d * d / 1000.0; }, 7.0, 300.0);
    CHECK(r.status == RootStatus::Found);
    CHECK(r.high == Approx(std::sqrt(7000.0)).epsilon(1e-11));
    CHECK((r.high - r.low) <= 1e-12 * r.low * 1.0000001);
}

TEST_CASE("dose: a figure that levels off below the value is unreachable", "[dose]") {
    // 1 − e^{−d/100} never reaches 2 (computed from the closed form).
    const auto r = solve_rising([](double d) { return 1.0 - std::exp(-d / 100.0); }, 2.0, 100.0);
    CHECK(r.status == RootStatus::Unreachable);
    CHECK_THAT(r.why, Catch::Contains("at the largest dose searched"));
}

TEST_CASE("dose: a figure lost above a dose is solved below it", "[dose]") {
    // d/(100 − d), no value from d = 100 on (a steady state lost): 3 at d = 75 (computed from the closed form).
    auto f = [](double d) { return d < 100.0 ? d / (100.0 - d) : std::numeric_limits<double>::infinity(); };
    const auto r = solve_rising(f, 3.0, 400.0);
    CHECK(r.status == RootStatus::Found);
    CHECK(r.high == Approx(75.0).epsilon(1e-11));
}

TEST_CASE("dose: a figure that falls while the dose rises is reported, not trusted", "[dose]") {
    // d·e^{−d/50} peaks at d = 50 (value 18.39) and falls after it; started beyond the peak, the proportional
    // guess goes further down the slope (computed from the closed form).
    const auto r = solve_rising([](double d) { return d * std::exp(-d / 50.0); }, 10.0, 200.0);
    CHECK(r.status == RootStatus::NonMonotone);
    CHECK_THAT(r.why, Catch::Contains("the figure falls from"));
}
