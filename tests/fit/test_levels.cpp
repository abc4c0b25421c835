// Reading levels: a simulated CSV reads back, day and clock columns, other units, censored levels.
#include <catch2/catch.hpp>

#include <sstream>

#include "../cli/cli_support.hpp"
#include "../support/temp_dir.hpp"
#include "fit_support.hpp"

namespace {

using namespace plateau;

input::Levels parse(const std::string& text, const regimen::Regimen& r) {
    return input::parse_levels(text, "levels.csv", r.model, 0, fit::level_context(r));
}

}  // namespace

TEST_CASE("input: a CSV written by run --csv reads back as levels", "[input][fit]") {
    test::TempDir dir("levels");
    cli::RunOptions o;
    o.regimen = fittest::data("one-cpt-bolus.toml");
    o.csv = dir.file("sim.csv");
    o.times = "2,7,13.5";
    std::ostringstream out, err;
    REQUIRE(cli::run_command(o, out, err) == 0);
    const auto l = fittest::load(fittest::data("one-cpt-bolus.toml"), o.csv);
    REQUIRE(l.levels.levels.size() == 3);
    CHECK(l.levels.column == "conc_mg_per_L");
    CHECK(l.levels.levels[1].t == 7.0);
    // 500 mg / 40 L · exp(−0.125 · 6) (computed from the closed form), to the CSV's 10 digits.
    CHECK(l.levels.levels[1].value == Approx(12.5 * std::exp(-0.75)).epsilon(1e-9));
    CHECK_FALSE(l.levels.levels[1].below);
}

TEST_CASE("input: levels by day and clock time, in other units, below the limit", "[input][fit]") {
    const regimen::Regimen r = input::load_regimen(fittest::data("one-cpt-bolus.toml"), {});
    // Start clock 08:00: day 1 14:30 is 6.5 h, day 2 08:00 is 24 h (common practice, no source).
    const auto a = parse("# comment\n\nday, clock, conc_ug_per_mL\n1,14:30,3.5\n2,08:00,<0.25\n", r);
    REQUIRE(a.levels.size() == 2);
    CHECK(a.levels[0].t == Approx(6.5).epsilon(1e-15));
    CHECK(a.levels[1].t == Approx(24.0).epsilon(1e-15));
    CHECK(a.levels[0].value == Approx(3.5).epsilon(1e-15));   // 1 µg/mL = 1 mg/L (from memory)
    CHECK(a.levels[1].below);
    CHECK(a.levels[1].value == Approx(0.25).epsilon(1e-15));
    // ng/mL and minutes; rows in any order come back sorted; other columns are ignored.
    const auto b = parse("time_min,note,conc_ng_per_mL\n600,x,2500\n120,y,8000\n", r);
    REQUIRE(b.levels.size() == 2);
    CHECK(b.levels[0].t == Approx(2.0).epsilon(1e-15));
    CHECK(b.levels[0].value == Approx(8.0).epsilon(1e-15));   // 1000 ng/mL = 1 mg/L (from memory)
    CHECK(b.levels[0].pos.line == 3);
    // Several problems are reported together.
    try {
        parse("time_h,conc_mg_per_L\n2,x\n3,-1\n", r);
        FAIL("expected an error");
    } catch (const InputError& e) {
        CHECK(e.diagnostics().size() == 2);
    }
}
