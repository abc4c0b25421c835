// Loading valid model and regimen files: canonical values, series expansion, default horizon, model lookup.
// Unit factors are SI definitions ("common practice, no source"); dose times are computed by hand from the files.
#include <catch2/catch.hpp>

#include "../support/temp_dir.hpp"

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "input/load.hpp"
#include "units/units.hpp"

namespace {

namespace fs = std::filesystem;

const std::string kTests = PLATEAU_TEST_DIR;
const std::string kModels = kTests + "/data/models";
const std::string kRegimens = kTests + "/data/regimens";

using TempDir = plateau::test::TempDir;

// A regimen on the simple-oral fixture model with the given [[doses]] entries (and anything after them).
plateau::regimen::Regimen regimen_with(const TempDir& tmp, const std::string& body) {
    const std::string path = tmp.write("r.toml", "id = \"r\"\nmodel = \"simple-oral\"\n" + body);
    return plateau::input::load_regimen(path, {kModels});
}

}  // namespace

TEST_CASE("input: a model file loads with canonical values and file positions", "[input]") {
    const auto m = plateau::input::load_model(kModels + "/simple-oral.toml");
    CHECK(m.id == "simple-oral");
    CHECK(m.summary == "One compartment, first-order absorption with a lag");
    CHECK(m.path == kModels + "/simple-oral.toml");

    REQUIRE(m.parameters.size() == 5);
    CHECK(m.parameters[0].name == "ka");
    CHECK(m.parameters[0].value == Approx(1.2));
    CHECK(m.parameters[0].dim == plateau::units::kRate);
    CHECK(m.parameters[0].unit_text == "1/h");
    CHECK(m.parameters[0].about == "absorption rate constant");
    CHECK(m.parameters[0].pos.line == 7);
    CHECK(m.parameters[0].pos.col == 19);   // first character inside the quotes
    CHECK(m.parameters[1].dim == plateau::units::kFlow);
    CHECK(m.parameters[2].dim == plateau::units::kVolume);
    CHECK(m.parameters[3].name == "f");
    CHECK(m.parameters[3].value == Approx(0.8));
    CHECK(m.parameters[3].dim.dimensionless());
    CHECK(m.parameters[3].unit_text.empty());
    CHECK(m.parameters[4].name == "tlag");
    CHECK(m.parameters[4].value == Approx(0.5));           // 30 min = 0.5 h (SI definition)
    CHECK(m.parameters[4].unit_text == "min");
    CHECK(m.parameters[4].unit.factor == Approx(1.0 / 60.0));   // common practice, no source

    REQUIRE(m.compartments.size() == 2);   // in file order, not alphabetical
    CHECK(m.compartments[0].name == "gut");
    CHECK(m.compartments[1].name == "central");
    CHECK(m.compartments[1].unit_text == "mg");

    REQUIRE(m.rates.size() == 2);
    CHECK(m.rates[0].text == "-ka*gut");
    CHECK(m.rates[0].expr != nullptr);
    CHECK(m.rates[0].pos.line == 18);
    CHECK(m.rates[0].pos.col == 12);
    CHECK(m.rates[1].text == "ka*gut - cl/v*central");

    REQUIRE(m.outputs.size() == 2);
    CHECK(m.outputs[0].name == "conc");
    CHECK(m.outputs[0].about == "plasma concentration");
    CHECK(m.outputs[0].unit.dim == plateau::units::kConc);
    CHECK(m.outputs[1].name == "conc_ng");
    CHECK(m.outputs[1].unit_text == "ng/mL");
    CHECK(m.outputs[1].unit.factor == Approx(1e-3));   // 1 ng/mL = 1e-3 mg/L (SI definition)

    REQUIRE(m.routes.size() == 2);
    CHECK(m.routes[0].name == "oral");
    CHECK(m.routes[0].into == 0);
    CHECK(m.routes[0].fraction_text == "f");
    REQUIRE(m.routes[0].fraction != nullptr);
    CHECK(plateau::model::evaluate_constant(m, *m.routes[0].fraction, m.default_values()) == Approx(0.8));
    REQUIRE(m.routes[0].lag != nullptr);
    CHECK(plateau::model::evaluate_constant(m, *m.routes[0].lag, m.default_values()) == Approx(0.5));
    CHECK(m.routes[1].name == "iv");
    CHECK(m.routes[1].into == 1);
    CHECK(m.routes[1].fraction == nullptr);
    CHECK(m.routes[1].lag == nullptr);
}

