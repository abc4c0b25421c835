// Emptied compartments (sim::Options::empty_decayed): amounts far below the largest dose, below the rounding of
// the largest amount, or in a draining compartment that the explicit method can no longer follow, are set to
// zero, so they stop costing steps; the amounts that remain keep their accuracy relative to themselves.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "../support/build_model.hpp"
#include "sim/simulate.hpp"

using namespace plateau;
using test::build_model;
using test::dose;

namespace {

sim::Simulation run(const model::Model& m, const std::vector<sim::Dose>& doses, double t_end, bool empty) {
    sim::Options opt;
    opt.empty_decayed = empty;
    sim::Simulation s = sim::simulate(m, m.default_values(), doses, t_end, opt);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    return s;
}

double rel(double got, double want) { return std::abs(got - want) / std::abs(want); }

std::vector<sim::Dose> daily(double amount, int count) {
    std::vector<sim::Dose> d;
    for (int i = 0; i < count; ++i) d.push_back(dose(0, amount, 24.0 * i));
    return d;
}

}  // namespace

TEST_CASE("engine: a terminal phase keeps its own accuracy down to the dose floor, then is exactly zero",
          "[numeric][decayed]") {
    // One compartment, IV bolus 100 mg, k = ln 2 / 4 h: A(t) = 100·e^{−kt} (computed from the closed form). The
    // floor is 1e-30 × 100 mg, reached at t = ln(1e30)/k = 398.6 h.
    const double k = std::log(2.0) / 4.0;
    const model::Model m = build_model({{{"k", k}}, {{"central", "-k*central"}}, {{"amount", "central"}}, {{"iv", "central"}}});
    const auto on = run(m, {dose(0, 100.0, 0.0)}, 600.0, true);
    const auto off = run(m, {dose(0, 100.0, 0.0)}, 600.0, false);
    const int a = on.output_series(0);
    double worst = 0.0;
    for (double t = 1.0; t <= 390.0; t += 1.0) worst = std::max(worst, rel(on.trajectory.value(a, t), 100.0 * std::exp(-k * t)));
    INFO("largest relative error down to 4e-28 mg: " << worst);
    CHECK(worst < 1e-9);  // tolerance 1e-10 (common practice, no source)
    CHECK(on.trajectory.value(a, 410.0) == 0.0);  // below the floor: emptied
    CHECK(on.trajectory.value(a, 599.0) == 0.0);
    // Without emptying, the relative rule follows the amount for the whole horizon (about 1e-43 mg at 600 h).
    CHECK(rel(off.trajectory.value(a, 599.0), 100.0 * std::exp(-k * 599.0)) < 1e-9);
    INFO("steps with emptying " << on.steps << ", without " << off.steps);
    CHECK(on.steps < off.steps * 3 / 4);  // measured: 104 against 154
}

TEST_CASE("engine: fast linear + saturable elimination with long gaps stops stepping once emptied",
          "[numeric][decayed]") {
    // CL 50 L/h, V 5 L (k = 10 /h) plus a saturable pathway, 500 mg daily for 51 days: each dose is gone within
    // ~7 h, and the rest of the day used to be followed down to 1e-100 mg and below, ~1.4 steps per e-fold.
    const model::Model m = build_model({{{"cl", 50.0}, {"v", 5.0}, {"vmax", 15.0}, {"km", 4.0}},
                                        {{"central", "-cl/v*central - vmax*(central/v)/(km + central/v)"}},
                                        {{"conc", "central/v"}},
                                        {{"iv", "central"}}});
    const auto doses = daily(500.0, 51);
    const auto on = run(m, doses, 51 * 24.0, true);
    const auto off = run(m, doses, 51 * 24.0, false);
    INFO("steps with emptying " << on.steps << ", without " << off.steps);
    CHECK(on.steps * 3 < off.steps);  // measured: 5 304 against 19 533
    const int c = on.output_series(0);
    double worst = 0.0;
    for (int day = 0; day < 51; ++day)
        for (double dt : {0.0, 0.1, 0.5, 1.0, 2.0, 3.0}) {
            const double t = 24.0 * day + dt;
            worst = std::max(worst, rel(on.trajectory.value(c, t), off.trajectory.value(c, t)));
        }
    INFO("largest relative difference in the first 3 h after each dose: " << worst);
    CHECK(worst < 1e-9);  // both runs at tolerance 1e-10 (common practice, no source)
    CHECK(on.trajectory.value(c, 24.0 * 50 + 20.0) == 0.0);  // 20 h after a dose: below 1e-30 × 500 mg
    // Exposure is unchanged: what is cut off is less than 1e-27 mg per day.
    CHECK(rel(on.trajectory.integral(c, 0.0, 51 * 24.0), off.trajectory.integral(c, 0.0, 51 * 24.0)) < 1e-12);
}

