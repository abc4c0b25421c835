// Turning one series of a trajectory into a drawable curve.
#pragma once

#include <string>
#include <vector>

#include "plot/plot.hpp"
#include "trajectory/trajectory.hpp"

namespace plateau::plot {

// Samples series `s` over [a, b] on n evenly spaced points plus, at each time in `jumps` (dose times) inside
// [a, b], both the left limit and the value after (so a bolus shows as a vertical jump), values divided by
// `unit_factor` (canonical → display).
// [a, b] is clipped to the trajectory; an empty trajectory (or no overlap) gives a curve without points.
// Throws std::invalid_argument for n < 2, b <= a, a series out of range or a unit factor that is not a
// positive finite number.
plot::Curve sample(const traj::Trajectory& tr, int s, double a, double b, int n, double unit_factor,
                   const std::vector<double>& jumps, std::string label);

}  // namespace plateau::plot
