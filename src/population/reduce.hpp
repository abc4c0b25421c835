// From per-subject figures to what decides a regimen: PTA per target with its Wilson score 95 % interval,
// percentiles, the PTA curve over thresholds, the expected attainment over a threshold distribution, the bands.
#pragma once

#include <array>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "population/cohort.hpp"
#include "population/run.hpp"

namespace plateau::population {

// Wilson score interval for k successes in n trials at the 95 % level (Wilson, J Am Stat Assoc 1927).
std::pair<double, double> wilson95(std::size_t k, std::size_t n);

// Percentile p (0..100) of sorted values, linear interpolation between order statistics (Hyndman & Fan's
// definition 7, as R's default). NaN for no values.
double percentile(const std::vector<double>& sorted, double p);

inline constexpr std::array<double, 5> kPercentiles{5, 25, 50, 75, 95};

struct Quantiles {
    std::string key;          // "ss_trough": the figure's label and unit are report/figures' (by this key)
    std::size_t n = 0;        // subjects with this figure
    std::array<double, 5> values{};   // at kPercentiles, canonical
};

struct Attainment {
    std::string kind, what;   // as in the single-regimen verdicts
    std::size_t attained = 0, assessed = 0, total = 0;
    double pta = 0.0;         // attained / total: subjects without a figure count as not attaining
    std::pair<double, double> ci95{0.0, 0.0};
};

struct CurvePoint {
    double threshold = 0.0;   // canonical
    std::size_t attained = 0;
    double pta = 0.0;
    std::pair<double, double> ci95{0.0, 0.0};
};

struct RegimenSummary {
    std::size_t total = 0, ok = 0, no_steady_state = 0, failed = 0;
    std::vector<Attainment> targets;
    std::vector<Quantiles> spreads;
    std::vector<CurvePoint> curve;           // when asked
    std::optional<double> expected;          // expected attainment over the threshold distribution
    // Bands over the regimen's grid: 5, 25, 50, 75, 95 % at each time (NaN where every subject failed).
    std::vector<std::array<double, 5>> band;
};

// Thresholds from `low` doubling up to `high` (inclusive, within round-off).
std::vector<double> doubling(double low, double high);

// `verdicts`: the kind/what of each target (from verdict::verdicts on any exposure of the regimen).
RegimenSummary summarize(const std::vector<Figures>& figures, const std::vector<float>& bands, int band_points,
                         const std::vector<std::pair<std::string, std::string>>& verdicts,
                         const std::vector<double>& curve, const ThresholdDist* dist);

}  // namespace plateau::population
