// Writing the files a measuring command may ask for: JSON, the HTML report and the overlay plot.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include "report/compare.hpp"

namespace plateau::cli {

// `json`, `report`, `plot`: "" = not asked; `json` may be "-" (standard output, `out`). Progress lines go to
// `summary`. A run (one candidate, `single`) writes one JSON object; a comparison an object with an array.
// Throws UsageError for unwritable files and plot::PlotError when gnuplot fails.
void write_outputs(const std::vector<report::Candidate>& cs, const std::string& json, const std::string& report,
                   const std::string& plot, double tol, std::ostream& summary, std::ostream& out,
                   bool single = true, const std::string& date = {});

// Checks the asked outputs before anything runs: the plot format and gnuplot, that each file can be created,
// and that no output would overwrite an input file or another output. Throws UsageError.
void check_outputs(const std::string& json, const std::string& report, const std::string& plot,
                   const std::vector<std::string>& inputs, const std::string& csv = {});

// Writes `text` to `path` through a temporary file in the same folder, so a failure leaves no half-written file.
// `what` names the option in messages. Throws UsageError.
void write_file(const std::string& path, const std::string& text, std::string_view what);

// Today's date as YYYY-MM-DD (UTC).
std::string today();

}  // namespace plateau::cli
