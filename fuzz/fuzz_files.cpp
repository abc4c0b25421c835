// libFuzzer targets for the model, the regimen and the cohort loader (one source; FUZZ_REGIMEN or FUZZ_COHORT
// chooses, the model loader otherwise). The input is written
// to a file in a private temporary folder and loaded as a user's file would be; an InputError (bad input,
// located) is the expected answer; a crash, a sanitizer report, a hang or another exception is a finding.
// Regimens find their model among the built-in models (model = "zelmarin") and the test models.
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "work_file.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string path = plateau::fuzz::write_work_file("input.toml", data, size);
    if (path.empty()) return 0;
    try {
#if defined(FUZZ_COHORT)
        // A cohort may name a CSV of observed covariates (resampled) beside it: a missing or bad one is a
        // located error like any other.
        (void)plateau::input::load_cohort(path);
#elif defined(FUZZ_REGIMEN)
        static const std::vector<std::string> dirs{std::string(PLATEAU_SOURCE_DIR) + "/models",
                                                   std::string(PLATEAU_SOURCE_DIR) + "/tests/data/models"};
        (void)plateau::input::load_regimen(path, dirs);
#else
        (void)plateau::input::load_model(path);
#endif
    } catch (const plateau::InputError& e) {
        if (e.diagnostics().empty()) std::abort();  // an error says what was wrong
    }
    return 0;
}
