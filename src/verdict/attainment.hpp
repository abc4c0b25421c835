// Which regimen the population run favours: the one whose first target the most patients attain.
#pragma once

#include <cstddef>
#include <vector>

#include "population/reduce.hpp"

namespace plateau::verdict {

// The regimens whose first target is attained by the most patients (every one of a tie, in order); empty when
// there are no targets.
std::vector<std::size_t> most_attaining(const std::vector<population::RegimenSummary>& summaries);

}  // namespace plateau::verdict
