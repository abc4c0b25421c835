#include "regimen/regimen.hpp"

namespace plateau::regimen {

double DoseSpec::dose_time(long n) const {
    const long per = static_cast<long>(offsets.size());
    const long k = (n - 1) / per, j = (n - 1) % per;
    return at + static_cast<double>(k) * every + offsets[static_cast<std::size_t>(j)];
}

std::vector<double> Regimen::parameter_values() const {
    std::vector<double> v = model.default_values();
    for (const auto& o : overrides)
        if (o.index >= 0 && static_cast<std::size_t>(o.index) < v.size()) v[static_cast<std::size_t>(o.index)] = o.value;
    return v;
}

}  // namespace plateau::regimen
