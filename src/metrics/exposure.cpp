#include "metrics/exposure.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace plateau::metrics {

namespace {

double window_hours(const traj::Trajectory& tr, int s, const std::pair<double, double>& w, double a, double b) {
    // Inside [low, high]: above low minus above high (the sets where the curve equals a bound have measure
    // zero unless it is flat there).
    return std::max(0.0, level(tr, s, w.first, a, b).hours_above - level(tr, s, w.second, a, b).hours_above);
}

// Distinct dose times, sorted.
std::vector<double> dose_times(const sim::Simulation& sim) {
    std::vector<double> t;
    for (const auto& d : sim.doses) t.push_back(d.time);
    std::sort(t.begin(), t.end());
    t.erase(std::unique(t.begin(), t.end(), [](double a, double b) { return b - a <= 1e-9 * std::max(1.0, b); }),
            t.end());
    return t;
}

Interval interval_figures(const traj::Trajectory& tr, int s, double a, double b, const Request& req) {
    Interval iv;
    iv.start = a;
    iv.end = b;
    iv.peak = maximum(tr, s, a, b);
    iv.minimum = minimum(tr, s, a, b);
    iv.trough = tr.left_limit(s, b);
    iv.auc = tr.integral(s, a, b);
    if (req.above) iv.above_hours = level(tr, s, *req.above, a, b).hours_above;
    if (req.window) iv.window_hours = window_hours(tr, s, *req.window, a, b);
    return iv;
}

// The time from which the output stays inside [(1 − frac)·lowest, (1 + frac)·peak] of the steady state, up to
// `end`: the last crossing of either bound (jumps at doses included), or `start` if it never leaves the band;
// nullopt if it is outside the band at `end`.
std::optional<double> settled_from(const traj::Trajectory& tr, int s, double start, double end, double low_ss,
                                   double peak_ss, double frac) {
    if (!(end > start)) return std::nullopt;
    const double low = (1.0 - frac) * low_ss, high = (1.0 + frac) * peak_ss;
    const double last = tr.left_limit(s, end);
    if (last < low || last > high) return std::nullopt;
    double t = start;
    for (double bound : {low, high})
        for (const auto& c : level(tr, s, bound, start, end).crossings) t = std::max(t, c.time);
    return t;
}

bool uses_time(const model::Model& m) {
    auto has_t = [](const expr::Ptr& p) {
        if (!p) return false;
        const auto ids = expr::identifiers(*p);
        return std::find(ids.begin(), ids.end(), "t") != ids.end();
    };
    for (const auto& r : m.rates)
        if (has_t(r.expr)) return true;
    for (const auto& o : m.outputs)
        if (has_t(o.expr)) return true;
    return false;
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

Exposure compute(const regimen::Regimen& r, const sim::Simulation& sim, const Request& req) {
    Exposure e;
    const traj::Trajectory& tr = sim.trajectory;
    const int s = sim.output_series(req.output);
    e.output = req.output;
    e.start = tr.start();
    e.end = tr.end();
    const std::vector<double> doses = dose_times(sim);
    e.first_dose = doses.empty() ? e.start : std::clamp(doses.front(), e.start, e.end);
    const double horizon = e.end - e.start;

    e.peak = maximum(tr, s, e.start, e.end);
    // The minimum from the first dose's peak on: before it, an infusion or an oral dose starts from zero, which
    // says nothing about the regimen. With a lag longer than the interval the first intervals stay at zero:
    // the first peak is then the first one above zero.
    {
        double from = e.first_dose;
        for (std::size_t i = 0; i < doses.size(); ++i) {
            const double a = std::max(doses[i], e.start);
            const double b = i + 1 < doses.size() ? std::min(doses[i + 1], e.end) : e.end;
            if (!(b > a)) continue;
            const Extreme pk = maximum(tr, s, a, b);
            if (pk.value > 0.0) {
                from = pk.time;
                break;
            }
        }
        e.minimum = minimum(tr, s, from, e.end);
    }
    e.auc = tr.integral(s, e.start, e.end);
    for (const auto& [a, b] : req.auc_windows) e.auc_windows.push_back({a, b, tr.integral(s, a, b)});
    for (double d0 = e.start; d0 < e.end - 1e-9; d0 += 24.0) {
        Day d{d0, std::min(d0 + 24.0, e.end), 0.0, 0.0, false};
        d.partial = d.end - d.start < 24.0 - 1e-9;
        d.auc = tr.integral(s, d.start, d.end);
        if (req.above) d.above_hours = level(tr, s, *req.above, d.start, d.end).hours_above;
        e.days.push_back(d);
    }
    if (req.above) {
        e.above = req.above;
        LevelResult lv = level(tr, s, *req.above, e.start, e.end);
        e.above_hours = lv.hours_above;
        e.above_fraction = horizon > 0 ? lv.hours_above / horizon : 0.0;
        e.crossings = lv.crossings;
        if (tr.value(s, e.start) > *req.above) e.first_reached = e.start;
        else
            for (const auto& c : lv.crossings)
                if (c.up) {
                    e.first_reached = c.time;
                    break;
                }
    }
    if (req.window) {
        e.window = req.window;
        e.window_hours = window_hours(tr, s, *req.window, e.start, e.end);
        e.window_fraction = horizon > 0 ? e.window_hours / horizon : 0.0;
        e.above_window_hours = level(tr, s, req.window->second, e.start, e.end).hours_above;
        e.above_window_fraction = horizon > 0 ? e.above_window_hours / horizon : 0.0;
    }
    for (std::size_t i = 0; i < doses.size(); ++i) {
        const double a = doses[i];
        const double b = i + 1 < doses.size() ? doses[i + 1] : e.end;
        if (!(a < e.end) || !(b > a)) continue;
        e.intervals.push_back(interval_figures(tr, s, a, std::min(b, e.end), req));
    }
    // The last interval is cut short when the horizon ends before the next dose would be due, or while an
    // infusion given in it still runs.
    if (!e.intervals.empty()) {
        auto& last = e.intervals.back();
        double due = last.start;
        for (const auto& d : sim.doses)
            if (std::abs(d.time - last.start) <= 1e-9 * std::max(1.0, last.start)) due = std::max(due, d.time + d.duration);
        for (const auto& spec : r.doses)
            if (spec.count > 1) due = std::max(due, std::min(last.start + spec.every, spec.at + static_cast<double>(spec.count) * spec.every));
        last.partial = due > e.end + 1e-9 * std::max(1.0, e.end);
    }

    if (auto period = final_period(r)) {
        Steady st;
        st.interval = period->tau;
        st.period_start = period->start;
        if (uses_time(r.model)) {
            // Rates that change with t: one interval is not like the next, so there is no periodic state.
            st.why_not = "the model's expressions depend on the time t, so the intervals never repeat exactly";
            e.steady = st;
            return e;
        }
        std::vector<double> guess;
        if (period->start <= e.end)
            for (int k = 0; k < sim.n_states; ++k) guess.push_back(tr.left_limit(k, std::max(period->start, e.start)));
        const std::vector<double> params = r.parameter_values();
        PeriodicSolution sol = solve_periodic(r.model, params, *period, guess, req.options);
        st.newton_iterations = sol.iterations;
        st.found = sol.found;
        st.why_not = sol.why_not;
        if (sol.found) {
            const traj::Trajectory& pt = sol.period.trajectory;
            const double tau = period->tau;
            Interval iv = interval_figures(pt, s, 0.0, tau, req);
            st.peak = iv.peak;
            st.trough = iv.trough;
            st.constant = iv.peak.value - iv.minimum.value <= 1e-9 * std::abs(iv.peak.value);
            st.minimum = iv.minimum;
            st.auc = iv.auc;
            st.average = iv.auc / tau;
            st.auc24 = st.average * 24.0;
            st.above_hours = iv.above_hours;
            st.window_hours = iv.window_hours;
            if (req.window) st.above_window_hours = level(pt, s, req.window->second, 0.0, tau).hours_above;
            st.first_interval_auc = sol.first_dose.trajectory.integral(s, 0.0, tau);
            // Undefined (NaN, printed as absent) when the first dose shows nothing within one interval (a lag
            // longer than the interval).
            st.accumulation = st.first_interval_auc > 0 ? st.auc / st.first_interval_auc
                                                        : std::numeric_limits<double>::quiet_NaN();
            // Judged up to the end of the final series' last full interval (or the horizon, if sooner).
            const double check_end = std::min(e.end, period->start + tau);
            st.within_10pct = settled_from(tr, s, e.first_dose, check_end, st.minimum.value, st.peak.value, 0.10);
            st.within_5pct = settled_from(tr, s, e.first_dose, check_end, st.minimum.value, st.peak.value, 0.05);
            st.period = sol.period.trajectory;
        }
        e.steady = st;
    }
    return e;
}

}  // namespace plateau::metrics
