// `plateau run` through the command function: summary values, CSV sampling, and bad options.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli/commands.hpp"
#include "cli_support.hpp"
#include "report/caution.hpp"

using namespace plateau;
using namespace plateau::clitest;

namespace {

cli::RunOptions opts(const std::string& fixture) {
    cli::RunOptions o;
    o.regimen = data_path(fixture);
    return o;
}

// One compartment, IV bolus 100 mg, V = 10 L, k = ln 2 / 4 h (Bourne, Basic Pharmacokinetics, ch. 14).
const double kBolusK = std::log(2.0) / 4.0;
double bolus_conc(double t) {
    return 10.0 * std::exp(-kBolusK * t);
}

// First-order absorption, F = 0.8, D = 500 mg, V = 40 L, ka = 1.2 /h, k = 0.15 /h
// (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory).
double oral_auc(double T) {
    const double ka = 1.2, k = 0.15, A = 0.8 * 500.0 * ka / (40.0 * (ka - k));
    return A * ((1.0 - std::exp(-k * T)) / k - (1.0 - std::exp(-ka * T)) / ka);
}

}  // namespace

TEST_CASE("cli: run prints the summary of a single IV bolus", "[cli]") {
    const Result r = run(opts("bolus-single.toml"));
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    CHECK(contains(r.out, "Regimen   bolus-single"));
    CHECK(contains(r.out, "Model     one-compartment-iv (" + std::string(PLATEAU_SOURCE_DIR) +
                              "/models/one-compartment-iv.toml): One compartment"));
    CHECK(contains(r.out, "1 dose (iv), 100 mg in total, at 0 h"));
    CHECK(contains(r.out, "Horizon   0 to 24 h"));
    CHECK(contains(r.out, "Taylor order 13"));  // p = ceil(-0.5 ln 1e-10 + 1) = 13, computed from the closed form
    // The caution line is wrapped to 100 columns.
    std::string flat = r.out;
    std::replace(flat.begin(), flat.end(), '\n', ' ');
    CHECK(contains(flat, report::kCaution));
    // C(24 h) = 10 * 2^-6 mg/L = 0.15625 (computed from the closed form).
    CHECK(number_after(r.out, "At end") == Approx(0.15625).epsilon(1e-8));
    // The peak is the value just after the bolus: D/V = 10 mg/L at 0 h (computed from the closed form).
    CHECK(number_after(r.out, "Peak") == Approx(10.0).epsilon(1e-5));  // 6 significant digits printed
    CHECK(number_after_word(r.out, "Peak", " at ") == 0.0);
    // AUC 0-24 = D/CL * (1 - 2^-6) = 57.7078016356 * 0.984375 (Bourne, Basic Pharmacokinetics, ch. 14;
    // computed from the closed form).
    CHECK(number_after(r.out, "AUC over the horizon") == Approx(57.7078016356 * 0.984375).epsilon(1e-5));
    CHECK(contains(r.out, "mg·h/L from 0 to 24 h"));
    CHECK(longest_line(r.out) <= 100);
}

TEST_CASE("cli: run finds the peak after the last of repeated boluses", "[cli]") {
    const Result r = run(opts("bolus-q6h.toml"));
    REQUIRE(r.code == cli::kExitOk);
    CHECK(contains(r.out, "4 doses (iv), 400 mg in total, from 0 h to 18 h"));
    // Peak just after dose 4 at 18 h: 10 * (1 - q^4) / (1 - q), q = 2^-1.5 (computed from the closed form).
    const double q = std::pow(2.0, -1.5);
    CHECK(number_after(r.out, "Peak") == Approx(10.0 * (1 - std::pow(q, 4)) / (1 - q)).epsilon(1e-5));
    CHECK(number_after_word(r.out, "Peak", " at ") == 18.0);
}

TEST_CASE("cli: run prints the exact oral peak", "[cli]") {
    cli::RunOptions o = opts("oral-single.toml");
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    // Tmax = 1.9804205159 h, Cmax = 7.4299714457 mg/L (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1,
    // from memory); the summary prints 8 significant digits.
    CHECK(number_after(r.out, "Peak") == Approx(7.4299714457).epsilon(1e-5));
    CHECK(number_after_word(r.out, "Peak", " at ") == Approx(1.9804205159).margin(0.5e-4));  // 4 decimals printed
    // C(24 h) = 0.3122711137 mg/L (Gibaldi & Perrier, ch. 1, from memory).
    CHECK(number_after(r.out, "At end") == Approx(0.3122711137).epsilon(1e-7));
    // AUC 0-24 h of the Bateman function (computed from the closed form).
    CHECK(number_after(r.out, "AUC over the horizon") == Approx(oral_auc(24.0)).epsilon(1e-5));
}

