// What a dose search aims at, from the targets: each target becomes one or two goals on a steady-state figure
// that rises with the dose. A lower goal (the threshold, the window's low end, the AUC24 range's low end) sets
// the smallest dose; an upper goal (the window's high end, the AUC24 range's high end) the largest; an exact
// goal (an AUC24 "range" of one value) the one dose.
#pragma once

#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "model/model.hpp"
#include "regimen/regimen.hpp"

namespace plateau::dose {

enum class Side { Lower, Upper, Exact };

enum class Figure {
    Lowest,      // steady-state lowest value
    Peak,        // steady-state peak
    AboveShare,  // share of each steady-state interval above the threshold
    Auc24,       // steady-state AUC24
};

struct Goal {
    Side side = Side::Lower;
    Figure figure = Figure::Lowest;
    double value = 0.0;  // canonical units (a share for AboveShare)
    std::string name;    // "threshold", "window low", "window high", "AUC24 low", "AUC24 high", "AUC24 ="
    std::string label;   // "threshold 4 mg/L", "window high 40 mg/L", "AUC24 = 400 mg·h/L"
};

// The threshold counts as met only when the output is above it by more than round-off (metrics/level.cpp:
// 1e-12 relative), so a lowest-value goal aims this much above the threshold.
inline constexpr double kAboveMargin = 2e-12;

// The goals of a set of targets, in the order of the targets (threshold, window, AUC24).
std::vector<Goal> goals_of(const regimen::Targets& t, const model::Output& o);

// The goal's figure at steady state: +inf when the regimen has no steady state (the amounts keep rising), NaN
// when it does not repeat.
double figure_of(const Goal& g, const metrics::Exposure& e);

// Short name of a figure for tables ("ss lowest", "ss peak", "above", "AUC24").
std::string figure_name(Figure f);

}  // namespace plateau::dose
