// Tests for the polynomial tools behind dense output: real-root isolation on a step, critical points, and the
// trajectory operations built on them (roots across steps, integrals across steps, limits at a jump).
// Polynomials are built from their roots, so the expected roots are exact by construction.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "trajectory/poly.hpp"
#include "trajectory/trajectory.hpp"

using namespace plateau;

namespace {

using Poly = std::vector<double>;

Poly mul(const Poly& a, const Poly& b) {
    Poly c(a.size() + b.size() - 1, 0.0);
    for (std::size_t i = 0; i < a.size(); ++i)
        for (std::size_t j = 0; j < b.size(); ++j) c[i + j] += a[i] * b[j];
    return c;
}

// scale · Π (τ − r_i)
Poly from_roots(const std::vector<double>& roots, double scale = 1.0) {
    Poly p{scale};
    for (double r : roots) p = mul(p, Poly{-r, 1.0});
    return p;
}

// p(τ) → p(τ/h): the same polynomial with its roots stretched by h.
Poly stretch(Poly p, double h) {
    double f = 1.0;
    for (double& c : p) { c /= f; f *= h; }
    return p;
}

}  // namespace

TEST_CASE("roots: three simple roots of a scaled cubic", "[roots]") {
    // 3·(τ−0.2)(τ−0.5)(τ−0.9): roots by construction.
    const Poly p = from_roots({0.2, 0.5, 0.9}, 3.0);
    const auto r = traj::roots_in(p, 0.0, 1.0);
    REQUIRE(r.size() == 3);
    CHECK(r[0] == Approx(0.2).margin(1e-14));
    CHECK(r[1] == Approx(0.5).margin(1e-14));
    CHECK(r[2] == Approx(0.9).margin(1e-14));

    // The same roots on a step of length 7.3 (roots 1.46, 3.65, 6.57), and a negative scale.
    const Poly q = stretch(from_roots({0.2, 0.5, 0.9}, -250.0), 7.3);
    const auto rq = traj::roots_in(q, 0.0, 7.3);
    REQUIRE(rq.size() == 3);
    CHECK(rq[0] == Approx(0.2 * 7.3).margin(1e-13));
    CHECK(rq[1] == Approx(0.5 * 7.3).margin(1e-13));
    CHECK(rq[2] == Approx(0.9 * 7.3).margin(1e-13));

    // Only the part of the step in (0, h) counts: on h = 0.6 only 0.2 and 0.5.
    const auto r6 = traj::roots_in(p, 0.0, 0.6);
    REQUIRE(r6.size() == 2);
    CHECK(r6[1] == Approx(0.5).margin(1e-14));
}

TEST_CASE("roots: crossings of a level, not of zero", "[roots]") {
    // p(τ) = 2 + 3τ − τ², level 4: τ² − 3τ + 2 = 0 -> τ = 1, 2 (by construction).
    const Poly p{2.0, 3.0, -1.0};
    const auto r = traj::roots_in(p, 4.0, 2.5);
    REQUIRE(r.size() == 2);
    CHECK(r[0] == Approx(1.0).margin(1e-14));
    CHECK(r[1] == Approx(2.0).margin(1e-14));
    CHECK(traj::roots_in(p, 4.3, 2.5).empty());  // the maximum is 4.25 at τ = 1.5
}

TEST_CASE("roots: a root exactly on a bisection midpoint does not hide its neighbour", "[roots]") {
    // (τ−0.25)(τ−0.5) has exactly representable coefficients; 0.5 is the first bisection point of [0, 1].
    const Poly p = from_roots({0.25, 0.5});
    const auto r = traj::roots_in(p, 0.0, 1.0);
    REQUIRE(r.size() == 2);
    CHECK(r[0] == Approx(0.25).margin(1e-14));
    CHECK(r[1] == Approx(0.5).margin(1e-14));
    // Same with three roots around the midpoint.
    const auto r3 = traj::roots_in(from_roots({0.125, 0.5, 0.875}), 0.0, 1.0);
    REQUIRE(r3.size() == 3);
    CHECK(r3[0] == Approx(0.125).margin(1e-14));
    CHECK(r3[2] == Approx(0.875).margin(1e-14));
}

TEST_CASE("roots: clustered roots are separated", "[roots]") {
    const Poly p = from_roots({0.5, 0.5 + 1e-6, 0.8}, 5.0);
    const auto r = traj::roots_in(p, 0.0, 1.0);
    REQUIRE(r.size() == 3);
    CHECK(r[0] == Approx(0.5).margin(1e-12));
    CHECK(r[1] == Approx(0.5 + 1e-6).margin(1e-12));
    CHECK(r[2] == Approx(0.8).margin(1e-13));
}

