// The pipeline every command that measures a regimen shares: load, apply the command line's targets,
// simulate, compute the exposure figures.
#pragma once

#include <ostream>
#include <string>
#include <utility>
#include <vector>

#include "report/compare.hpp"
#include "sim/simulate.hpp"

namespace plateau::cli {

// Targets given on the command line (texts as typed; empty = not given). They override the files' targets.
struct TargetOverrides {
    std::string above;      // "4mg/L"
    std::string window;     // "10mg/L..20mg/L"
    std::string above_for;  // "50%"
    std::string auc24;      // "400..600" (in the output's unit times hours) or with units "400mg*h/L..600mg*h/L"
    std::string output;     // the model output the figures are about
    bool any() const {
        return !above.empty() || !window.empty() || !above_for.empty() || !auc24.empty() || !output.empty();
    }
};

// "0h..24h", "0..24" (hours), "1d..2d": one AUC window. Throws UsageError naming `what`.
std::pair<double, double> parse_time_window(std::string_view text, std::string_view what);

// Applies the overrides to the regimen's targets, checking units against its output. Throws UsageError.
void apply_targets(regimen::Regimen& r, const TargetOverrides& t);

// Loads a regimen (models searched in the built-in directory, then `model_dirs`) and applies the overrides.
regimen::Regimen load(const std::string& path, const std::vector<std::string>& model_dirs,
                      const TargetOverrides& targets);

// "file:line:col: warning: ..." for each of the regimen's warnings.
void print_warnings(const regimen::Regimen& r, std::ostream& err);

// Simulates and measures one regimen. A numerical failure throws NumericalError with the time and the reason.
report::Candidate evaluate(regimen::Regimen r, const sim::Options& opt,
                           const std::vector<std::pair<double, double>>& auc_windows);

}  // namespace plateau::cli
