// Whether a regimen meets its targets, judged at steady state, and the one set of targets a comparison judges
// every regimen against. Computed here; report/ only shows the result.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"

namespace plateau::verdict {

struct Verdict {
    std::string kind;          // "above", "window", "auc24"
    std::string what;          // "above 4 mg/L for at least 50.0 % of each interval at steady state"
    std::optional<bool> met;   // nullopt: cannot be judged (no steady state)
};

// Threshold: above it for at least `above_for` of each steady-state interval (default: the whole interval).
// Window: the whole steady-state range (lowest value to peak) inside it. AUC24: the steady-state AUC24 inside
// the range. In that order, for the targets that are set.
std::vector<Verdict> verdicts(const regimen::Targets& t, const model::Output& o, const metrics::Exposure& e);

// "A", "B", ..., "Z", "AA", ...: how regimens are named in every comparison.
std::string letter_for(std::size_t i);

// One set of targets for a comparison: each kind (threshold with its share, window, AUC24) from the first
// regimen that sets it. Applies it to every regimen before measuring and returns a note for each regimen whose
// own file asked for something else.
std::vector<std::string> unify_targets(std::vector<regimen::Regimen>& rs);

}  // namespace plateau::verdict
