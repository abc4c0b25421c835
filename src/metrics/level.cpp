#include "metrics/level.hpp"

#include <algorithm>
#include <cmath>

#include "trajectory/poly.hpp"

namespace plateau::metrics {

namespace {

// One walk over the steps that meet [a, b]: each step's polynomial is fetched once, its start (both limits)
// and its interior critical points are the candidates, and the O(d) bound in critical_points_in skips the
// root isolation on steps where the derivative keeps its sign.
template <class Better>
Extreme extreme(const traj::Trajectory& tr, int s, double a, double b, Better better) {
    Extreme best{tr.value(s, a), a};
    auto consider = [&](double t, double v) {
        if (better(v, best.value)) best = {v, t};
    };
    traj::PolyBuffer bufs[2];
    std::span<const double> prev;
    double prev_t0 = 0.0;
    int which = 0;
    for (std::size_t k = tr.step_at(a); k < tr.size() && tr.step_start(k) < b; ++k) {
        const double t0 = tr.step_start(k);
        const std::span<const double> p = tr.poly(k, s, bufs[which]);
        which ^= 1;
        if (t0 > a) {
            if (k > 0) consider(t0, traj::horner(prev.empty() ? tr.poly(k - 1, s, bufs[which]) : prev, t0 - (prev.empty() ? tr.step_start(k - 1) : prev_t0)));
            consider(t0, p[0]);
        }
        for (double tau : traj::critical_points_in(p, tr.step_length(k))) {
            const double t = t0 + tau;
            if (t > a && t < b) consider(t, traj::horner(p, t - t0));
        }
        prev = p;
        prev_t0 = t0;
    }
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
    // The pieces lie in the steps in time order: walk both, fetching each step's polynomial once.
    std::size_t k = tr.step_at(cuts.front());
    traj::PolyBuffer buf;
    std::span<const double> p = tr.poly(k, series, buf);
    for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
        const double lo = cuts[i], hi = cuts[i + 1];
        if (!(hi > lo)) continue;
        const double mid = 0.5 * (lo + hi);
        if (k + 1 < tr.size() && tr.step_start(k + 1) <= mid) {
            while (k + 1 < tr.size() && tr.step_start(k + 1) <= mid) ++k;
            p = tr.poly(k, series, buf);
        }
        // Above means above by more than round-off: a curve sitting on the level (a plateau exactly at a
        // threshold) is not above it, whatever the last bits say.
        int state = traj::horner(p, mid - tr.step_start(k)) - c > 1e-12 * std::abs(c) ? 1 : -1;
        // A sliver between a root and a step boundary that round-off put a hair apart: no new crossing.
        if (prev != 0 && hi - lo < 1e-12 * std::max(1.0, std::abs(hi))) state = prev;
        if (state == 1) out.hours_above += hi - lo;
        if (prev != 0 && state != prev) out.crossings.push_back({lo, state == 1});
        prev = state;
    }
    return out;
}

}  // namespace plateau::metrics
