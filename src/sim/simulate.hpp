// Drives the Taylor stepper through a dose schedule: exactly to each event, applies the jump or the input-rate
// change, restarts the series. The result is one dense trajectory over the horizon.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "model/model.hpp"
#include "regimen/regimen.hpp"
#include "sim/events.hpp"
#include "taylor/stepper.hpp"
#include "taylor/tape.hpp"
#include "trajectory/trajectory.hpp"

namespace plateau::sim {

struct Options {
    double tol = 1e-10;          // integration tolerance (sets the Taylor order)
    int order = 0;               // > 0 forces the order
    long max_steps = 2'000'000;  // step budget over the whole horizon
};

struct Simulation {
    traj::Trajectory trajectory; // series: compartments (mg), then outputs (canonical units)
    std::vector<std::string> series;  // names of the series
    int n_states = 0;
    std::vector<Dose> doses;     // the administrations, nominal times
    double end = 0.0;            // horizon end (h)
    long steps = 0;
    int order = 0;
    taylor::Outcome outcome = taylor::Outcome::Ok;
    double failed_at = 0.0;      // time of the failure when outcome != Ok
    int output_series(int output) const { return n_states + output; }
};

// The tape of a model: right-hand sides over compartments, parameters and t, and every output.
taylor::Tape model_tape(const model::Model& m);

// Simulates from t = 0 with all compartments empty up to `t_end`.
Simulation simulate(const model::Model& m, std::span<const double> params, std::vector<Dose> doses, double t_end,
                    const Options& opt = {});

// Convenience: the regimen's doses, parameters and horizon.
Simulation simulate(const regimen::Regimen& r, const Options& opt = {});

}  // namespace plateau::sim
