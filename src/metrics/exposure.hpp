// Every exposure figure of one output over the horizon, from the step polynomials: overall extremes, AUC over
// the horizon, over asked windows and per 24-h day, time above a threshold and inside a window, crossings,
// per-dosing-interval figures and the periodic steady state.
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "metrics/level.hpp"
#include "regimen/regimen.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"
#include "sim/steady_state.hpp"

namespace plateau::metrics {

struct Request {
    int output = 0;                                       // model output index
    std::optional<double> above;                          // threshold, canonical output unit
    std::optional<std::pair<double, double>> window;      // [low, high], canonical output unit
    std::vector<std::pair<double, double>> auc_windows;   // extra AUC windows, h
    sim::Options options;                                 // integration options of the run
};

struct AucWindow {
    double from = 0.0, to = 0.0, value = 0.0;
};

struct Day {
    double start = 0.0, end = 0.0, auc = 0.0;
    double above_hours = 0.0;   // time above the threshold that day (0 without a threshold)
    bool partial = false;       // shorter than 24 h (the horizon ends inside it)
};

struct Interval {
    double start = 0.0, end = 0.0;
    Extreme peak;               // right limit at a bolus
    double trough = 0.0;        // left limit at the end (the value just before the next dose)
    Extreme minimum;
    double auc = 0.0;
    double above_hours = 0.0;
    double window_hours = 0.0;
    bool partial = false;       // the horizon ends before this last interval is complete (its "trough" is then
                                // the value at the horizon end)
};

// The value just before one dose of the steady-state cycle.
struct CycleTrough {
    double offset = 0.0;   // h after the cycle start
    double value = 0.0;
};

struct Steady {
    bool found = false;
    std::string why_not;
    double interval = 0.0;        // the cycle's period, h (one dosing interval for a single series)
    double period_start = 0.0;    // time of the regimen's last cycle start
    std::vector<sim::Dose> cycle_doses;   // the doses of one cycle, times as offsets from its start
    Extreme peak;                 // time after the cycle start
    bool constant = false;        // the steady-state level does not vary (continuous input)
    double trough = 0.0;          // the lowest of the values just before each dose of the cycle
    double trough_time = 0.0;     // its offset in the cycle
    std::vector<CycleTrough> troughs;  // the value just before each dose of the cycle (one per distinct time)
    Extreme minimum;
    double auc = 0.0;             // over one cycle
    double average = 0.0;         // auc / interval
    double auc24 = 0.0;           // average × 24 h
    double above_hours = 0.0;     // per cycle
    double window_hours = 0.0;    // per cycle
    double above_window_hours = 0.0;
    double first_interval_auc = 0.0;  // the doses of one cycle alone, from empty compartments, over one cycle
    double accumulation = 0.0;        // auc / first_interval_auc
    std::optional<double> within_10pct;  // time from which the output stays within 10 % of the steady-state
                                         // range [lowest, peak] (−10 % below the lowest, +10 % above the peak)
    std::optional<double> within_5pct;
    int newton_iterations = 0;
    traj::Trajectory period;          // one steady-state cycle, t = 0 .. interval (for plots)

    // The lowest value comes after a dose rather than just before one (an absorption lag, a slow input), by
    // more than round-off: writers then show it beside the trough.
    bool dips_below_trough() const { return minimum.value < trough * (1 - 1e-9); }
};

struct Exposure {
    int output = 0;
    double start = 0.0, end = 0.0;     // horizon
    double first_dose = 0.0;
    Extreme peak;
    Extreme minimum;                   // from the first peak to the end of the horizon, that peak included
    double auc = 0.0;                  // over the horizon
    std::vector<AucWindow> auc_windows;
    std::vector<Day> days;
    std::optional<double> above;       // threshold (canonical)
    double above_hours = 0.0, above_fraction = 0.0;
    std::vector<Crossing> crossings;
    std::optional<double> first_reached;  // first time above the threshold
    std::optional<std::pair<double, double>> window;
    double window_hours = 0.0, window_fraction = 0.0;
    double above_window_hours = 0.0, above_window_fraction = 0.0;
    std::vector<Interval> intervals;
    std::optional<Steady> steady;      // when the regimen repeats
};

// Computes every figure of one simulation of the regimen from its schedule and, when the regimen repeats, its
// periodic steady state (sim::steady_state). Integrates nothing. The steady solution is taken by value: its
// cycle's trajectory moves into the result (a population computes this for every subject).
Exposure compute(const sim::Schedule& schedule, const sim::Simulation& sim,
                 std::optional<sim::PeriodicSolution> steady, const Request& req);

// Convenience for one simulated regimen: builds its schedule, solves its steady state (this integrates one
// cycle several times) and computes every figure.
Exposure compute(const regimen::Regimen& r, const sim::Simulation& sim, const Request& req);

// The request a regimen's [targets] table asks for (output, above, window), with options.
Request request_from(const regimen::Regimen& r, const sim::Options& opt);

}  // namespace plateau::metrics