TEST_CASE("roots: a double root is reported at most once and nothing crashes", "[roots]") {
    // (τ − 0.25)(τ − 0.5)²: exact coefficients, a touch at 0.5 and a simple root at 0.25.
    const auto r = traj::roots_in(from_roots({0.25, 0.5, 0.5}), 0.0, 1.0);
    REQUIRE(!r.empty());
    CHECK(r[0] == Approx(0.25).margin(1e-14));
    int near_half = 0;
    for (double x : r)
        if (std::abs(x - 0.5) < 1e-6) ++near_half;
    CHECK(near_half <= 1);
    CHECK(r.size() <= 2);
    // (5τ − 1.5)²(τ − 0.8): exact coefficients, a touch at 0.3 off the bisection points.
    const auto r2 = traj::roots_in(mul(from_roots({0.8}), Poly{2.25, -15.0, 25.0}), 0.0, 1.0);
    REQUIRE(!r2.empty());
    CHECK(r2.back() == Approx(0.8).margin(1e-14));
    int near_03 = 0;
    for (double x : r2)
        if (std::abs(x - 0.3) < 1e-6) ++near_03;
    CHECK(near_03 <= 1);
    // (τ − 0.1)(τ − 0.5)² with rounded coefficients: the touch may split into two roots within round-off, or
    // vanish; the simple root is always found and nothing else appears.
    const auto r3 = traj::roots_in(from_roots({0.1, 0.5, 0.5}), 0.0, 1.0);
    REQUIRE(!r3.empty());
    CHECK(r3[0] == Approx(0.1).margin(1e-14));
    CHECK(r3.size() <= 3);
    for (std::size_t i = 1; i < r3.size(); ++i) CHECK(r3[i] == Approx(0.5).margin(1e-7));
}

TEST_CASE("roots: roots at the interval ends are outside the open interval", "[roots]") {
    // τ(τ − 0.7)(τ − 1): roots 0 and 1 are the ends of (0, 1).
    const auto r = traj::roots_in(from_roots({0.0, 0.7, 1.0}), 0.0, 1.0);
    REQUIRE(r.size() == 1);
    CHECK(r[0] == Approx(0.7).margin(1e-14));
    CHECK(traj::roots_in(from_roots({0.0}), 0.0, 1.0).empty());
    CHECK(traj::roots_in(from_roots({2.0}), 0.0, 2.0).empty());
}

TEST_CASE("roots: no roots, constants and degenerate input", "[roots]") {
    // All by construction.
    CHECK(traj::roots_in(Poly{1.0, 0.0, 1.0}, 0.0, 1.0).empty());           // τ² + 1
    CHECK(traj::roots_in(from_roots({-0.5, 1.5}), 0.0, 1.0).empty());       // roots outside [0, 1]
    CHECK(traj::roots_in(from_roots({0.3, 0.6}), 0.0, 0.2).empty());        // roots beyond h
    CHECK(traj::roots_in(Poly{3.0}, 3.0, 1.0).empty());                     // identically equal: no isolated root
    CHECK(traj::roots_in(Poly{3.0, 0.0, 0.0}, 1.0, 1.0).empty());
    CHECK(traj::roots_in(Poly{}, 0.0, 1.0).empty());
    CHECK(traj::roots_in(from_roots({0.5}), 0.0, 0.0).empty());             // empty interval
    CHECK(traj::roots_in(from_roots({0.5}), 0.0, -1.0).empty());
}

TEST_CASE("roots: degree 15 with five real roots", "[roots]") {
    // (τ−0.1)(τ−0.3)(τ−0.45)(τ−0.7)(τ−0.95)·(τ² + 1)^5: ten complex roots, five real ones in (0, 1).
    Poly p = from_roots({0.1, 0.3, 0.45, 0.7, 0.95});
    for (int i = 0; i < 5; ++i) p = mul(p, Poly{1.0, 0.0, 1.0});
    REQUIRE(p.size() == 16);
    const auto r = traj::roots_in(p, 0.0, 1.0);
    const std::vector<double> want{0.1, 0.3, 0.45, 0.7, 0.95};
    REQUIRE(r.size() == want.size());
    for (std::size_t i = 0; i < want.size(); ++i) CHECK(r[i] == Approx(want[i]).margin(1e-12));
}

