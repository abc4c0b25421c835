// Whether a regimen meets the targets its [targets] table (or the command line) sets, judged at steady state.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"

namespace plateau::report {

struct Verdict {
    std::string kind;          // "above", "window", "auc24"
    std::string what;          // "above 4 mg/L for at least 50.0 % of each interval at steady state"
    std::optional<bool> met;   // nullopt: cannot be judged (no steady state)
};

// Threshold: above it for at least `above_for` of each steady-state interval (default: the whole interval).
// Window: the whole steady-state range (lowest value to peak) inside it. AUC24: the steady-state AUC24 inside
// the range. In that order, for the targets that are set.
std::vector<Verdict> verdicts(const regimen::Targets& t, const model::Output& o, const metrics::Exposure& e);

}  // namespace plateau::report
