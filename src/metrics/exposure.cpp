#include "metrics/exposure.hpp"

#include <algorithm>
#include <utility>
#include <cmath>
#include <limits>

#include "metrics/sweep.hpp"
#include "regimen/time.hpp"

namespace plateau::metrics {

namespace {

// The level sweeps of one series that the request asks for (each one walk over the steps).
struct Levels {
    std::optional<LevelSweep> above, low, high;
};

Levels levels_for(const Sweep& sw, const Request& req) {
    Levels lv;
    if (req.above) lv.above = sweep_level(sw, *req.above);
    if (req.window) {
        // A window whose low bound is the threshold (the usual case) shares its sweep.
        if (lv.above && *req.above == req.window->first) lv.low = lv.above;
        else lv.low = sweep_level(sw, req.window->first);
        lv.high = sweep_level(sw, req.window->second);
    }
    return lv;
}

double window_hours(const Levels& lv, double a, double b) {
    // Inside [low, high]: above low minus above high (the sets where the curve equals a bound have measure
    // zero unless it is flat there).
    return std::max(0.0, hours_above(*lv.low, a, b) - hours_above(*lv.high, a, b));
}

Interval interval_figures(const Sweep& sw, const Levels& lv, double a, double b) {
    Interval iv;
    iv.start = a;
    iv.end = b;
    iv.peak = maximum(sw, a, b);
    iv.minimum = minimum(sw, a, b);
    iv.trough = left_limit_at(sw, b);
    iv.auc = integral(sw, a, b);
    if (lv.above) iv.above_hours = hours_above(*lv.above, a, b);
    if (lv.low) iv.window_hours = window_hours(lv, a, b);
    return iv;
}

// The time from which the output stays inside [(1 − frac)·lowest, (1 + frac)·peak] of the steady state, up to
// `end`: the last crossing of either bound (jumps at doses included), or `start` if it never leaves the band;
// nullopt if it is outside the band at `end`.
std::optional<double> settled_from(const Sweep& sw, double start, double end, double low_ss, double peak_ss,
                                   double frac) {
    if (!(end > start)) return std::nullopt;
    const double low = (1.0 - frac) * low_ss, high = (1.0 + frac) * peak_ss;
    const double last = left_limit_at(sw, end);
    if (last < low || last > high) return std::nullopt;
    double t = start;
    for (double bound : {low, high})
        if (const auto c = last_crossing(sw, bound, start, end)) t = std::max(t, *c);
    return t;
}

}  // namespace

Request request_from(const regimen::Regimen& r, const sim::Options& opt) {
    Request q;
    q.output = r.targets.output.empty() ? 0 : std::max(0, r.model.output_index(r.targets.output));
    q.above = r.targets.above;
    q.window = r.targets.window;
    q.options = opt;
    return q;
}

Exposure compute(const sim::Schedule& schedule, const sim::Simulation& sim,
                 std::optional<sim::PeriodicSolution> steady, const Request& req) {
    using regimen::before;
    Exposure e;
    const traj::Trajectory& tr = sim.trajectory;
    const int s = sim.output_series(req.output);
    // The trajectory is read once: every figure below comes from this sweep and one level sweep per level.
    const Sweep sw = make_sweep(tr, s);
    const Levels lv = levels_for(sw, req);
    e.output = req.output;
    e.start = tr.start();
    e.end = tr.end();
    const std::vector<double>& doses = schedule.dose_times;
    e.first_dose = doses.empty() ? e.start : std::clamp(doses.front(), e.start, e.end);
    const double horizon = e.end - e.start;

    e.peak = maximum(sw, e.start, e.end);
    // The minimum from the first peak on, that peak included: before it, an infusion or an oral dose starts
    // from zero, which says nothing about the regimen; including the peak itself keeps the minimum from jumping
    // when the first peak falls at the instant of the next dose (the value just before a bolus). With a lag
    // longer than the interval the first intervals stay at zero: the first peak is the first one above zero.
    {
        Extreme first{value_at(sw, e.first_dose), e.first_dose};
        for (const auto& iv : schedule.intervals) {
            const Extreme pk = maximum(sw, std::max(iv.start, e.start), std::min(iv.end, e.end));
            if (pk.value > 0.0) {
                first = pk;
                break;
            }
        }
        e.minimum = minimum(sw, first.time, e.end);
        if (first.value < e.minimum.value) e.minimum = first;
    }
    e.auc = integral(sw, e.start, e.end);
    for (const auto& [a, b] : req.auc_windows) e.auc_windows.push_back({a, b, integral(sw, a, b)});
    for (double d0 = e.start; before(d0, e.end); d0 += 24.0) {
        Day d{d0, std::min(d0 + 24.0, e.end), 0.0, 0.0, false};
        d.partial = before(d.end, d0 + 24.0);
        d.auc = integral(sw, d.start, d.end);
        if (lv.above) d.above_hours = hours_above(*lv.above, d.start, d.end);
        e.days.push_back(d);
    }
    if (req.above) {
        e.above = req.above;
        e.above_hours = hours_above(*lv.above, e.start, e.end);
        e.above_fraction = horizon > 0 ? e.above_hours / horizon : 0.0;
        e.crossings = crossings_in(*lv.above, e.start, e.end);
        if (value_at(sw, e.start) > *req.above) e.first_reached = e.start;
        else
            for (const auto& c : e.crossings)
                if (c.up) {
                    e.first_reached = c.time;
                    break;
                }
    }
    if (req.window) {
        e.window = req.window;
        e.window_hours = window_hours(lv, e.start, e.end);
        e.window_fraction = horizon > 0 ? e.window_hours / horizon : 0.0;
        e.above_window_hours = hours_above(*lv.high, e.start, e.end);
        e.above_window_fraction = horizon > 0 ? e.above_window_hours / horizon : 0.0;
    }
    for (const auto& iv : schedule.intervals) {
        e.intervals.push_back(interval_figures(sw, lv, iv.start, std::min(iv.end, e.end)));
        e.intervals.back().partial = iv.partial;
    }

    if (steady) {
        Steady st;
        st.found = steady->found;
        st.why_not = steady->why_not;
        st.newton_iterations = steady->iterations;
        if (schedule.cycle) {
            st.interval = schedule.cycle->period;
            st.period_start = schedule.cycle->start;
            st.cycle_doses = schedule.cycle->doses;
        }
        if (st.found) {
            const traj::Trajectory& pt = steady->period.trajectory;
            const double tau = st.interval;
            const Sweep psw = make_sweep(pt, s);
            const Levels plv = levels_for(psw, req);
            Interval iv = interval_figures(psw, plv, 0.0, tau);
            st.peak = iv.peak;
            st.minimum = iv.minimum;
            st.constant = iv.peak.value - iv.minimum.value <= 1e-9 * std::abs(iv.peak.value);
            for (double off : schedule.cycle->dose_offsets) {
                const double v = left_limit_at(psw, off > 0.0 ? off : tau);
                st.troughs.push_back({off, v});
            }
            st.trough = iv.trough;
            st.trough_time = 0.0;
            for (const auto& t : st.troughs)
                if (t.value < st.trough) {
                    st.trough = t.value;
                    st.trough_time = t.offset;
                }
            st.auc = iv.auc;
            st.average = iv.auc / tau;
            st.auc24 = st.average * 24.0;
            st.above_hours = iv.above_hours;
            st.window_hours = iv.window_hours;
            if (plv.high) st.above_window_hours = hours_above(*plv.high, 0.0, tau);
            st.first_interval_auc = steady->first_cycle.trajectory.integral(s, 0.0, tau);
            // Undefined (NaN, printed as absent) when the cycle's doses show nothing within one cycle (a lag
            // longer than the cycle).
            st.accumulation = st.first_interval_auc > 0 ? st.auc / st.first_interval_auc
                                                        : std::numeric_limits<double>::quiet_NaN();
            // Judged up to when the pattern's next dose would have come after the regimen's last one (or the
            // horizon, if sooner): until then the regimen follows the pattern, after it the washout begins.
            const double check_end = std::min(e.end, schedule.cycle->next_due);
            st.within_10pct = settled_from(sw, e.first_dose, check_end, st.minimum.value, st.peak.value, 0.10);
            st.within_5pct = settled_from(sw, e.first_dose, check_end, st.minimum.value, st.peak.value, 0.05);
            st.period = std::move(steady->period.trajectory);  // psw, which reads pt, is not used after this
        }
        e.steady = std::move(st);
    }
    return e;
}

Exposure compute(const regimen::Regimen& r, const sim::Simulation& sim, const Request& req) {
    const sim::Schedule schedule = sim::make_schedule(r);
    auto steady = sim::steady_state(r.model, r.parameter_values(), schedule, sim, req.options);
    return compute(schedule, sim, std::move(steady), req);
}

}  // namespace plateau::metrics
