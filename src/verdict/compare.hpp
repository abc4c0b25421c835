// The figures that decide between regimens, computed once per measured regimen: what the comparison table,
// the targets-met table and the plain-words summary show. report/ renders them and computes nothing.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::verdict {

// One simulated and measured regimen.
struct Candidate {
    regimen::Regimen regimen;
    sim::Schedule schedule;       // the regimen's time structure (doses, intervals, cycle)
    sim::Simulation sim;
    metrics::Exposure exposure;
    std::string letter;   // "A", "B", ...
};

// The output a candidate's figures are about.
const model::Output& output_of(const Candidate& c);

// The shares of the steady-state cycle above the threshold, inside the window and above it (0..1); nullopt
// without a steady state or without that target.
struct CycleShares {
    std::optional<double> above, window, above_window;
};
CycleShares cycle_shares(const metrics::Exposure& e);

// The figures compared, canonical units; nullopt where a figure does not apply.
struct Figures {
    double dose_per_day = 0.0;             // mg/day: the repeating pattern's rate, or total over the horizon
    double total_dose = 0.0;               // mg
    long doses = 0;
    double first_peak = 0.0;               // peak of the first dosing interval
    double first_peak_time = 0.0;
    std::optional<double> ss_peak, ss_trough, ss_average;
    std::optional<double> ss_lowest;               // the lowest value of the steady-state cycle
    bool dips_below_trough = false;                // ... below the trough, after a dose (an absorption lag)
    double auc24_day1 = 0.0;
    std::optional<double> auc24_ss;
    std::optional<double> above_day1_hours;        // threshold set
    std::optional<double> above_worst_day_hours;   // threshold set: the full 24-h day with the least time above
    int above_worst_day = 0;                       // ... its number (1-based)
    std::optional<double> above_ss_fraction;       // threshold set and steady state found
    std::optional<double> window_ss_fraction;      // window set and steady state found
    std::optional<double> above_window_ss_fraction;
    std::optional<double> first_reached;           // threshold set and reached
    std::optional<double> within_10pct;
    std::string no_steady_state;                   // reason, when the regimen repeats but has none
    bool repeats = false;
};

Figures figures_of(const Candidate& c);

// What a target asks and whether each regimen meets it.
struct TargetCheck {
    std::string kind;                     // "above", "window", "auc24"
    std::string what;                     // "at least 50 % of each interval above 4 mg/L at steady state"
    std::vector<std::optional<bool>> met; // per candidate; nullopt = cannot be assessed (no steady state)
};

// Every candidate judged against the first one's targets (see unify_targets).
std::vector<TargetCheck> target_checks(const std::vector<Candidate>& cs);

// Plain-words differences against the first regimen ("B reaches the threshold 3.1 h sooner than A").
std::vector<std::string> summary_sentences(const std::vector<Candidate>& cs);

}  // namespace plateau::verdict
