// The real executable: exit codes 0/1/2, help and version, CSV through a file.
#include <catch2/catch.hpp>

#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "cli_support.hpp"

using namespace plateau::clitest;

namespace {

struct Run {
    int code = -1;
    std::string out;
    std::string err;
};

std::string slurp(const std::filesystem::path& p) {
    std::ifstream in(p);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

// Runs the binary with `args` from the fixture directory.
Run run_binary(const std::string& args) {
    const auto out = temp_dir() / "cli-binary.out", err = temp_dir() / "cli-binary.err";
    const std::string cmd = "cd '" + data_path("") + "' && '" + std::string(PLATEAU_BINARY) + "' " + args + " >'" +
                            out.string() + "' 2>'" + err.string() + "'";
    const int status = std::system(cmd.c_str());
    Run r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = slurp(out);
    r.err = slurp(err);
    std::filesystem::remove(out);
    std::filesystem::remove(err);
    return r;
}

}  // namespace

TEST_CASE("cli: the binary runs a regimen and writes the CSV", "[cli]") {
    const Run r = run_binary("run bolus-single.toml --csv - --times 6,1d");
    REQUIRE(r.code == 0);
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 3);
    CHECK(rows[0][1] == "conc_mg_per_L");
    // C(6 h) = 3.5355339059 mg/L (Bourne, Basic Pharmacokinetics, ch. 14); 10 significant digits printed.
    CHECK(std::abs(cell(rows, 1, 1) - 3.5355339059) <= 5e-10);
    // C(24 h) = 10 * 2^-6 = 0.15625 mg/L (computed from the closed form).
    CHECK(cell(rows, 2, 1) == Approx(0.15625).epsilon(1e-9));
    CHECK(contains(r.err, "Research simulation only"));
}

TEST_CASE("cli: the binary exits 1 on bad input and bad options", "[cli]") {
    Run r = run_binary("run bad-amount.toml");
    CHECK(r.code == 1);
    CHECK(contains(r.err, "bad-amount.toml:6:"));

    r = run_binary("run bolus-single.toml --tol abc");
    CHECK(r.code == 1);
    CHECK(r.out.empty());
    CHECK(contains(r.err, "error: --tol: expected a number from 1e-15 to 1e-3, got 'abc'"));

    r = run_binary("run bolus-single.toml --tol -1");
    CHECK(r.code == 1);
    CHECK(contains(r.err, "got '-1'"));

    r = run_binary("run bolus-single.toml --tol 0.5");
    CHECK(r.code == 1);

    r = run_binary("run bolus-single.toml --csv - --step 0");
    CHECK(r.code == 1);
    CHECK(contains(r.err, "error: --step: expected a positive time, got '0'"));

    r = run_binary("run bolus-single.toml --no-such-option");
    CHECK(r.code == 1);

    r = run_binary("");
    CHECK(r.code == 1);

    r = run_binary("check bolus-single.toml unknown-kind.toml");
    CHECK(r.code == 1);
    CHECK(contains(r.out, "bolus-single.toml: ok"));
}

TEST_CASE("cli: the binary takes one directory per --models and keeps later positionals", "[cli]") {
    Run r = run_binary("models --models models runaway");
    CHECK(r.code == 0);
    CHECK(contains(r.out, "runaway: Test model with first-order growth"));

    r = run_binary("check --models models bolus-single.toml oral-single.toml");
    CHECK(r.code == 0);
    CHECK(lines_of(r.out).size() == 2);
    CHECK(contains(r.out, "oral-single.toml: ok (regimen 'oral-single', 1 dose, model 'one-compartment-oral')"));
}

TEST_CASE("cli: the binary exits 2 on a numerical failure", "[cli]") {
    const Run r = run_binary("run runaway-regimen.toml");
    CHECK(r.code == 2);
    CHECK(contains(r.err, "numerical failure at t = "));
}

TEST_CASE("cli: the binary prints help with examples and exit codes, and its version", "[cli]") {
    for (const std::string cmd : {"--help", "run --help", "check --help", "models --help"}) {
        const Run r = run_binary(cmd);
        CHECK(r.code == 0);
        CHECK(contains(r.out, "Example:"));
        CHECK(contains(r.out, "Exit codes: 0 ok, 1 bad input"));
        CHECK(contains(r.out, "2 numerical failure"));
        CHECK(longest_line(r.out) <= 100);
    }
    const Run v = run_binary("--version");
    CHECK(v.code == 0);
    CHECK(v.out == std::string("plateau ") + plateau::cli::kVersion + "\n");
}

TEST_CASE("cli: the binary says plainly when an option is given twice or misspelt", "[cli]") {
    Run r = run_binary("run bolus-single.toml --json a.json --json b.json");
    CHECK(r.code == 1);
    CHECK(r.err == "error: --json given twice; give it once\n(run 'plateau run --help' for usage)\n");
    CHECK_FALSE(std::filesystem::exists(data_path("a.json")));

    r = run_binary("compare bolus-single.toml bolus-q6h.toml --tol 1e-3 --tol 1e-4 --tol 1e-5");
    CHECK(r.code == 1);
    CHECK(r.err == "error: --tol given 3 times; give it once\n(run 'plateau compare --help' for usage)\n");

    r = run_binary("run bolus-single.toml --jsn out.json");
    CHECK(r.code == 1);
    CHECK(r.err == "error: unknown option '--jsn' for 'run'; did you mean '--json'?\n"
                   "(run 'plateau run --help' for usage)\n");

    r = run_binary("run bolus-single.toml bolus-q6h.toml");
    CHECK(r.code == 1);
    CHECK(r.err == "error: unexpected argument 'bolus-q6h.toml' ('run' takes one regimen file)\n"
                   "(run 'plateau run --help' for usage)\n");

    r = run_binary("rnu bolus-single.toml");
    CHECK(r.code == 1);
    CHECK(r.err == "error: unknown command 'rnu'; expected one of: run, compare, population, check, models, dose, fit; did you mean 'run'?\n"
                   "(run 'plateau --help' for usage)\n");
}
