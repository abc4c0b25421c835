#include "trajectory/poly.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>

#include <boost/math/tools/toms748_solve.hpp>

namespace plateau::traj {

double horner(std::span<const double> c, double tau) {
    double v = 0.0;
    for (std::size_t k = c.size(); k-- > 0;) v = v * tau + c[k];
    return v;
}

double horner_derivative(std::span<const double> c, double tau) {
    double v = 0.0;
    for (std::size_t k = c.size(); k-- > 1;) v = v * tau + static_cast<double>(k) * c[k];
    return v;
}

double integral_from_zero(std::span<const double> c, double tau) {
    double v = 0.0;
    for (std::size_t k = c.size(); k-- > 0;) v = v * tau + c[k] / static_cast<double>(k + 1);
    return v * tau;
}

namespace {

// Number of sign changes in a coefficient sequence, ignoring zeros and coefficients negligible against the
// largest one (round-off noise must not make a root appear).
int sign_variations(std::span<const double> a) {
    double big = 0.0;
    for (double x : a) big = std::max(big, std::abs(x));
    const double floor = big * 1e-15;
    int v = 0, last = 0;
    for (double x : a) {
        if (std::abs(x) <= floor) continue;
        int s = x > 0 ? 1 : -1;
        if (last != 0 && s != last) ++v;
        last = s;
    }
    return v;
}

// In place: q(x) -> q(x + 1) (Taylor shift by one), O(n^2) synthetic division.
void shift_by_one(std::span<double> q) {
    const std::size_t n = q.size();
    for (std::size_t i = 0; i + 1 < n; ++i)
        for (std::size_t k = n - 1; k-- > i;) q[k] += q[k + 1];
}

// Coefficients of (x+1)^n q(1/(x+1)): reverse, then shift by one. Its sign variations bound the roots in (0,1).
// `r` is scratch of q's size.
int variations_on_unit(std::span<const double> q, std::span<double> r) {
    std::reverse_copy(q.begin(), q.end(), r.begin());
    shift_by_one(r);
    return sign_variations(r);
}

// Scratch for the isolation, reused by every call on this thread (no allocation once it has grown): three
// polynomials per bisection depth (the two halves and the variation test's copy).
constexpr int kMaxDepth = 48;
thread_local std::vector<double> scratch;

struct Finder {
    std::span<const double> c;  // original polynomial in τ
    double level;
    double h;
    std::vector<double> roots;
    std::size_t n = 0;  // coefficients of the unit-interval polynomial
    std::span<double> slot(int depth, int which) const {
        return {scratch.data() + (static_cast<std::size_t>(depth) * 3 + static_cast<std::size_t>(which)) * n, n};
    }

    double f(double tau) const { return horner(c, tau) - level; }

    // Refines the one root Descartes' rule found in (lo, hi). Returns false when the ends do not bracket it
    // (an end is itself a root, or round-off near an end hides the sign change): the caller bisects further.
    bool refine(double lo, double hi) {
        const double flo = f(lo), fhi = f(hi);
        if (flo == 0.0 || fhi == 0.0 || (flo < 0) == (fhi < 0)) return false;
        std::uintmax_t iters = 200;
        auto r = boost::math::tools::toms748_solve([this](double x) { return f(x); }, lo, hi, flo, fhi,
                                                    boost::math::tools::eps_tolerance<double>(52), iters);
        roots.push_back(0.5 * (r.first + r.second));
        return true;
    }

    // At the bisection depth limit the interval is a few ulps of h wide: a root of even multiplicity (a touch)
    // or one that round-off keeps from changing sign; report the point where |p − level| is least if it is
    // round-off small.
    void settle(double lo, double hi, double magnitude) {
        const double mid = 0.5 * (lo + hi);
        double best = lo, fbest = std::abs(f(lo));
        for (double x : {mid, hi})
            if (std::abs(f(x)) < fbest) { best = x; fbest = std::abs(f(x)); }
        if (fbest <= 1e-12 * magnitude) roots.push_back(best);
    }

