// Drives the Taylor stepper through a dose schedule: exactly to each event, applies the jump or the input-rate
// change, restarts the series. The result is one dense trajectory over the horizon.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "model/model.hpp"
#include "regimen/regimen.hpp"
#include "sim/events.hpp"
#include "sim/mass_balance.hpp"
#include "taylor/stepper.hpp"
#include "taylor/tape.hpp"
#include "trajectory/trajectory.hpp"

namespace plateau::sim {

struct Options {
    double tol = 1e-10;          // integration tolerance (sets the Taylor order)
    int order = 0;               // > 0 forces the order
    long max_steps = 2'000'000;  // step budget over the whole horizon
    double max_bytes = 1024.0 * 1024.0 * 1024.0;  // memory budget of the kept step polynomials (1 GiB)
    // Emptied compartments (simulate.cpp): an amount below dose_floor × the largest dose, below the rounding
    // unit of the largest amount, or in a draining compartment that grows over a step is set to zero, and the
    // step control's scale N is at least dose_floor × the largest dose. false follows every amount down.
    bool empty_decayed = true;
    double dose_floor = 1e-30;
    // Linear models: the mass balance of every compartment is checked at each dose time and at the end
    // (sim/mass_balance.hpp); a run out of balance ends with Outcome::MassBalance.
    bool check_mass = true;
    // The model's tape (model_tape), when the caller has built it: the steady-state solve then does not build
    // it again (a population builds it once per model). Must be the tape of the model being simulated.
    const taylor::Tape* tape = nullptr;
    // Sensitivity runs (sim/sensitivity.cpp): number of sensitivity states per compartment, after the amounts.
    int sensitivities = 0;
};

// The step budget of a simulation: max_steps, lowered so that the kept polynomials fit in max_bytes.
long step_budget(const Options& opt, int n_series, int order);
// The same for a trajectory that keeps `bytes_per_step` per step (compact storage keeps fewer).
long step_budget(const Options& opt, double bytes_per_step);

struct Simulation {
    traj::Trajectory trajectory; // series: compartments (mg), then outputs (canonical units)
    std::vector<std::string> series;  // names of the series
    int n_states = 0;
    std::vector<Dose> doses;     // the administrations, nominal times
    double end = 0.0;            // horizon end (h)
    long steps = 0;
    long budget = 0;             // the step budget of this run (step_budget of its storage)
    int order = 0;
    taylor::Outcome outcome = taylor::Outcome::Ok;
    double failed_at = 0.0;      // time of the failure when outcome != Ok
    int failed_state = -1;       // NegativeAmount: the compartment that went below zero
    MassBalanceFailure mass;     // MassBalance: what the check found
    bool projected = false;      // StepLimit declared early: the recent steps would need > 4 budgets
    // StepLimit with steps held by stability (linear models): the fastest compartment, its loss rate (1/h) and
    // the last free step (h). Empty when the steps were set by accuracy.
    std::string stiff_state;
    double stiff_rate = 0.0;
    double stiff_step = 0.0;
    int output_series(int output) const { return n_states + output; }
};

// The tape of a model: right-hand sides over compartments, parameters and t, and every output.
taylor::Tape model_tape(const model::Model& m);

// Simulates from t = 0 with all compartments empty up to `t_end`.
Simulation simulate(const model::Model& m, std::span<const double> params, std::vector<Dose> doses, double t_end,
                    const Options& opt = {});

// Convenience: the regimen's doses, parameters and horizon.
Simulation simulate(const regimen::Regimen& r, const Options& opt = {});

// The core loop, reusable with one stepper: integrates from t = 0 with state x0 up to t_end through `events`.
// Events at or before 0 are applied at 0 (rate changes add up; so a schedule may start with infusions already
// running). Fills sim.trajectory, steps and outcome; leaves sim.doses and sim.series empty.
Simulation integrate_events(const model::Model& m, taylor::Stepper& stepper, const std::vector<Event>& events,
                            std::span<const double> x0, double t_end, const Options& opt);

// Left limit of the states at the end of a simulation (the values just before any event at the end).
std::vector<double> final_state(const Simulation& sim);

}  // namespace plateau::sim
