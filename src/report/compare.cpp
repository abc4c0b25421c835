#include "report/compare.hpp"

#include <algorithm>
#include <cmath>

#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/targets.hpp"

namespace plateau::report {

std::string letter_for(std::size_t i) {
    std::string s;
    std::size_t n = i + 1;
    while (n > 0) {
        s.insert(s.begin(), static_cast<char>('A' + (n - 1) % 26));
        n = (n - 1) / 26;
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
            f.auc24_ss = st.auc24;
            if (e.above) f.above_ss_fraction = st.above_hours / st.interval;
            if (e.window) {
                f.window_ss_fraction = st.window_hours / st.interval;
                f.above_window_ss_fraction = st.above_window_hours / st.interval;
            }
            f.within_10pct = st.within_10pct;
        } else {
            f.no_steady_state = st.why_not;
        }
    }
    return f;
}

namespace {

const model::Output& output_of(const Candidate& c) {
    return c.regimen.model.outputs[static_cast<std::size_t>(c.exposure.output)];
}

std::string conc(const Candidate& c, std::optional<double> v) {
    return v ? num(in_output_unit(output_of(c), *v)) : "—";
}

std::string opt_hours(std::optional<double> h) { return h ? num(*h, 4) : "—"; }

std::string opt_percent(std::optional<double> f) { return f ? percent(*f) : "—"; }

}  // namespace

std::vector<Row> comparison_rows(const std::vector<Candidate>& cs) {
    std::vector<Row> rows;
    if (cs.empty()) return rows;
    const auto& o = output_of(cs.front());
    const std::string u = o.unit_text, au = auc_unit(o.unit_text);
    std::vector<Figures> fs;
    for (const auto& c : cs) fs.push_back(figures_of(c));
    auto add = [&](std::string label, std::string unit, auto cell) {
        Row r{std::move(label), std::move(unit), {}};
        for (std::size_t i = 0; i < cs.size(); ++i) r.cells.push_back(cell(cs[i], fs[i]));
        rows.push_back(std::move(r));
    };
    const bool any_above = std::any_of(cs.begin(), cs.end(), [](const Candidate& c) { return c.exposure.above.has_value(); });
    const bool any_window = std::any_of(cs.begin(), cs.end(), [](const Candidate& c) { return c.exposure.window.has_value(); });
    const bool any_steady = std::any_of(fs.begin(), fs.end(), [](const Figures& f) { return f.repeats; });

    add("Dose per day", "mg/day", [](const Candidate&, const Figures& f) {
        return f.repeats ? num(f.dose_per_day) : std::string("—");
    });
    add("Doses (total mg)", "", [](const Candidate&, const Figures& f) {
        return std::to_string(f.doses) + " (" + num(f.total_dose, 4) + ")";
    });
    add("First-dose peak", u, [](const Candidate& c, const Figures& f) { return conc(c, f.first_peak); });
    if (any_steady) {
        add("Steady-state peak", u, [](const Candidate& c, const Figures& f) { return conc(c, f.ss_peak); });
        add("Steady-state trough", u, [](const Candidate& c, const Figures& f) { return conc(c, f.ss_trough); });
        // The lowest value differs from the trough when it comes after the dose (an absorption lag): the window
        // verdict uses it, so the table shows it.
        const bool any_lowest = std::any_of(cs.begin(), cs.end(), [](const Candidate& c) {
            const auto& st = c.exposure.steady;
            return st && st->found && st->dips_below_trough();
        });
        if (any_lowest)
            add("Steady-state lowest", u, [](const Candidate& c, const Figures& f) {
                const auto& st = c.exposure.steady;
                return f.ss_peak ? conc(c, st->minimum.value) : std::string("—");
            });
        add("Steady-state average", u, [](const Candidate& c, const Figures& f) { return conc(c, f.ss_average); });
    }
    add("AUC24, day 1", au, [](const Candidate& c, const Figures& f) {
        return num(in_output_unit(output_of(c), f.auc24_day1));
    });
    // Windows asked with --auc, in the order given (every candidate has the same list).
    for (std::size_t w = 0; w < cs.front().exposure.auc_windows.size(); ++w) {
        const auto& aw = cs.front().exposure.auc_windows[w];
        add("AUC " + num(aw.from, 6) + "–" + num(aw.to, 6) + " h", au, [w](const Candidate& c, const Figures&) {
            const auto& ws = c.exposure.auc_windows;
            return w < ws.size() ? num(in_output_unit(output_of(c), ws[w].value)) : std::string("—");
        });
    }
    if (any_steady)
        add("AUC24, steady state", au, [](const Candidate& c, const Figures& f) {
            return f.auc24_ss ? num(in_output_unit(output_of(c), *f.auc24_ss)) : std::string("—");
        });
    if (any_above) {
        add("Time above threshold, day 1", "h", [](const Candidate&, const Figures& f) { return opt_hours(f.above_day1_hours); });
        // The day a missed or late dose hurts most: shown when, for some regimen, it is not the first day.
        const bool later_worst = std::any_of(fs.begin(), fs.end(), [](const Figures& f) { return f.above_worst_day > 1; });
        if (later_worst)
            add("Time above threshold, worst day", "h", [](const Candidate&, const Figures& f) {
                return f.above_worst_day_hours
                           ? opt_hours(f.above_worst_day_hours) + " d" + std::to_string(f.above_worst_day)
                           : std::string("—");
            });
        if (any_steady)
            add("Time above threshold, ss", "% of τ", [](const Candidate&, const Figures& f) { return opt_percent(f.above_ss_fraction); });
        add("First reaches threshold", "h", [](const Candidate&, const Figures& f) {
            return f.above_day1_hours ? (f.first_reached ? num(*f.first_reached, 4) : std::string("never")) : std::string("—");
        });
    }
    if (any_window && any_steady) {
        add("Time in window, ss", "% of τ", [](const Candidate&, const Figures& f) { return opt_percent(f.window_ss_fraction); });
        add("Time above window, ss", "% of τ", [](const Candidate&, const Figures& f) { return opt_percent(f.above_window_ss_fraction); });
    }
    if (any_steady)
        add("Within 10 % of steady state", "h", [](const Candidate&, const Figures& f) {
            if (!f.repeats) return std::string("—");
            if (!f.no_steady_state.empty()) return std::string("none");
            return f.within_10pct ? num(*f.within_10pct, 4) : std::string("later");
        });
    return rows;
}

