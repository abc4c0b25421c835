// The dose schedule of a regimen, expanded: single doses, then the input events the model sees (boluses into a
// compartment, input-rate changes for infusions and zero-order oral input), sorted and merged.
#pragma once

#include <span>
#include <vector>

#include "model/model.hpp"
#include "regimen/regimen.hpp"

namespace plateau::sim {

// One administration as the prescriber sees it (before the route's fraction and lag).
struct Dose {
    double time = 0.0;      // h, nominal administration time
    int route = -1;         // route index in the model
    double amount = 0.0;    // mg
    double duration = 0.0;  // h; 0 = bolus
    int entry = 0;          // index of the [[doses]] entry it came from
};

// What happens to the model's compartments at one instant.
struct Event {
    double time = 0.0;
    std::vector<double> bolus;       // amount added per compartment (mg)
    std::vector<double> rate_change; // change of input rate per compartment (mg/h)
};

// Applies routes (compartment, fraction, lag) to the doses and merges simultaneous events (one instant by
// regimen/time.hpp). Infusions become a rate step up at the start and down at the end.
std::vector<Event> build_events(const model::Model& m, std::span<const double> params, std::span<const Dose> doses);

}  // namespace plateau::sim
