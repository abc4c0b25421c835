// A dosing regimen as plain data. Built by input/ from a regimen file. All values canonical (mg, L, h).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/diagnostic.hpp"
#include "model/model.hpp"

namespace plateau::regimen {

// One [[doses]] entry: a single dose (count = 1) or a series of `count` doses one `every` apart.
struct DoseSpec {
    std::string route;
    int route_index = -1;
    double amount = 0.0;      // mg, before the route's fraction
    double at = 0.0;          // h, time of the first dose
    double every = 0.0;       // h, 0 for a single dose
    long count = 1;           // number of doses (from `count`, or computed from `until`)
    double over = 0.0;        // h, infusion / zero-order input duration; 0 = bolus
    SourcePos pos;            // position of the [[doses]] table
};

struct Targets {
    std::string output;                          // empty: the model's first output
    std::optional<double> above;                 // canonical output unit
    std::optional<std::pair<double, double>> window;
    std::optional<double> above_for;                   // fraction of each interval above `above` at steady
                                                       // state that meets the target (absent: the whole interval)
    std::optional<std::pair<double, double>> auc24;    // steady-state AUC over 24 h that meets the target
    SourcePos pos;
};

struct Horizon {
    double until = 0.0;       // h
    double step = 0.25;       // h, sampling grid for CSV and plots only
    SourcePos pos;
};

struct Override {
    std::string name;
    int index = -1;           // parameter index in the model
    double value = 0.0;
    SourcePos pos;
};

struct Regimen {
    std::string id;
    std::string about;
    std::string path;             // file it came from
    std::string model_ref;        // as written
    model::Model model;           // resolved and loaded
    std::vector<Override> overrides;
    std::vector<DoseSpec> doses;
    Targets targets;
    Horizon horizon;

    // Model defaults with the overrides applied.
    std::vector<double> parameter_values() const;
};

// Limits enforced by input/ (documented in the README).
inline constexpr double kMaxHorizonHours = 10.0 * 365.25 * 24.0;  // 10 years
inline constexpr long kMaxDoses = 100000;
inline constexpr long kMaxGridPoints = 2000000;

}  // namespace plateau::regimen
