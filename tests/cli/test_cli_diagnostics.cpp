// The mistakes a new user makes at the command line and in model folders, and what plateau says about them.
// Messages are this project's own contract (common practice, no source) unless a comment names another.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>

#include "cli/commands.hpp"
#include "cli_support.hpp"

using namespace plateau;
using namespace plateau::clitest;

namespace {

cli::CompareOptions compare_of(const std::vector<std::string>& names) {
    cli::CompareOptions o;
    for (const auto& n : names) o.regimens.push_back(data_path(n));
    o.date = "2026-12-02";
    return o;
}

// The text with line breaks and runs of spaces folded to single spaces (sentences are wrapped in the report).
std::string flat(const std::string& text) {
    std::string out;
    for (char ch : text) {
        const char c = ch == '\n' ? ' ' : ch;
        if (c == ' ' && !out.empty() && out.back() == ' ') continue;
        out += c;
    }
    return out;
}

}  // namespace

TEST_CASE("cli: a non-finite value names the rate behind it, its place, the time and the remedies", "[cli]") {
    cli::RunOptions o;
    o.regimen = data_path("hill-at-zero.toml");
    const Result r = run(o);
    CHECK(r.code == cli::kExitNumerical);
    CHECK(r.out.empty());
    // At t = 0 the central compartment is empty (the dose comes at 1 h): (0/c50)^1.5 has an infinite derivative.
    CHECK(contains(r.err, "error: numerical failure at t = 0 h (non-finite state) after 0 steps in '" +
                              data_path("hill-at-zero.toml") + "'; nothing was written\n"));
    CHECK(contains(flat(r.err), " the rate of compartment 'effect' (" + data_path("models/hill-at-zero.toml") +
                                    ":20:12) at t = 0 h: '(central/c50)^hill' raises 'central/c50', which is 0 "
                                    "there, to the non-integer power 1.5: its derivatives are infinite at 0 usual "
                                    "remedies: keep the base of a fractional power above 0"));
    const auto lines = lines_of(r.err);
    REQUIRE(lines.size() >= 3);
    for (std::size_t i = 1; i < lines.size(); ++i) CHECK(lines[i].size() <= 100);  // wrapped under the error line
}

TEST_CASE("cli: check refuses a model whose id is not its file name", "[cli]") {
    const auto dir = temp_dir() / "id-mismatch";
    std::filesystem::create_directories(dir);
    const std::string path = (dir / "my-model.toml").string();
    {
        std::ifstream in(std::string(PLATEAU_SOURCE_DIR) + "/models/one-compartment-iv.toml");
        std::ofstream out(path);
        out << in.rdbuf();
    }
    cli::CheckOptions o;
    o.files = {path};
    const Result r = check(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.out.empty());
    CHECK(r.err == path + ":2:7: error: the model id 'one-compartment-iv' differs from the file name "
                          "'my-model.toml'; a model is found by its file name\n"
                          "  id = \"one-compartment-iv\"\n"
                          "        ^~~~~~~~~~~~~~~~~~\n"
                          "  expected: id = \"my-model\", or the file renamed to one-compartment-iv.toml\n");
    std::filesystem::remove_all(dir);
}

TEST_CASE("cli: models --models lists model files only, not the regimens kept beside them", "[cli]") {
    cli::ModelsOptions o;
    o.model_dirs = {data_path("shadow")};
    const Result r = models(o);
    CHECK(r.code == cli::kExitOk);
    CHECK_FALSE(contains(r.out, "shadow-bolus"));
    CHECK(contains(r.out, "one-compartment-iv"));

    // The same for the ids offered when a regimen names an unknown model.
    cli::RunOptions ro;
    ro.regimen = data_path("shadow/shadow-bolus.toml");
    ro.model_dirs = {data_path("shadow")};
    const auto dir = temp_dir() / "unknown-model";
    std::filesystem::create_directories(dir);
    const std::string bad = (dir / "bad.toml").string();
    {
        std::ofstream out(bad);
        out << "id = \"bad\"\nmodel = \"one-compartment-ivv\"\n[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\n";
    }
    ro.regimen = bad;
    const Result u = run(ro);
    CHECK(u.code == cli::kExitBadInput);
    CHECK(contains(u.err, "unknown model 'one-compartment-ivv'; did you mean 'one-compartment-iv'?"));
    CHECK_FALSE(contains(u.err, "shadow-bolus"));
    std::filesystem::remove_all(dir);
}

TEST_CASE("cli: a --models folder wins over the built-in model of the same id, and says so", "[cli]") {
    cli::RunOptions o;
    o.regimen = data_path("shadow/shadow-bolus.toml");
    o.model_dirs = {data_path("shadow")};
    o.csv = "-";
    o.times = "5h";
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    // 400 mg into 40 L, k = 8/40 1/h: C(5 h) = 10 e^-1 = 3.6787944117 mg/L (computed from the closed form); the
    // built-in model (cl = 5 L/h) would give 10 e^-0.625 = 5.3526142852.
    const auto rows = parse_csv(r.out);
    REQUIRE(rows.size() == 2);
    CHECK(cell(rows, 1, 1) == Approx(3.6787944117).epsilon(1e-9));
    CHECK(contains(flat(r.err), "Model one-compartment-iv (" + data_path("shadow/one-compartment-iv.toml") + ")"));

    cli::ModelsOptions m;
    m.model_dirs = {data_path("shadow")};
    const Result listed = models(m);
    CHECK(contains(flat(listed.out), "note: 'one-compartment-iv' is " + data_path("shadow/one-compartment-iv.toml") +
                                         "; " + std::string(PLATEAU_SOURCE_DIR) +
                                         "/models/one-compartment-iv.toml has the same id and is not used"));
}