TEST_CASE("roots: critical points are the roots of the derivative", "[roots]") {
    // p = 1 + 0.48τ − 1.1τ² + (2/3)τ³, so p' = 2τ² − 2.2τ + 0.48 = 2(τ−0.3)(τ−0.8) (by construction).
    const Poly p{1.0, 0.48, -1.1, 2.0 / 3.0};
    const auto cp = traj::critical_points_in(p, 1.0);
    REQUIRE(cp.size() == 2);
    CHECK(cp[0] == Approx(0.3).margin(1e-14));
    CHECK(cp[1] == Approx(0.8).margin(1e-14));
    CHECK(traj::critical_points_in(Poly{1.0, 2.0}, 1.0).empty());  // a line has none
    CHECK(traj::critical_points_in(p, 0.5).size() == 1);
    // horner, derivative and integral on the same polynomial (computed by hand).
    CHECK(traj::horner(p, 0.5) == Approx(1.0 + 0.24 - 0.275 + 1.0 / 12.0).epsilon(1e-15));
    CHECK(traj::horner_derivative(p, 0.5) == Approx(0.48 - 1.1 + 0.5).epsilon(1e-15));
    CHECK(traj::integral_from_zero(p, 0.5) == Approx(0.5 + 0.06 - 1.1 / 24 + 1.0 / 96).epsilon(1e-15));
}

namespace {

// One series, p(t) = (t − 1)(t − 3)(t − 4.5) on [0, 6] cut into steps at the given times; each step stores
// the polynomial re-expanded around its start (Taylor shift), like the engine's steps.
traj::Trajectory cubic_over_steps(const std::vector<double>& cuts) {
    const Poly p = from_roots({1.0, 3.0, 4.5});
    traj::Trajectory tr(1, 3);
    for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
        const double t0 = cuts[k];
        // Coefficients of p(t0 + τ): p^(j)(t0)/j!.
        Poly q(4, 0.0);
        Poly d = p;
        double fact = 1.0;
        for (int j = 0; j < 4; ++j) {
            q[static_cast<std::size_t>(j)] = traj::horner(d, t0) / fact;
            Poly nd(d.size() > 1 ? d.size() - 1 : 1, 0.0);
            for (std::size_t i = 1; i < d.size(); ++i) nd[i - 1] = static_cast<double>(i) * d[i];
            d = nd;
            fact *= j + 1;
        }
        tr.append(t0, cuts[k + 1] - t0, q);
    }
    return tr;
}

}  // namespace

TEST_CASE("trajectory: a root exactly at a step boundary is found once", "[roots]") {
    // Steps [0, 1), [1, 2.5), [2.5, 3), [3, 6]: the roots 1 and 3 sit exactly on boundaries, 4.5 inside a step.
    const traj::Trajectory tr = cubic_over_steps({0.0, 1.0, 2.5, 3.0, 6.0});
    REQUIRE(tr.size() == 4);
    const auto r = tr.level_roots(0, 0.0, 0.0, 6.0);
    REQUIRE(r.size() == 3);
    CHECK(r[0] == Approx(1.0).margin(1e-13));
    CHECK(r[1] == Approx(3.0).margin(1e-13));
    CHECK(r[2] == Approx(4.5).margin(1e-13));
}

TEST_CASE("trajectory: roots and critical points across many steps", "[roots]") {
    std::vector<double> cuts;
    for (int i = 0; i <= 13; ++i) cuts.push_back(6.0 * i / 13.0);  // boundaries avoid the roots
    const traj::Trajectory tr = cubic_over_steps(cuts);
    const auto r = tr.level_roots(0, 0.0, 0.0, 6.0);
    REQUIRE(r.size() == 3);
    CHECK(r[0] == Approx(1.0).margin(1e-13));
    CHECK(r[1] == Approx(3.0).margin(1e-13));
    CHECK(r[2] == Approx(4.5).margin(1e-13));
    // Window (a, b) restricts the answer.
    const auto r2 = tr.level_roots(0, 0.0, 2.0, 5.0);
    REQUIRE(r2.size() == 2);
    CHECK(r2[0] == Approx(3.0).margin(1e-13));
    // p' = 3t² − 17t + 21 = 0 -> t = (17 ± √37)/6 (computed from the closed form).
    const auto cp = tr.critical_points(0, 0.0, 6.0);
    REQUIRE(cp.size() == 2);
    CHECK(cp[0] == Approx((17.0 - std::sqrt(37.0)) / 6.0).margin(1e-13));
    CHECK(cp[1] == Approx((17.0 + std::sqrt(37.0)) / 6.0).margin(1e-13));
}

