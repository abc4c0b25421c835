// One series of a trajectory read once, so that the many windows of the exposure figures (horizon, days,
// dosing intervals, settling) do not each walk the steps again.
//
// `Sweep` fetches every step's polynomial once and keeps, per step, both limits at its start, its exact integral
// and its interior critical points with their values. `LevelSweep` walks the steps once per level: an O(d)
// bound per step before any root isolation, the step boundaries taken from the Sweep (evaluated once), and the
// pieces between cuts classified as level() does. A window query then reads only the few entries inside the
// window (binary search for its first one), and gives what maximum(), minimum(), Trajectory::integral() and
// level() give for that window: the same candidates, sums and classification in the same order (a test
// compares them on random trajectories).
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "metrics/level.hpp"
#include "trajectory/trajectory.hpp"

namespace plateau::metrics {

struct Sweep {
    int degree = 0;                   // polynomial degree (coefficients per step: degree + 1)
    std::vector<double> t0;           // step starts, then the end of the last step (size steps + 1)
    std::vector<double> h;            // step lengths
    std::vector<double> coef;         // coefficients, step-major
    std::vector<double> left;         // value just before each step start (the previous step at its end)
    std::vector<double> whole;        // exact integral of each whole step
    std::vector<double> end_value;    // value at each step's end
    std::vector<double> spread;       // Σ_{k≥1} |c_k|·h^k: |p(τ) − p(0)| ≤ spread on the step (roots_in's bound)
    std::vector<std::size_t> crit_from;  // per step: its critical points in crit_t / crit_v (size steps + 1)
    std::vector<double> crit_t, crit_v;

    std::size_t steps() const { return h.size(); }
    const double* poly(std::size_t k) const { return coef.data() + k * static_cast<std::size_t>(degree + 1); }
};

Sweep make_sweep(const traj::Trajectory& tr, int series);

// As Trajectory::step_at, value, left_limit and integral, from the sweep's copy.
std::size_t step_at(const Sweep& sw, double t);
double value_at(const Sweep& sw, double t);
double left_limit_at(const Sweep& sw, double t);
double integral(const Sweep& sw, double a, double b);
// As maximum() / minimum() over [a, b].
Extreme maximum(const Sweep& sw, double a, double b);
Extreme minimum(const Sweep& sw, double a, double b);

struct LevelSweep {
    double level = 0.0;
    std::vector<double> cuts;         // piece ends over the whole trajectory (step boundaries and roots)
    std::vector<signed char> above;   // per piece: 1 above the level, −1 at or below
    std::vector<Crossing> crossings;  // in time order
};

LevelSweep sweep_level(const Sweep& sw, double level);

// As level(tr, series, c, a, b).hours_above / .crossings for the window [a, b].
double hours_above(const LevelSweep& lv, double a, double b);
std::vector<Crossing> crossings_in(const LevelSweep& lv, double a, double b);
// The time of the last crossing strictly inside (a, b), if any.
std::optional<double> last_crossing(const LevelSweep& lv, double a, double b);
// The same without sweeping the whole trajectory: only as far back from b as the last crossing (what settling
// asks: a series near its steady state crosses a band's bound, if at all, long before the end).
std::optional<double> last_crossing(const Sweep& sw, double level, double a, double b);

}  // namespace plateau::metrics
