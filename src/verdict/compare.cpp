#include "verdict/compare.hpp"

#include <algorithm>
#include <cmath>

#include "report/format.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::verdict {

using report::num;
using report::percent;

const model::Output& output_of(const Candidate& c) {
    return c.regimen.model.outputs[static_cast<std::size_t>(c.exposure.output)];
}

CycleShares cycle_shares(const metrics::Exposure& e) {
    CycleShares s;
    if (!e.steady || !e.steady->found || !(e.steady->interval > 0)) return s;
    const auto& st = *e.steady;
    if (e.above) s.above = st.above_hours / st.interval;
    if (e.window) {
        s.window = st.window_hours / st.interval;
        s.above_window = st.above_window_hours / st.interval;
    }
    return s;
}

Figures figures_of(const Candidate& c) {
    Figures f;
    const auto& e = c.exposure;
    for (const auto& d : c.sim.doses) f.total_dose += d.amount;
    f.doses = static_cast<long>(c.sim.doses.size());
    const double horizon = e.end - e.start;
    f.dose_per_day = horizon > 0 ? f.total_dose / horizon * 24.0 : 0.0;
    if (const auto& cy = c.schedule.cycle) {
        double per_cycle = 0.0;
        for (const auto& d : cy->doses) per_cycle += d.amount;
        f.dose_per_day = per_cycle / cy->period * 24.0;
    }
    if (!e.intervals.empty()) {
        f.first_peak = e.intervals.front().peak.value;
        f.first_peak_time = e.intervals.front().peak.time;
    }
    if (!e.days.empty()) f.auc24_day1 = e.days.front().auc;
    if (e.above) {
        f.above_day1_hours = e.days.empty() ? 0.0 : e.days.front().above_hours;
        for (std::size_t d = 0; d < e.days.size(); ++d)
            if (!e.days[d].partial && (!f.above_worst_day_hours || e.days[d].above_hours < *f.above_worst_day_hours)) {
                f.above_worst_day_hours = e.days[d].above_hours;
                f.above_worst_day = static_cast<int>(d) + 1;
            }
        f.first_reached = e.first_reached;
    }
    if (e.steady) {
        f.repeats = true;
        const auto& st = *e.steady;
        if (st.found) {
            f.ss_peak = st.peak.value;
            f.ss_trough = st.trough;
            f.ss_average = st.average;
            f.ss_lowest = st.minimum.value;
            f.dips_below_trough = st.dips_below_trough();
            f.auc24_ss = st.auc24;
            const CycleShares shares = cycle_shares(e);
            f.above_ss_fraction = shares.above;
            f.window_ss_fraction = shares.window;
            f.above_window_ss_fraction = shares.above_window;
            f.within_10pct = st.within_10pct;
        } else {
            f.no_steady_state = st.why_not;
        }
    }
    return f;
}

std::vector<TargetCheck> target_checks(const std::vector<Candidate>& cs) {
    std::vector<TargetCheck> out;
    if (cs.empty()) return out;
    // Every candidate is judged against the same targets (see unify_targets): the first one's.
    const auto& t = cs.front().regimen.targets;
    for (const auto& v : verdicts(t, output_of(cs.front()), cs.front().exposure)) out.push_back({v.kind, v.what, {}});
    for (const auto& c : cs) {
        const auto vs = verdicts(t, output_of(c), c.exposure);
        for (std::size_t k = 0; k < out.size() && k < vs.size(); ++k) out[k].met.push_back(vs[k].met);
    }
    return out;
}

namespace {

// The share of the compared doses (the repeating cycle's, else all) that reaches the circulation, by each
// route's fraction with the regimen's parameter values, and the routes as words ("oral, 60 %").
struct Uptake {
    double fraction = 1.0;
    std::string routes;              // "oral 60.0 %"
    std::vector<std::string> names;  // "oral"
};

Uptake uptake_of(const Candidate& c) {
    const model::Model& m = c.regimen.model;
    const std::vector<double> values = c.regimen.parameter_values();
    const std::vector<sim::Dose>& doses = c.schedule.cycle ? c.schedule.cycle->doses : c.schedule.doses;
    double given = 0.0, reached = 0.0;
    std::vector<int> seen;
    Uptake u;
    for (const auto& d : doses) {
        if (d.route < 0 || static_cast<std::size_t>(d.route) >= m.routes.size()) continue;
        const model::Route& r = m.routes[static_cast<std::size_t>(d.route)];
        const double f = r.fraction ? model::evaluate_constant(m, *r.fraction, values) : 1.0;
        given += d.amount;
        reached += d.amount * f;
        if (std::find(seen.begin(), seen.end(), d.route) != seen.end()) continue;
        seen.push_back(d.route);
        u.names.push_back(r.name);
        u.routes += (u.routes.empty() ? "" : ", ") + r.name + " " + percent(f);
    }
    if (given > 0) u.fraction = reached / given;
    return u;
}

}  // namespace

