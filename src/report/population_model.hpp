// The report model of a population run: who, the regimens, per regimen the patients counted, PTA per target
// with its Wilson interval, percentiles of the figures (keys, labels and units from report/figures), the PTA
// curve and the expected attainment. Built once; the text, JSON and HTML writers render it.
#pragma once

#include "report/model.hpp"
#include "report/population_report.hpp"

namespace plateau::report {

Node population_model(const PopulationRun& p);

// The output the population's figures are about.
const model::Output& population_output(const PopulationRun& p);

}  // namespace plateau::report
