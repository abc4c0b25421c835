#include "input/clock.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <limits>

#include "regimen/time.hpp"

namespace plateau::input::detail {

namespace {

const char* kClockExpected = "a clock time like \"14:00\" (24-hour, HH:MM), or \"day 2 14:00\"";

// Digits at s[i...]; advances i. nullopt when there are none.
std::optional<long> digits(std::string_view s, std::size_t& i, std::size_t max_len) {
    std::size_t start = i;
    long v = 0;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i])) && i - start < max_len) v = v * 10 + (s[i++] - '0');
    if (i == start) return std::nullopt;
    return v;
}

std::string trim_copy(std::string_view s) {
    while (!s.empty() && s.front() == ' ') s.remove_prefix(1);
    while (!s.empty() && s.back() == ' ') s.remove_suffix(1);
    return std::string(s);
}

}  // namespace

bool looks_like_clock(std::string_view text) {
    const std::string t = trim_copy(text);
    if (t.rfind("day", 0) == 0) return true;
    const auto colon = t.find(':');
    return colon != std::string::npos && colon > 0 && std::isdigit(static_cast<unsigned char>(t[colon - 1]));
}

std::optional<ClockTime> clock_time(Ctx& c, const Value& v, std::string_view key, bool allow_day) {
    const std::string expected = allow_day ? kClockExpected : "a clock time like \"08:00\" (24-hour, HH:MM)";
    if (v.kind != Kind::String) {
        wrong_kind(c, v, key, "a string", expected);
        return std::nullopt;
    }
    const std::string t = trim_copy(v.str);
    ClockTime ct;
    std::size_t i = 0;
    auto bad = [&](const std::string& why) {
        c.value_error(v, "'" + std::string(key) + "': " + why + " in '" + v.str + "'", expected);
        return std::nullopt;
    };
    if (t.rfind("day", 0) == 0) {
        if (!allow_day) return bad("a day is not allowed here");
        i = 3;
        while (i < t.size() && t[i] == ' ') ++i;
        const auto d = digits(t, i, 6);
        if (!d || *d < 1) return bad("expected a day number from 1 after 'day'");
        ct.day = *d;
        while (i < t.size() && t[i] == ' ') ++i;
        if (i == t.size()) return bad("a day needs a clock time, like \"day " + std::to_string(*d) + " 08:00\"");
    }
    const auto hh = digits(t, i, 2);
    if (!hh || i >= t.size() || t[i] != ':') return bad("expected HH:MM");
    ++i;
    const std::size_t mstart = i;
    const auto mm = digits(t, i, 2);
    if (!mm || i - mstart != 2) return bad("expected two digits of minutes");
    long ss = 0;
    if (i < t.size() && t[i] == ':') {
        ++i;
        const std::size_t sstart = i;
        const auto s = digits(t, i, 2);
        if (!s || i - sstart != 2) return bad("expected two digits of seconds");
        ss = *s;
    }
    if (i != t.size()) return bad("unexpected text after the time");
    if (*hh > 23 || *mm > 59 || ss > 59) return bad("not a time of day (00:00 to 23:59)");
    ct.hour = static_cast<double>(*hh) + static_cast<double>(*mm) / 60.0 + static_cast<double>(ss) / 3600.0;
    return ct;
}

double hours_from_start(const ClockTime& ct, double start_clock) {
    // "day d HH:MM" is on the d-th calendar day, day 1 being the one t = 0 falls on (it may come before t = 0;
    // callers refuse that). A time without a day is its first occurrence at or after t = 0.
    if (ct.day) return static_cast<double>(*ct.day - 1) * 24.0 + ct.hour - start_clock;
    double off = std::fmod(ct.hour - start_clock, 24.0);
    if (off < 0.0) off += 24.0;
    return off;
}

std::string start_clock_hint() {
    return "start_clock = \"08:00\" at the top of the file (the clock time at t = 0), or a time since the start "
           "like \"6 h\"";
}