std::vector<std::string> summary_sentences(const std::vector<Candidate>& cs) {
    std::vector<std::string> out;
    if (cs.size() < 2) return out;
    const auto& o = output_of(cs.front());
    const Figures a = figures_of(cs.front());
    const Uptake ua = uptake_of(cs.front());
    const std::string A = cs.front().letter;
    for (std::size_t i = 1; i < cs.size(); ++i) {
        const Figures b = figures_of(cs[i]);
        const Uptake ub = uptake_of(cs[i]);
        const std::string B = cs[i].letter;
        if (a.above_ss_fraction && b.above_ss_fraction && std::abs(*a.above_ss_fraction - *b.above_ss_fraction) >= 0.01)
            out.push_back(B + " is above the threshold for " + percent(*b.above_ss_fraction) +
                          " of each interval at steady state, against " + percent(*a.above_ss_fraction) + " for " + A + ".");
        if (b.above_window_ss_fraction && *b.above_window_ss_fraction >= 0.005)
            out.push_back(B + " spends " + percent(*b.above_window_ss_fraction) + " of each interval above the window.");
        if (a.ss_peak && b.ss_peak && a.dose_per_day > 0 && *a.ss_average > 0 && ua.fraction > 0 &&
            std::abs(ub.fraction / ua.fraction - 1.0) > 0.01) {
            // Different shares reach the circulation (an oral dose against an IV one): compare what arrives,
            // or a bioavailability of 0.6 reads as "exposure not proportional to dose".
            const double dose_ratio = b.dose_per_day / a.dose_per_day;
            const double reach_ratio = dose_ratio * ub.fraction / ua.fraction;
            const double exposure_ratio = *b.ss_average / *a.ss_average;
            const bool proportional = std::abs(exposure_ratio / reach_ratio - 1.0) <= 0.15;
            std::vector<std::string> na = ua.names, nb = ub.names;
            std::sort(na.begin(), na.end());
            std::sort(nb.begin(), nb.end());
            out.push_back(B + " gives " + num(dose_ratio, 3) + " times " + A + "'s daily dose" +
                          (na == nb ? std::string(" (") : std::string(" by another route (")) + B +
                          ": " + ub.routes + " reaches the circulation; " + A + ": " + ua.routes + "), so " +
                          num(reach_ratio, 3) + " times as much reaches the circulation" +
                          (proportional ? ", and its steady-state average is " + num(exposure_ratio, 3) + " times " + A + "'s."
                                        : ", but its steady-state average is " + num(exposure_ratio, 3) + " times " + A +
                                              "'s: exposure is not proportional to the dose that reaches the circulation."));
        } else if (a.ss_peak && b.ss_peak && a.dose_per_day > 0 && *a.ss_average > 0) {
            const double dose_ratio = b.dose_per_day / a.dose_per_day;
            const double exposure_ratio = *b.ss_average / *a.ss_average;
            if (std::abs(dose_ratio - 1.0) > 0.01 && std::abs(exposure_ratio / dose_ratio - 1.0) > 0.15)
                out.push_back(B + " gives " + num(dose_ratio, 3) + " times " + A + "'s daily dose but " +
                              num(exposure_ratio, 3) + " times its steady-state average concentration: " +
                              "exposure is not proportional to dose.");
            else if (std::abs(dose_ratio - 1.0) <= 0.01 && std::abs(*b.ss_peak / *a.ss_peak - 1.0) >= 0.05)
                out.push_back("Same daily dose: " + B + "'s steady-state peak is " + num(*b.ss_peak / *a.ss_peak, 3) +
                              " times " + A + "'s, its trough " + num(*b.ss_trough / std::max(*a.ss_trough, 1e-300), 3) +
                              " times.");
        }
        // How fast the threshold is first reached comes last: it matters less than the steady state.
        if (a.first_reached && b.first_reached) {
            const double d = *a.first_reached - *b.first_reached;
            if (std::abs(d) >= 0.05)
                out.push_back(B + " reaches the threshold " + num(std::abs(d), 2) + " h " +
                              (d > 0 ? "sooner" : "later") + " than " + A + ".");
        } else if (a.first_reached && !b.first_reached && b.above_day1_hours) {
            out.push_back(B + " never reaches the threshold; " + A + " does at " + num(*a.first_reached, 3) + " h.");
        } else if (!a.first_reached && b.first_reached && a.above_day1_hours) {
            out.push_back(B + " reaches the threshold at " + num(*b.first_reached, 3) + " h; " + A + " never does.");
        }
        if (!b.no_steady_state.empty()) out.push_back(B + " has no steady state: " + b.no_steady_state + ".");
    }
    if (!a.no_steady_state.empty()) out.insert(out.begin(), A + " has no steady state: " + a.no_steady_state + ".");
    (void)o;
    return out;
}

}  // namespace plateau::verdict
