#include "regimen/regimen.hpp"

namespace plateau::regimen {

std::vector<double> Regimen::parameter_values() const {
    std::vector<double> v = model.default_values();
    for (const auto& o : overrides)
        if (o.index >= 0 && static_cast<std::size_t>(o.index) < v.size()) v[static_cast<std::size_t>(o.index)] = o.value;
    return v;
}

}  // namespace plateau::regimen
