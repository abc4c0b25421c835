#include "report/compare_model.hpp"

#include <algorithm>

#include "report/caution.hpp"
#include "report/figures.hpp"
#include "report/format.hpp"
#include "report/run_model.hpp"

namespace plateau::report {

namespace {

Value maybe(std::optional<double> v, std::string why = {}) { return v ? Value::of(*v) : Value::absent(std::move(why)); }

}  // namespace

Table comparison_table(const std::vector<verdict::Candidate>& cs) {
    Table t;
    t.key = "comparison";
    t.title = cs.size() > 1 ? "Figures side by side" : "Key figures";
    if (cs.empty()) return t;
    for (const auto& c : cs) t.columns.push_back(c.letter);
    const auto& o = verdict::output_of(cs.front());
    std::vector<verdict::Figures> fs;
    for (const auto& c : cs) fs.push_back(verdict::figures_of(c));
    // In the output's unit, for a candidate (the same unit for all: one output is compared).
    auto conc = [&](std::size_t i, std::optional<double> v) {
        return v ? Value::of(in_output_unit(verdict::output_of(cs[i]), *v)) : Value::absent();
    };
    auto add = [&](std::string_view key, auto cell, int digits = 4, Form form = Form::Number,
                   std::string label = {}) {
        const FigureInfo& f = figure_info(key);
        Row r{std::string(key), label.empty() ? std::string(f.label) : label, unit_text(f.measure, o), form, digits, {}};
        for (std::size_t i = 0; i < cs.size(); ++i) r.cells.push_back(cell(i, fs[i]));
        t.rows.push_back(std::move(r));
    };
    const bool any_above = std::any_of(cs.begin(), cs.end(), [](const auto& c) { return c.exposure.above.has_value(); });
    const bool any_window = std::any_of(cs.begin(), cs.end(), [](const auto& c) { return c.exposure.window.has_value(); });
    const bool any_steady = std::any_of(fs.begin(), fs.end(), [](const auto& f) { return f.repeats; });
    using F = verdict::Figures;

    add("dose_per_day", [](std::size_t, const F& f) { return f.repeats ? Value::of(f.dose_per_day) : Value::absent(); });
    add("doses", [](std::size_t, const F& f) {
        Value v = Value::count(static_cast<unsigned long long>(f.doses));
        v.tag = "(" + num(f.total_dose, 4) + ")";
        return v;
    }, 4, Form::Integer);
    add("first_peak", [&](std::size_t i, const F& f) { return conc(i, f.first_peak); });
    if (any_steady) {
        add("ss_peak", [&](std::size_t i, const F& f) { return conc(i, f.ss_peak); });
        add("ss_trough", [&](std::size_t i, const F& f) { return conc(i, f.ss_trough); });
        // The lowest value differs from the trough when it comes after the dose (an absorption lag): the window
        // verdict uses it, so the table shows it.
        if (std::any_of(fs.begin(), fs.end(), [](const F& f) { return f.dips_below_trough; }))
            add("ss_lowest", [&](std::size_t i, const F& f) { return conc(i, f.ss_lowest); });
        add("ss_average", [&](std::size_t i, const F& f) { return conc(i, f.ss_average); });
    }
    add("auc24_day1", [&](std::size_t i, const F& f) { return conc(i, f.auc24_day1); });
    // Windows asked with --auc, in the order given (every candidate has the same list).
    for (std::size_t w = 0; w < cs.front().exposure.auc_windows.size(); ++w) {
        const auto& aw = cs.front().exposure.auc_windows[w];
        add("auc_window", [&, w](std::size_t i, const F&) {
            const auto& ws = cs[i].exposure.auc_windows;
            return w < ws.size() ? conc(i, ws[w].value) : Value::absent();
        }, 4, Form::Number, "AUC " + num(aw.from, 6) + "–" + num(aw.to, 6) + " h");
    }
    if (any_steady) add("ss_auc24", [&](std::size_t i, const F& f) { return conc(i, f.auc24_ss); });
    if (any_above) {
        add("above_day1", [](std::size_t, const F& f) { return maybe(f.above_day1_hours); });
        // The day a missed or late dose hurts most: shown when, for some regimen, it is not the first day.
        if (std::any_of(fs.begin(), fs.end(), [](const F& f) { return f.above_worst_day > 1; }))
            add("above_worst_day", [](std::size_t, const F& f) {
                Value v = maybe(f.above_worst_day_hours);
                if (v.present()) v.tag = "d" + std::to_string(f.above_worst_day);
                return v;
            });
        if (any_steady)
            add("above_pct", [](std::size_t, const F& f) { return maybe(f.above_ss_fraction); }, 4, Form::Percent);
        add("first_reached", [](std::size_t, const F& f) {
            return f.above_day1_hours ? maybe(f.first_reached, "never") : Value::absent();
        });
    }
    if (any_window && any_steady) {
        add("window_pct", [](std::size_t, const F& f) { return maybe(f.window_ss_fraction); }, 4, Form::Percent);
        add("above_window_pct", [](std::size_t, const F& f) { return maybe(f.above_window_ss_fraction); }, 4,
            Form::Percent);
    }
    if (any_steady)
        add("within_10pct", [](std::size_t, const F& f) {
            if (!f.repeats) return Value::absent();
            if (!f.no_steady_state.empty()) return Value::absent("none");
            return maybe(f.within_10pct, "later");
        });
    return t;
}

Node compare_model(const std::vector<verdict::Candidate>& cs, double tolerance) {
    Node d;
    d.shape = Node::Shape::Group;
    Node& rs = d.list("regimens", "Regimens");
    for (const auto& c : cs) {
        rs.items.push_back(run_model(c.regimen, c.sim, c.exposure, tolerance));
        rs.items.back().key.clear();
    }
    d.leaf("caution", Value::words(kCaution));
    return d;
}

}  // namespace plateau::report
