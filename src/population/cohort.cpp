#include "population/cohort.hpp"

namespace plateau::population {

std::vector<std::string> Cohort::names() const {
    if (!columns.empty()) return columns;
    std::vector<std::string> out;
    for (const auto& c : covariates) out.push_back(c.name);
    return out;
}

std::string Cohort::unit_of(std::size_t k) const {
    return columns.empty() ? covariates[k].unit_text : column_units[k];
}

double Cohort::factor_of(std::size_t k) const {
    return columns.empty() ? covariates[k].unit_factor : column_factors[k];
}

}  // namespace plateau::population