TEST_CASE("engine: an emptied fast absorption compartment is set to zero instead of held at the stability limit",
          "[numeric][decayed]") {
    // Two compartments with oral absorption, ka = 3000 /h, q = 0.05 L/h, V2 = 500 L (a stiff case: once the gut
    // is empty only stability keeps ka·h below ~6.5, and a year of daily doses used to exhaust the step budget).
    const model::Model m = build_model({{{"ka", 3000.0}, {"cl", 5.0}, {"v1", 15.0}, {"q", 0.05}, {"v2", 500.0}},
                                        {{"gut", "-ka*gut"},
                                         {"central", "ka*gut - cl/v1*central - q/v1*central + q/v2*peripheral"},
                                         {"peripheral", "q/v1*central - q/v2*peripheral"}},
                                        {{"conc", "central/v1"}},
                                        {{"oral", "gut"}}});
    const auto on = run(m, daily(500.0, 3), 72.0, true);
    const auto off = run(m, daily(500.0, 3), 72.0, false);
    INFO("steps over 3 days with emptying " << on.steps << ", without " << off.steps);
    // Measured: 90 steps either way. Without emptying, the gut's series overshooting below zero now ends the
    // step where it reaches zero (amounts cannot go negative), which empties it too; before either rule, the
    // emptied gut was followed at the stability limit for 34 878 steps.
    CHECK(on.steps < 1000);
    CHECK(off.steps < 1000);
    const int c = on.output_series(0);
    double worst = 0.0;
    for (double t = 0.01; t < 72.0; t += 0.37) worst = std::max(worst, rel(on.trajectory.value(c, t), off.trajectory.value(c, t)));
    INFO("largest relative difference of the concentration: " << worst);
    CHECK(worst < 1e-9);  // both runs at tolerance 1e-10 (common practice, no source)

    const auto year = run(m, daily(500.0, 365), 365 * 24.0, true);
    INFO("steps over a year: " << year.steps);
    CHECK(year.steps < 20000);  // measured: 10 107; without emptying the 2 000 000-step budget ran out at day 172
    CHECK(year.trajectory.value(0, 365 * 24.0 - 1.0) == 0.0);  // the gut, 23 h after the last dose
}

TEST_CASE("engine: a stiff model at the step budget names its fast compartment", "[numeric][decayed]") {
    // Fast exchange between central and tissue (k12 = k21 = 5000 /h) that never empties: the explicit method
    // must keep h·5000 near its stability limit for the whole horizon.
    const model::Model m = build_model({{{"k10", 0.1}, {"k12", 5000.0}, {"k21", 5000.0}},
                                        {{"central", "-(k10 + k12)*central + k21*tissue"},
                                         {"tissue", "k12*central - k21*tissue"}},
                                        {{"conc", "central/10"}},
                                        {{"iv", "central"}}});
    sim::Options opt;
    opt.max_steps = 20000;
    const sim::Simulation s = sim::simulate(m, m.default_values(), {dose(0, 100.0, 0.0)}, 1000.0, opt);
    CHECK(s.outcome == taylor::Outcome::StepLimit);
    CHECK(s.stiff_state == "central");  // the largest loss rate, k10 + k12 (computed by hand)
    CHECK(s.stiff_rate == Approx(5000.1).epsilon(1e-12));
    CHECK(s.stiff_step * s.stiff_rate > 2.0);  // beyond what accuracy alone would allow
    // Fail fast: the recent steps show the 1000 h would need ~1.7 million steps, so the run stops early.
    CHECK(s.projected);
    CHECK(s.steps < opt.max_steps);

    // The same model with slow exchange runs to the end with steps set by accuracy.
    const model::Model slow = build_model({{{"k10", 0.1}, {"k12", 0.5}, {"k21", 0.5}},
                                           {{"central", "-(k10 + k12)*central + k21*tissue"},
                                            {"tissue", "k12*central - k21*tissue"}},
                                           {{"conc", "central/10"}},
                                           {{"iv", "central"}}});
    const sim::Simulation ok = sim::simulate(slow, slow.default_values(), {dose(0, 100.0, 0.0)}, 1000.0, opt);
    CHECK(ok.outcome == taylor::Outcome::Ok);
    CHECK(ok.stiff_state.empty());
}
