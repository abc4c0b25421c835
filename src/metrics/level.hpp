// Questions about one series of a trajectory over a time window, answered from the step polynomials:
// extremes (roots of the derivative, step ends and both limits at jumps), time above a level and the
// crossings of a level (roots of p(t) − c, with jumps at doses counted as crossings).
#pragma once

#include <optional>
#include <vector>

#include "trajectory/trajectory.hpp"

namespace plateau::metrics {

struct Extreme {
    double value = 0.0;
    double time = 0.0;
};

// Largest value over [a, b]: the right limit at a, the left limit at b, both limits at interior step
// boundaries, and the interior critical points. A bolus makes the output jump: the peak is the value just
// after it. Ties go to the earliest time.
Extreme maximum(const traj::Trajectory& tr, int series, double a, double b);
// Smallest value over [a, b], on the same candidates (the value just before a dose counts).
Extreme minimum(const traj::Trajectory& tr, int series, double a, double b);

struct Crossing {
    double time = 0.0;
    bool up = true;   // from at-or-below the level to above it
};

struct LevelResult {
    double hours_above = 0.0;            // measure of {t in [a, b] : x(t) > level (1 + 1e-12)}
    std::vector<Crossing> crossings;     // in time order, strictly inside (a, b) or at a jump
};

// The window is cut at every step boundary and every root of x − level; each piece is classified by the sign
// at its midpoint. A curve that only touches the level has no crossing and no time above.
LevelResult level(const traj::Trajectory& tr, int series, double level_value, double a, double b);

}  // namespace plateau::metrics
