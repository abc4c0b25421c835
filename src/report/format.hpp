// Number and unit formatting shared by the text, JSON and HTML reports. No computation of figures here.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "model/model.hpp"

namespace plateau::report {

// The AUC unit of an output unit: "mg/L" -> "mg·h/L", "ng/mL" -> "ng·h/mL", "mg" -> "mg·h".
std::string auc_unit(std::string_view unit_text);

// Significant digits of times in hours in every table (interval bounds, peak times).
inline constexpr int kTimeDigits = 6;

// At most `sig` significant digits, trailing zeros dropped, no exponent for ordinary magnitudes ("12.35",
// "0.001235", "10", "1.235e+07").
std::string num(double v, int sig = 4);

// Hours with a fixed number of decimals ("31.83 h"); "—" when absent.
std::string hours(std::optional<double> h, int decimals = 2);

// A time in hours from t = 0 as day and clock time, with `start_clock` the hour of the day at t = 0:
// "day 2 14:05" (calendar days: day 1 is the day of t = 0, and days change at midnight; minutes rounded).
std::string day_clock(double t, double start_clock);

// The shortest form with `digits` significant digits, as C's %g ("0.1", "1e-10", "12345.7"): what the JSON,
// the CSV files and the command summaries print (JSON with 12 digits, CSV with 10).
std::string general(double v, int digits);

// An integration tolerance as every header shows it: "1e-10", "2.5e-08".
std::string tolerance_text(double tol);

// Percentage with one decimal ("63.4 %").
std::string percent(double fraction);

// A canonical value of an output converted to its declared unit.
double in_output_unit(const model::Output& o, double canonical);

// Pads or truncates to a display width (counting UTF-8 code points, so "µ" and "·" take one column).
std::string pad_right(std::string_view s, std::size_t width);
std::string pad_left(std::string_view s, std::size_t width);
std::size_t display_width(std::string_view s);

}  // namespace plateau::report
