// The printable, self-contained HTML report: caution, what was compared, the comparison table, targets,
// plain-words summary, figures (inline SVG drawn by gnuplot), per-interval tables and the inputs.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include "plot/plot.hpp"
#include "report/compare.hpp"

namespace plateau::report {

struct HtmlOptions {
    double tolerance = 1e-10;
    std::string date;          // YYYY-MM-DD
    bool figures = true;       // false: no gnuplot (figures replaced by a note)
};

// Writes the whole page. Throws plot::PlotError if figures are asked for and gnuplot fails.
void write_html(std::ostream& out, const std::vector<Candidate>& cs, const HtmlOptions& opt);

// The overlay figure of all regimens (threshold line, window band, dose marks), shared with --plot.
plot::Figure overlay_figure(const std::vector<Candidate>& cs);

}  // namespace plateau::report