TEST_CASE("trajectory: integral across steps is exact", "[roots]") {
    const traj::Trajectory tr = cubic_over_steps({0.0, 0.7, 1.9, 2.0, 3.3, 6.0});
    // ∫ (t³ − 8.5t² + 21t − 13.5) dt = t⁴/4 − 8.5t³/3 + 10.5t² − 13.5t (computed from the closed form).
    auto F = [](double t) { return t * t * t * t / 4 - 8.5 * t * t * t / 3 + 10.5 * t * t - 13.5 * t; };
    CHECK(tr.integral(0, 0.0, 6.0) == Approx(F(6.0) - F(0.0)).epsilon(1e-14));
    // F(5.1) and F(0.35) are ~10 times their difference: the closed form itself carries ~1e-14 relative.
    CHECK(tr.integral(0, 0.35, 5.1) == Approx(F(5.1) - F(0.35)).epsilon(1e-13));
    CHECK(tr.integral(0, 1.9, 2.0) == Approx(F(2.0) - F(1.9)).epsilon(1e-13));
    CHECK(tr.integral(0, 5.1, 0.35) == Approx(F(0.35) - F(5.1)).epsilon(1e-13));  // reversed bounds
    CHECK(tr.integral(0, -3.0, 9.0) == Approx(F(6.0) - F(0.0)).epsilon(1e-14));   // clamped
    CHECK(tr.integral(0, 2.0, 2.0) == 0.0);
    CHECK(tr.value(0, 2.5) == Approx((2.5 - 1) * (2.5 - 3) * (2.5 - 4.5)).epsilon(1e-14));
    CHECK(tr.end() == 6.0);
    CHECK(tr.boundaries(0.0, 6.0) == std::vector<double>{0.7, 1.9, 2.0, 3.3});
}

TEST_CASE("trajectory: left limit and value at a jump", "[roots]") {
    // Two series, built by hand:
    // step 1 on [0, 2): s0 = 5 − 2τ, s1 = τ;  step 2 on [2, 3]: s0 = 11 − τ (a bolus of 10), s1 = 2 + τ.
    traj::Trajectory tr(2, 1);
    tr.append(0.0, 2.0, std::vector<double>{5.0, -2.0, 0.0, 1.0});
    tr.append(2.0, 1.0, std::vector<double>{11.0, -1.0, 2.0, 1.0});
    CHECK(tr.left_limit(0, 2.0) == 1.0);   // 5 − 2·2
    CHECK(tr.value(0, 2.0) == 11.0);       // right-continuous: just after the jump
    CHECK(tr.left_limit(1, 2.0) == 2.0);   // continuous series: both limits agree
    CHECK(tr.value(1, 2.0) == 2.0);
    CHECK(tr.value(0, 3.0) == 10.0);       // at the end: the left limit
    CHECK(tr.left_limit(0, 0.0) == 5.0);   // at the start: the value there
    CHECK(tr.derivative(0, 2.0) == -1.0);  // from the right
    CHECK(tr.derivative(0, 1.0) == -2.0);
    CHECK(tr.step_at(2.0) == 1);
    CHECK(tr.step_at(1.999) == 0);
    // The jump from 1 to 11 passes level 6 but is not a root: 5 − 2τ = 6 only at τ = −0.5 and 11 − τ = 6 only at
    // τ = 5, both outside their steps. Level 3 is crossed at t = 1 in step 1 and never in step 2 (11 − τ ≥ 10).
    const auto r = tr.level_roots(0, 3.0, 0.0, 3.0);
    REQUIRE(r.size() == 1);
    CHECK(r[0] == Approx(1.0).margin(1e-15));
    CHECK(tr.level_roots(0, 6.0, 0.0, 3.0).empty());
    // Integral across the jump: ∫0^2 (5 − 2τ) + ∫0^1 (11 − τ) = 6 + 10.5.
    CHECK(tr.integral(0, 0.0, 3.0) == Approx(16.5).epsilon(1e-15));
    CHECK_THROWS(tr.append(3.0, 0.0, std::vector<double>{1.0, 0.0, 0.0, 0.0}));
    CHECK_THROWS(tr.append(3.0, 1.0, std::vector<double>{1.0, 0.0}));
}
