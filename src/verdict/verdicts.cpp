#include "verdict/verdicts.hpp"

#include "report/format.hpp"

namespace plateau::verdict {

using report::auc_unit;
using report::in_output_unit;
using report::num;
using report::percent;

std::vector<Verdict> verdicts(const regimen::Targets& t, const model::Output& o, const metrics::Exposure& e) {
    std::vector<Verdict> out;
    auto conc_text = [&](double v) { return num(in_output_unit(o, v)) + " " + o.unit_text; };
    const metrics::Steady* st = e.steady && e.steady->found ? &*e.steady : nullptr;
    if (t.above) {
        const double need = t.above_for.value_or(1.0);
        Verdict v{"above",
                  need >= 1.0 ? "stays above " + conc_text(*t.above) + " through each interval at steady state"
                              : "above " + conc_text(*t.above) + " for at least " + percent(need) +
                                    " of each interval at steady state",
                  std::nullopt};
        if (st) v.met = st->above_hours / st->interval >= need - 1e-12;
        out.push_back(v);
    }
    if (t.window) {
        Verdict v{"window",
                  "whole steady-state range inside " + num(in_output_unit(o, t.window->first)) + " .. " +
                      conc_text(t.window->second),
                  std::nullopt};
        if (st)
            v.met = st->peak.value <= t.window->second * (1 + 1e-12) &&
                    st->minimum.value >= t.window->first * (1 - 1e-12);
        out.push_back(v);
    }
    if (t.auc24) {
        Verdict v{"auc24",
                  "steady-state AUC24 within " + num(in_output_unit(o, t.auc24->first)) + " .. " +
                      num(in_output_unit(o, t.auc24->second)) + " " + auc_unit(o.unit_text),
                  std::nullopt};
        if (st) v.met = st->auc24 >= t.auc24->first * (1 - 1e-12) && st->auc24 <= t.auc24->second * (1 + 1e-12);
        out.push_back(v);
    }
    return out;
}

std::string letter_for(std::size_t i) {
    std::string s;
    std::size_t n = i + 1;
    while (n > 0) {
        s.insert(s.begin(), static_cast<char>('A' + (n - 1) % 26));
        n = (n - 1) / 26;
    }
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

}  // namespace plateau::verdict
