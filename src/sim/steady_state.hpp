// The periodic steady state of the dosing cycle: the fixed point of the map "state at the start of a cycle →
// state at the start of the next", solved directly by Newton's method over the whole cycle (every dose of the
// pattern, infusions and lags that carry over from earlier cycles included). One Newton step is exact for
// linear models; Michaelis–Menten elimination iterates.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "model/model.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"

namespace plateau::sim {

// The solve runs at this tolerance or the user's, whichever is tighter: its verdict (found or not) and its
// figures must not depend on --tol, and a loose tolerance makes the cycle map too noisy for Newton's method.
inline constexpr double kSteadyStateTolerance = 1e-12;

struct PeriodicSolution {
    bool found = false;
    std::string why_not;                 // when not found
    std::vector<double> state;           // compartments just before the cycle's first dose
    int iterations = 0;
    double residual = 0.0;               // ‖Φ(x) − x‖∞ at the solution
    Simulation period;                   // one cycle from the periodic state (t = 0 .. period)
    Simulation first_cycle;              // one cycle of the same doses from empty compartments
};

// Solves Φ(x) = x. `guess` (may be empty) seeds Newton's method; the state of the actual regimen at its last
// cycle start is a good one.
PeriodicSolution solve_cycle(const model::Model& m, std::span<const double> params, const Cycle& c,
                             std::span<const double> guess, const Options& opt);

// The steady state of a regimen's schedule: solved when the schedule has a cycle and the model does not depend
// on the time t; otherwise not found, with the reason. Nullopt when the regimen does not repeat. `actual` (the
// simulated regimen) gives Newton's method its starting state at the last cycle start.
std::optional<PeriodicSolution> steady_state(const model::Model& m, std::span<const double> params,
                                             const Schedule& s, const Simulation& actual, const Options& opt);

}  // namespace plateau::sim
