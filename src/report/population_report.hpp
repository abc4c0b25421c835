// The outputs of `plateau population`: the terminal summary, JSON, one CSV row per subject and regimen, and the
// HTML section with its figures. Figures are computed in population/ and verdict/; the writers render the
// report model (report/population_model.hpp).
#pragma once

#include <cstdint>
#include <ostream>
#include <string>
#include <vector>

#include "plot/plot.hpp"
#include "population/cohort.hpp"
#include "population/reduce.hpp"
#include "population/run.hpp"
#include "regimen/regimen.hpp"

namespace plateau::report {

struct PopulationRun {
    const std::vector<regimen::Regimen>* regimens = nullptr;
    const population::Result* result = nullptr;
    std::vector<population::RegimenSummary> summaries;   // per regimen
    const population::Cohort* cohort = nullptr;
    const population::ThresholdDist* thresholds = nullptr;
    std::size_t size = 0;
    std::uint64_t seed = 0;
    double tol = 1e-10;
    std::string date;
};

void write_population_text(std::ostream& out, const PopulationRun& p, const std::string& trailer);
void write_population_json(std::ostream& out, const PopulationRun& p);
void write_population_csv(std::ostream& out, const PopulationRun& p);
std::string population_html(const PopulationRun& p);

// Median with the 25–75 % and 5–95 % ranges over time of one regimen.
plot::Figure band_figure(const PopulationRun& p, std::size_t regimen);
// Every regimen's median (with its 5–95 % range when there are at most two regimens): the --plot figure.
plot::Figure overview_figure(const PopulationRun& p);
// PTA against the threshold (log2 scale) per regimen; empty curves when no curve was asked.
plot::Figure pta_figure(const PopulationRun& p);

}  // namespace plateau::report
