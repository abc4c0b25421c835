#include "sim/schedule.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <numeric>
#include <stdexcept>

#include "regimen/time.hpp"

namespace plateau::sim {

using regimen::before;
using regimen::same_instant;

std::vector<Dose> expand_doses(const regimen::Regimen& r) {
    long total = 0;
    for (const auto& d : r.doses) total += d.doses();
    if (total > regimen::kMaxDoses) throw std::length_error("too many doses");
    std::vector<Dose> out;
    out.reserve(static_cast<std::size_t>(total));
    for (std::size_t e = 0; e < r.doses.size(); ++e) {
        const auto& d = r.doses[e];
        for (long n = 1; n <= d.doses(); ++n) {
            Dose dose{d.dose_time(n), d.route_index, d.amount, d.over, static_cast<int>(e)};
            bool missed = false;
            for (const auto& dev : d.deviations) {
                if (dev.number != n) continue;
                switch (dev.kind) {
                    case regimen::Deviation::Kind::Missed: missed = true; break;
                    case regimen::Deviation::Kind::Late: dose.time += dev.delay; break;
                    case regimen::Deviation::Kind::Doubled: dose.amount *= 2.0; break;
                }
            }
            if (!missed) out.push_back(dose);
        }
    }
    std::stable_sort(out.begin(), out.end(), [](const Dose& a, const Dose& b) { return a.time < b.time; });
    return out;
}

namespace {

bool is_series(const regimen::DoseSpec& d) { return d.count >= 2 && d.every > 0.0; }

// An interval as a whole number of milliseconds, when it is one (to the instant resolution).
std::optional<long long> whole_ms(double hours) {
    const double ms = std::round(hours * 3.6e6);
    if (!(ms >= 1.0) || ms > 1e15 || !same_instant(ms / 3.6e6, hours)) return std::nullopt;
    return static_cast<long long>(ms);
}

std::string hours_text(double h) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g h", h);
    return buf;
}

// The period of the pattern formed by `series`: the least common multiple of their intervals, exactly, in
// whole milliseconds; or the common interval when they all share one that is not a whole number of ms.
std::optional<double> common_period(const regimen::Regimen& r, const std::vector<int>& series, std::string& why) {
    const double tau0 = r.doses[static_cast<std::size_t>(series.front())].every;
    bool all_equal = true;
    for (int i : series) all_equal = all_equal && same_instant(r.doses[static_cast<std::size_t>(i)].every, tau0);
    if (all_equal) return tau0;
    long long lcm = 1;
    const long long max_ms = static_cast<long long>(kMaxCycleHours * 3.6e6);
    for (int i : series) {
        const double tau = r.doses[static_cast<std::size_t>(i)].every;
        const auto ms = whole_ms(tau);
        if (!ms) {
            why = "the intervals of the series running at the end (" + hours_text(tau0) + " and " + hours_text(tau) +
                  ") have no common period that is a whole number of milliseconds";
            return std::nullopt;
        }
        lcm = lcm / std::gcd(lcm, *ms) * *ms;  // both ≤ max_ms here, so no overflow
        if (lcm > max_ms) {
            why = "the series running at the end repeat together only after more than 28 days, so the whole "
                  "pattern has no steady state computed";
            return std::nullopt;
        }
    }
    return static_cast<double>(lcm) / 3.6e6;
}

bool same_dose(const Dose& a, const Dose& b) {
    return a.route == b.route && a.amount == b.amount && a.duration == b.duration && same_instant(a.time, b.time);
}

// The pattern may repeat sooner than the least common multiple of its series' intervals: three daily clock times
// 8 h apart are one dose every 8 h. The shortest shift that maps the cycle's doses onto themselves (a whole
// fraction of the period) is the period.
void shortest_period(Cycle& c) {
    const std::size_t n = c.doses.size();
    for (std::size_t j = 1; j < n; ++j) {
        const double shift = c.doses[j].time - c.doses[0].time;
        const double parts = std::round(c.period / shift);
        if (!(shift > 0.0) || parts < 2.0 || !same_instant(parts * shift, c.period)) continue;
        bool maps = true;
        for (std::size_t i = 0; i < n && maps; ++i) {
            Dose moved = c.doses[i];
            moved.time = std::fmod(moved.time + shift, c.period);
            if (same_instant(moved.time, c.period)) moved.time = 0.0;
            maps = std::any_of(c.doses.begin(), c.doses.end(), [&](const Dose& d) { return same_dose(d, moved); });
        }
        if (!maps) continue;
        c.period = c.period / parts;
        std::vector<Dose> kept;
        for (const auto& d : c.doses)
            if (before(d.time, c.period)) kept.push_back(d);
        c.doses = std::move(kept);
        return;
    }
}

std::optional<Cycle> final_cycle(const regimen::Regimen& r, std::string& why) {
    double t_last = 0.0;
    bool any = false;
    for (const auto& d : r.doses)
        if (is_series(d)) {
            t_last = any ? std::max(t_last, d.last_time()) : d.last_time();
            any = true;
        }
    if (!any) return std::nullopt;
    // A series is part of the final pattern if its next dose would fall after the regimen's last dose: series
    // that stopped earlier (a loading phase) are not.
    std::vector<int> series;
    for (std::size_t i = 0; i < r.doses.size(); ++i) {
        const auto& d = r.doses[i];
        if (is_series(d) && before(t_last, d.last_time() + d.every)) series.push_back(static_cast<int>(i));
    }
    const auto period = common_period(r, series, why);
    if (!period) return std::nullopt;
    Cycle c;
    c.period = *period;
    c.entries = series;
    double phase = std::numeric_limits<double>::infinity();
    for (int i : series) phase = std::min(phase, r.doses[static_cast<std::size_t>(i)].first_time());
    c.start = phase + c.period * std::floor((t_last - phase) / c.period + regimen::kInstantRelative);
    for (int i : series) {
        const auto& d = r.doses[static_cast<std::size_t>(i)];
        for (double off : d.offsets) {
            const double base = d.at + off;
            double k = std::ceil((c.start - base) / d.every - regimen::kInstantRelative);
            for (;; k += 1.0) {
                double t = base + k * d.every - c.start;
                if (!before(t, c.period)) break;
                if (same_instant(t, 0.0)) t = 0.0;
                c.doses.push_back(Dose{t, d.route_index, d.amount, d.over, i});
            }
        }
    }
    std::stable_sort(c.doses.begin(), c.doses.end(), [](const Dose& a, const Dose& b) { return a.time < b.time; });
    shortest_period(c);
    for (const auto& d : c.doses)
        if (c.dose_offsets.empty() || before(c.dose_offsets.back(), d.time)) c.dose_offsets.push_back(d.time);
    return c;
}

}  // namespace

