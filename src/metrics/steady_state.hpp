// The periodic steady state of a repeating dose series: the fixed point of the map "state just before a dose
// → state just before the next dose", solved directly by Newton's method (one step is exact for linear
// models; Michaelis–Menten elimination iterates).
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "model/model.hpp"
#include "sim/simulate.hpp"

namespace plateau::metrics {

// The dose pattern of one period: doses at offsets in [0, tau) from the period start.
struct Period {
    double tau = 0.0;
    std::vector<sim::Dose> doses;   // times are offsets within the period
    double start = 0.0;             // time of the regimen's last period start (the last dose of the series)
    int entry = -1;                 // the [[doses]] entry that sets the period
};

// The repeating series that runs last (the entry with count ≥ 2 whose last dose is latest), with every other
// series of the same interval still running at its end folded into the pattern. Nullopt if nothing repeats.
std::optional<Period> final_period(const regimen::Regimen& r);

struct PeriodicSolution {
    bool found = false;
    std::string why_not;                 // when not found
    std::vector<double> state;           // compartments just before the period's first dose
    int iterations = 0;
    double residual = 0.0;               // ‖Φ(x) − x‖∞ at the solution
    sim::Simulation period;              // one period from the periodic state (t = 0 .. tau)
    sim::Simulation first_dose;          // one period from empty compartments (the first dose alone)
};

// Solves Φ(x) = x. `guess` (may be empty) seeds Newton's method; the state of the actual regimen at its last
// period start is a good one.
PeriodicSolution solve_periodic(const model::Model& m, std::span<const double> params, const Period& p,
                                std::span<const double> guess, const sim::Options& opt);

}  // namespace plateau::metrics
