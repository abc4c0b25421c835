// The report model of one measured regimen (what `plateau run` shows and writes): built once from the
// regimen, its simulation and its exposure figures; the text, JSON and HTML writers render it. The keys are the
// JSON schema in the README.
#pragma once

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "report/model.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

// Concentrations in the output's unit, AUCs in that unit times hours, times in hours, fractions 0..1.
Node run_model(const regimen::Regimen& r, const sim::Simulation& s, const metrics::Exposure& e, double tolerance);

}  // namespace plateau::report
