// `plateau check` and `plateau models` through the command functions.
#include <catch2/catch.hpp>

#include <filesystem>

#include "cli/commands.hpp"
#include "cli_support.hpp"

using namespace plateau;
using namespace plateau::clitest;

TEST_CASE("cli: check accepts a model file and a regimen file", "[cli]") {
    cli::CheckOptions o;
    o.files = {data_path("models/runaway.toml"), data_path("bolus-q6h.toml")};
    const Result r = check(o);
    CHECK(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    const auto lines = lines_of(r.out);
    REQUIRE(lines.size() == 2);
    CHECK(lines[0] == data_path("models/runaway.toml") +
                          ": ok (model 'runaway', 2 parameters, 1 compartment, 1 output, 1 route)");
    CHECK(lines[1] ==
          data_path("bolus-q6h.toml") + ": ok (regimen 'bolus-q6h', 4 doses, model 'one-compartment-iv')");
}

TEST_CASE("cli: check accepts every built-in model", "[cli]") {
    cli::CheckOptions o;
    for (const auto& e : std::filesystem::directory_iterator(std::string(PLATEAU_SOURCE_DIR) + "/models"))
        if (e.path().extension() == ".toml") o.files.push_back(e.path().string());
    REQUIRE(o.files.size() >= 11);  // the table in models/README.md lists 11
    const Result r = check(o);
    CHECK(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    CHECK(lines_of(r.out).size() == o.files.size());
}

TEST_CASE("cli: check reports every failing file and exits 1", "[cli]") {
    cli::CheckOptions o;
    o.files = {data_path("bad-amount.toml"), data_path("oral-single.toml"), data_path("unknown-kind.toml")};
    const Result r = check(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.out ==
          data_path("oral-single.toml") + ": ok (regimen 'oral-single', 1 dose, model 'one-compartment-oral')\n");
    CHECK(contains(r.err, "bad-amount.toml:6:"));
    CHECK(contains(r.err, "mgg"));
    CHECK(contains(r.err, "unknown-kind.toml: error: cannot tell what kind of file this is"));
    CHECK(contains(r.err, "2 of 3 files failed the check"));
}

TEST_CASE("cli: check knows the shipped cohort and threshold-distribution files", "[cli]") {
    cli::CheckOptions o;
    const std::string dir = std::string(PLATEAU_SOURCE_DIR) + "/cohorts/";
    o.files = {dir + "zelmarin-thresholds.toml"};
    Result r = check(o);
    INFO(r.err);
    CHECK(r.code == cli::kExitOk);
    CHECK(r.out == dir + "zelmarin-thresholds.toml: ok (threshold distribution, 7 thresholds)\n");
    for (const auto& f : std::filesystem::directory_iterator(dir)) {
        if (f.path().extension() != ".toml") continue;
        o.files = {f.path().string()};
        r = check(o);
        INFO(f.path().string() << ": " << r.err);
        CHECK(r.code == cli::kExitOk);
    }
}

TEST_CASE("cli: models lists the built-in models in columns", "[cli]") {
    const Result r = models({});
    CHECK(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    const auto lines = lines_of(r.out);
    REQUIRE(lines.size() >= 12);  // header and the 11 models of models/README.md
    CHECK(lines[0].rfind("id", 0) == 0);
    CHECK(contains(lines[0], "compartments"));
    const std::size_t summary_col = lines[0].find("summary");
    REQUIRE(summary_col != std::string::npos);
    bool found_oral = false;
    for (const auto& l : lines) {
        CHECK(l.size() <= 100);
        if (l.rfind("two-compartment-oral ", 0) == 0) {
            found_oral = true;
            // gut, central, peripheral; routes oral and iv (models/two-compartment-oral.toml).
            CHECK(contains(l, " 3 "));
            CHECK(contains(l, "oral, iv"));
            CHECK(l.find("Two") == summary_col);
        }
    }
    CHECK(found_oral);
}

TEST_CASE("cli: models ID describes one model", "[cli]") {
    cli::ModelsOptions o;
    o.id = "one-compartment-oral";
    const Result r = models(o);
    CHECK(r.code == cli::kExitOk);
    CHECK(longest_line(r.out) <= 100);
    // Values as written in models/one-compartment-oral.toml.
    CHECK(contains(r.out, "one-compartment-oral: One compartment, first-order absorption"));
    CHECK(contains(r.out, "  ka    1.2 1/h  absorption rate constant"));
    CHECK(contains(r.out, "  f     0.8      oral bioavailability"));
    CHECK(contains(r.out, "  central  mg"));
    CHECK(contains(r.out, "  dcentral/dt  =  ka*gut - cl/v*central"));
    CHECK(contains(r.out, "  conc  mg/L  central/v"));
    CHECK(contains(r.out, "  oral  into gut      fraction f  lag tlag"));
    CHECK(contains(r.out, "  iv    into central  fraction 1  lag none"));
}

TEST_CASE("cli: models finds models in --models directories", "[cli]") {
    cli::ModelsOptions o;
    o.id = "runaway";
    o.model_dirs = {data_path("models")};
    const Result r = models(o);
    CHECK(r.code == cli::kExitOk);
    CHECK(contains(r.out, "  k  1000 1/h  growth rate constant"));
}

TEST_CASE("cli: models with an unknown id lists the available ids", "[cli]") {
    cli::ModelsOptions o;
    o.id = "no-such-model";
    const Result r = models(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.out.empty());
    CHECK(contains(r.err, "error: no model 'no-such-model' in "));
    CHECK(contains(r.err, "available: "));
    CHECK(contains(r.err, "one-compartment-iv"));
    CHECK(contains(r.err, "korvatide"));
    CHECK(longest_line(r.err) <= 100);
}