TEST_CASE("input: compartment amounts in grams, a lag written as a duration", "[input]") {
    const auto m = plateau::input::load_model(kModels + "/two-comp-iv.toml");
    REQUIRE(m.compartments.size() == 2);
    CHECK(m.compartments[1].unit.factor == Approx(1000.0));   // 1 g = 1000 mg (SI definition)

    TempDir tmp;
    const std::string ok = tmp.write("ok.toml", R"(id = "lagged"
[parameters]
k = { value = "0.5 1/h" }
bio = 0.75
vd = "12 L"
[compartments]
a = "mg"
[rates]
a = "-k*a"
[outputs]
amount = { expr = "a", unit = "mg" }
[routes]
po = { into = "a", fraction = "bio", lag = "45 min" }
)");
    const auto m2 = plateau::input::load_model(ok);
    REQUIRE(m2.parameters.size() == 3);
    CHECK(m2.parameters[1].value == Approx(0.75));   // a bare TOML number is a dimensionless value
    CHECK(m2.parameters[2].value == Approx(12.0));   // a quantity string without the { value = ... } table
    CHECK(m2.parameters[2].dim == plateau::units::kVolume);
    REQUIRE(m2.routes.size() == 1);
    REQUIRE(m2.routes[0].lag != nullptr);
    CHECK(m2.routes[0].lag_text == "45 min");
    CHECK(plateau::model::evaluate_constant(m2, *m2.routes[0].lag, m2.default_values()) == Approx(0.75));   // 45 min
}

TEST_CASE("input: a regimen loads with canonical amounts, times and targets", "[input]") {
    const auto r = plateau::input::load_regimen(kRegimens + "/full.toml", {kModels});
    CHECK(r.id == "fixture-full");
    CHECK(r.model_ref == "simple-oral");
    CHECK(r.model.id == "simple-oral");
    CHECK(r.path == kRegimens + "/full.toml");

    REQUIRE(r.overrides.size() == 2);
    CHECK(r.overrides[0].name == "cl");
    CHECK(r.overrides[0].index == 1);
    CHECK(r.overrides[0].value == Approx(3.9));
    CHECK(r.overrides[1].name == "f");
    CHECK(r.overrides[1].value == Approx(0.9));
    const std::vector<double> values = r.parameter_values();
    REQUIRE(values.size() == 5);
    CHECK(values[1] == Approx(3.9));
    CHECK(values[3] == Approx(0.9));
    CHECK(values[4] == Approx(0.5));

    REQUIRE(r.doses.size() == 3);
    CHECK(r.doses[0].route == "iv");
    CHECK(r.doses[0].route_index == 1);
    CHECK(r.doses[0].amount == Approx(2000.0));   // 2 g = 2000 mg (SI definition)
    CHECK(r.doses[0].at == 0.0);
    CHECK(r.doses[0].count == 1);
    CHECK(r.doses[0].over == Approx(0.5));        // 30 min
    CHECK(r.doses[0].pos.line == 10);

    CHECK(r.doses[1].route_index == 0);
    CHECK(r.doses[1].amount == Approx(500.0));
    CHECK(r.doses[1].at == Approx(8.0));
    CHECK(r.doses[1].every == Approx(8.0));
    CHECK(r.doses[1].count == 5);                 // 8, 16, 24, 32, 40 h: 48 h is not before until = 2 d
    CHECK(r.doses[1].over == 0.0);                // bolus

    CHECK(r.doses[2].amount == Approx(1000.0));
    CHECK(r.doses[2].over == Approx(0.5));        // 1 g at 2 g/h lasts 0.5 h

    CHECK(r.targets.output == "conc");
    REQUIRE(r.targets.above.has_value());
    CHECK(*r.targets.above == Approx(4.0));
    REQUIRE(r.targets.window.has_value());
    CHECK(r.targets.window->first == Approx(10.0));
    CHECK(r.targets.window->second == Approx(20.0));   // 20000 ng/mL = 20 mg/L (SI definition)

    CHECK(r.horizon.until == Approx(72.0));   // 3 d
    CHECK(r.horizon.step == Approx(0.5));
}

TEST_CASE("input: 'until' gives the doses strictly before it", "[input]") {
    TempDir tmp;
    // 0, 20, 40 min; 60 min is not before 1 h even though 1/(1/3) is not exactly 3 in doubles.
    auto r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nevery = \"20 min\"\nuntil = \"1 h\"\n");
    REQUIRE(r.doses.size() == 1);
    CHECK(r.doses[0].count == 3);
    CHECK(r.doses[0].every == Approx(1.0 / 3.0));

    // 1, 9, 17 h before 25 h.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nat = \"1 h\"\nevery = \"8 h\"\nuntil = \"25 h\"\n");
    CHECK(r.doses[0].count == 3);
    // 1, 9, 17, 25 h before 25.5 h.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nat = \"1 h\"\nevery = \"8 h\"\nuntil = \"25.5 h\"\n");
    CHECK(r.doses[0].count == 4);
    // A week of doses every 12 h: 14.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nevery = \"12 h\"\nuntil = \"7 d\"\n");
    CHECK(r.doses[0].count == 14);
}

