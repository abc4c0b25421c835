#include "report/compare.hpp"

#include <algorithm>
#include <cmath>

#include "report/caution.hpp"
#include "report/compare_model.hpp"
#include "report/format.hpp"
#include "verdict/compare.hpp"

namespace plateau::report {

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

void write_compare_text(std::ostream& out, const std::vector<Candidate>& cs, const CompareHeader& h) {
    const std::size_t width = 100;
    wrap(out, std::string("CAUTION: ") + kCaution, width, "", "         ");
    out << '\n';
    if (cs.empty()) return;
    const auto& first = cs.front();
    const auto& o = verdict::output_of(first);
    out << "Comparison of " << cs.size() << " regimen" << (cs.size() == 1 ? "" : "s") << " — " << models_line(cs)
        << ", output '" << o.name << "' (" << o.unit_text << ")\n";
    out << "Tolerance " << tolerance_text(h.tolerance) << (h.date.empty() ? "" : ", " + h.date) << "; figures from the exact step polynomials\n\n";
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
    const Table table = comparison_table(cs);
    std::size_t label_w = 0;
    for (const auto& r : table.rows) label_w = std::max(label_w, display_width(label_with_unit(r.label, r.unit)));
    std::size_t cell_w = 9;
    for (const auto& r : table.rows)
        for (std::size_t i = 0; i < r.cells.size(); ++i) cell_w = std::max(cell_w, display_width(shown(r, i)) + 2);
    // Keep within the width: shrink the label column first, never the numbers.
    const std::size_t room = width > cell_w * cs.size() + 2 ? width - cell_w * cs.size() - 2 : 20;
    label_w = std::min(label_w, std::max<std::size_t>(room, 20));
    out << "  " << pad_right("", label_w);
    for (const auto& c : table.columns) out << pad_left(c, cell_w);
    out << '\n';
    out << "  " << std::string(label_w + cell_w * cs.size(), '-') << '\n';
    for (const auto& r : table.rows) {
        std::string label = label_with_unit(r.label, r.unit);
        if (display_width(label) > label_w) label = r.label.substr(0, label_w);
        out << "  " << pad_right(label, label_w);
        for (std::size_t i = 0; i < r.cells.size(); ++i) out << pad_left(shown(r, i), cell_w);
        out << '\n';
    }

    const auto checks = verdict::target_checks(cs);
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
    const auto sentences = verdict::summary_sentences(cs);
    if (!sentences.empty()) {
        out << "\nIn plain words\n";
        for (const auto& s : sentences) wrap(out, s, width, "  - ", "    ");
    }
    out << '\n';
    if (!h.trailer.empty()) out << h.trailer << '\n';
    wrap(out, std::string("CAUTION: ") + kCaution, width, "", "         ");
}

}  // namespace plateau::report
