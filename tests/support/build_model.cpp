#include "build_model.hpp"

#include <stdexcept>

#include "expr/expr.hpp"

namespace plateau::test {

model::Model build_model(const ModelText& text) {
    model::Model m;
    m.id = "built-in-code";
    for (const auto& [name, value] : text.parameters) {
        model::Parameter p;
        p.name = name;
        p.value = value;
        m.parameters.push_back(std::move(p));
    }
    for (const auto& c : text.compartments) {
        model::Compartment comp;
        comp.name = c.name;
        comp.unit_text = "mg";
        comp.unit = units::Unit{1.0, units::kMass};
        m.compartments.push_back(std::move(comp));
        model::Rate r;
        r.text = c.rate;
        if (!c.rate.empty()) r.expr = expr::parse(c.rate);
        m.rates.push_back(std::move(r));
    }
    for (const auto& o : text.outputs) {
        model::Output out;
        out.name = o.name;
        out.text = o.expr;
        out.expr = expr::parse(o.expr);
        m.outputs.push_back(std::move(out));
    }
    for (const auto& rt : text.routes) {
        model::Route route;
        route.name = rt.name;
        route.into = m.compartment_index(rt.into);
        if (route.into < 0) throw std::invalid_argument("build_model: route into unknown compartment " + rt.into);
        route.fraction_text = rt.fraction;
        if (!rt.fraction.empty()) route.fraction = expr::parse(rt.fraction);
        route.lag_text = rt.lag;
        if (!rt.lag.empty()) route.lag = expr::parse(rt.lag);
        m.routes.push_back(std::move(route));
    }
    return m;
}

}  // namespace plateau::test
