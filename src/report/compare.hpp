// Side-by-side figures of several regimens of the same output: the comparison table, which targets each
// regimen meets, and a plain-words summary of the differences. Text here; HTML in html.hpp.
#pragma once

#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"

namespace plateau::report {

// One simulated and measured regimen.
struct Candidate {
    regimen::Regimen regimen;
    sim::Schedule schedule;       // the regimen's time structure (doses, intervals, cycle)
    sim::Simulation sim;
    metrics::Exposure exposure;
    std::string letter;   // "A", "B", ...
};

// The figures compared, canonical units; nullopt where a figure does not apply.
struct Figures {
    double dose_per_day = 0.0;             // mg/day: the repeating pattern's rate, or total over the horizon
    double total_dose = 0.0;               // mg
    long doses = 0;
    double first_peak = 0.0;               // peak of the first dosing interval
    double first_peak_time = 0.0;
    std::optional<double> ss_peak, ss_trough, ss_average;
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

// What a target asks and whether each regimen meets it ("meets" / "falls short" / "not assessed").
struct TargetCheck {
    std::string what;                     // "at least 50 % of each interval above 4 mg/L at steady state"
    std::vector<std::optional<bool>> met; // per candidate; nullopt = cannot be assessed (no steady state)
};

std::vector<TargetCheck> target_checks(const std::vector<Candidate>& cs);

// Plain-words differences against the first regimen ("B reaches 4 mg/L 3.1 h sooner than A").
std::vector<std::string> summary_sentences(const std::vector<Candidate>& cs);

struct CompareHeader {
    double tolerance = 1e-10;
    std::string date;                 // YYYY-MM-DD
    std::vector<std::string> notes;   // printed under the targets (e.g. targets taken from another file)
    std::string trailer;              // printed just before the closing caution (files written)
};

// "model 'x'" or "models 'x' (A, B), 'y' (C)" when the regimens use different models.
std::string models_line(const std::vector<Candidate>& cs);

// One set of targets for a comparison: each kind (threshold with its share, window, AUC24) from the first
// regimen that sets it. Applies it to every candidate's regimen before measuring and returns a note for each
// regimen whose own file asked for something else.
std::vector<std::string> unify_targets(std::vector<regimen::Regimen>& rs);

// The whole terminal report: header, caution, table, targets, summary, caution. Fits 100 columns.
void write_compare_text(std::ostream& out, const std::vector<Candidate>& cs, const CompareHeader& h);

// The table's rows as label, unit and one text cell per regimen (shared by text and HTML).
struct Row {
    std::string label;
    std::string unit;
    std::vector<std::string> cells;
};
std::vector<Row> comparison_rows(const std::vector<Candidate>& cs);

// "A", "B", ..., "Z", "AA", ...
std::string letter_for(std::size_t i);

}  // namespace plateau::report
