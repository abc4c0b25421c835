// The residual error model of measured levels (model::Residual): the one place that knows σ(f).
#pragma once

#include <string>

#include "model/model.hpp"

namespace plateau::fit {

// σ² = additive² + (proportional·f)² at prediction f (canonical units).
double residual_variance(const model::Residual& r, double f);

// dσ²/df = 2·proportional²·f.
double residual_variance_slope(const model::Residual& r, double f);

// "15 % proportional + 0.2 mg/L additive, on output 'conc'" for listings and reports.
std::string residual_text(const model::Model& m);

}  // namespace plateau::fit
