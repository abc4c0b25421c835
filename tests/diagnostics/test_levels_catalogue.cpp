// The catalogue of bad levels files (tests/diagnostics/levels/): each has one defect, and its first diagnostic
// is checked to the letter with its line and column. Read against tests/fit/data/one-cpt-bolus.toml (first dose
// at 1 h, start clock 08:00). Messages are this project's own contract; "common practice, no source" for all.
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>

#include "core/diagnostic.hpp"
#include "fit/problem.hpp"
#include "input/load.hpp"
#include "input/load_levels.hpp"

namespace {

namespace fs = std::filesystem;
using namespace plateau;

const std::string kDir = std::string(PLATEAU_TEST_DIR) + "/diagnostics/levels/";

struct Case {
    const char* file;
    const char* first;      // first line of the first diagnostic, path shortened to the file name
    const char* expected;
};

const Case kLevels[] = {
    {"bad-clock.csv", "bad-clock.csv:3:3: error: '25:00' is not a time of day",
     "a clock time like 14:00 (24-hour, HH:MM)"},
    {"bad-number.csv", "bad-number.csv:3:3: error: 'abc' is not a level",
     "a number in mg/L, like 12.5, or <0.5 for a level below the quantification limit 0.5"},
    {"before-first-dose.csv", "before-first-dose.csv:2:1: error: the level at 0.5 h comes before the first dose (at 1 h)",
     "levels taken at or after the first dose of the regimen"},
    {"duplicate-time.csv", "duplicate-time.csv:4:1: error: a second level at 3 h (the first is on line 2)",
     "one level per time"},
    {"empty.csv", "empty.csv:1:1: error: empty file: no levels in it",
     "a header line like time_h,conc_mg_per_L, then one line per level"},
    {"header-only.csv", "header-only.csv:1:1: error: no levels in the file, only its header",
     "one line per level after the header, like 8,12.5"},
    {"negative.csv", "negative.csv:3:3: error: a level cannot be negative, got '-1.5'",
     "a level of 0 mg/L or more (<limit for one below the quantification limit)"},
    {"no-level-column.csv", "no-level-column.csv:1:1: error: no column for output 'conc' in the header",
     "a column named conc_<unit>, like conc_mg_per_L"},
    {"no-time-column.csv", "no-time-column.csv:1:1: error: no time column in the header",
     "a column time_h (hours since the start) or the two columns day and clock"},
    {"short-row.csv", "short-row.csv:3:1: error: this line has 1 field, the header has 2",
     "one value per column, separated by commas"},
    {"wrong-unit-column.csv", "wrong-unit-column.csv:1:8: error: column 'conc_mg' is an amount (mass), but output 'conc' is a concentration (mass/volume)",
     "a column named conc_<unit> with a unit of a concentration (mass/volume), like conc_mg_per_L"},
    {"zero-limit.csv", "zero-limit.csv:3:3: error: the quantification limit must be above 0, got '<0'",
     "<limit with a limit above 0, like <0.5"},
};

std::string first_line(const Diagnostic& d) {
    std::string s = format_diagnostic(d);
    s = s.substr(0, s.find('\n'));
    return s.rfind(kDir, 0) == 0 ? s.substr(kDir.size()) : s;
}

}  // namespace

TEST_CASE("input: every bad levels file in the catalogue gives its exact first diagnostic", "[input][diagnostics][fit]") {
    const regimen::Regimen r = input::load_regimen(std::string(PLATEAU_TEST_DIR) + "/fit/data/one-cpt-bolus.toml", {});
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(kDir))
        if (e.path().extension() == ".csv") ++files;
    CHECK(files == std::size(kLevels));
    for (const Case& c : kLevels) {
        INFO("case " << c.file);
        std::vector<Diagnostic> ds;
        try {
            input::load_levels(kDir + c.file, r.model, 0, fit::level_context(r));
        } catch (const InputError& e) {
            ds = e.diagnostics();
        }
        REQUIRE(ds.size() == 1);
        CHECK(first_line(ds.front()) == c.first);
        CHECK(ds.front().expected == c.expected);
        CHECK(ds.front().pos.line > 0);
        CHECK(ds.front().pos.col > 0);
    }
}
