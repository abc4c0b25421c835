// The report model of a comparison: the side-by-side table (one column per regimen), built once from the
// figures verdict/ computes; the text and HTML writers render it.
#pragma once

#include <vector>

#include "report/model.hpp"
#include "verdict/compare.hpp"

namespace plateau::report {

// The rows that apply to these regimens (a row of steady-state figures only when some regimen repeats, of the
// threshold only when one is set, ...), each with its key, label and unit from report/figures.
Table comparison_table(const std::vector<verdict::Candidate>& cs);

// What `compare --json` writes: {"regimens": [one run model per regimen], "caution"}.
Node compare_model(const std::vector<verdict::Candidate>& cs, double tolerance);

}  // namespace plateau::report
