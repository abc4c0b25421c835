#include "report/cycle_words.hpp"

#include <algorithm>
#include <vector>

#include "report/format.hpp"

namespace plateau::report {

bool multi_dose_cycle(const metrics::Steady& st) { return st.troughs.size() > 1 || st.cycle_doses.size() > 1; }

std::string cycle_noun(const metrics::Steady& st) { return multi_dose_cycle(st) ? "cycle" : "interval"; }

std::string after_cycle_start(const metrics::Steady& st) {
    return multi_dose_cycle(st) ? "after the cycle's first dose" : "after the dose";
}

std::string cycle_description(const metrics::Steady& st, const model::Model& m) {
    if (!multi_dose_cycle(st)) return "doses every " + num(st.interval, 6) + " h";
    // Group the cycle's doses by (entry): each series lists its offsets.
    std::vector<int> entries;
    for (const auto& d : st.cycle_doses)
        if (std::find(entries.begin(), entries.end(), d.entry) == entries.end()) entries.push_back(d.entry);
    std::string s = "a " + num(st.interval, 6) + "-h cycle of " + std::to_string(st.cycle_doses.size()) + " doses:";
    for (std::size_t i = 0; i < entries.size(); ++i) {
        std::string offs;
        const sim::Dose* first = nullptr;
        for (const auto& d : st.cycle_doses) {
            if (d.entry != entries[i]) continue;
            if (first == nullptr) first = &d;
            offs += (offs.empty() ? "+" : ", +") + num(d.time, 6);
        }
        const std::string route = first->route >= 0 && static_cast<std::size_t>(first->route) < m.routes.size()
                                      ? m.routes[static_cast<std::size_t>(first->route)].name
                                      : "?";
        s += (i ? "; " : " ") + num(first->amount, 6) + " mg " + route + " at " + offs + " h";
    }
    return s;
}

}  // namespace plateau::report