TEST_CASE("cli: run samples the CSV on the regimen's grid", "[cli]") {
    cli::RunOptions o = opts("bolus-single.toml");
    o.csv = "-";
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    // With the CSV on standard output the summary goes to standard error.
    CHECK(contains(r.err, "Regimen   bolus-single"));
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 26);  // header + 0, 1, ..., 24 h (step 1 h)
    CHECK(rows[0] == std::vector<std::string>{"time_h", "conc_mg_per_L", "free_mg_per_L", "central_mg"});
    for (std::size_t i = 1; i < rows.size(); ++i) {
        const double t = static_cast<double>(i - 1);
        CHECK(cell(rows, i, 0) == t);
        // Closed form 10 e^{-kt} (Bourne, ch. 14); the CSV has 10 significant digits.
        CHECK(cell(rows, i, 1) == Approx(bolus_conc(t)).epsilon(1e-9));
        // free = fu * conc with the model's fu = 0.9; central = V * conc (computed from the closed form).
        CHECK(cell(rows, i, 2) == Approx(0.9 * bolus_conc(t)).epsilon(1e-9));
        CHECK(cell(rows, i, 3) == Approx(10.0 * bolus_conc(t)).epsilon(1e-9));
    }
}

TEST_CASE("cli: run --step overrides the grid and always ends at the horizon", "[cli]") {
    cli::RunOptions o = opts("bolus-single.toml");
    o.csv = "-";
    o.step = "15min";
    Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 1 + 97);  // 24 h / 0.25 h + 1 points
    CHECK(cell(rows, 2, 0) == 0.25);
    CHECK(cell(rows, 97, 0) == 24.0);

    o.step = "7";  // plain number: hours; 0, 7, 14, 21 and the end, 24
    r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    rows = parse_csv(r.out);
    REQUIRE(rows.size() == 1 + 5);
    CHECK(cell(rows, 4, 0) == 21.0);
    CHECK(cell(rows, 5, 0) == 24.0);
}

TEST_CASE("cli: run --times gives the textbook IV bolus value", "[cli]") {
    cli::RunOptions o = opts("bolus-single.toml");
    o.csv = "-";
    o.times = "6";
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 2);
    CHECK(cell(rows, 1, 0) == 6.0);
    // C(6 h) = 3.5355339059 mg/L (Bourne, Basic Pharmacokinetics, ch. 14); 10 significant digits printed.
    CHECK(std::abs(cell(rows, 1, 1) - 3.5355339059) <= 5e-10);
}

TEST_CASE("cli: run --times accepts units and gives the Bateman values", "[cli]") {
    cli::RunOptions o = opts("oral-single.toml");
    o.csv = "-";
    o.times = "30min, 1h,120 min,8,1d";
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 6);
    CHECK(rows[0][0] == "time_h");
    CHECK(rows[0][1] == "conc_mg_per_L");
    CHECK(rows[0][3] == "gut_mg");
    CHECK(rows[0][4] == "central_mg");
    const double t[] = {0.5, 1.0, 2.0, 8.0, 24.0};
    // C(0.5) = 4.3306497170, C(1) = 6.3944430230, C(2) = 7.4297173416, C(8) = 3.4414455220,
    // C(24) = 0.3122711137 mg/L (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 1, from memory).
    const double c[] = {4.3306497170, 6.3944430230, 7.4297173416, 3.4414455220, 0.3122711137};
    for (std::size_t i = 0; i < 5; ++i) {
        CHECK(cell(rows, i + 1, 0) == t[i]);
        CHECK(cell(rows, i + 1, 1) == Approx(c[i]).epsilon(1e-9));
        // Gut amount F*D*e^{-ka t} (computed from the closed form). The error control mixes absolute and
        // relative error (N = max(1, |x|)), so tiny amounts are accurate to about 1e-10 mg, not relatively.
        CHECK(cell(rows, i + 1, 3) == Approx(400.0 * std::exp(-1.2 * t[i])).epsilon(1e-9).margin(1e-9));
    }
}

TEST_CASE("cli: run --times at a bolus time gives the value just after the dose", "[cli]") {
    cli::RunOptions o = opts("bolus-q6h.toml");
    o.csv = "-";
    o.times = "0,6,12";
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 4);
    // D/V = 10 mg/L at 0 (computed from the closed form); peaks after doses 2 and 3 = 13.5355339059 and
    // 14.7855339059 mg/L (Bourne, Basic Pharmacokinetics, ch. 14; computed).
    CHECK(cell(rows, 1, 1) == Approx(10.0).epsilon(1e-9));
    CHECK(cell(rows, 2, 1) == Approx(13.5355339059).epsilon(1e-9));
    CHECK(cell(rows, 3, 1) == Approx(14.7855339059).epsilon(1e-9));
}

TEST_CASE("cli: run writes the CSV to a file", "[cli]") {
    cli::RunOptions o = opts("bolus-q6h.toml");
    const std::string path = (temp_dir() / "cli-q6h.csv").string();
    o.csv = path;
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(contains(r.out, "Regimen   bolus-q6h"));
    CHECK(contains(r.out, "49 rows written to"));  // step 30 min over 1 d: 49 points
    std::ifstream in(path);
    std::stringstream text;
    text << in.rdbuf();
    const auto rows = parse_csv(text.str());
    REQUIRE(rows.size() == 50);
    CHECK(cell(rows, 49, 0) == 24.0);
    in.close();
    std::remove(path.c_str());
}

