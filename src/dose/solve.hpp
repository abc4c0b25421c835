// The dose at which one steady-state figure reaches a value: bracket from a start dose (proportional guess,
// exact for linear models), then TOMS 748 on the exact figures. The figure is expected to rise with the dose;
// samples that say otherwise are reported rather than trusted.
#pragma once

#include <functional>
#include <string>
#include <vector>

namespace plateau::dose {

// A figure measured at one dose. +inf when the dose is too large to have one (no steady state: the amounts keep
// rising), NaN when it cannot be measured at all.
struct Sample {
    double dose = 0.0;
    double value = 0.0;
};

enum class RootStatus {
    Found,        // low < high bracket the value, to the relative tolerance
    Unreachable,  // no dose in the searched range reaches the value (the figure levels off below it)
    NonMonotone,  // the figure fell while the dose rose: the bracket cannot be trusted
};

struct Root {
    RootStatus status = RootStatus::Found;
    double low = 0.0;             // largest dose found with figure < value (= high when a dose hits the value exactly)
    double high = 0.0;            // smallest dose found with figure >= value
    std::vector<Sample> samples;  // every evaluation, in dose order
    std::string why;              // plain words when not Found
};

// Relative tolerance of the solve on the dose: far below any rounding step a pharmacy uses, above the
// figures' own integration error.
inline constexpr double kDoseRelTol = 1e-12;
// Doses searched: from start·kRange⁻¹ to start·kRange.
inline constexpr double kRange = 1e9;

// Finds the dose where `figure` reaches `value` (> 0), starting from `start` (> 0). `figure` must be cheap to
// call again at the same dose (it is not cached here).
Root solve_rising(const std::function<double(double)>& figure, double value, double start);

}  // namespace plateau::dose
