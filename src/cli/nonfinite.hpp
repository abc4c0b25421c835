// Why a run stopped on a non-finite value: the rate or output expression behind it, found by evaluating every
// expression of the model at the state and time where the integration stopped.
#pragma once

#include <string>

#include "regimen/regimen.hpp"
#include "sim/simulate.hpp"

namespace plateau::cli {

// Text for a NumericalError after a NonFinite outcome, without a leading indent: the first rate or output (in
// model order) that is not finite there or whose Taylor series cannot start there (a non-integer power, log
// or sqrt of a value at or below 0, a division by 0), with its file:line:col, the time and the usual remedies;
// a general explanation when no single expression is to blame (a solution that grows without bound).
std::string explain_nonfinite(const regimen::Regimen& r, const sim::Simulation& s);

}  // namespace plateau::cli
