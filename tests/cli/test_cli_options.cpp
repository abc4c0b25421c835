// Option parsing helpers of the command line and the CSV helpers.
#include <catch2/catch.hpp>

#include <sstream>

#include "cli/commands.hpp"
#include "core/diagnostic.hpp"
#include "report/csv.hpp"

using namespace plateau;

TEST_CASE("cli: tolerance values are checked against 1e-15..1e-3", "[cli]") {
    CHECK(cli::tolerance_problem("1e-10").empty());
    CHECK(cli::tolerance_problem("1e-15").empty());
    CHECK(cli::tolerance_problem("0.001").empty());
    CHECK(cli::tolerance_problem("abc") == "expected a number from 1e-15 to 1e-3, got 'abc'");
    CHECK(cli::tolerance_problem("-1") == "expected a number from 1e-15 to 1e-3, got '-1'");
    CHECK(cli::tolerance_problem("0.5") == "expected a number from 1e-15 to 1e-3, got '0.5'");
    CHECK(cli::tolerance_problem("1e-16") == "expected a number from 1e-15 to 1e-3, got '1e-16'");
    CHECK(cli::tolerance_problem("1e-10x") == "expected a number from 1e-15 to 1e-3, got '1e-10x'");
    CHECK(cli::tolerance_problem("nan") == "expected a number from 1e-15 to 1e-3, got 'nan'");
    CHECK(cli::parse_tolerance(" 1e-12 ") == 1e-12);
    CHECK_THROWS_AS(cli::parse_tolerance(""), cli::UsageError);
}

TEST_CASE("cli: durations are hours or numbers with a time unit", "[cli]") {
    // 1 min = 1/60 h, 1 d = 24 h, 1 s = 1/3600 h (common practice, no source).
    CHECK(cli::parse_duration("2", "--step") == 2.0);
    CHECK(cli::parse_duration("2h", "--step") == 2.0);
    CHECK(cli::parse_duration("30min", "--step") == Approx(0.5).epsilon(1e-15));
    CHECK(cli::parse_duration("1 d", "--step") == 24.0);
    CHECK(cli::parse_duration("90 s", "--step") == Approx(0.025).epsilon(1e-15));
    CHECK(cli::duration_problem("15min").empty());
    CHECK(cli::duration_problem("0") == "expected a positive time, got '0'");
    CHECK(cli::duration_problem("-2h") == "expected a positive time, got '-2h'");
    CHECK(cli::duration_problem("5 mg") ==
          "expected a time such as 15min, 2h or 1d (plain numbers are hours), got '5 mg'");
    CHECK(cli::duration_problem("50%") ==
          "expected a time such as 15min, 2h or 1d (plain numbers are hours), got '50%'");
    CHECK(cli::duration_problem("abc") ==
          "expected a time such as 15min, 2h or 1d (plain numbers are hours), got 'abc'");
    try {
        cli::parse_duration("3 L", "--times");
        FAIL("no error for a volume");
    } catch (const cli::UsageError& e) {
        CHECK(std::string(e.what()) ==
              "--times: expected a time such as 15min, 2h or 1d (plain numbers are hours), got '3 L'");
    }
}

TEST_CASE("cli: --times lists are split on commas", "[cli]") {
    const std::vector<double> t = cli::parse_times("0.5, 1,2h ,30min,1d,0");
    REQUIRE(t.size() == 6);
    CHECK(t[0] == 0.5);
    CHECK(t[1] == 1.0);
    CHECK(t[2] == 2.0);
    CHECK(t[3] == Approx(0.5).epsilon(1e-15));  // 30 min = 0.5 h (common practice, no source)
    CHECK(t[4] == 24.0);                        // 1 d = 24 h (common practice, no source)
    CHECK(t[5] == 0.0);
    CHECK_THROWS_AS(cli::parse_times(""), cli::UsageError);
    CHECK_THROWS_AS(cli::parse_times("1,"), cli::UsageError);
    CHECK_THROWS_AS(cli::parse_times("1;2"), cli::UsageError);
    CHECK_THROWS_AS(cli::parse_times("-0.5"), cli::UsageError);
}

TEST_CASE("cli: CSV column names spell out the unit", "[cli]") {
    CHECK(report::csv_column_name("conc", "mg/L") == "conc_mg_per_L");
    CHECK(report::csv_column_name("central", "mg") == "central_mg");
    CHECK(report::csv_column_name("conc", "ng/mL") == "conc_ng_per_mL");
    CHECK(report::csv_column_name("auc", "mg*h/L") == "auc_mg_h_per_L");
    CHECK(report::csv_column_name("ratio", "") == "ratio");
}

TEST_CASE("cli: CSV grids include 0 and the end exactly once", "[cli]") {
    CHECK(report::grid_point_count(24.0, 1.0) == 25);
    CHECK(report::grid_point_count(24.0, 0.25) == 97);
    CHECK(report::grid_point_count(24.0, 7.0) == 5);
    CHECK(report::grid_point_count(24.0, 24.0) == 2);
    CHECK(report::grid_point_count(24.0, 100.0) == 2);
    CHECK(report::grid_point_count(1.0, 0.1) == 11);  // 10 * 0.1 rounds to 1 within the end tolerance
    const std::vector<double> g = report::grid_times(1.0, 0.1);
    REQUIRE(g.size() == 11);
    CHECK(g[3] == 3 * 0.1);  // i * step, not accumulated sums
    CHECK(g.back() == 1.0);
    const std::vector<double> h = report::grid_times(24.0, 7.0);
    CHECK(h == std::vector<double>{0.0, 7.0, 14.0, 21.0, 24.0});
    CHECK_THROWS_AS(report::grid_times(24.0, 1e-5), InputError);  // 2.4 million points
    CHECK_NOTHROW(report::grid_times(24.0, 24.0 / 1999999.0));    // exactly 2 million points
}
