// Test support for the individual fit: load a regimen and its levels and build the fit problem.
#pragma once

#include <string>
#include <vector>

#include "fit/fit.hpp"
#include "fit/problem.hpp"
#include "input/load.hpp"
#include "input/load_levels.hpp"

namespace plateau::fittest {

inline std::string data(const std::string& name) { return std::string(PLATEAU_TEST_DIR) + "/fit/data/" + name; }

struct Loaded {
    regimen::Regimen regimen;
    input::Levels levels;
};

inline Loaded load(const std::string& regimen_path, const std::string& levels_path) {
    Loaded l;
    l.regimen = input::load_regimen(regimen_path, input::default_model_dirs());
    const model::Model& m = l.regimen.model;
    l.levels = input::load_levels(levels_path, m, m.residual ? m.residual->output : 0, fit::level_context(l.regimen));
    return l;
}

}  // namespace plateau::fittest
