// Writing the files a measuring command may ask for: JSON, the HTML report, the overlay plot and the CSV.
//
// Safety rules, all here: no output ever replaces an input file (compared by device and inode, through any
// spelling or link); an existing target must be a regular file ('-' is how to write to standard output); every
// file is first written to a fresh temporary file created exclusively in the target's folder, checked, and only
// when all of one command's files are ready are they renamed into place; on any failure the temporary files are
// removed and no target is touched.
#pragma once

#include <functional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "report/compare.hpp"

namespace plateau::cli {

// A file written along with the others (the run command's CSV): its text and the line that reports it.
struct ExtraFile {
    std::string path;
    std::string text;
    std::string what;  // the option, for messages: "--csv"
    std::string line;  // printed once written, e.g. "CSV       97 rows written to a.csv"
};

// `json`, `report`, `plot`: "" = not asked; `json` may be "-" (standard output, `out`). The "... written to"
// lines go to `summary`. A run (one candidate, `single`) writes one JSON object; a comparison an object with an
// array. All files or none: throws UsageError (unwritable, full disk) or plot::PlotError (gnuplot failed, or
// what it wrote is not a whole PNG, SVG or PDF) with nothing left behind.
void write_outputs(const std::vector<report::Candidate>& cs, const std::string& json, const std::string& report,
                   const std::string& plot, double tol, std::ostream& summary, std::ostream& out,
                   bool single = true, const std::string& date = {}, const std::vector<ExtraFile>& extra = {});

// Checks the asked outputs before anything runs: the plot format and gnuplot, the report's extension (.html or
// .htm), that each target's folder exists, that an existing target is a regular file, and that no output is one
// of `inputs` (call again once the model files are known) or another output. Throws UsageError.
void check_outputs(const std::string& json, const std::string& report, const std::string& plot,
                   const std::vector<std::string>& inputs, const std::string& csv = {});

// A figure written along with text files: `draw` renders it into the temporary path it is given.
struct FigureFile {
    std::string path;
    std::function<void(const std::string&)> draw;
    std::string line;  // printed once written
};

// Any command's files by the same rules, all or none: the texts, then the figure (when `figure.path` is set),
// checked, then renamed together; the lines go to `summary`. Throws UsageError or plot::PlotError.
void write_all(const std::vector<ExtraFile>& texts, const FigureFile& figure, std::ostream& summary);

// Writes one file by the same rules (temporary file, check, rename). `what` names the option in messages.
// Throws UsageError.
void write_file(const std::string& path, const std::string& text, std::string_view what);

// Today's date as YYYY-MM-DD (UTC).
std::string today();

}  // namespace plateau::cli
