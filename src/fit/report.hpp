// What `plateau fit` shows, in text, JSON and HTML (with its figure). No computation here beyond unit
// conversion: the numbers come from fit() and band().
#pragma once

#include <optional>
#include <ostream>
#include <string>

#include "fit/fit.hpp"
#include "input/load_levels.hpp"
#include "plot/plot.hpp"
#include "regimen/regimen.hpp"

namespace plateau::fit {

struct Report {
    const regimen::Regimen* regimen = nullptr;
    const input::Levels* levels = nullptr;
    const Problem* problem = nullptr;
    const Result* result = nullptr;
    const Band* band = nullptr;          // may be null (no figure asked for)
    double tol = 1e-10;
    std::string date;
    std::string trailer;                 // "written to" lines, printed before the closing caution
};

void write_text(std::ostream& out, const Report& r);
void write_json(std::ostream& out, const Report& r);
std::string html(const Report& r);
plot::Figure figure(const Report& r);   // needs r.band

// A parameter's value in its display unit ("6.21 L/h").
std::string parameter_text(const model::Parameter& p, double canonical);

}  // namespace plateau::fit
