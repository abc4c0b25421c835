#include "dose/goals.hpp"

#include <limits>

#include "report/format.hpp"

namespace plateau::dose {

std::vector<Goal> goals_of(const regimen::Targets& t, const model::Output& o) {
    std::vector<Goal> g;
    auto conc = [&](double v) { return report::num(report::in_output_unit(o, v)) + " " + o.unit_text; };
    auto auc = [&](double v) {
        return report::num(report::in_output_unit(o, v)) + " " + report::auc_unit(o.unit_text);
    };
    if (t.above) {
        const double share = t.above_for.value_or(1.0);
        if (share >= 1.0)
            g.push_back({Side::Lower, Figure::Lowest, *t.above * (1.0 + kAboveMargin), "threshold",
                         "threshold " + conc(*t.above)});
        else
            g.push_back({Side::Lower, Figure::AboveShare, share, "threshold",
                         report::percent(share) + " of each interval above " + conc(*t.above)});
    }
    if (t.window) {
        if (t.window->first > 0.0)
            g.push_back(
                {Side::Lower, Figure::Lowest, t.window->first, "window low", "window low " + conc(t.window->first)});
        g.push_back(
            {Side::Upper, Figure::Peak, t.window->second, "window high", "window high " + conc(t.window->second)});
    }
    if (t.auc24) {
        const auto [lo, hi] = *t.auc24;
        if (lo == hi) {
            g.push_back({Side::Exact, Figure::Auc24, lo, "AUC24 =", "AUC24 = " + auc(lo)});
        } else {
            if (lo > 0.0) g.push_back({Side::Lower, Figure::Auc24, lo, "AUC24 low", "AUC24 low " + auc(lo)});
            g.push_back({Side::Upper, Figure::Auc24, hi, "AUC24 high", "AUC24 high " + auc(hi)});
        }
    }
    return g;
}

double figure_of(const Goal& g, const metrics::Exposure& e) {
    if (!e.steady) return std::numeric_limits<double>::quiet_NaN();
    if (!e.steady->found) return std::numeric_limits<double>::infinity();
    const metrics::Steady& s = *e.steady;
    switch (g.figure) {
        case Figure::Lowest:
            return s.minimum.value;
        case Figure::Peak:
            return s.peak.value;
        case Figure::AboveShare:
            return s.above_hours / s.interval;
        case Figure::Auc24:
            return s.auc24;
    }
    return std::numeric_limits<double>::quiet_NaN();
}

std::string figure_name(Figure f) {
    switch (f) {
        case Figure::Lowest:
            return "ss lowest";
        case Figure::Peak:
            return "ss peak";
        case Figure::AboveShare:
            return "above";
        case Figure::Auc24:
            return "AUC24";
    }
    return "";
}

}  // namespace plateau::dose
