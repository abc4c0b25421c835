// The population workload of the speed work (bench/README.md): two compartments, 1 g IV over 30 min every 8 h
// for 14 days, threshold 4 mg/L and window 4–40 mg/L (fictional), loaded as a user's regimen file would be.
#pragma once

#include "regimen/regimen.hpp"

namespace plateau::bench {

regimen::Regimen population_workload();

}  // namespace plateau::bench
