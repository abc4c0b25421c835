// The one rule for when two times of a regimen are the same instant. Dose times, infusion ends, lag-shifted
// inputs, interval bounds and horizon ends are compared with it everywhere (input checks, the schedule, the
// integration loop, the figures and the writers), so that an event is never one instant for one module and two
// for another.
#pragma once

#include <algorithm>
#include <cmath>

namespace plateau::regimen {

// Times closer than this are one instant: 1e-9 h relative, and 1e-9 h (3.6 µs) near 0. Far below anything a
// dose record resolves, far above the round-off of sums like 0.1 h + 0.7 h.
inline constexpr double kInstantRelative = 1e-9;

inline double instant_tolerance(double t) { return kInstantRelative * std::max(1.0, std::abs(t)); }

inline bool same_instant(double a, double b) {
    return std::abs(a - b) <= instant_tolerance(std::max(std::abs(a), std::abs(b)));
}

// a is before b by more than the resolution.
inline bool before(double a, double b) { return b - a > instant_tolerance(std::max(std::abs(a), std::abs(b))); }

}  // namespace plateau::regimen
