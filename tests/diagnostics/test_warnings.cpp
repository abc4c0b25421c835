// The catalogue of warnings: files that load and run, but not quite as written. Each warning points at the key
// whose value causes it (not at the [[doses]] header), and its text is checked to the letter. Messages and
// positions are this project's own contract; "common practice, no source" for all of them.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "input/load.hpp"

namespace {

const std::string kTests = PLATEAU_TEST_DIR;
const std::string kDir = kTests + "/diagnostics/warnings/";
const std::vector<std::string> kModelDirs{kTests + "/data/models"};

struct Case {
    const char* file;
    std::vector<std::string> warnings;   // "file:line:col: warning: message", path shortened to the file name
};

const Case kCatalogue[] = {
    {"warn-infusion-rate-too-fast.toml",
     {"warn-infusion-rate-too-fast.toml:9:9: warning: [[doses]] entry 1: the infusion lasts 6e-10 h, shorter than "
      "the time resolution (2e-09 h): each dose is given as a bolus"}},
    {"warn-infusion-over-too-short.toml",
     {"warn-infusion-over-too-short.toml:10:9: warning: [[doses]] entry 1: the infusion lasts 1e-10 h, shorter than "
      "the time resolution (1e-09 h): each dose is given as a bolus"}},
    {"warn-close-at.toml",
     {"warn-close-at.toml:13:7: warning: doses at 10 h and 10.000000005 h are closer than the time resolution (1e-09 "
      "of the time, at least 1e-09 h) and are given at one instant"}},
    {"warn-close-every.toml",
     {"warn-close-every.toml:9:10: warning: doses at 1 h and 1.0000000005 h are closer than the time resolution "
      "(1e-09 of the time, at least 1e-09 h) and are given at one instant"}},
    {"warn-close-series-and-single.toml",
     {"warn-close-series-and-single.toml:14:7: warning: doses at 16 h and 16.00000001 h are closer than the time "
      "resolution (1e-09 of the time, at least 1e-09 h) and are given at one instant"}},
    {"warn-lag-past-horizon.toml",
     {"warn-lag-past-horizon.toml:14:10: warning: [[doses]] entry 1 (route 'oral'): the route's lag (30 h) delays "
      "the last dose, at 0 h, to the end of the horizon or later: it has no effect"}},
};

std::string shown(const plateau::regimen::Warning& w) {
    std::string file = w.pos.file;
    if (const auto slash = file.rfind('/'); slash != std::string::npos) file = file.substr(slash + 1);
    return file + ":" + std::to_string(w.pos.line) + ":" + std::to_string(w.pos.col) + ": warning: " + w.message;
}

}  // namespace

TEST_CASE("diagnostics: each warning points at the key that causes it, with its exact text", "[diagnostics]") {
    for (const Case& c : kCatalogue) {
        INFO(c.file);
        const plateau::regimen::Regimen r = plateau::input::load_regimen(kDir + c.file, kModelDirs);
        std::vector<std::string> got;
        for (const auto& w : r.warnings) got.push_back(shown(w));
        CHECK(got == c.warnings);
    }
}
