#include "report/json.hpp"

#include <cmath>
#include <cstdio>
#include <string>

#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/targets.hpp"

namespace plateau::report {

namespace {

std::string quote(std::string_view s) {
    std::string o = "\"";
    for (unsigned char c : s) {
        switch (c) {
            case '"': o += "\\\""; break;
            case '\\': o += "\\\\"; break;
            case '\n': o += "\\n"; break;
            case '\t': o += "\\t"; break;
            case '\r': o += "\\r"; break;
            default:
                if (c < 0x20) {
                    char buf[8];
                    std::snprintf(buf, sizeof buf, "\\u%04x", c);
                    o += buf;
                } else {
                    o += static_cast<char>(c);
                }
        }
    }
    return o + "\"";
}

std::string number(double v) {
    if (!std::isfinite(v)) return "null";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.12g", v);
    return buf;
}

std::string opt_number(const std::optional<double>& v) { return v ? number(*v) : "null"; }

// A tiny streaming writer: objects and arrays with commas handled, two-space indentation.
class Writer {
public:
    Writer(std::ostream& out, int indent) : out_(out), depth_(indent) {}
    void key(std::string_view k) {
        comma();
        out_ << quote(k) << ": ";
        pending_value_ = true;
    }
    void raw(const std::string& v) {
        if (!pending_value_) comma();
        out_ << v;
        pending_value_ = false;
    }
    void field(std::string_view k, const std::string& rawv) { key(k); raw(rawv); }
    void str(std::string_view k, std::string_view v) { field(k, quote(v)); }
    void num(std::string_view k, double v) { field(k, number(v)); }
    void open(char c) {
        if (!pending_value_) comma();
        out_ << c;
        pending_value_ = false;
        ++depth_;
        first_ = true;
    }
    void close(char c) {
        --depth_;
        out_ << '\n' << std::string(static_cast<std::size_t>(2 * depth_), ' ') << c;
        first_ = false;
    }

private:
    void comma() {
        if (!started_) {  // the very first token starts the line it is on
            started_ = true;
            first_ = false;
            return;
        }
        if (!first_) out_ << ',';
        out_ << '\n' << std::string(static_cast<std::size_t>(2 * depth_), ' ');
        first_ = false;
    }
    std::ostream& out_;
    int depth_;
    bool first_ = true;
    bool pending_value_ = false;
    bool started_ = false;
};

}  // namespace

void write_exposure_json(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const JsonContext& ctx, int indent) {
    const model::Output& o = r.model.outputs[static_cast<std::size_t>(e.output)];
    auto c = [&](double v) { return in_output_unit(o, v); };
    Writer w(out, indent);
    w.open('{');
    w.str("regimen", r.id);
    w.str("about", r.about);
    w.str("file", r.path);
    w.str("model", r.model.id);
    w.str("model_file", r.model.path);
    w.key("parameters"); w.open('{');
    {
        const std::vector<double> values = r.parameter_values();
        for (std::size_t i = 0; i < r.model.parameters.size(); ++i) {
            const auto& p = r.model.parameters[i];
            w.key(p.name); w.open('{');
            w.num("value", values[i] / p.unit.factor);
            w.str("unit", p.unit_text);
            w.field("overridden", values[i] != p.value ? "true" : "false");
            w.close('}');
        }
    }
    w.close('}');
    w.str("output", o.name);
    w.str("unit", o.unit_text);
    w.str("auc_unit", auc_unit(o.unit_text));
    w.num("tolerance", ctx.tolerance);
    w.num("steps", static_cast<double>(s.steps));
    w.num("order", s.order);
    w.key("horizon"); w.open('{'); w.num("from", e.start); w.num("to", e.end); w.close('}');
    double total = 0.0;
    for (const auto& d : s.doses) total += d.amount;
    w.key("doses"); w.open('{');
    w.num("count", static_cast<double>(s.doses.size()));
    w.num("total_mg", total);
    w.num("first", e.first_dose);
    w.close('}');
    w.key("peak"); w.open('{'); w.num("value", c(e.peak.value)); w.num("time", e.peak.time); w.close('}');
    w.key("minimum"); w.open('{'); w.num("value", c(e.minimum.value)); w.num("time", e.minimum.time); w.close('}');
    w.key("auc"); w.open('{'); w.num("from", e.start); w.num("to", e.end); w.num("value", c(e.auc)); w.close('}');
    w.key("auc_windows"); w.open('[');
    for (const auto& a : e.auc_windows) {
        w.open('{'); w.num("from", a.from); w.num("to", a.to); w.num("value", c(a.value)); w.close('}');
    }
    w.close(']');
    if (e.above) {
        w.key("above"); w.open('{');
        w.num("threshold", c(*e.above)); w.num("hours", e.above_hours); w.num("fraction", e.above_fraction);
        w.field("first_reached", opt_number(e.first_reached));
        w.close('}');
        w.key("crossings"); w.open('[');
        for (const auto& x : e.crossings) {
            w.open('{'); w.num("time", x.time); w.str("direction", x.up ? "up" : "down"); w.close('}');
        }
        w.close(']');
    }
    if (e.window) {
        w.key("window"); w.open('{');
        w.num("low", c(e.window->first)); w.num("high", c(e.window->second));
        w.num("hours", e.window_hours); w.num("fraction", e.window_fraction);
        w.num("above_high_hours", e.above_window_hours); w.num("above_high_fraction", e.above_window_fraction);
        w.close('}');
    }
    w.key("days"); w.open('[');
    for (const auto& d : e.days) {
        w.open('{'); w.num("start", d.start); w.num("end", d.end); w.num("auc", c(d.auc));
        if (e.above) w.num("above_hours", d.above_hours);
        w.field("partial", d.partial ? "true" : "false"); w.close('}');
    }
    w.close(']');
    w.key("intervals"); w.open('[');
    for (const auto& iv : e.intervals) {
        w.open('{');
        w.num("start", iv.start); w.num("end", iv.end);
        w.num("peak", c(iv.peak.value)); w.num("peak_time", iv.peak.time);
        w.num("trough", c(iv.trough));
        w.num("minimum", c(iv.minimum.value)); w.num("minimum_time", iv.minimum.time);
        w.num("auc", c(iv.auc));
        if (e.above) w.num("above_hours", iv.above_hours);  // absent without a threshold, like the days'
        if (e.window) w.num("window_hours", iv.window_hours);
        w.field("partial", iv.partial ? "true" : "false");
        w.close('}');
    }
    w.close(']');
    if (e.steady) {
        const auto& st = *e.steady;
        w.key("steady_state"); w.open('{');
        w.field("found", st.found ? "true" : "false");
        if (!st.found) w.str("reason", st.why_not);
        w.num("interval", st.interval);
        if (!st.cycle_doses.empty()) {
            // The doses that form the repeating cycle, as offsets from its start.
            w.key("cycle"); w.open('{');
            w.num("period", st.interval);
            w.num("start", st.period_start);
            w.key("doses"); w.open('[');
            for (const auto& d : st.cycle_doses) {
                w.open('{');
                w.num("offset", d.time);
                w.str("route", d.route >= 0 ? r.model.routes[static_cast<std::size_t>(d.route)].name : "");
                w.num("amount_mg", d.amount);
                w.num("over", d.duration);
                w.num("entry", d.entry + 1);
                w.close('}');
            }
            w.close(']');
            w.close('}');
        }
        if (st.found) {
            w.num("peak", c(st.peak.value)); w.num("peak_time", st.peak.time);
            w.field("constant", st.constant ? "true" : "false");
            w.num("trough", c(st.trough)); w.num("trough_time", st.trough_time);
            w.key("troughs"); w.open('[');
            for (const auto& t : st.troughs) {
                w.open('{');
                w.num("offset", t.offset);
                w.num("value", c(t.value));
                w.close('}');
            }
            w.close(']');
            w.num("minimum", c(st.minimum.value)); w.num("minimum_time", st.minimum.time);
            w.num("average", c(st.average));
            w.num("auc", c(st.auc)); w.num("auc24", c(st.auc24));
            if (e.above) {
                w.num("above_hours", st.above_hours);
                w.num("above_fraction", st.interval > 0 ? st.above_hours / st.interval : 0.0);
            }
            if (e.window) {
                w.num("window_hours", st.window_hours);
                w.num("above_high_hours", st.above_window_hours);
            }
            w.num("first_interval_auc", c(st.first_interval_auc));
            w.num("accumulation", st.accumulation);
            w.field("within_10pct", opt_number(st.within_10pct));
            w.field("within_5pct", opt_number(st.within_5pct));
        }
        w.close('}');
    }
    w.key("targets"); w.open('[');
    for (const auto& v : verdicts(r.targets, o, e)) {
        w.open('{');
        w.str("kind", v.kind);
        w.str("what", v.what);
        w.field("met", v.met ? (*v.met ? "true" : "false") : "null");
        w.close('}');
    }
    w.close(']');
    w.str("caution", kCaution);
    w.close('}');
}

}  // namespace plateau::report

namespace plateau::report {

std::string json_string(std::string_view s) { return quote(s); }
std::string json_number(double v) { return number(v); }

}  // namespace plateau::report
