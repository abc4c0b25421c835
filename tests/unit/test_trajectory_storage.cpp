// Dense-output storage: chunks, outputs derived from the states, and the compact records of linear models
// (x[0], x[1] only) must hand back exactly the polynomials the steps were taken with.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "expr/expr.hpp"
#include "taylor/stepper.hpp"
#include "taylor/tape.hpp"
#include "trajectory/trajectory.hpp"

using namespace plateau;

namespace {

// Two compartments with first-order absorption (linear, constant coefficients) and two outputs: an amount over
// a volume (affine) and its square root (not affine, so it stays stored).
taylor::Tape tape() {
    taylor::SystemSpec spec;
    spec.states = {"gut", "central", "periph"};
    spec.params = {"ka", "k10", "k12", "k21", "v"};
    spec.rhs = {expr::parse("-ka*gut"), expr::parse("ka*gut - (k10 + k12)*central + k21*periph"),
                expr::parse("k12*central - k21*periph")};
    spec.outputs = {expr::parse("central/v"), expr::parse("sqrt(central + 1)")};
    return taylor::compile(spec);
}

const std::vector<double> kParams{1.2, 0.2, 0.9, 0.6, 20.0};

void compact(traj::Trajectory& tr, const taylor::Stepper& st, std::size_t full_bytes) {
    const auto& ex = st.expander();
    std::vector<char> affine;
    std::vector<double> w, d;
    for (int j = 0; j < ex.n_outputs(); ++j) {
        affine.push_back(ex.output_affine(j) ? 1 : 0);
        for (double x : ex.output_weights(j)) w.push_back(x);
        d.push_back(ex.output_offset(j));
    }
    std::vector<double> a(ex.linear_matrix().begin(), ex.linear_matrix().end());
    tr.set_compact(ex.n_states(), a, affine, w, d, full_bytes);
}

}  // namespace

TEST_CASE("trajectory: compact and chunked storage returns the steps' polynomials bit for bit", "[trajectory]") {
    taylor::Stepper st(tape(), kParams, 1e-10);
    const auto& ex = st.expander();
    REQUIRE(ex.linear());
    CHECK(ex.output_affine(0));
    CHECK_FALSE(ex.output_affine(1));
    const int order = st.order();
    const std::size_t stride = static_cast<std::size_t>(order) + 1;

    traj::Trajectory plain(st.n_series(), order), derived(st.n_series(), order), mixed(st.n_series(), order),
        packed(st.n_series(), order);
    compact(derived, st, std::size_t{1} << 40);  // outputs derived, states in full
    compact(mixed, st, 64 * 1024);               // full chunks for the first 64 KiB, compact after
    compact(packed, st, 0);                      // compact from the first step
    CHECK(plain.bytes_per_step() == 8 * (2 + 5 * stride));
    CHECK(packed.bytes_per_step() == 8 * (2 + 2 * 3 + stride));  // x[0], x[1] of 3 states + the sqrt output

    // 3000 steps with a dose into the gut every 200 steps: many chunks, several layouts.
    std::vector<std::vector<double>> kept;
    std::vector<double> x{0.0, 0.0, 0.0}, u, c;
    double t = 0.0;
    for (int k = 0; k < 3000; ++k) {
        if (k % 200 == 0) x[0] += 100.0;
        const auto r = st.step(t, x, u, 0.5, c);
        REQUIRE(r.outcome == taylor::Outcome::Ok);
        for (auto* tr : {&plain, &derived, &mixed, &packed}) tr->append(t, r.h, c);
        kept.push_back(c);
        for (std::size_t s = 0; s < 3; ++s) {
            double v = 0.0;
            for (std::size_t n = stride; n-- > 0;) v = v * r.h + c[s * stride + n];
            x[s] = v;
        }
        t += r.h;
    }
    for (auto* tr : {&plain, &derived, &mixed, &packed}) REQUIRE(tr->size() == 3000);
    traj::PolyBuffer buf;
    int mismatches = 0;
    for (std::size_t k = 0; k < 3000; ++k)
        for (int s = 0; s < st.n_series(); ++s)
            for (auto* tr : {&plain, &derived, &mixed, &packed}) {
                const auto p = tr->poly(k, s, buf);
                for (std::size_t n = 0; n < stride; ++n)
                    if (p[n] != kept[k][static_cast<std::size_t>(s) * stride + n]) ++mismatches;
            }
    CHECK(mismatches == 0);  // the same recurrence in the same order: identical doubles (common practice, no source)

    // Queries across chunk boundaries agree exactly.
    for (double q : {0.0, 17.3, 250.0, t * 0.5, t * 0.99}) {
        CHECK(packed.step_at(q) == plain.step_at(q));
        CHECK(packed.value(3, q) == plain.value(3, q));
        CHECK(mixed.left_limit(1, q) == plain.left_limit(1, q));
    }
    CHECK(packed.integral(3, 3.0, t - 1.0) == plain.integral(3, 3.0, t - 1.0));
    CHECK(packed.level_roots(3, 0.5, 0.0, t) == plain.level_roots(3, 0.5, 0.0, t));
    CHECK(mixed.critical_points(3, 0.0, t) == plain.critical_points(3, 0.0, t));
    CHECK_FALSE(plain.level_roots(3, 0.5, 0.0, t).empty());  // the level is crossed (a real check)
}

TEST_CASE("taylor: the linear executor matches the generic tape", "[taylor]") {
    // The same right-hand sides once as affine forms (linear executor) and once with a harmless non-linear
    // factor (·(1 + 0·t): the time makes the tape generic). Coefficients agree to rounding.
    taylor::SystemSpec lin, gen;
    lin.states = gen.states = {"a", "b"};
    lin.params = gen.params = {"k1", "k2", "v"};
    lin.rhs = {expr::parse("-k1*a + 2"), expr::parse("k1*a - k2/v*b")};
    gen.rhs = {expr::parse("(-k1*a + 2)*(1 + 0*t*a)"), expr::parse("k1*a - k2/v*b")};
    lin.outputs = {expr::parse("b/v + 1")};
    gen.outputs = {expr::parse("b/v + 1")};
    const std::vector<double> params{0.7, 3.0, 12.0};
    taylor::Expander el(taylor::compile(lin), 15), eg(taylor::compile(gen), 15);
    el.set_params(params);
    eg.set_params(params);
    REQUIRE(el.linear());
    REQUIRE_FALSE(eg.linear());
    const std::vector<double> x0{5.0, 1.0}, u{0.5, 0.0};
    std::vector<double> a(3 * 16), b(3 * 16);
    el.expand(2.0, x0, u, a);
    eg.expand(2.0, x0, u, b);
    double worst = 0.0;
    for (std::size_t i = 0; i < a.size(); ++i) worst = std::max(worst, std::abs(a[i] - b[i]) / std::max(1e-300, std::abs(b[i])));
    CHECK(worst < 1e-13);  // two evaluations of one series (computed from the closed form of the recurrences)
    CHECK(a[16] == 1.0);   // b[0]
    CHECK(a[17] == Approx(0.7 * 5.0 - 3.0 / 12.0 * 1.0).epsilon(1e-15));  // b[1] = k1·a − k2/v·b (hand-computed)
}
