// Every exposure figure as JSON (schema in the README). Times in hours, concentrations in the output's unit,
// AUC in that unit times hours.
#pragma once

#include <ostream>
#include <string>
#include <string_view>

#include "metrics/exposure.hpp"
#include "report/model.hpp"
#include "regimen/regimen.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

struct JsonContext {
    double tolerance = 1e-10;
};

// A report model as JSON: groups as objects, lists as arrays, keys from the model; `indent` levels of two spaces.
void write_json(std::ostream& out, const Node& document, int indent = 0);

// One JSON object for one regimen (its report model, report/run_model.hpp).
void write_exposure_json(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const JsonContext& ctx, int indent = 0);

// A JSON string literal (quoted, escaped) and a JSON number (%.12g; null when not finite), for other writers.
std::string json_string(std::string_view s);
std::string json_number(double v);

}  // namespace plateau::report