TEST_CASE("cli: run refuses bad option values before simulating", "[cli]") {
    cli::RunOptions o = opts("bolus-single.toml");
    Result r;

    SECTION("tolerance out of range") {
        o.tol = 0.5;
        r = run(o);
        CHECK(contains(r.err, "error: --tol: expected a number from 1e-15 to 1e-3, got 0.5"));
    }
    SECTION("--times after the horizon") {
        o.csv = "-";
        o.times = "1,25h";
        r = run(o);
        CHECK(contains(r.err, "error: --times: 25 h is after the end of the horizon; expected times from 0 to 24 h"));
    }
    SECTION("--times before 0") {
        o.csv = "-";
        o.times = "-1";
        r = run(o);
        CHECK(contains(r.err, "error: --times: '-1' is before 0"));
    }
    SECTION("--times with a wrong unit") {
        o.csv = "-";
        o.times = "1,2 mg";
        r = run(o);
        CHECK(contains(r.err, "error: --times: expected a time such as 15min, 2h or 1d"));
        CHECK(contains(r.err, "got '2 mg'"));
    }
    SECTION("--times with an empty entry") {
        o.csv = "-";
        o.times = "1,,2";
        r = run(o);
        CHECK(contains(r.err, "error: --times: entry 2 of '1,,2' is empty"));
    }
    SECTION("--times without --csv") {
        o.times = "1";
        r = run(o);
        CHECK(contains(r.err, "add --csv FILE"));
    }
    SECTION("--step 0") {
        o.csv = "-";
        o.step = "0";
        r = run(o);
        CHECK(contains(r.err, "error: --step: expected a positive time, got '0'"));
    }
    SECTION("a grid above the point limit") {
        o.csv = "-";
        o.step = "0.01s";  // 24 h / 0.01 s = 8640000 steps
        r = run(o);
        CHECK(contains(r.err, "error: the sampling grid would have 8640001 points (horizon 24 h, step 0.01 s)"));
        CHECK(contains(r.err, "at most 2000000 points"));
    }
    SECTION("an unwritable CSV path") {
        o.csv = "/nonexistent-dir/out.csv";
        r = run(o);
        CHECK(contains(r.err, "error: --csv: cannot write '/nonexistent-dir/out.csv'"));
    }
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.out.empty());
    CHECK(lines_of(r.err).size() <= 2);
}

TEST_CASE("cli: run reports bad files as located diagnostics", "[cli]") {
    Result r = run(opts("bad-amount.toml"));
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.out.empty());
    CHECK(contains(r.err, "bad-amount.toml:6:"));
    CHECK(contains(r.err, "error: "));
    CHECK(contains(r.err, "mgg"));

    r = run(opts("no-such-file.toml"));
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "no-such-file.toml"));
}

TEST_CASE("cli: run reports a numerical failure with its time and exit code 2", "[cli]") {
    cli::RunOptions o = opts("runaway-regimen.toml");
    o.csv = "-";
    const Result r = run(o);
    CHECK(r.code == cli::kExitNumerical);
    CHECK(r.out.empty());  // nothing written, not even the CSV header
    CHECK(contains(r.err, "error: numerical failure at t = "));
    CHECK(contains(r.err, "(non-finite state)"));
    // e^{1000 t} passes the largest double (about e^709.8) near t = 0.71 h (computed from the closed form):
    // the failure must be reported before that, not at the end of the 10 h horizon.
    const std::size_t p = r.err.find("t = ");
    REQUIRE(p != std::string::npos);
    const double t = std::strtod(r.err.c_str() + p + 4, nullptr);
    CHECK(t > 0.0);
    CHECK(t < 0.72);
}

TEST_CASE("cli: run refuses outputs that would overwrite an input or each other", "[cli]") {
    const auto dir = temp_dir();
    const std::string copy = (dir / "copy-of-regimen.toml").string();
    std::filesystem::copy_file(data_path("bolus-single.toml"), copy, std::filesystem::copy_options::overwrite_existing);
    cli::RunOptions o;
    o.regimen = copy;
    o.json = copy;
    Result r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "is an input file; it would be overwritten"));
    o.json = (dir / "same.out").string();
    o.report = o.json;
    r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "--report and --json name the same file"));
    CHECK_FALSE(std::filesystem::exists(o.json));  // nothing was written
}

TEST_CASE("cli: run names a model file given where a regimen is expected, and checks --output", "[cli]") {
    cli::RunOptions o;
    o.regimen = std::string(PLATEAU_SOURCE_DIR) + "/models/one-compartment-iv.toml";
    Result r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "is a model file; expected a regimen file"));

    o = opts("bolus-single.toml");
    o.targets.output = "nope";
    r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "--output: model 'one-compartment-iv' has no output 'nope'; expected one of: conc, free"));

    // The free output is fu = 0.9 times the total: its peak after 100 mg into 10 L is 9 mg/L (computed from the
    // closed form), printed to 6 significant digits.
    o.targets.output = "free";
    r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(number_after(r.out, "Peak") == Approx(9.0).epsilon(1e-5));
}