Schedule make_schedule(const regimen::Regimen& r) {
    Schedule s;
    s.doses = expand_doses(r);
    s.end = r.horizon.until;
    for (const auto& d : s.doses)
        if (s.dose_times.empty() || before(s.dose_times.back(), d.time)) s.dose_times.push_back(d.time);
    for (std::size_t i = 0; i < s.dose_times.size(); ++i) {
        const double a = s.dose_times[i];
        const double b = i + 1 < s.dose_times.size() ? s.dose_times[i + 1] : s.end;
        if (!before(a, s.end) || !before(a, b)) continue;
        s.intervals.push_back(DosingInterval{a, std::min(b, s.end), false});
    }
    // The last interval is cut short when the horizon ends before the next dose of a series would be due, or
    // while an infusion given in it still runs.
    if (!s.intervals.empty()) {
        auto& last = s.intervals.back();
        double due = last.start;
        for (const auto& d : s.doses)
            if (same_instant(d.time, last.start)) due = std::max(due, d.time + d.duration);
        for (const auto& spec : r.doses) {
            if (!is_series(spec)) continue;
            // The series' first nominal dose after the interval start, one past its end at most.
            for (long n = 1; n <= spec.doses() + 1; ++n) {
                const double t = spec.dose_time(n);
                if (before(last.start, t)) {
                    const bool running = n <= spec.doses() || !before(spec.last_time(), last.start);
                    if (running) due = std::max(due, t);
                    break;
                }
            }
        }
        last.partial = before(s.end, due);
    }
    for (const auto& d : r.doses) s.repeats = s.repeats || is_series(d);
    s.cycle = final_cycle(r, s.no_cycle);
    return s;
}

int interval_at(const Schedule& s, double t) {
    auto it = std::upper_bound(s.intervals.begin(), s.intervals.end(), t,
                               [](double v, const DosingInterval& iv) { return v < iv.start; });
    return static_cast<int>(it - s.intervals.begin()) - 1;
}

}  // namespace plateau::sim
