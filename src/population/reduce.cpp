#include "population/reduce.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace plateau::population {

std::pair<double, double> wilson95(std::size_t k, std::size_t n) {
    if (n == 0) return {0.0, 1.0};
    const double z = 1.959963984540054;   // the 97.5 % point of the standard normal
    const double nn = static_cast<double>(n), p = static_cast<double>(k) / nn;
    const double denom = 1.0 + z * z / nn;
    const double centre = (p + z * z / (2.0 * nn)) / denom;
    const double half = z / denom * std::sqrt(p * (1.0 - p) / nn + z * z / (4.0 * nn * nn));
    return {std::max(0.0, centre - half), std::min(1.0, centre + half)};
}

double percentile(const std::vector<double>& sorted, double p) {
    if (sorted.empty()) return std::numeric_limits<double>::quiet_NaN();
    const double h = (static_cast<double>(sorted.size()) - 1.0) * p / 100.0;
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, sorted.size() - 1);
    return sorted[lo] + (h - static_cast<double>(lo)) * (sorted[hi] - sorted[lo]);
}

std::vector<double> doubling(double low, double high) {
    std::vector<double> out;
    for (double t = low; t <= high * (1.0 + 1e-9) && out.size() < 64; t *= 2.0) out.push_back(t);
    return out;
}

namespace {

Quantiles spread_of(const std::vector<Figures>& fs, double Figures::*field, std::string key) {
    Quantiles s{std::move(key), 0, {}};
    std::vector<double> v;
    for (const auto& f : fs)
        if (std::isfinite(f.*field)) v.push_back(f.*field);
    std::sort(v.begin(), v.end());
    s.n = v.size();
    for (std::size_t k = 0; k < kPercentiles.size(); ++k) s.values[k] = percentile(v, kPercentiles[k]);
    return s;
}

}  // namespace

RegimenSummary summarize(const std::vector<Figures>& figures, const std::vector<float>& bands, int band_points,
                         const std::vector<std::pair<std::string, std::string>>& verdicts,
                         const std::vector<double>& curve, const ThresholdDist* dist) {
    RegimenSummary s;
    s.total = figures.size();
    for (const auto& f : figures) {
        if (f.status == Status::Ok) ++s.ok;
        else if (f.status == Status::NoSteadyState) ++s.no_steady_state;
        else ++s.failed;
    }
    for (std::size_t k = 0; k < verdicts.size(); ++k) {
        Attainment a{verdicts[k].first, verdicts[k].second, 0, 0, s.total, 0.0, {}};
        for (const auto& f : figures) {
            if (k >= f.met.size() || f.met[k] < 0) continue;
            ++a.assessed;
            if (f.met[k] == 1) ++a.attained;
        }
        a.pta = s.total > 0 ? static_cast<double>(a.attained) / static_cast<double>(s.total) : 0.0;
        a.ci95 = wilson95(a.attained, s.total);
        s.targets.push_back(a);
    }
    s.spreads.push_back(spread_of(figures, &Figures::first_peak, "first_peak"));
    s.spreads.push_back(spread_of(figures, &Figures::ss_peak, "ss_peak"));
    s.spreads.push_back(spread_of(figures, &Figures::ss_trough, "ss_trough"));
    s.spreads.push_back(spread_of(figures, &Figures::ss_average, "ss_average"));
    s.spreads.push_back(spread_of(figures, &Figures::ss_auc24, "ss_auc24"));
    s.spreads.push_back(spread_of(figures, &Figures::above_pct, "above_pct"));
    s.spreads.push_back(spread_of(figures, &Figures::first_reached, "first_reached"));

    // A subject meets threshold T when its attained level is at least T (with the target's own round-off
    // allowance, 1e-12 relative).
    std::vector<double> levels;
    for (const auto& f : figures)
        if (std::isfinite(f.level)) levels.push_back(f.level);
    std::sort(levels.begin(), levels.end());
    auto attained_at = [&](double t) {
        const auto it = std::lower_bound(levels.begin(), levels.end(), t * (1.0 - 1e-12));
        return static_cast<std::size_t>(levels.end() - it);
    };
    for (double t : curve) {
        CurvePoint p{t, attained_at(t), 0.0, {}};
        p.pta = s.total > 0 ? static_cast<double>(p.attained) / static_cast<double>(s.total) : 0.0;
        p.ci95 = wilson95(p.attained, s.total);
        s.curve.push_back(p);
    }
    if (dist != nullptr && s.total > 0) {
        double num = 0.0, den = 0.0;
        for (std::size_t k = 0; k < dist->thresholds.size(); ++k) {
            num += dist->weights[k] * static_cast<double>(attained_at(dist->thresholds[k])) / static_cast<double>(s.total);
            den += dist->weights[k];
        }
        if (den > 0.0) s.expected = num / den;
    }

    const std::size_t bp = static_cast<std::size_t>(band_points);
    s.band.resize(bp);
    std::vector<double> col;
    for (std::size_t k = 0; k < bp; ++k) {
        col.clear();
        for (std::size_t i = 0; i < figures.size(); ++i) {
            const float v = bands[i * bp + k];
            if (std::isfinite(v)) col.push_back(static_cast<double>(v));
        }
        std::sort(col.begin(), col.end());
        for (std::size_t q = 0; q < kPercentiles.size(); ++q) s.band[k][q] = percentile(col, kPercentiles[q]);
    }
    return s;
}

}  // namespace plateau::population
