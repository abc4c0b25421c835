#include "report/exposure_text.hpp"

#include <algorithm>
#include <string>
#include <vector>

#include "report/cycle_words.hpp"
#include "report/format.hpp"
#include "report/run_model.hpp"

namespace plateau::report {

namespace {

void row(std::ostream& out, std::string_view label, const std::string& value) {
    out << "  " << pad_right(label, 34) << value << '\n';
}

}  // namespace

void write_exposure_text(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const TextOptions& opt) {
    // Every figure and label from the report model; the layout is this writer's.
    const Node doc = run_model(r, s, e, 0.0);
    const std::string u = doc.at("unit").value.text;
    const std::string au = doc.at("auc_unit").value.text;
    const int dg = opt.digits;
    auto v = [](const Node& n) { return n.value.number; };
    auto c = [&](const Node& n) { return num(v(n), dg) + " " + u; };
    // A time in hours, and as day and clock time when asked.
    auto when = [&](double t) { return num(t, 6) + " h" + (opt.clock ? " (" + day_clock(t, *opt.clock) + ")" : ""); };
    auto at = [&](const Node& n) { return " at " + when(v(n)); };
    const double start = v(doc.at("horizon/from")), end = v(doc.at("horizon/to"));

    out << "Exposure of '" << doc.at("output").value.text << "' (" << u << ") from " << num(start, 6) << " to "
        << num(end, 6) << " h\n";
    const Node& peak = doc.at("peak");
    row(out, peak.label, c(peak.at("value")) + at(peak.at("time")));
    const Node& minimum = doc.at("minimum");
    row(out, minimum.label, c(minimum.at("value")) + at(minimum.at("time")));
    const Node& auc = doc.at("auc");
    row(out, auc.label, num(v(auc.at("value")), dg) + " " + au + " from " + num(start, 6) + " to " + num(end, 6) + " h");
    const Node& windows = doc.at("auc_windows");
    for (const Node& w : windows.items)
        row(out, windows.label + " " + num(v(w.at("from")), 4) + " h .. " + num(v(w.at("to")), 4) + " h",
            num(v(w.at("value")), dg) + " " + au);
    const Node& days = doc.at("days");
    if (!days.items.empty()) {
        auto day = [&](const Node& d) { return num(v(d.at("auc")), 5) + (d.at("partial").value.flag ? " (partial)" : ""); };
        std::string text;
        for (std::size_t i = 0; i < days.items.size() && i < 3; ++i) text += (i ? ", " : "") + day(days.items[i]);
        if (days.items.size() > 3) text += ", ... last " + day(days.items.back());
        row(out, label_with_unit(days.label, au), text);
    }
    if (const Node* above = doc.find("above")) {
        const std::string threshold = c(above->at("threshold"));
        row(out, above->at("hours").label + " " + threshold,
            hours(v(above->at("hours"))) + " (" + shown(above->at("fraction")) + " of the horizon)");
        const Node& first = above->at("first_reached");
        row(out, first.label + " " + threshold, first.value.present() ? "at " + when(v(first)) : shown(first));
        const Node& crossings = doc.at("crossings");
        std::string xs;
        for (std::size_t i = 0; i < crossings.items.size() && i < 3; ++i)
            xs += (i ? ", " : "") + num(v(crossings.items[i].at("time")), 6) + " " +
                  crossings.items[i].at("direction").value.text;
        if (crossings.items.size() > 3) xs += ", ... (" + std::to_string(crossings.items.size()) + " in all, --json)";
        row(out, label_with_unit(crossings.label, "h"), xs.empty() ? "none" : xs);
    }
    if (const Node* window = doc.find("window")) {
        const std::string wn = num(v(window->at("low"))) + " .. " + c(window->at("high"));
        row(out, window->at("hours").label + " " + wn,
            hours(v(window->at("hours"))) + " (" + shown(window->at("fraction")) + ")");
        row(out, window->at("above_high_hours").label + " " + c(window->at("high")),
            hours(v(window->at("above_high_hours"))) + " (" + shown(window->at("above_high_fraction")) + ")");
    }

    const Node& intervals = doc.at("intervals");
    if (!intervals.items.empty()) {
        const bool above = doc.find("above") != nullptr, window = doc.find("window") != nullptr;
        out << "\n" << intervals.label << " (" << intervals.items.size() << "; " << doc.at("output").value.text << " in "
            << u << ", AUC in " << au << ")\n";
        std::vector<std::string> head = {"start h", "end h", "peak", "at h", "trough", "minimum", "AUC"};
        if (above) head.push_back("above h");
        if (window) head.push_back("window h");
        std::vector<const char*> keys = {"start", "end", "peak", "peak_time", "trough", "minimum", "auc"};
        if (above) keys.push_back("above_hours");
        if (window) keys.push_back("window_hours");
        // Columns of at least 10, wider when a value needs it (two spaces between values, always).
        std::size_t wcol = 10;
        for (const auto& iv : intervals.items)
            for (const char* k : keys) wcol = std::max(wcol, shown(iv.at(k)).size() + 2);
        out << "  ";
        for (const auto& h : head) out << pad_left(h, wcol);
        if (opt.clock) out << pad_left("starts", 13);
        out << '\n';
        auto line = [&](const Node& iv) {
            out << "  ";
            for (const char* k : keys) out << pad_left(shown(iv.at(k)), wcol);
            if (opt.clock) out << pad_left(day_clock(v(iv.at("start")), *opt.clock), 13);
            out << (iv.at("partial").value.flag ? " *" : "") << '\n';
        };
        const std::size_t n = intervals.items.size();
        const std::size_t hn = static_cast<std::size_t>(opt.head), tn = static_cast<std::size_t>(opt.tail);
        if (opt.all_intervals || n <= hn + tn + 1) {
            for (const auto& iv : intervals.items) line(iv);
        } else {
            for (std::size_t i = 0; i < hn; ++i) line(intervals.items[i]);
            out << "  " << pad_left("... " + std::to_string(n - hn - tn) + " more (--intervals all)", 40) << '\n';
            for (std::size_t i = n - tn; i < n; ++i) line(intervals.items[i]);
        }
        if (intervals.items.back().at("partial").value.flag)
            out << "  * cut short by the end of the horizon: its trough is the value at the horizon end\n";
    }

    if (e.steady) {
        const auto& st = *e.steady;
        const Node& ss = doc.at("steady_state");
        out << "\n" << ss.label << " ("
            << (st.interval > 0 ? cycle_description(st, r.model) : std::string("dosing pattern")) << ", solved directly)\n";
        if (const Node* reason = ss.find("reason")) row(out, reason->label, reason->value.text);
        if (st.found) {
            const std::string per = " per " + cycle_noun(st);
            auto share = [&](const char* h, const char* f) {
                return hours(v(ss.at(h))) + per + " (" + shown(ss.at(f)) + ")";
            };
            if (ss.at("constant").value.flag) {
                row(out, "Level", c(ss.at("peak")) + ", constant (continuous input)");
            } else {
                row(out, ss.at("peak").label, c(ss.at("peak")) + ", " + num(v(ss.at("peak_time")), 6) + " h " +
                                                  after_cycle_start(st));
                if (multi_dose_cycle(st)) {
                    row(out, ss.at("trough").label + " (lowest before a dose)",
                        c(ss.at("trough")) + ", before the dose at +" + num(v(ss.at("trough_time")), 6) + " h");
                    std::string ts;
                    for (const Node& t : ss.at("troughs").items)
                        ts += (ts.empty() ? "" : ", ") + std::string("+") + num(v(t.at("offset")), 6) +
                              " h: " + num(v(t.at("value")), dg);
                    row(out, label_with_unit(ss.at("troughs").label, u), ts);
                } else {
                    row(out, ss.at("trough").label, c(ss.at("trough")) + " (just before the next dose)");
                }
                if (st.dips_below_trough())
                    row(out, ss.at("minimum").label, c(ss.at("minimum")) + ", " + num(v(ss.at("minimum_time")), 6) +
                                                         " h " + after_cycle_start(st));
            }
            row(out, ss.at("average").label, c(ss.at("average")));
            row(out, ss.at("auc").label + " " + cycle_noun(st) + " / per 24 h",
                num(v(ss.at("auc")), dg) + " / " + num(v(ss.at("auc24")), dg) + " " + au);
            if (const Node* above = doc.find("above"))
                row(out, ss.at("above_hours").label + " " + c(above->at("threshold")), share("above_hours", "above_fraction"));
            if (ss.find("window_hours")) {
                row(out, ss.at("window_hours").label, share("window_hours", "window_fraction"));
                row(out, ss.at("above_high_hours").label, share("above_high_hours", "above_high_fraction"));
            }
            row(out, ss.at("accumulation").label,
                shown(ss.at("accumulation")) + " (steady state / one " + cycle_noun(st) + "'s doses alone)");
            for (const char* k : {"within_10pct", "within_5pct"}) {
                const Node& w = ss.at(k);
                row(out, w.label, w.value.present() ? "from " + when(v(w)) : shown(w));
            }
        }
    }
    const Node& targets = doc.at("targets");
    if (!targets.items.empty()) {
        out << "\n" << targets.label << "\n";
        for (const Node& t : targets.items) {
            const Value& met = t.at("met").value;
            out << "  " << pad_right(met.present() ? (met.flag ? "meets" : "falls short") : shown(t.at("met")), 14)
                << t.at("what").value.text << '\n';
        }
    }
}

}  // namespace plateau::report
