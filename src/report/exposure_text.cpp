#include "report/exposure_text.hpp"

#include <string>
#include <vector>

#include "report/cycle_words.hpp"
#include "report/format.hpp"
#include "report/targets.hpp"

namespace plateau::report {

namespace {

void row(std::ostream& out, std::string_view label, const std::string& value) {
    out << "  " << pad_right(label, 34) << value << '\n';
}

}  // namespace

void write_exposure_text(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const TextOptions& opt) {
    const model::Output& o = r.model.outputs[static_cast<std::size_t>(e.output)];
    const std::string u = o.unit_text;
    const std::string au = auc_unit(u);
    const int dg = opt.digits;
    auto c = [&](double v) { return num(in_output_unit(o, v), dg) + " " + u; };
    // A time in hours, and as day and clock time when asked.
    auto when = [&](double t) { return num(t, 6) + " h" + (opt.clock ? " (" + day_clock(t, *opt.clock) + ")" : ""); };
    auto at = [&](double t) { return " at " + when(t); };
    (void)s;

    out << "Exposure of '" << o.name << "' (" << u << ") from " << num(e.start, 6) << " to " << num(e.end, 6) << " h\n";
    row(out, "Peak", c(e.peak.value) + at(e.peak.time));
    row(out, "Minimum after the first peak", c(e.minimum.value) + at(e.minimum.time));
    row(out, "AUC over the horizon", num(in_output_unit(o, e.auc), dg) + " " + au + " from " + num(e.start, 6) + " to " + num(e.end, 6) + " h");
    for (const auto& w : e.auc_windows)
        row(out, "AUC " + num(w.from, 4) + " h .. " + num(w.to, 4) + " h", num(in_output_unit(o, w.value), dg) + " " + au);
    if (!e.days.empty()) {
        std::string days;
        for (std::size_t i = 0; i < e.days.size() && i < 3; ++i)
            days += (i ? ", " : "") + num(in_output_unit(o, e.days[i].auc), 5) + (e.days[i].partial ? " (partial)" : "");
        if (e.days.size() > 3) days += ", ... last " + num(in_output_unit(o, e.days.back().auc), 5) +
                                       (e.days.back().partial ? " (partial)" : "");
        row(out, "AUC per 24-h day (" + au + ")", days);
    }
    if (e.above) {
        row(out, "Time above " + c(*e.above), hours(e.above_hours) + " (" + percent(e.above_fraction) + " of the horizon)");
        row(out, "First reaches " + c(*e.above), e.first_reached ? "at " + when(*e.first_reached) : "never");
        std::string xs;
        for (std::size_t i = 0; i < e.crossings.size() && i < 3; ++i)
            xs += (i ? ", " : "") + num(e.crossings[i].time, 6) + (e.crossings[i].up ? " up" : " down");
        if (e.crossings.size() > 3) xs += ", ... (" + std::to_string(e.crossings.size()) + " in all, --json)";
        row(out, "Crossings (h)", xs.empty() ? "none" : xs);
    }
    if (e.window) {
        const std::string wn = num(in_output_unit(o, e.window->first)) + " .. " + c(e.window->second);
        row(out, "Time inside " + wn, hours(e.window_hours) + " (" + percent(e.window_fraction) + ")");
        row(out, "Time above " + c(e.window->second), hours(e.above_window_hours) + " (" + percent(e.above_window_fraction) + ")");
    }

    if (!e.intervals.empty()) {
        out << "\nDosing intervals (" << e.intervals.size() << "; " << o.name << " in " << u << ", AUC in " << au
            << ")\n";
        std::vector<std::string> head = {"start h", "end h", "peak", "at h", "trough", "minimum", "AUC"};
        if (e.above) head.push_back("above h");
        if (e.window) head.push_back("window h");
        const std::size_t wcol = 10;
        out << "  ";
        for (const auto& h : head) out << pad_left(h, wcol);
        if (opt.clock) out << pad_left("starts", 13);
        out << '\n';
        auto line = [&](const metrics::Interval& iv) {
            // Times with the 6 significant digits of every other time in this report (to 0.001 h below 1000 h).
            out << "  " << pad_left(num(iv.start, kTimeDigits), wcol) << pad_left(num(iv.end, kTimeDigits), wcol)
                << pad_left(num(in_output_unit(o, iv.peak.value)), wcol) << pad_left(num(iv.peak.time, kTimeDigits), wcol)
                << pad_left(num(in_output_unit(o, iv.trough)), wcol)
                << pad_left(num(in_output_unit(o, iv.minimum.value)), wcol)
                << pad_left(num(in_output_unit(o, iv.auc), 5), wcol);
            if (e.above) out << pad_left(num(iv.above_hours, 4), wcol);
            if (e.window) out << pad_left(num(iv.window_hours, 4), wcol);
            if (opt.clock) out << pad_left(day_clock(iv.start, *opt.clock), 13);
            out << (iv.partial ? " *" : "") << '\n';
        };
        const std::size_t n = e.intervals.size();
        const std::size_t hn = static_cast<std::size_t>(opt.head), tn = static_cast<std::size_t>(opt.tail);
        if (opt.all_intervals || n <= hn + tn + 1) {
            for (const auto& iv : e.intervals) line(iv);
        } else {
            for (std::size_t i = 0; i < hn; ++i) line(e.intervals[i]);
            out << "  " << pad_left("... " + std::to_string(n - hn - tn) + " more (--intervals all)", 40) << '\n';
            for (std::size_t i = n - tn; i < n; ++i) line(e.intervals[i]);
        }
        if (e.intervals.back().partial)
            out << "  * cut short by the end of the horizon: its trough is the value at the horizon end\n";
    }

    if (e.steady) {
        const auto& st = *e.steady;
        out << "\nSteady state (" << (st.interval > 0 ? cycle_description(st, r.model) : std::string("dosing pattern"))
            << ", solved directly)\n";
        if (!st.found) row(out, "Not reached", st.why_not);
    }
    if (e.steady && e.steady->found) {
        const auto& st = *e.steady;
        const std::string per = " per " + cycle_noun(st);
        if (st.constant) {
            row(out, "Level", c(st.peak.value) + ", constant (continuous input)");
        } else {
            row(out, "Peak", c(st.peak.value) + ", " + num(st.peak.time, 6) + " h " + after_cycle_start(st));
            if (multi_dose_cycle(st)) {
                row(out, "Trough (lowest before a dose)",
                    c(st.trough) + ", before the dose at +" + num(st.trough_time, 6) + " h");
                std::string ts;
                for (const auto& t : st.troughs)
                    ts += (ts.empty() ? "" : ", ") + std::string("+") + num(t.offset, 6) + " h: " +
                          num(in_output_unit(o, t.value), dg);
                row(out, "Before each dose (" + u + ")", ts);
            } else {
                row(out, "Trough", c(st.trough) + " (just before the next dose)");
            }
            if (st.dips_below_trough())
                row(out, "Lowest", c(st.minimum.value) + ", " + num(st.minimum.time, 6) + " h " + after_cycle_start(st));
        }
        row(out, "Average", c(st.average));
        row(out, "AUC" + per + " / per 24 h", num(in_output_unit(o, st.auc), dg) + " / " +
                                                   num(in_output_unit(o, st.auc24), dg) + " " + au);
        if (e.above)
            row(out, "Time above " + c(*e.above), hours(st.above_hours) + per + " (" +
                                                      percent(st.above_hours / st.interval) + ")");
        if (e.window) {
            row(out, "Time inside the window", hours(st.window_hours) + per + " (" +
                                                   percent(st.window_hours / st.interval) + ")");
            row(out, "Time above the window", hours(st.above_window_hours) + per + " (" +
                                                  percent(st.above_window_hours / st.interval) + ")");
        }
        row(out, "Accumulation ratio (AUC)",
            num(st.accumulation, 5) + " (steady state / one " + cycle_noun(st) + "'s doses alone)");
        row(out, "Within 10 % of steady state", st.within_10pct ? "from " + when(*st.within_10pct) : "not within the horizon");
        row(out, "Within 5 % of steady state", st.within_5pct ? "from " + when(*st.within_5pct) : "not within the horizon");
    }
    const auto vs = verdicts(r.targets, o, e);
    if (!vs.empty()) {
        out << "\nTargets\n";
        for (const auto& v : vs)
            out << "  " << pad_right(v.met ? (*v.met ? "meets" : "falls short") : "not assessed", 14) << v.what << '\n';
    }
}

}  // namespace plateau::report
