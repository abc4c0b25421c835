#include "model/model.hpp"

#include <stdexcept>

namespace plateau::model {

namespace {
template <class V>
int index_of(const V& items, std::string_view name) {
    for (std::size_t i = 0; i < items.size(); ++i)
        if (items[i].name == name) return static_cast<int>(i);
    return -1;
}
}  // namespace

int Model::parameter_index(std::string_view name) const { return index_of(parameters, name); }
int Model::compartment_index(std::string_view name) const { return index_of(compartments, name); }
int Model::output_index(std::string_view name) const { return index_of(outputs, name); }
int Model::route_index(std::string_view name) const { return index_of(routes, name); }

std::vector<double> Model::default_values() const {
    std::vector<double> v;
    v.reserve(parameters.size());
    for (const auto& p : parameters) v.push_back(p.value);
    return v;
}

double evaluate_constant(const Model& m, const expr::Node& e, const std::vector<double>& parameter_values) {
    return expr::evaluate(e, [&](std::string_view name) {
        int i = m.parameter_index(name);
        if (i < 0) throw std::invalid_argument("not a parameter: " + std::string(name));
        return parameter_values[static_cast<std::size_t>(i)];
    });
}

}  // namespace plateau::model
