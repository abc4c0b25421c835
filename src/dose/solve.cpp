#include "dose/solve.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>

#include <boost/math/tools/toms748_solve.hpp>

#include "report/format.hpp"

namespace plateau::dose {

namespace {

std::string mg(double d) { return report::general(d, 6) + " mg"; }

std::string val(double v) { return std::isinf(v) ? "no steady state" : report::general(v, 6); }

// The figure fell while the dose rose (beyond the figures' own round-off): the first such pair, or "".
std::string falling_pair(std::vector<Sample> s) {
    std::sort(s.begin(), s.end(), [](const Sample& a, const Sample& b) { return a.dose < b.dose; });
    for (std::size_t i = 0; i + 1 < s.size(); ++i) {
        const double a = s[i].value, b = s[i + 1].value;
        if (std::isnan(a) || std::isnan(b) || std::isnan(s[i].dose) || std::isnan(s[i + 1].dose)) continue;
        if (b < a - 1e-9 * std::abs(a))
            return "the figure falls from " + val(a) + " at " + mg(s[i].dose) + " to " + val(b) + " at " +
                   mg(s[i + 1].dose);
    }
    return {};
}

}  // namespace

Root solve_rising(const std::function<double(double)>& figure, double value, double start) {
    Root r;
    auto eval = [&](double d) {
        const double v = figure(d);
        r.samples.push_back({d, v});
        return v;
    };
    // The bracket from every sample so far: lo the largest dose below the value, hi the smallest at or above.
    double lo = 0.0, hi = std::numeric_limits<double>::infinity(), vlo = 0.0, vhi = 0.0;
    auto update = [&](double d, double v) {
        if (std::isnan(v)) return;
        if (v == value) {  // hit exactly: the bracket closes here
            lo = hi = d;
            vlo = vhi = v;
        } else if (v < value) {
            if (d > lo) lo = d, vlo = v;
        } else if (d < hi) {
            hi = d, vhi = v;
        }
    };
    auto finish = [&](RootStatus status, std::string why) {
        std::sort(r.samples.begin(), r.samples.end(), [](const Sample& a, const Sample& b) { return a.dose < b.dose; });
        r.low = lo;
        r.high = hi;
        r.status = status;
        r.why = std::move(why);
        if (std::string f = falling_pair(r.samples); !f.empty()) {
            r.status = RootStatus::NonMonotone;
            r.why = f;
        }
        return r;
    };

    const double v0 = eval(start);
    if (std::isnan(v0)) return finish(RootStatus::Unreachable, "the figure cannot be measured at " + mg(start));
    update(start, v0);
    // Proportional guess: exact for linear models, a good start for the others.
    double guess = start;
    if (v0 > 0.0 && std::isfinite(v0)) guess = std::clamp(start * value / v0, start / kRange, start * kRange);
    if (guess != start) update(guess, eval(guess));

    // Widen around the guess, a little first (a linear model is already there), then by decades.
    const double steps[] = {1e-9, 1e-6, 1e-3, 0.03, 0.3, 1.0, 3.0, 9.0};
    double factor = 1.0;
    for (int k = 0; (lo == 0.0 || std::isinf(hi)) && lo != hi && k < 40; ++k) {
        factor = k < 8 ? 1.0 + steps[k] : factor * 10.0;
        if (lo == 0.0) {
            const double d = hi / factor;
            if (d < start / kRange)
                return finish(RootStatus::Unreachable, "already reached at the smallest dose searched, " + mg(d));
            update(d, eval(d));
        } else {
            const double d = lo * factor;
            if (d > start * kRange)
                return finish(RootStatus::Unreachable, "still " + val(vlo) + " at the largest dose searched, " +
                                                           mg(lo) + ", below " + val(value));
            update(d, eval(d));
        }
    }
    if (lo == 0.0 || std::isinf(hi)) return finish(RootStatus::Unreachable, "no bracket found");
    if (std::string f = falling_pair(r.samples); !f.empty()) return finish(RootStatus::NonMonotone, f);

    // Where the larger dose has no steady state, close in on where it is lost: TOMS 748 needs finite values.
    for (int k = 0; std::isinf(vhi) && k < 200 && hi - lo > kDoseRelTol * lo; ++k) {
        const double mid = 0.5 * (lo + hi);
        update(mid, eval(mid));
    }
    if (std::isinf(vhi))
        return finish(RootStatus::Unreachable, "the figure stays below " + val(value) + " up to " + mg(lo) +
                                                   ", where the steady state is lost (the amounts keep rising)");

    if (hi - lo > kDoseRelTol * lo) {
        auto f = [&](double d) {
            const double v = eval(d);
            update(d, v);
            // A non-finite value inside the bracket means a non-monotone figure (reported after the solve); a
            // moderate stand-in keeps the solver's interpolation finite.
            return std::isfinite(v) ? v - value : std::abs(value) + 1.0;
        };
        auto tol = [](double a, double b) { return std::abs(b - a) <= kDoseRelTol * std::min(a, b); };
        std::uintmax_t iterations = 100;
        const double a = lo, b = hi, fa = vlo - value, fb = vhi - value;  // copies: f moves lo and hi
        boost::math::tools::toms748_solve(f, a, b, fa, fb, tol, iterations);
    }
    return finish(RootStatus::Found, {});
}

}  // namespace plateau::dose
