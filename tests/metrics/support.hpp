// Test support: write a regimen file into a temporary directory and load it with the built-in models.
#pragma once

#include <string>

#include "metrics/exposure.hpp"
#include "regimen/regimen.hpp"
#include "sim/schedule.hpp"
#include "sim/simulate.hpp"

namespace plateau::testing {

// Writes `text` to a fresh file named `name` in a per-process temporary directory; returns the path.
std::string write_temp(const std::string& name, const std::string& text);

// Loads a regimen from TOML text (models looked up among the built-in ones).
regimen::Regimen regimen_from_text(const std::string& name, const std::string& text);

struct Run {
    regimen::Regimen regimen;
    sim::Schedule schedule;
    sim::Simulation sim;
    metrics::Exposure exposure;
};

// Loads, simulates and computes the exposure figures with the regimen's own targets (the CLI's pipeline).
Run run_text(const std::string& name, const std::string& text, double tol = 1e-10);

}  // namespace plateau::testing