    // q is the polynomial on the unit interval that maps to τ ∈ [lo, lo + width]; it lives in scratch at this
    // depth, and the halves go to the next depth's slots.
    void isolate(std::span<const double> q, double lo, double width, int depth, double magnitude) {
        const int v = variations_on_unit(q, slot(depth, 2));
        if (v == 0) return;
        if (v == 1 && refine(lo, lo + width)) return;
        if (depth >= kMaxDepth) {
            if (!refine(lo, lo + width)) settle(lo, lo + width, magnitude);
            return;
        }
        // Left half: q(x/2); right half: q((x+1)/2) = left half shifted by one.
        const std::span<double> left = slot(depth + 1, 0), right = slot(depth + 1, 1);
        double scale = 1.0;
        for (std::size_t k = 0; k < n; ++k) {
            left[k] = q[k] * scale;
            scale *= 0.5;
        }
        std::copy(left.begin(), left.end(), right.begin());
        shift_by_one(right);
        const double half = 0.5 * width;
        isolate(left, lo, half, depth + 1, magnitude);
        // A simple root on the midpoint lies in neither open half: take it when p − level is round-off small
        // there and the slope is not (near a touch, |p − level| is tiny over a wider stretch).
        const double m = lo + half;
        if (right.front() == 0.0 ||
            (std::abs(f(m)) <= 4e-16 * magnitude && std::abs(horner_derivative(c, m)) * h >= 1e-6 * magnitude))
            roots.push_back(m);
        isolate(right, lo + half, half, depth + 1, magnitude);
    }
};

// p(h·x) − level into q (c's size); returns its size without trailing zero coefficients.
std::size_t unit_polynomial(std::span<const double> c, double level, double h, double* q) {
    double hk = 1.0;
    for (std::size_t k = 0; k < c.size(); ++k) {
        q[k] = c[k] * hk;
        hk *= h;
    }
    q[0] -= level;
    std::size_t n = c.size();
    while (n > 1 && q[n - 1] == 0.0) --n;
    return n;
}

}  // namespace

bool no_root_possible(std::span<const double> c, double level, double h) {
    if (c.empty()) return true;
    // |p(τ) − p(0)| ≤ Σ_{k≥1} |c_k|·h^k on [0, h]: when p(0) is farther than that from the level, p − level
    // keeps its sign over the step. O(d), no allocation: most steps of a trajectory end here.
    double spread = 0.0, hk = 1.0;
    for (std::size_t k = 1; k < c.size(); ++k) {
        hk *= h;
        spread += std::abs(c[k]) * hk;
    }
    // The margin keeps near-touches for the isolation, which reports |p − level| ≤ 1e-12·Σ|q_k| as a root.
    return std::abs(c[0] - level) * (1.0 - 1e-11) > spread * (1.0 + 1e-11);
}

std::vector<double> roots_in(std::span<const double> c, double level, double h) {
    if (!(h > 0.0) || c.empty()) return {};
    if (no_root_possible(c, level, h)) return {};
    Finder fd{c, level, h, {}};
    const std::size_t need = static_cast<std::size_t>(kMaxDepth + 1) * 3 * c.size();
    if (scratch.size() < need) scratch.resize(need);
    fd.n = unit_polynomial(c, level, h, scratch.data());
    if (fd.n <= 1) return {};  // constant: no isolated roots
    const std::span<const double> q{scratch.data(), fd.n};  // slot(0, 0)
    double magnitude = 0.0;
    for (double a : q) magnitude += std::abs(a);
    fd.isolate(q, 0.0, h, 0, magnitude);
    auto& r = fd.roots;
    r.erase(std::remove_if(r.begin(), r.end(), [h](double x) { return !(x > 0.0 && x < h); }), r.end());
    std::sort(r.begin(), r.end());
    r.erase(std::unique(r.begin(), r.end(), [h](double a, double b) { return b - a <= 1e-12 * h; }), r.end());
    return r;
}

std::vector<double> critical_points_in(std::span<const double> c, double h) {
    if (c.size() < 3) return {};
    {
        // The same bound on p'(τ) = Σ k·c_k·τ^{k−1}, before building the derivative.
        double spread = 0.0, hk = 1.0;
        for (std::size_t k = 2; k < c.size(); ++k) {
            hk *= h;
            spread += static_cast<double>(k) * std::abs(c[k]) * hk;
        }
        if (std::abs(c[1]) * (1.0 - 1e-11) > spread * (1.0 + 1e-11)) return {};
    }
    std::vector<double> d(c.size() - 1);
    for (std::size_t k = 1; k < c.size(); ++k) d[k - 1] = static_cast<double>(k) * c[k];
    return roots_in(d, 0.0, h);
}

}  // namespace plateau::traj
