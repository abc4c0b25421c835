// The one place where a figure that several reports show gets its key, its label and its unit: the comparison
// table, the population percentiles, the population CSV columns and their JSON keys all take them from here.
// To add a figure: add it to kFigures (figures.cpp), compute it in verdict/ or population/, and put it in the
// report model (compare_model.cpp, population_model.cpp); every writer then shows it.
#pragma once

#include <string>
#include <string_view>

#include "model/model.hpp"

namespace plateau::report {

// What a figure's number measures, so its unit text follows the output's unit.
enum class Measure {
    Concentration,   // the output's unit ("mg/L")
    Exposure,        // the output's unit times hours ("mg·h/L")
    Hours,           // "h"
    ShareOfCycle,    // "% of τ"
    DosePerDay,      // "mg/day"
    None,            // no unit shown
};

struct FigureInfo {
    std::string_view key;     // JSON key and CSV column
    std::string_view label;   // text and HTML
    Measure measure;
};

// The figure of `key`; throws std::logic_error for an unknown key (a writer's own mistake).
const FigureInfo& figure_info(std::string_view key);

// The unit text of a measure for an output.
std::string unit_text(Measure m, const model::Output& o);

}  // namespace plateau::report
