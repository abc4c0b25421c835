// The individualised regimen: the fitted regimen with the estimates as [parameters] overrides, written as a
// regimen file that `run`, `compare` and `dose` read as it is.
#pragma once

#include <string>

#include "fit/fit.hpp"
#include "regimen/regimen.hpp"

namespace plateau::fit {

// The regimen with overrides that reproduce the fitted individual values. A varied parameter is overridden
// directly; a varied derived parameter through a fixed parameter that only its expression uses (solved for by
// Newton's method). Throws std::runtime_error (with the reason) when the estimates cannot be expressed so, or
// when the regimen has doses the file writer cannot write (clock-time patterns, missed, late or doubled doses).
regimen::Regimen individualised(const regimen::Regimen& r, const Result& res);

// The file text (dose::regimen_text) with a header saying where it came from and the caution.
std::string individualised_text(const regimen::Regimen& written, const std::string& from, const std::string& levels);

}  // namespace plateau::fit
