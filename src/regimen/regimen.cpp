#include "regimen/regimen.hpp"

#include <cmath>

namespace plateau::regimen {

double DoseSpec::dose_time(long n) const {
    const long per = static_cast<long>(offsets.size());
    const long k = (n - 1) / per, j = (n - 1) % per;
    return at + static_cast<double>(k) * every + offsets[static_cast<std::size_t>(j)];
}

std::vector<double> Regimen::parameter_values() const {
    if (!subject_values.empty()) return subject_values;
    std::vector<double> v = model.default_values();
    for (const auto& o : overrides)
        if (o.index >= 0 && static_cast<std::size_t>(o.index) < v.size()) v[static_cast<std::size_t>(o.index)] = o.value;
    for (const auto& p : patient)
        if (p.index >= 0 && static_cast<std::size_t>(p.index) < v.size()) v[static_cast<std::size_t>(p.index)] = p.value;
    model::individualize(model, v, {});
    return v;
}

BodySize Regimen::body_size() const {
    BodySize b;
    const int wi = model.parameter_index(kWeightName);
    if (wi >= 0 && model.parameters[static_cast<std::size_t>(wi)].dim == units::kMass)
        b.weight_kg = model.parameters[static_cast<std::size_t>(wi)].value / 1e6;
    for (const auto& p : patient) {
        if (p.name == kWeightName) b.weight_kg = p.value / 1e6;   // canonical mg → kg
        if (p.name == kHeightName) b.height_cm = p.value;
    }
    return b;
}

double bsa_mosteller(double weight_kg, double height_cm) { return std::sqrt(height_cm * weight_kg / 3600.0); }

double resolved_amount(const DoseSpec& d, const BodySize& b) {
    switch (d.per_size) {
    case Per::None: return d.amount;
    case Per::Kg: return d.per_amount * b.weight_kg;
    case Per::M2: return d.per_amount * bsa_mosteller(b.weight_kg, b.height_cm);
    }
    return d.amount;
}

}  // namespace plateau::regimen
