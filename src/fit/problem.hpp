// Building a fit problem from a loaded regimen and its levels (shared by the command and the tests).
#pragma once

#include "fit/fit.hpp"
#include "input/load_levels.hpp"
#include "regimen/regimen.hpp"

namespace plateau::fit {

// `r` must outlive the problem (it points at r.model). Levels must be of r's model.
Problem make_problem(const regimen::Regimen& r, const input::Levels& levels, double tol);

// What levels of this regimen are checked against: its first dose and its start clock.
input::LevelContext level_context(const regimen::Regimen& r);

}  // namespace plateau::fit
