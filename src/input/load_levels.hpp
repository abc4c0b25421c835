// Measured levels of one model output, from a CSV file: what an individual fit is fitted to.
//
// The file reads the columns `run --csv` writes, so a simulated CSV reads back as levels:
//   time_h,conc_mg_per_L           a time column (time_h, or time_min / time_d ...: "time_" and a time unit)
//   2,31.5                         and a column named after the output with its unit (conc_ug_per_mL, ...);
//   7.5,<0.5                       "<0.5": below the quantification limit 0.5 (in the column's unit).
// Instead of the time column, the columns `day` (1 = the day of t = 0) and `clock` (HH:MM, 24-hour) give the
// time by the regimen's start_clock. Other columns are ignored; blank lines and lines starting with '#' too.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "model/model.hpp"

namespace plateau::input {

struct Level {
    double t = 0.0;          // h since t = 0
    double value = 0.0;      // canonical unit of the output; for a level below the limit: the limit
    bool below = false;      // below the quantification limit (censored)
    std::string text;        // the cell as written
    SourcePos pos;           // the cell of the level
};

struct Levels {
    std::string path;
    int output = -1;         // the model output measured
    std::string column;      // the header of the level column ("conc_mg_per_L")
    units::Unit unit{};      // the column's unit
    std::string unit_text;   // "mg/L"
    std::vector<Level> levels;   // in time order
};

// What the levels are checked against: the regimen's first dose and its start clock.
struct LevelContext {
    double first_dose = 0.0;                // h: no level may come before it
    std::optional<double> start_clock;      // h after midnight at t = 0 (for day/clock columns)
};

// Largest number of levels in one file.
inline constexpr std::size_t kMaxLevels = 10000;

// Reads and checks a levels file for output `output` of model `m`. Throws InputError with every problem,
// located (file:line:col) with what was expected.
Levels load_levels(const std::string& path, const model::Model& m, int output, const LevelContext& ctx);

// The same, on text already in memory (as if read from `path`).
Levels parse_levels(const std::string& text, const std::string& path, const model::Model& m, int output,
                    const LevelContext& ctx);

}  // namespace plateau::input
