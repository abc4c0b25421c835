#include "metrics/sweep.hpp"

#include <algorithm>
#include <cmath>
#include <span>
#include <stdexcept>

#include "trajectory/poly.hpp"

namespace plateau::metrics {

namespace {

std::span<const double> poly_of(const Sweep& sw, std::size_t k) {
    return {sw.poly(k), static_cast<std::size_t>(sw.degree + 1)};
}

template <class Better>
Extreme extreme(const Sweep& sw, double a, double b, Better better) {
    Extreme best{value_at(sw, a), a};
    auto consider = [&](double t, double v) {
        if (better(v, best.value)) best = {v, t};
    };
    // The candidates of maximum()/minimum(), in their order: both limits at each boundary inside the window,
    // then the step's critical points inside it, then the left limit at b.
    const std::size_t n = sw.steps();
    for (std::size_t k = step_at(sw, a); k < n && sw.t0[k] < b; ++k) {
        const double t0 = sw.t0[k];
        if (t0 > a) {
            if (k > 0) consider(t0, sw.left[k]);
            consider(t0, sw.poly(k)[0]);
        }
        for (std::size_t i = sw.crit_from[k]; i < sw.crit_from[k + 1]; ++i) {
            const double t = sw.crit_t[i];
            if (t > a && t < b) consider(t, sw.crit_v[i]);
        }
    }
    if (b > a) consider(b, left_limit_at(sw, b));
    return best;
}

}  // namespace

Sweep make_sweep(const traj::Trajectory& tr, int series) {
    Sweep sw;
    const std::size_t n = tr.size();
    sw.degree = tr.order();
    const std::size_t stride = static_cast<std::size_t>(sw.degree + 1);
    sw.t0.reserve(n + 1);
    sw.h.reserve(n);
    sw.coef.reserve(n * stride);
    sw.left.reserve(n);
    sw.whole.reserve(n);
    sw.end_value.reserve(n);
    sw.spread.reserve(n);
    sw.crit_from.reserve(n + 1);
    traj::PolyBuffer buf;
    for (std::size_t k = 0; k < n; ++k) {
        const double t0 = tr.step_start(k), h = tr.step_length(k);
        const std::span<const double> p = tr.poly(k, series, buf);
        sw.left.push_back(k == 0 ? p[0] : traj::horner(poly_of(sw, k - 1), t0 - sw.t0[k - 1]));
        sw.t0.push_back(t0);
        sw.h.push_back(h);
        sw.coef.insert(sw.coef.end(), p.begin(), p.end());
        // What Trajectory::integral adds for a step the window covers: ∫ from 0 to (t0 + h) − t0.
        sw.whole.push_back(traj::integral_from_zero(p, (t0 + h) - t0));
        sw.end_value.push_back(traj::horner(p, (t0 + h) - t0));
        double spread = 0.0, hk = 1.0;
        for (std::size_t j = 1; j < p.size(); ++j) {
            hk *= h;
            spread += std::abs(p[j]) * hk;
        }
        sw.spread.push_back(spread);
        sw.crit_from.push_back(sw.crit_t.size());
        for (double tau : traj::critical_points_in(p, h)) {
            const double t = t0 + tau;
            sw.crit_t.push_back(t);
            sw.crit_v.push_back(traj::horner(p, t - t0));
        }
    }
    sw.crit_from.push_back(sw.crit_t.size());
    if (n > 0) sw.t0.push_back(sw.t0[n - 1] + sw.h[n - 1]);
    return sw;
}

std::size_t step_at(const Sweep& sw, double t) {
    const std::size_t n = sw.steps();
    if (n == 0) throw std::out_of_range("Trajectory is empty");
    const auto it = std::upper_bound(sw.t0.begin(), sw.t0.begin() + static_cast<std::ptrdiff_t>(n), t);
    return it == sw.t0.begin() ? 0 : static_cast<std::size_t>(it - sw.t0.begin()) - 1;
}

double value_at(const Sweep& sw, double t) {
    const std::size_t k = step_at(sw, t);
    return traj::horner(poly_of(sw, k), t - sw.t0[k]);
}

double left_limit_at(const Sweep& sw, double t) {
    std::size_t k = step_at(sw, t);
    if (k > 0 && t <= sw.t0[k]) --k;
    return traj::horner(poly_of(sw, k), t - sw.t0[k]);
}

double integral(const Sweep& sw, double a, double b) {
    const std::size_t n = sw.steps();
    if (n == 0) return 0.0;
    double sign = 1.0;
    if (b < a) {
        std::swap(a, b);
        sign = -1.0;
    }
    a = std::max(a, sw.t0.front());
    b = std::min(b, sw.t0.back());
    if (!(b > a)) return 0.0;
    double sum = 0.0;
    for (std::size_t k = step_at(sw, a); k < n && sw.t0[k] < b; ++k) {
        const double t0 = sw.t0[k], end = t0 + sw.h[k];
        const double lo = std::max(a, t0) - t0;
        const double hi = std::min(b, end) - t0;
        if (hi <= lo) continue;
        if (lo == 0.0 && b >= end) sum += sw.whole[k];
        else {
            const auto p = poly_of(sw, k);
            sum += traj::integral_from_zero(p, hi) - (lo > 0.0 ? traj::integral_from_zero(p, lo) : 0.0);
        }
    }
    return sign * sum;
}

Extreme maximum(const Sweep& sw, double a, double b) {
    return extreme(sw, a, b, [](double v, double best) { return v > best; });
}

Extreme minimum(const Sweep& sw, double a, double b) {
    return extreme(sw, a, b, [](double v, double best) { return v < best; });
}

namespace {

// A step whose values all lie clearly on one side of the level needs neither root isolation nor a midpoint
// evaluation: by the bound (most steps, O(1) here since the spread is kept per step), or because it is monotone
// (no critical point) with both ends on that side. "Clearly" is a margin far above the rounding of the
// evaluations and the round-off tolerances of roots_in and of the classification, so the answer is what
// roots_in and the midpoint test would give. 1 above, −1 below, 0 not known.
signed char known_side(const Sweep& sw, std::size_t k, double c) {
    const double p0 = sw.poly(k)[0], d0 = p0 - c, sp = sw.spread[k];
    const double margin = 1e-10 * (std::abs(c) + std::abs(p0) + sp);
    const bool monotone = sw.crit_from[k] == sw.crit_from[k + 1];
    const double d1 = sw.end_value[k] - c;
    if (d0 - sp > margin || (monotone && std::min(d0, d1) > margin)) return 1;
    if (-d0 - sp > margin || (monotone && std::max(d0, d1) < -margin)) return -1;
    return 0;
}

// The level sweep over steps [first, last) (the window [t0[first], t0[last]]).
LevelSweep sweep_from(const Sweep& sw, double c, std::size_t first, std::size_t last) {
    LevelSweep lv;
    lv.level = c;
    const std::size_t n = std::min(last, sw.steps());
    if (first >= n) return lv;
    const double a = sw.t0[first], b = sw.t0[n];
    if (!(b > a)) return lv;
    // Roots as Trajectory::level_roots finds them over [a, b]: inside each step (after the O(d) bound in
    // roots_in), and on a boundary where the series is continuous and meets the level.
    std::vector<signed char> sure(n - first, 0);
    std::vector<double> roots;
    for (std::size_t k = first; k < n; ++k) {
        const double t0 = sw.t0[k];
        const auto p = poly_of(sw, k);
        const signed char known = sure[k - first] = known_side(sw, k, c);
        if (known == 0)
            for (double tau : traj::roots_in(p, c, sw.h[k])) {
                const double t = t0 + tau;
                if (t > a && t < b) roots.push_back(t);
            }
        if (k > 0 && t0 > a) {
            const double before = sw.left[k] - c;
            const double after = p[0] - c;
            const double scale = std::abs(c) + std::abs(before) + std::abs(after);
            const bool continuous = std::abs(before - after) <= 1e-12 * std::max(scale, 1e-300);
            if (continuous && (after == 0.0 || (before < 0) != (after < 0) || std::abs(after) <= 4e-16 * scale))
                roots.push_back(t0);
        }
    }
    std::sort(roots.begin(), roots.end());
    roots.erase(std::unique(roots.begin(), roots.end(),
                            [](double x, double y) { return y - x <= 1e-12 * std::max(1.0, std::abs(y)); }),
                roots.end());
    // The cuts: every step boundary (the ends included) and every root, in order, each once.
    lv.cuts.reserve(n + 1 - first + roots.size());
    std::merge(sw.t0.begin() + static_cast<std::ptrdiff_t>(first), sw.t0.begin() + static_cast<std::ptrdiff_t>(n + 1),
               roots.begin(), roots.end(), std::back_inserter(lv.cuts));
    lv.cuts.erase(std::unique(lv.cuts.begin(), lv.cuts.end()), lv.cuts.end());
    lv.above.reserve(lv.cuts.size());
    // Each piece classified at its midpoint, as level() does.
    int prev = 0;
    std::size_t k = first;
    for (std::size_t i = 0; i + 1 < lv.cuts.size(); ++i) {
        const double lo = lv.cuts[i], hi = lv.cuts[i + 1];
        const double mid = 0.5 * (lo + hi);
        while (k + 1 < n && sw.t0[k + 1] <= mid) ++k;
        int state = sure[k - first];
        if (state == 0) state = traj::horner(poly_of(sw, k), mid - sw.t0[k]) - c > 1e-12 * std::abs(c) ? 1 : -1;
        if (prev != 0 && hi - lo < 1e-12 * std::max(1.0, std::abs(hi))) state = prev;
        lv.above.push_back(static_cast<signed char>(state));
        if (prev != 0 && state != prev) lv.crossings.push_back({lo, state == 1});
        prev = state;
    }
    return lv;
}

}  // namespace

LevelSweep sweep_level(const Sweep& sw, double c) { return sweep_from(sw, c, 0, sw.steps()); }

std::optional<double> last_crossing(const Sweep& sw, double c, double a, double b) {
    if (sw.steps() == 0 || !(b > a)) return std::nullopt;
    // Pieces, and so crossings, depend only on the steps around them: sweep the last m steps before b, and
    // double m until a crossing after the suffix's first piece turns up or the suffix covers a. A series that
    // has settled is then crossed near b or not at all, and most steps cost only the O(d) bound.
    const std::size_t ka = step_at(sw, a);
    std::size_t kb = step_at(sw, b);
    // Steps before b that all lie clearly on the same side of the level hold no crossing, nor do the
    // boundaries between them: start the search where that run begins.
    const std::size_t last = kb + 1;
    if (const signed char side = known_side(sw, kb, c); side != 0)
        while (kb > ka && known_side(sw, kb - 1, c) == side) --kb;
    for (std::size_t m = 4;; m *= 2) {
        const std::size_t first = kb + 1 > ka + m ? kb + 1 - m : ka;
        const LevelSweep lv = sweep_from(sw, c, first, last);
        const double from = first > ka ? std::max(a, lv.cuts.size() > 1 ? lv.cuts[1] : sw.t0[first]) : a;
        if (const auto t = last_crossing(lv, a, b); t && *t >= from) return t;
        if (first == ka) return std::nullopt;
    }
}

double hours_above(const LevelSweep& lv, double a, double b) {
    if (lv.cuts.size() < 2 || !(b > a)) return 0.0;
    const auto it = std::upper_bound(lv.cuts.begin(), lv.cuts.end(), a);
    std::size_t i = it == lv.cuts.begin() ? 0 : static_cast<std::size_t>(it - lv.cuts.begin()) - 1;
    double sum = 0.0;
    for (; i + 1 < lv.cuts.size() && lv.cuts[i] < b; ++i) {
        const double lo = std::max(lv.cuts[i], a), hi = std::min(lv.cuts[i + 1], b);
        if (hi > lo && lv.above[i] == 1) sum += hi - lo;
    }
    return sum;
}

std::vector<Crossing> crossings_in(const LevelSweep& lv, double a, double b) {
    auto first = std::upper_bound(lv.crossings.begin(), lv.crossings.end(), a,
                                  [](double t, const Crossing& x) { return t < x.time; });
    auto last = std::lower_bound(first, lv.crossings.end(), b,
                                 [](const Crossing& x, double t) { return x.time < t; });
    return {first, last};
}

std::optional<double> last_crossing(const LevelSweep& lv, double a, double b) {
    auto last = std::lower_bound(lv.crossings.begin(), lv.crossings.end(), b,
                                 [](const Crossing& x, double t) { return x.time < t; });
    if (last == lv.crossings.begin()) return std::nullopt;
    --last;
    if (!(last->time > a)) return std::nullopt;
    return last->time;
}

}  // namespace plateau::metrics
