// The time structure of a regimen, worked out once: every administration (with missed, late and doubled doses
// applied), the distinct dose times, the dosing intervals with their partial flag, and the repeating cycle of
// the dosing pattern in force at the end. Everything that needs the regimen's time structure asks the schedule;
// nothing else rebuilds it. Times that are one instant follow regimen/time.hpp.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "regimen/regimen.hpp"
#include "sim/events.hpp"

namespace plateau::sim {

// From one distinct dose time to the next (the last one to the horizon end).
struct DosingInterval {
    double start = 0.0, end = 0.0;
    bool partial = false;   // the horizon ends before this last interval is complete
};

// The dosing pattern in force at the end of the regimen, repeated forever: its period is the shortest time
// after which every series in it (route, amount, infusion length, offset) repeats.
struct Cycle {
    double period = 0.0;            // h
    double start = 0.0;             // start of the regimen's last cycle (a dose time of the pattern)
    std::vector<Dose> doses;        // the doses of one cycle, times as offsets in [0, period), sorted
    std::vector<int> entries;       // the [[doses]] entries (0-based) that form the pattern
    std::vector<double> dose_offsets;  // distinct offsets of the cycle's doses, sorted (the first is 0)
    double last_dose = 0.0;         // the regimen's last dose of the pattern
    double next_due = 0.0;          // when the pattern's next dose would have come after it: the actual
                                    // regimen follows the steady-state pattern up to here
};

struct Schedule {
    std::vector<Dose> doses;                  // every administration as given, sorted by time
    std::vector<double> dose_times;           // distinct, sorted
    std::vector<DosingInterval> intervals;
    double end = 0.0;                         // horizon end
    bool repeats = false;                     // some entry is a series (more than one dose)
    std::optional<Cycle> cycle;               // when the final pattern has a common period
    std::string no_cycle;                     // why not, when it repeats but has none
    double first_dose() const { return dose_times.empty() ? 0.0 : dose_times.front(); }
};

// The longest cycle the steady state is computed for.
inline constexpr double kMaxCycleHours = 28.0 * 24.0;

// Every dose of every entry, deviations applied, sorted by time (stable for equal times).
std::vector<Dose> expand_doses(const regimen::Regimen& r);

Schedule make_schedule(const regimen::Regimen& r);

// Index of the dosing interval holding t (the last one whose start is at or before t), or -1.
int interval_at(const Schedule& s, double t);

}  // namespace plateau::sim
