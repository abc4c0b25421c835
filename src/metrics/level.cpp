#include "metrics/level.hpp"

#include <algorithm>
#include <cmath>

namespace plateau::metrics {

namespace {

template <class Better>
Extreme extreme(const traj::Trajectory& tr, int s, double a, double b, Better better) {
    Extreme best{tr.value(s, a), a};
    auto consider = [&](double t, double v) {
        if (better(v, best.value)) best = {v, t};
    };
    for (double t : tr.boundaries(a, b)) {
        consider(t, tr.left_limit(s, t));
        consider(t, tr.value(s, t));
    }
    for (double t : tr.critical_points(s, a, b)) consider(t, tr.value(s, t));
    if (b > a) consider(b, tr.left_limit(s, b));
    return best;
}

}  // namespace

Extreme maximum(const traj::Trajectory& tr, int series, double a, double b) {
    return extreme(tr, series, a, b, [](double v, double best) { return v > best; });
}

Extreme minimum(const traj::Trajectory& tr, int series, double a, double b) {
    return extreme(tr, series, a, b, [](double v, double best) { return v < best; });
}

LevelResult level(const traj::Trajectory& tr, int series, double c, double a, double b) {
    LevelResult out;
    if (tr.empty() || !(b > a)) return out;
    std::vector<double> cuts = tr.boundaries(a, b);
    const std::vector<double> roots = tr.level_roots(series, c, a, b);
    cuts.insert(cuts.end(), roots.begin(), roots.end());
    cuts.push_back(a);
    cuts.push_back(b);
    std::sort(cuts.begin(), cuts.end());
    cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());

    int prev = 0;  // 0 unknown, 1 above, −1 at or below
    for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
        const double lo = cuts[i], hi = cuts[i + 1];
        if (!(hi > lo)) continue;
        const double mid = 0.5 * (lo + hi);
        // Above means above by more than round-off: a curve sitting on the level (a plateau exactly at a
        // threshold) is not above it, whatever the last bits say.
        int state = tr.value(series, mid) - c > 1e-12 * std::abs(c) ? 1 : -1;
        // A sliver between a root and a step boundary that round-off put a hair apart: no new crossing.
        if (prev != 0 && hi - lo < 1e-12 * std::max(1.0, std::abs(hi))) state = prev;
        if (state == 1) out.hours_above += hi - lo;
        if (prev != 0 && state != prev) out.crossings.push_back({lo, state == 1});
        prev = state;
    }
    return out;
}

}  // namespace plateau::metrics
