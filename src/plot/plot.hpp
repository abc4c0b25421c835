// Concentration–time figures drawn by gnuplot: PNG, SVG and PDF files, and SVG text for inlining in HTML.
// The figure is pure data (already in display units); this module only draws it.
#pragma once

#include <optional>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

namespace plateau::plot {

struct Curve {                                                      // hours, display units
  std::string label;
  std::vector<double> t, y;
  bool points = false;                                              // drawn as markers (measured levels), not a line
};

struct Figure {
  std::string title, xlabel = "time (h)", ylabel;
  std::vector<Curve> curves;
  std::optional<double> threshold;                                  // horizontal dashed line, labelled
  std::string threshold_label;                                      // e.g. "target 4 mg/L"
  std::optional<std::pair<double, double>> band;                    // shaded window [low, high]
  std::vector<std::vector<double>> dose_marks;                      // per curve: dose times, small ticks at the bottom in the curve's colour
  double x_min = 0, x_max = 0;                                       // 0,0: auto from the data
  int width = 900, height = 420;                                     // pixels (pdf: scaled to inches at 96 dpi)
  std::string band_label;                                            // key entry for the band; empty: "window <low>–<high>"
};

class PlotError : public std::runtime_error { using std::runtime_error::runtime_error; };

// The gnuplot program used: $PLATEAU_GNUPLOT_PATH when set and non-empty, else the one found at configure time
// (empty when none was found).
std::string gnuplot_program();

bool gnuplot_available();                                 // the configured gnuplot exists and runs (`gnuplot --version`)

// Format from the extension: .png (pngcairo), .svg, .pdf (pdfcairo); anything else throws
// PlotError("unsupported plot format '.jpg': use .png, .svg or .pdf"). The file is written through a temporary
// file in the same directory and renamed on success, so a failed run leaves an existing file untouched.
void render_file(const Figure& f, const std::string& path);

// SVG text (no XML prolog, no DOCTYPE, no namespace attributes, no external references, no script), suitable
// for inlining in an HTML page. Element ids carry a prefix derived from the content so that several figures can
// share one page.
std::string render_svg(const Figure& f);

}  // namespace plateau::plot
