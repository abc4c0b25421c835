// Sampling a simulated trajectory to CSV. Values come from the step polynomials (exact at the sample times, not
// interpolated); at a bolus time the value is the one just after the dose.
#pragma once

#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "model/model.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

// Significant digits of every number in a CSV file.
inline constexpr int kCsvDigits = 10;

// A CSV column name: name, '_', unit with '/' -> "_per_", '*' -> '_', '^' dropped, '%' -> "pct", spaces
// dropped ("conc", "mg/L" -> "conc_mg_per_L"). No unit: the name alone.
std::string csv_column_name(std::string_view name, std::string_view unit_text);

// Number of points of the grid 0, step, 2*step, ..., end (the end always included, never twice).
// Saturates at a huge value instead of overflowing. Requires step > 0, end >= 0.
long grid_point_count(double end, double step);

// The grid itself. Throws InputError when it would have more than regimen::kMaxGridPoints points.
std::vector<double> grid_times(double end, double step);

// Writes the header "time_h,<outputs...>,<compartments...>" and one row per time. Outputs are converted to
// their declared units, compartments to theirs; every value is printed with 10 significant digits.
// Times must lie within the trajectory.
void write_csv(std::ostream& out, const sim::Simulation& s, const model::Model& m, std::span<const double> times);

}  // namespace plateau::report
