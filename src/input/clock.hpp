// Clock times in regimen files: `start_clock = "08:00"` (the clock time at t = 0), `at = "14:00"` or
// `at = "day 2 14:00"`, daily `times = ["08:00", "22:00"]`, and the dose references of missed, late and doubled
// doses (`missed = [6]`, `doubled = ["day 3 22:00"]`, `late = [{ dose = 9, by = "2 h" }]`). Internal to input/.
#pragma once

#include <optional>
#include <string>

#include "input/fields.hpp"
#include "regimen/regimen.hpp"

namespace plateau::input::detail {

// A clock time as written: an optional day (1-based) and the time of day in hours.
struct ClockTime {
    std::optional<long> day;
    double hour = 0.0;   // 0 <= hour < 24
};

// True when the text looks like a clock time ("14:00", "day 2 08:30"), not a quantity.
bool looks_like_clock(std::string_view text);

// Parses a clock time; reports a located error and returns nullopt when it is malformed.
std::optional<ClockTime> clock_time(Ctx& c, const Value& v, std::string_view key, bool allow_day);

// Hours from t = 0 to the clock time: "day d HH:MM" is on the d-th calendar day, day 1 being the day of t = 0
// (negative when it comes before t = 0); a time without a day is its first occurrence at or after t = 0.
double hours_from_start(const ClockTime& ct, double start_clock);

// "start_clock = \"08:00\"" hint for errors about clock times without a start.
std::string start_clock_hint();

// Reads `times` and `days` of a [[doses]] entry into spec (every = 24 h, offsets from the start clock).
// Returns false on error (reported; a malformed start_clock is reported where it is written, not here).
// `item_pos`, when given, receives the position of the clock time behind each offset (in the offsets' order).
bool daily_times(Ctx& c, const Value& entry, const std::optional<double>& start_clock, bool start_clock_written,
                 regimen::DoseSpec& spec, std::vector<SourcePos>* item_pos = nullptr);

// Reads `missed`, `late` and `doubled` of a [[doses]] entry whose doses are already known. Returns false on
// error (reported).
bool deviations(Ctx& c, const Value& entry, const std::optional<double>& start_clock, regimen::DoseSpec& spec);

}  // namespace plateau::input::detail
