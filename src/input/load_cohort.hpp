// Loading cohort files (who the virtual patients are) and threshold-distribution files. Throws InputError with
// every problem located at file:line:col.
#pragma once

#include <string>

#include "population/cohort.hpp"

namespace plateau::input {

population::Cohort load_cohort(const std::string& path);

// thresholds = ["0.25 mg/L", "0.5 mg/L", ...], counts = [3, 12, ...] (or fractions), about = "...".
population::ThresholdDist load_thresholds(const std::string& path);

}  // namespace plateau::input