bool daily_times(Ctx& c, const Value& entry, const std::optional<double>& start_clock, bool start_clock_written,
                 regimen::DoseSpec& spec, std::vector<SourcePos>* item_pos) {
    const Entry* times = entry.find("times");
    if (times == nullptr) return true;
    const Value& v = times->value;
    const std::string expected = "times = [\"08:00\", \"20:00\"] with days = <number of days>";
    bool ok = true;
    if (!start_clock && !start_clock_written) {
        c.value_error(v, "clock 'times' need the clock time at t = 0",
                      "start_clock = \"08:00\" at the top of the file (the clock time at t = 0)");
        ok = false;
    } else if (!start_clock) {
        ok = false;  // start_clock is there but malformed: reported where it is written
    }
    for (const char* other : {"at", "every", "count", "until"})
        if (const Entry* e = entry.find(other)) {
            c.error(e->key_pos, std::string("'") + other + "' cannot be given with 'times'",
                    "times = [...] with days = <number of days> (the times repeat every day from day 1)",
                    static_cast<int>(e->key.size()));
            ok = false;
        }
    if (v.kind != Kind::Array || v.items.empty()) {
        if (v.kind != Kind::Array) wrong_kind(c, v, "times", "an array of clock times", expected);
        else c.error(v.pos, "'times' is empty", expected);
        return false;
    }
    std::vector<std::pair<double, SourcePos>> offsets;  // with the position of the clock time that gives it
    for (const Value& item : v.items) {
        auto ct = clock_time(c, item, "times", false);
        if (!ct) {
            ok = false;
            continue;
        }
        if (!start_clock) continue;
        const double off = hours_from_start(*ct, *start_clock);
        for (const auto& [o, where] : offsets)
            if (regimen::same_instant(o, off)) {
                c.value_error(item, "'times' lists " + item.str + " twice", "each clock time once");
                ok = false;
            }
        offsets.emplace_back(off, item.kind == Kind::String ? string_pos(c.doc, item, 0) : item.pos);
    }
    long days = 0;
    const Entry* d = entry.find("days");
    const std::string dexp = "days = <whole number of days from 1 to " + std::to_string(regimen::kMaxDoses) + ">";
    if (d == nullptr) {
        c.missing(entry, "days", "[[doses]] with 'times'", dexp);
        ok = false;
    } else if (d->value.kind != Kind::Integer) {
        wrong_kind(c, d->value, "days", "an integer", dexp);
        ok = false;
    } else if (d->value.integer < 1 || d->value.integer > regimen::kMaxDoses) {
        c.error(d->value.pos, "'days' is " + std::to_string(d->value.integer) + ", outside 1 to " +
                                  std::to_string(regimen::kMaxDoses), dexp);
        ok = false;
    } else {
        days = static_cast<long>(d->value.integer);
    }
    if (!ok) return false;
    std::stable_sort(offsets.begin(), offsets.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
    spec.at = 0.0;
    spec.every = 24.0;
    spec.count = days;
    spec.offsets.clear();
    if (item_pos != nullptr) item_pos->clear();
    for (const auto& [o, where] : offsets) {
        spec.offsets.push_back(o);
        if (item_pos != nullptr) item_pos->push_back(where);
    }
    return true;
}

namespace {

// The dose of `spec` a reference names: a dose number, or "day D HH:MM" for a clock-time schedule.
std::optional<long> dose_ref(Ctx& c, const Value& v, std::string_view key, const std::optional<double>& start_clock,
                             const regimen::DoseSpec& spec) {
    const std::string expected = "a dose number from 1 to " + std::to_string(spec.doses()) + ", or its time" +
                                 (start_clock ? " like \"day 3 22:00\" or \"16 h\"" : " like \"16 h\"");
    if (v.kind == Kind::Integer) {
        if (v.integer < 1 || v.integer > spec.doses()) {
            c.error(v.pos, "'" + std::string(key) + "': this [[doses]] entry has no dose " + std::to_string(v.integer),
                    expected);
            return std::nullopt;
        }
        return static_cast<long>(v.integer);
    }
    if (v.kind == Kind::String && looks_like_clock(v.str)) {
        if (!start_clock) {
            c.value_error(v, "'" + std::string(key) + "': a clock time needs the clock time at t = 0",
                          "start_clock = \"08:00\" at the top of the file, or the dose's number or its time since "
                          "the start, like \"16 h\"");
            return std::nullopt;
        }
        auto ct = clock_time(c, v, key, true);
        if (!ct) return std::nullopt;
        const double t = hours_from_start(*ct, *start_clock);
        // Dose times are increasing: find n by the repetition and the offset.
        for (long n = 1; n <= spec.doses(); ++n) {
            const double tn = spec.dose_time(n);
            if (regimen::same_instant(tn, t)) return n;
            if (tn > t) break;
        }
        c.value_error(v, "'" + std::string(key) + "': this [[doses]] entry has no dose at " + v.str, expected);
        return std::nullopt;
    }
    if (v.kind == Kind::String) {
        // A time since the start, like "16 h".
        auto q = quantity(c, v, key, units::kTime, "16 h");
        if (!q) return std::nullopt;
        for (long n = 1; n <= spec.doses(); ++n)
            if (regimen::same_instant(spec.dose_time(n), q->value)) return n;
        c.value_error(v, "'" + std::string(key) + "': this [[doses]] entry has no dose at " + v.str, expected);
        return std::nullopt;
    }
    wrong_kind(c, v, key, "a dose number or a dose time", expected);
    return std::nullopt;
}

}  // namespace

bool deviations(Ctx& c, const Value& entry, const std::optional<double>& start_clock, regimen::DoseSpec& spec) {
    bool ok = true;
    using Kind_ = regimen::Deviation::Kind;
    auto add = [&](Kind_ kind, long n, double delay, const Value& at) {
        for (const auto& d : spec.deviations)
            if (d.number == n) {
                c.value_error(at, "dose " + std::to_string(n) + " of this [[doses]] entry is changed twice",
                              "each dose at most once in missed, late and doubled");
                ok = false;
                return;
            }
        regimen::Deviation d;
        d.kind = kind;
        d.number = n;
        d.delay = delay;
        d.pos = at.pos;
        spec.deviations.push_back(d);
    };
    for (auto [key, kind] : {std::pair{"missed", Kind_::Missed}, std::pair{"doubled", Kind_::Doubled}}) {
        const Entry* e = entry.find(key);
        if (e == nullptr) continue;
        if (e->value.kind != Kind::Array) {
            wrong_kind(c, e->value, key, "an array", std::string(key) + " = [6] (dose numbers) or [\"day 3 22:00\"]");
            ok = false;
            continue;
        }
        for (const Value& item : e->value.items) {
            if (auto n = dose_ref(c, item, key, start_clock, spec)) add(kind, *n, 0.0, item);
            else ok = false;
        }
    }
    if (const Entry* e = entry.find("late")) {
        const std::string expected = "late = [{ dose = 9, by = \"2 h\" }]";
        if (e->value.kind != Kind::Array) {
            wrong_kind(c, e->value, "late", "an array of tables", expected);
            return false;
        }
        for (const Value& item : e->value.items) {
            if (item.kind != Kind::Table) {
                wrong_kind(c, item, "late", "a table { dose = ..., by = \"...\" }", expected);
                ok = false;
                continue;
            }
            check_keys(c, item, {"dose", "by"}, "a 'late' entry");
            const Entry* dose = item.find("dose");
            const Entry* by = item.find("by");
            if (dose == nullptr || by == nullptr) {
                c.missing(item, dose == nullptr ? "dose" : "by", "a 'late' entry", expected);
                ok = false;
                continue;
            }
            auto n = dose_ref(c, dose->value, "dose", start_clock, spec);
            auto q = quantity(c, by->value, "by", units::kTime, "2 h");
            if (!n || !q) {
                ok = false;
                continue;
            }
            // A dose taken after the next one is due is not late: it is another schedule.
            const double gap = spec.doses() > 1 ? (*n < spec.doses() ? spec.dose_time(*n + 1) - spec.dose_time(*n)
                                                                     : spec.dose_time(*n) - spec.dose_time(*n - 1))
                                                : std::numeric_limits<double>::infinity();
            if (!(q->value > 0.0) || !regimen::before(q->value, gap)) {
                c.value_error(by->value, "'by' must be more than 0 and less than the time to the next dose (" +
                                             fmt(gap) + " h)", "a delay like \"2 h\"");
                ok = false;
                continue;
            }
            add(Kind_::Late, *n, q->value, dose->value);
        }
    }
    return ok;
}

}  // namespace plateau::input::detail