TEST_CASE("input: the default horizon follows the last dose", "[input]") {
    TempDir tmp;
    // A single dose: 24 h after it.
    auto r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nat = \"2 h\"\n");
    CHECK(r.horizon.until == Approx(26.0));
    CHECK(r.horizon.step == Approx(0.25));   // 15 min
    // Every 12 h, 4 doses: last at 36 h, then max(12 h, 24 h).
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nevery = \"12 h\"\ncount = 4\n");
    CHECK(r.horizon.until == Approx(60.0));
    // Every 48 h, 3 doses: last at 96 h, then one more interval.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nevery = \"48 h\"\ncount = 3\n");
    CHECK(r.horizon.until == Approx(144.0));
    // A 36 h infusion outlasts the 24 h after its start.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nover = \"36 h\"\n");
    CHECK(r.horizon.until == Approx(36.0));
    // Two entries: the later last dose counts (the series' last dose at 16 h, the single one at 30 h), delayed
    // by its route's 30-min lag: 30 h + 0.5 h + 24 h.
    r = regimen_with(tmp, "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\nevery = \"8 h\"\ncount = 3\n"
                          "[[doses]]\nroute = \"oral\"\namount = \"1 mg\"\nat = \"30 h\"\n");
    CHECK(r.horizon.until == Approx(54.5));
    // Targets default to the model's first output.
    CHECK(r.targets.output == "conc");
    CHECK(!r.targets.above.has_value());
}

TEST_CASE("input: models are found by id in the given directories and by path relative to the regimen", "[input]") {
    // By id, in the second directory (the first does not exist).
    TempDir tmp;
    const std::string by_id = tmp.write("r.toml", "id = \"r\"\nmodel = \"two-comp-iv\"\n[[doses]]\nroute = \"iv\"\n"
                                                  "amount = \"1 g\"\n");
    auto r = plateau::input::load_regimen(by_id, {(tmp.path / "none").string(), kModels});
    CHECK(r.model.id == "two-comp-iv");
    CHECK(r.model.path == kModels + "/two-comp-iv.toml");

    // By a path relative to the regimen file's directory.
    r = plateau::input::load_regimen(kRegimens + "/relative.toml", {});
    CHECK(r.model.id == "two-comp-iv");
    CHECK(fs::equivalent(r.model.path, kModels + "/two-comp-iv.toml"));
    REQUIRE(r.doses.size() == 1);
    CHECK(r.doses[0].count == 4);

    // An id that is in no directory.
    CHECK_THROWS_AS(plateau::input::load_regimen(by_id, {(tmp.path / "none").string()}), plateau::InputError);
}

TEST_CASE("input: the model directories, built-in first, then PLATEAU_MODELS", "[input]") {
    const char* old = std::getenv("PLATEAU_MODELS");
    const std::string saved = old != nullptr ? old : "";
    ::unsetenv("PLATEAU_MODELS");
    auto dirs = plateau::input::default_model_dirs();
    REQUIRE(dirs.size() == 1);
    CHECK(dirs[0] == std::string(PLATEAU_SOURCE_DIR) + "/models");

    ::setenv("PLATEAU_MODELS", "/a/b::/c", 1);
    dirs = plateau::input::default_model_dirs();
    CHECK(dirs == std::vector<std::string>{std::string(PLATEAU_SOURCE_DIR) + "/models", "/a/b", "/c"});
    if (old != nullptr) ::setenv("PLATEAU_MODELS", saved.c_str(), 1);
    else ::unsetenv("PLATEAU_MODELS");
}

TEST_CASE("input: the kind of a file and the list of models in a directory", "[input]") {
    CHECK(plateau::input::file_kind(kModels + "/simple-oral.toml") == "model");
    CHECK(plateau::input::file_kind(kRegimens + "/full.toml") == "regimen");
    TempDir tmp;
    CHECK(plateau::input::file_kind(tmp.write("x.toml", "id = \"x\"\n")).empty());
    CHECK_THROWS_AS(plateau::input::file_kind(tmp.write("bad.toml", "id = \n")), plateau::InputError);

    std::string problems;
    auto models = plateau::input::list_models({kModels, kModels}, &problems);
    REQUIRE(models.size() == 2);   // the second directory repeats the ids: first occurrence wins
    CHECK(models[0].id == "simple-oral");
    CHECK(models[1].id == "two-comp-iv");
    CHECK(problems.empty());

    // A directory of broken files: nothing loads, every file is reported.
    models = plateau::input::list_models({kTests + "/diagnostics/cases"}, &problems);
    CHECK(models.empty());
    CHECK(problems.find("model-unknown-unit.toml:7:22: error: unknown unit 'litres' in '40 litres'") != std::string::npos);

    // Regimen files beside models are skipped, not reported as broken models.
    problems.clear();
    models = plateau::input::list_models({kRegimens}, &problems);
    CHECK(models.empty());
    CHECK(problems.empty());
}
