#include "plot/sample.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <utility>

namespace plateau::plot {

plot::Curve sample(const traj::Trajectory& tr, int s, double a, double b, int n, double unit_factor,
                   const std::vector<double>& jumps, std::string label) {
    if (n < 2) throw std::invalid_argument("plot::sample: need at least 2 points, got " + std::to_string(n));
    if (!(b > a)) throw std::invalid_argument("plot::sample: the interval end must be after its start");
    if (!(unit_factor > 0.0) || !std::isfinite(unit_factor))
        throw std::invalid_argument("plot::sample: the unit factor must be a positive finite number");
    Curve c;
    c.label = std::move(label);
    if (tr.empty()) return c;
    if (s < 0 || s >= tr.n_series()) throw std::invalid_argument("plot::sample: series index out of range");

    const double lo = std::max(a, tr.start());
    const double hi = std::min(b, tr.end());
    if (lo > hi) return c;

    std::vector<double> jt;
    for (double t : jumps)
        if (t >= lo && t <= hi) jt.push_back(t);
    std::sort(jt.begin(), jt.end());
    jt.erase(std::unique(jt.begin(), jt.end()), jt.end());

    const std::size_t cap = static_cast<std::size_t>(n) + 2 + 2 * jt.size();
    c.t.reserve(cap);
    c.y.reserve(cap);
    auto put = [&](double t, double v) {
        c.t.push_back(t);
        c.y.push_back(v / unit_factor);
    };

    // Grid points on [a, b] inside the trajectory, plus its ends when [a, b] reaches past them.
    std::vector<double> grid;
    grid.reserve(static_cast<std::size_t>(n) + 2);
    if (lo > a) grid.push_back(lo);
    for (int i = 0; i < n; ++i) {
        const double t = (i == n - 1) ? b : a + (b - a) * static_cast<double>(i) / static_cast<double>(n - 1);
        if (t >= lo && t <= hi) grid.push_back(t);
    }
    if (hi < b) grid.push_back(hi);

    // Merge; a grid point that falls exactly on a jump is covered by the jump's two points.
    std::size_t j = 0;
    for (double t : grid) {
        while (j < jt.size() && jt[j] <= t) {
            put(jt[j], tr.left_limit(s, jt[j]));
            put(jt[j], tr.value(s, jt[j]));
            ++j;
        }
        if (j > 0 && jt[j - 1] == t) continue;
        put(t, tr.value(s, t));
    }
    for (; j < jt.size(); ++j) {
        put(jt[j], tr.left_limit(s, jt[j]));
        put(jt[j], tr.value(s, jt[j]));
    }
    return c;
}

}  // namespace plateau::plot
