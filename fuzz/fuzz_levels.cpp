// libFuzzer target for the levels CSV reader (plateau fit --levels). The input is written to a file in a
// private temporary folder and read against a fixed regimen (tests/fit/data/one-cpt-bolus.toml: first dose at
// 1 h, start clock 08:00), as a user's file would be; an InputError (bad input, located) is the expected answer;
// a crash, a sanitizer report, a hang, another exception, or levels that break the reader's promises (sorted,
// finite, not negative, at or after the first dose) are findings.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "core/diagnostic.hpp"
#include "fit/problem.hpp"
#include "input/load.hpp"
#include "input/load_levels.hpp"
#include "work_file.hpp"

namespace {

const plateau::regimen::Regimen& regimen() {
    static const plateau::regimen::Regimen r =
        plateau::input::load_regimen(std::string(PLATEAU_SOURCE_DIR) + "/tests/fit/data/one-cpt-bolus.toml", {});
    return r;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string path = plateau::fuzz::write_work_file("levels.csv", data, size);
    if (path.empty()) return 0;
    const auto& r = regimen();
    try {
        const auto levels = plateau::input::load_levels(path, r.model, 0, plateau::fit::level_context(r));
        double last = -1.0;
        for (const auto& l : levels.levels) {
            if (!std::isfinite(l.t) || !std::isfinite(l.value) || l.value < 0.0 || l.t < 1.0 - 1e-9 || l.t < last)
                std::abort();
            last = l.t;
        }
    } catch (const plateau::InputError& e) {
        if (e.diagnostics().empty()) std::abort();  // an error says what was wrong
    }
    return 0;
}
