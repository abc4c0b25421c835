// Every exposure figure as JSON (schema in the README). Times in hours, concentrations in the output's unit,
// AUC in that unit times hours.
#pragma once

#include <ostream>
#include <string>
#include <string_view>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

struct JsonContext {
    double tolerance = 1e-10;
};

// One JSON object for one regimen.
void write_exposure_json(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const JsonContext& ctx, int indent = 0);

// A JSON string literal (quoted, escaped) and a JSON number (%.12g; null when not finite), for other writers.
std::string json_string(std::string_view s);
std::string json_number(double v);

}  // namespace plateau::report
