#include "report/targets.hpp"

#include "report/format.hpp"

namespace plateau::report {

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

}  // namespace plateau::report
