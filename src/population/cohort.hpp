// Who the virtual patients are: a distribution per covariate (normal, log-normal or uniform, each truncated to
// a range; correlated where asked) or rows resampled from a table of observed covariates. Plain data, built by
// input/load_cohort.cpp from a cohort file.
#pragma once

#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "units/units.hpp"

namespace plateau::population {

enum class Dist { Normal, LogNormal, Uniform };

// One covariate's distribution. Values canonical (mg, L, h), heights in cm.
struct CovariateDist {
    std::string name;
    Dist dist = Dist::Normal;
    double mean = 0.0;        // Normal: mean; LogNormal: median
    double sd = 0.0;          // Normal: standard deviation; LogNormal: σ of the log (from the CV)
    double low = 0.0, high = 0.0;   // truncation range (Uniform: the support)
    std::string unit_text;    // as written in the file, for display
    double unit_factor = 1.0; // canonical = value × factor
    SourcePos pos;
};

// A threshold distribution (for example, how often each minimum inhibitory concentration occurs), to weight the
// PTA over thresholds: the cumulative fraction of response (Mouton et al., J Antimicrob Chemother 2005).
struct ThresholdDist {
    std::string path, about;
    std::vector<double> thresholds;   // canonical
    std::vector<double> weights;      // counts or fractions (normalised when used)
    units::Dim dim{};                 // of the thresholds
};

struct Cohort {
    std::string id, about, path;
    std::vector<CovariateDist> covariates;     // drawn, in file order
    std::vector<double> correlation;           // covariates.size()² row-major on the normal scale; empty: none
    // Resampling: rows of observed covariates, drawn with replacement (then `covariates` is empty).
    std::string table_path;
    std::vector<std::string> columns;          // covariate names
    std::vector<std::string> column_units;
    std::vector<double> column_factors;        // canonical = value × factor
    std::vector<std::vector<double>> rows;     // canonical values, one vector per row
    // Names of the values a subject gets, in order (covariates' names, or the table's columns).
    std::vector<std::string> names() const;
    // The display unit of value k (as written in the file) and its factor (canonical = shown × factor).
    std::string unit_of(std::size_t k) const;
    double factor_of(std::size_t k) const;
};

}  // namespace plateau::population