std::vector<TargetCheck> target_checks(const std::vector<Candidate>& cs) {
    std::vector<TargetCheck> out;
    if (cs.empty()) return out;
    // Every candidate is judged against the same targets (see unify_targets): the first one's.
    const auto& t = cs.front().regimen.targets;
    for (const auto& v : verdicts(t, output_of(cs.front()), cs.front().exposure)) out.push_back({v.what, {}});
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

namespace {

// Wraps text to `width` columns with a hanging indent.
void wrap(std::ostream& out, const std::string& text, std::size_t width, const std::string& first,
          const std::string& rest) {
    std::string line = first;
    std::size_t col = display_width(first);
    std::size_t pos = 0;
    bool at_start = true;
    while (pos < text.size()) {
        std::size_t sp = text.find(' ', pos);
        if (sp == std::string::npos) sp = text.size();
        const std::string word = text.substr(pos, sp - pos);
        const std::size_t w = display_width(word);
        if (!at_start && col + 1 + w > width) {
            out << line << '\n';
            line = rest;
            col = display_width(rest);
            at_start = true;
        }
        if (!at_start) {
            line += ' ';
            ++col;
        }
        line += word;
        col += w;
        at_start = false;
        pos = sp + 1;
    }
    out << line << '\n';
}

}  // namespace

std::string models_line(const std::vector<Candidate>& cs) {
    std::vector<std::pair<std::string, std::string>> groups;  // model id -> letters
    for (const auto& c : cs) {
        auto it = std::find_if(groups.begin(), groups.end(), [&](const auto& g) { return g.first == c.regimen.model.id; });
        if (it == groups.end()) groups.push_back({c.regimen.model.id, c.letter});
        else it->second += ", " + c.letter;
    }
    if (groups.size() == 1) return "model '" + groups.front().first + "'";
    std::string s = "models ";
    for (std::size_t i = 0; i < groups.size(); ++i)
        s += (i ? ", '" : "'") + groups[i].first + "' (" + groups[i].second + ")";
    return s;
}

namespace {
bool same_targets(const regimen::Targets& a, const regimen::Targets& b) {
    return a.above == b.above && a.above_for == b.above_for && a.window == b.window && a.auc24 == b.auc24;
}
}  // namespace

std::vector<std::string> unify_targets(std::vector<regimen::Regimen>& rs) {
    std::vector<std::string> notes;
    if (rs.empty()) return notes;
    regimen::Targets common = rs.front().targets;
    common.above.reset();
    common.above_for.reset();
    common.window.reset();
    common.auc24.reset();
    for (const auto& r : rs)
        if (r.targets.above) {
            common.above = r.targets.above;
            common.above_for = r.targets.above_for;
            break;
        }
    for (const auto& r : rs)
        if (r.targets.window) { common.window = r.targets.window; break; }
    for (const auto& r : rs)
        if (r.targets.auc24) { common.auc24 = r.targets.auc24; break; }
    for (std::size_t i = 0; i < rs.size(); ++i) {
        auto& t = rs[i].targets;
        if (!same_targets(t, common) && (t.above || t.window || t.auc24))
            notes.push_back(letter_for(i) + "'s file sets other targets than the ones compared here; every regimen is "
                            "measured against the same targets (set them with --above, --window, --above-for, --auc24).");
        common.output = t.output;
        common.pos = t.pos;
        t = common;
    }
    return notes;
}

void write_compare_text(std::ostream& out, const std::vector<Candidate>& cs, const CompareHeader& h) {
    const std::size_t width = 100;
    wrap(out, std::string("CAUTION: ") + kCaution, width, "", "         ");
    out << '\n';
    if (cs.empty()) return;
    const auto& first = cs.front();
    const auto& o = output_of(first);
    out << "Comparison of " << cs.size() << " regimen" << (cs.size() == 1 ? "" : "s") << " — " << models_line(cs)
        << ", output '" << o.name << "' (" << o.unit_text << ")\n";
    char tol[32];
    std::snprintf(tol, sizeof tol, "%.0e", h.tolerance);
    out << "Tolerance " << tol << (h.date.empty() ? "" : ", " + h.date) << "; figures from the exact step polynomials\n\n";
    for (const auto& c : cs) {
        wrap(out, c.regimen.id + (c.regimen.about.empty() ? "" : " — " + c.regimen.about), width,
             "  " + pad_right(c.letter, 3) + "", "     ");
    }
    const auto& t = first.regimen.targets;
    if (first.exposure.above || first.exposure.window) {
        std::string tg = "Targets:";
        if (first.exposure.above) {
            tg += " threshold " + num(in_output_unit(o, *first.exposure.above)) + " " + o.unit_text;
            if (t.above_for) tg += " for " + percent(*t.above_for) + " of each interval";
            tg += ";";
        }
        if (first.exposure.window)
            tg += " window " + num(in_output_unit(o, first.exposure.window->first)) + " .. " +
                  num(in_output_unit(o, first.exposure.window->second)) + " " + o.unit_text + ";";
        if (t.auc24)
            tg += " AUC24 " + num(in_output_unit(o, t.auc24->first)) + " .. " + num(in_output_unit(o, t.auc24->second)) +
                  " " + auc_unit(o.unit_text) + ";";
        tg.pop_back();
        out << '\n';
        wrap(out, tg, width, "", "  ");
    }
    for (const auto& n : h.notes) wrap(out, "Note: " + n, width, "", "      ");
    out << '\n';

    // The table: label + unit column, then one column per regimen.
    const std::vector<Row> rows = comparison_rows(cs);
    std::size_t label_w = 0;
    auto label_of = [](const Row& r) { return r.unit.empty() ? r.label : r.label + " (" + r.unit + ")"; };
    for (const auto& r : rows) label_w = std::max(label_w, display_width(label_of(r)));
    std::size_t cell_w = 9;
    for (const auto& r : rows)
        for (const auto& c : r.cells) cell_w = std::max(cell_w, display_width(c) + 2);
    // Keep within the width: shrink the label column first, never the numbers.
    const std::size_t room = width > cell_w * cs.size() + 2 ? width - cell_w * cs.size() - 2 : 20;
    label_w = std::min(label_w, std::max<std::size_t>(room, 20));
    out << "  " << pad_right("", label_w);
    for (const auto& c : cs) out << pad_left(c.letter, cell_w);
    out << '\n';
    out << "  " << std::string(label_w + cell_w * cs.size(), '-') << '\n';
    for (const auto& r : rows) {
        std::string label = label_of(r);
        if (display_width(label) > label_w) label = r.label.substr(0, label_w);
        out << "  " << pad_right(label, label_w);
        for (const auto& c : r.cells) out << pad_left(c, cell_w);
        out << '\n';
    }

    const auto checks = target_checks(cs);
    if (!checks.empty()) {
        out << "\nTargets met\n";
        for (const auto& tc : checks) {
            wrap(out, tc.what, width, "  ", "  ");
            std::string verdicts;
            for (std::size_t i = 0; i < cs.size(); ++i) {
                const auto& m = tc.met[i];
                verdicts += (i ? "; " : "") + cs[i].letter + ": " +
                            (m ? (*m ? "meets" : "falls short") : "not assessed (no steady state)");
            }
            wrap(out, verdicts, width, "    ", "    ");
        }
    }
    const auto sentences = summary_sentences(cs);
    if (!sentences.empty()) {
        out << "\nIn plain words\n";
        for (const auto& s : sentences) wrap(out, s, width, "  - ", "    ");
    }
    out << '\n';
    if (!h.trailer.empty()) out << h.trailer << '\n';
    wrap(out, std::string("CAUTION: ") + kCaution, width, "", "         ");
}

}  // namespace plateau::report
