// The exposure figures of one regimen as aligned terminal text (fits 100 columns, no colour).
#pragma once

#include <optional>
#include <ostream>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

struct TextOptions {
    bool all_intervals = false;   // every interval, not the first and last few
    int head = 4;                 // intervals shown at the start ...
    int tail = 3;                 // ... and at the end, when not all
    int digits = 6;               // significant digits of concentrations and AUCs
    std::optional<double> clock;  // the clock hour at t = 0: times also shown as day and clock time
};

// Overall figures, the per-interval table and the steady-state block.
void write_exposure_text(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const TextOptions& opt = {});

}  // namespace plateau::report
