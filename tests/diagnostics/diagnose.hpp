// Test support for the diagnostic catalogues: run a loader on a file and keep its diagnostics.
#pragma once

#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "input/load.hpp"

namespace plateau::test {

// The diagnostics of loading `path` as a regimen (models from `model_dirs`) or a model; empty if it loaded.
inline std::vector<Diagnostic> diagnose(const std::string& path, bool regimen, const std::vector<std::string>& model_dirs) {
    try {
        if (regimen) input::load_regimen(path, model_dirs);
        else input::load_model(path);
    } catch (const InputError& e) {
        return e.diagnostics();
    }
    return {};
}

}  // namespace plateau::test