TEST_CASE("cli: models takes the path of a model file as well as an id", "[cli]") {
    cli::ModelsOptions o;
    o.id = data_path("models/hill-at-zero.toml");
    Result r = models(o);
    CHECK(r.code == cli::kExitOk);
    CHECK(contains(r.out, "hill-at-zero: Test model: an effect driven by a Hill term"));
    CHECK(contains(r.out, "  hill  1.5"));

    o.id = data_path("bolus-single.toml");
    r = models(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "is a regimen file; expected a model id or a model file"));

    o.id = "one-compartment-orl";
    r = models(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "error: no model 'one-compartment-orl'; did you mean 'one-compartment-oral'? in "));
}

TEST_CASE("cli: compare's plain words compare the doses that reach the circulation", "[cli][report]") {
    // Same drug, f = 0.6: 500 mg orally reaches the circulation as 300 mg, like 300 mg IV. Steady-state average
    // F·D/(CL·τ) = 300/(5·12) = 5 mg/L for both (Gibaldi & Perrier, Pharmacokinetics, 2nd ed., ch. 3): a naive
    // reading ("1.67 times the dose, 1 times the average: not proportional") would be wrong.
    Result r = compare(compare_of({"iv-300-q12h.toml", "oral-500-q12h.toml"}));
    REQUIRE(r.code == cli::kExitOk);
    std::string text = flat(r.out);
    CHECK(contains(text, "B gives 1.67 times A's daily dose by another route (B: oral 60.0 % reaches the circulation; "
                         "A: iv 100.0 %), so 1 times as much reaches the circulation, and its steady-state average is "
                         "1 times A's."));
    CHECK_FALSE(contains(text, "not proportional"));

    // The same daily dose by mouth: only 0.6 times as much arrives, and the average is 0.6 times A's (same
    // closed form). A naive "same daily dose" sentence would credit the difference to the schedule's shape.
    r = compare(compare_of({"iv-300-q12h.toml", "oral-300-q12h.toml"}));
    REQUIRE(r.code == cli::kExitOk);
    text = flat(r.out);
    CHECK(contains(text, "B gives 1 times A's daily dose by another route (B: oral 60.0 % reaches the circulation; "
                         "A: iv 100.0 %), so 0.6 times as much reaches the circulation, and its steady-state average "
                         "is 0.6 times A's."));
    CHECK_FALSE(contains(text, "Same daily dose"));

    // Saturable elimination (models/korvatide.toml, f = 0.9): 250 mg orally delivers 225 mg against 150 mg IV,
    // 1.5 times as much, but the average rises far more: that is the elimination, not the route.
    r = compare(compare_of({"korvatide-iv-150.toml", "korvatide-oral-250.toml"}));
    REQUIRE(r.code == cli::kExitOk);
    text = flat(r.out);
    CHECK(contains(text, "B gives 1.67 times A's daily dose by another route (B: oral 90.0 % reaches the circulation; "
                         "A: iv 100.0 %), so 1.5 times as much reaches the circulation, but its steady-state average "
                         "is "));
    CHECK(contains(text, "times A's: exposure is not proportional to the dose that reaches the circulation."));
}

TEST_CASE("cli: without a threshold the JSON has no time-above figures at all", "[cli][json]") {
    cli::RunOptions o;
    o.regimen = data_path("bolus-q6h.toml");  // [targets] names the output only
    o.json = "-";
    Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(contains(r.out, "\"intervals\""));
    CHECK(contains(r.out, "\"steady_state\""));
    CHECK_FALSE(contains(r.out, "above_hours"));
    CHECK_FALSE(contains(r.out, "above_fraction"));

    // With one, every level has it: 4 doses every 6 h over a 1-day horizon give 4 intervals, 1 day and the
    // steady state (bolus-q6h.toml).
    o.targets.above = "1mg/L";
    r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    std::size_t n = 0;
    for (std::size_t p = r.out.find("\"above_hours\""); p != std::string::npos; p = r.out.find("\"above_hours\"", p + 1)) ++n;
    CHECK(n == 4 + 1 + 1);
}

TEST_CASE("cli: the interval table prints its times to 6 significant digits", "[cli]") {
    cli::RunOptions o;
    o.regimen = data_path("oral-300-q12h.toml");
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    // First-dose peak of one-compartment-oral (ka = 1.2 1/h, k = 5/40 1/h) at tmax = ln(ka/k)/(ka − k) =
    // 2.1039657 h (computed from the closed form), shown as 2.10397 like every other time in the report.
    std::string row;
    for (const auto& l : lines_of(r.out))
        if (l.rfind("           0        12", 0) == 0) row = l;
    REQUIRE_FALSE(row.empty());
    CHECK(contains(row, " 2.10397 "));
    CHECK_FALSE(contains(row, "2.103965"));
}
