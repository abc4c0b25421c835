// How the steady-state cycle is named in every writer: "interval" when one dose repeats, "cycle" when several
// doses form the repeating pattern, and a one-line description of the cycle's doses.
#pragma once

#include <string>

#include "metrics/exposure.hpp"
#include "model/model.hpp"

namespace plateau::report {

// True when the cycle holds more than one dose time.
bool multi_dose_cycle(const metrics::Steady& st);

// "interval" or "cycle".
std::string cycle_noun(const metrics::Steady& st);

// "after the dose" or "after the cycle's first dose".
std::string after_cycle_start(const metrics::Steady& st);

// "doses every 8 h" or "a 24-h cycle of 5 doses: 100 mg iv at +0, +8, +16 h; 150 mg iv at +0, +12 h".
std::string cycle_description(const metrics::Steady& st, const model::Model& m);

}  // namespace plateau::report
