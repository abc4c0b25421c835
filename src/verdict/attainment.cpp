#include "verdict/attainment.hpp"

namespace plateau::verdict {

std::vector<std::size_t> most_attaining(const std::vector<population::RegimenSummary>& summaries) {
    std::vector<std::size_t> best;
    std::size_t top = 0;
    for (std::size_t r = 0; r < summaries.size(); ++r) {
        if (summaries[r].targets.empty()) continue;
        const std::size_t a = summaries[r].targets.front().attained;
        if (best.empty() || a > top) {
            best = {r};
            top = a;
        } else if (a == top) {
            best.push_back(r);
        }
    }
    return best;
}

}  // namespace plateau::verdict
