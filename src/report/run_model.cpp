#include "report/run_model.hpp"

#include "report/caution.hpp"
#include "report/format.hpp"
#include "verdict/compare.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::report {

Node run_model(const regimen::Regimen& r, const sim::Simulation& s, const metrics::Exposure& e, double tolerance) {
    const model::Output& o = r.model.outputs[static_cast<std::size_t>(e.output)];
    const std::string u = o.unit_text, au = auc_unit(o.unit_text);
    auto c = [&](double v) { return Value::of(in_output_unit(o, v)); };
    auto w = [](const std::string& text) { return Value::words(text); };
    Node d;
    d.shape = Node::Shape::Group;
    d.leaf("regimen", w(r.id), "Regimen");
    d.leaf("about", w(r.about));
    d.leaf("file", w(r.path), "Regimen file");
    d.leaf("model", w(r.model.id), "Model");
    d.leaf("model_file", w(r.model.path));
    {
        Node& ps = d.group("parameters", "Parameters");
        const std::vector<double> values = r.parameter_values();
        for (std::size_t i = 0; i < r.model.parameters.size(); ++i) {
            const auto& p = r.model.parameters[i];
            Node& one = ps.group(p.name, p.name);
            one.leaf("value", Value::of(values[i] / p.unit.factor), "Value used", p.unit_text, 6);
            one.leaf("unit", w(p.unit_text));
            one.leaf("overridden", Value::yes_no(values[i] != p.value), "Set by the regimen");
        }
    }
    d.leaf("output", w(o.name), "Output");
    d.leaf("unit", w(u));
    d.leaf("auc_unit", w(au));
    d.leaf("tolerance", Value::of(tolerance), "Tolerance");
    d.leaf("steps", Value::count(static_cast<unsigned long long>(s.steps)), "Steps");
    d.leaf("order", Value::count(static_cast<unsigned long long>(s.order)), "Taylor order");
    {
        Node& h = d.group("horizon", "Horizon");
        h.leaf("from", Value::of(e.start), "From", "h", kTimeDigits);
        h.leaf("to", Value::of(e.end), "To", "h", kTimeDigits);
    }
    {
        double total = 0.0;
        for (const auto& dose : s.doses) total += dose.amount;
        Node& ds = d.group("doses", "Doses");
        ds.leaf("count", Value::count(s.doses.size()), "Doses");
        ds.leaf("total_mg", Value::of(total), "Total dose", "mg");
        ds.leaf("first", Value::of(e.first_dose), "First dose", "h", kTimeDigits);
    }
    {
        Node& p = d.group("peak", "Peak");
        p.leaf("value", c(e.peak.value), "Peak", u, 6);
        p.leaf("time", Value::of(e.peak.time), "at", "h", kTimeDigits);
    }
    {
        Node& m = d.group("minimum", "Minimum after the first peak");
        m.leaf("value", c(e.minimum.value), "Minimum after the first peak", u, 6);
        m.leaf("time", Value::of(e.minimum.time), "at", "h", kTimeDigits);
    }
    {
        Node& a = d.group("auc", "AUC over the horizon");
        a.leaf("from", Value::of(e.start), "From", "h", kTimeDigits);
        a.leaf("to", Value::of(e.end), "To", "h", kTimeDigits);
        a.leaf("value", c(e.auc), "AUC over the horizon", au, 6);
    }
    {
        Node& ws = d.list("auc_windows", "AUC");
        for (const auto& aw : e.auc_windows) {
            Node& one = ws.item();
            one.leaf("from", Value::of(aw.from), "From", "h", kTimeDigits);
            one.leaf("to", Value::of(aw.to), "To", "h", kTimeDigits);
            one.leaf("value", c(aw.value), "AUC", au, 6);
        }
    }
    if (e.above) {
        Node& a = d.group("above", "Time above the threshold");
        a.leaf("threshold", c(*e.above), "Threshold", u, 6);
        a.leaf("hours", Value::of(e.above_hours), "Time above", "h", 5);
        a.leaf("fraction", Value::of(e.above_fraction), "Share of the horizon above", "", 4, Form::Percent);
        a.leaf("first_reached", e.first_reached ? Value::of(*e.first_reached) : Value::absent("never"),
               "First reaches", "h", kTimeDigits);
        Node& xs = d.list("crossings", "Crossings");
        for (const auto& x : e.crossings) {
            Node& one = xs.item();
            one.leaf("time", Value::of(x.time), "Time", "h", kTimeDigits);
            one.leaf("direction", w(x.up ? "up" : "down"), "Direction");
        }
    }
    if (e.window) {
        Node& win = d.group("window", "Window");
        win.leaf("low", c(e.window->first), "Low", u, 6);
        win.leaf("high", c(e.window->second), "High", u, 6);
        win.leaf("hours", Value::of(e.window_hours), "Time inside", "h", 5);
        win.leaf("fraction", Value::of(e.window_fraction), "Share inside", "", 4, Form::Percent);
        win.leaf("above_high_hours", Value::of(e.above_window_hours), "Time above", "h", 5);
        win.leaf("above_high_fraction", Value::of(e.above_window_fraction), "Share above", "", 4, Form::Percent);
    }
    {
        Node& days = d.list("days", "AUC per 24-h day");
        for (const auto& day : e.days) {
            Node& one = days.item();
            one.leaf("start", Value::of(day.start), "Start", "h", kTimeDigits);
            one.leaf("end", Value::of(day.end), "End", "h", kTimeDigits);
            one.leaf("auc", c(day.auc), "AUC", au, 5);
            if (e.above) one.leaf("above_hours", Value::of(day.above_hours), "Time above", "h", 4);
            one.leaf("partial", Value::yes_no(day.partial), "Partial");
        }
    }
    {
        Node& ivs = d.list("intervals", "Dosing intervals");
        for (const auto& iv : e.intervals) {
            Node& one = ivs.item();
            one.leaf("start", Value::of(iv.start), "Start", "h", kTimeDigits);
            one.leaf("end", Value::of(iv.end), "End", "h", kTimeDigits);
            one.leaf("peak", c(iv.peak.value), "Peak", u);
            one.leaf("peak_time", Value::of(iv.peak.time), "at", "h", kTimeDigits);
            one.leaf("trough", c(iv.trough), "Trough", u);
            one.leaf("minimum", c(iv.minimum.value), "Minimum", u);
            one.leaf("minimum_time", Value::of(iv.minimum.time), "at", "h", kTimeDigits);
            one.leaf("auc", c(iv.auc), "AUC", au, 5);
            // Absent without a threshold (or a window), like the days'.
            if (e.above) one.leaf("above_hours", Value::of(iv.above_hours), "Above threshold", "h", 4);
            if (e.window) one.leaf("window_hours", Value::of(iv.window_hours), "In window", "h", 4);
            one.leaf("partial", Value::yes_no(iv.partial), "Partial");
        }
    }
    if (e.steady) {
        const auto& st = *e.steady;
        Node& ss = d.group("steady_state", "Steady state");
        ss.leaf("found", Value::yes_no(st.found), "Found");
        if (!st.found) ss.leaf("reason", w(st.why_not), "Not reached");
        ss.leaf("interval", Value::of(st.interval), "Period", "h", kTimeDigits);
        if (!st.cycle_doses.empty()) {
            // The doses that form the repeating cycle, as offsets from its start.
            Node& cy = ss.group("cycle", "Cycle");
            cy.leaf("period", Value::of(st.interval), "Period", "h", kTimeDigits);
            cy.leaf("start", Value::of(st.period_start), "Start", "h", kTimeDigits);
            Node& ds = cy.list("doses", "Doses of the cycle");
            for (const auto& dose : st.cycle_doses) {
                Node& one = ds.item();
                one.leaf("offset", Value::of(dose.time), "Offset", "h", kTimeDigits);
                one.leaf("route", w(dose.route >= 0 ? r.model.routes[static_cast<std::size_t>(dose.route)].name : ""),
                         "Route");
                one.leaf("amount_mg", Value::of(dose.amount), "Amount", "mg", 6);
                one.leaf("over", Value::of(dose.duration), "Over", "h", kTimeDigits);
                one.leaf("entry", Value::count(static_cast<unsigned long long>(dose.entry + 1)), "Dose entry");
            }
        }
        if (st.found) {
            const verdict::CycleShares shares = verdict::cycle_shares(e);
            ss.leaf("peak", c(st.peak.value), "Peak", u, 6);
            ss.leaf("peak_time", Value::of(st.peak.time), "at", "h", kTimeDigits);
            ss.leaf("constant", Value::yes_no(st.constant), "Constant");
            ss.leaf("trough", c(st.trough), "Trough", u, 6);
            ss.leaf("trough_time", Value::of(st.trough_time), "before the dose at", "h", kTimeDigits);
            Node& ts = ss.list("troughs", "Before each dose");
            for (const auto& t : st.troughs) {
                Node& one = ts.item();
                one.leaf("offset", Value::of(t.offset), "Offset", "h", kTimeDigits);
                one.leaf("value", c(t.value), "Before the dose", u, 6);
            }
            ss.leaf("minimum", c(st.minimum.value), "Lowest", u, 6);
            ss.leaf("minimum_time", Value::of(st.minimum.time), "at", "h", kTimeDigits);
            ss.leaf("average", c(st.average), "Average", u, 6);
            ss.leaf("auc", c(st.auc), "AUC per", au, 6);
            ss.leaf("auc24", c(st.auc24), "AUC24, steady state", au, 6);
            if (e.above) {
                ss.leaf("above_hours", Value::of(st.above_hours), "Time above", "h", 4);
                ss.leaf("above_fraction", Value::of(shares.above.value_or(0.0)), "Time above threshold, ss", "% of τ", 4,
                        Form::Percent);
            }
            if (e.window) {
                ss.leaf("window_hours", Value::of(st.window_hours), "Time inside the window", "h", 4);
                ss.leaf("window_fraction", Value::of(shares.window.value_or(0.0)), "Time in window, ss", "% of τ", 4,
                        Form::Percent);
                ss.leaf("above_high_hours", Value::of(st.above_window_hours), "Time above the window", "h", 4);
                ss.leaf("above_high_fraction", Value::of(shares.above_window.value_or(0.0)), "Time above window, ss",
                        "% of τ", 4, Form::Percent);
            }
            ss.leaf("first_interval_auc", c(st.first_interval_auc), "AUC of the first cycle", au, 6);
            ss.leaf("accumulation", Value::of(st.accumulation), "Accumulation ratio (AUC)", "", 5);
            ss.leaf("within_10pct", st.within_10pct ? Value::of(*st.within_10pct) : Value::absent("not within the horizon"),
                    "Within 10 % of steady state", "h", kTimeDigits);
            ss.leaf("within_5pct", st.within_5pct ? Value::of(*st.within_5pct) : Value::absent("not within the horizon"),
                    "Within 5 % of steady state", "h", kTimeDigits);
        }
    }
    {
        Node& ts = d.list("targets", "Targets");
        for (const auto& v : verdict::verdicts(r.targets, o, e)) {
            Node& one = ts.item();
            one.leaf("kind", w(v.kind));
            one.leaf("what", w(v.what));
            one.leaf("met", v.met ? Value::yes_no(*v.met) : Value::absent("not assessed"), "Met");
        }
    }
    d.leaf("caution", w(kCaution));
    return d;
}

}  // namespace plateau::report
