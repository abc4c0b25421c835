// Test-only helper: builds a model::Model in code from strings, without any file. Values are canonical
// (mg, L, h); rate, output, fraction and lag strings are parsed with expr::parse. No unit checking is done.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "model/model.hpp"
#include "sim/events.hpp"

namespace plateau::test {

struct CompartmentText {
    std::string name;
    std::string rate;  // d(amount)/dt; empty = no rate (zero)
};

struct OutputText {
    std::string name;
    std::string expr;
};

struct RouteText {
    std::string name;
    std::string into;          // compartment name
    std::string fraction = {}; // expression over parameters; empty = 1
    std::string lag = {};      // expression over parameters; empty = none
};

struct ModelText {
    std::vector<std::pair<std::string, double>> parameters;  // name -> canonical value
    std::vector<CompartmentText> compartments;
    std::vector<OutputText> outputs;
    std::vector<RouteText> routes;
};

// Throws std::invalid_argument for a route into an unknown compartment; expr::parse errors pass through.
model::Model build_model(const ModelText& text);

// A single administration through route `route` (index in the model): a bolus when `over` is 0.
inline sim::Dose dose(int route, double amount, double at, double over = 0.0) {
    return sim::Dose{at, route, amount, over, 0};
}

}  // namespace plateau::test
