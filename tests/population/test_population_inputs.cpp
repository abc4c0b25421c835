// Covariates, derived parameters, per-kg and per-m² amounts, the population command's determinism, and the
// located errors of the new tables.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>

#include "cli/commands.hpp"
#include "core/diagnostic.hpp"
#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "population/run.hpp"
#include "../support/temp_dir.hpp"

using namespace plateau;

namespace {

const std::string kSrc = PLATEAU_SOURCE_DIR;

std::string errors_of(const std::string& path, bool cohort = false) {
    try {
        if (cohort) input::load_cohort(path);
        else input::load_model(path);
    } catch (const InputError& e) {
        return format_diagnostics(e.diagnostics());
    }
    return "";
}

const char* kModelHead = R"(id = "m"
[parameters]
cl_pop = { value = "5 L/h" }
v      = { value = "40 L" }
fu     = { value = "0.9" }
[covariates]
wt = { value = "70 kg" }
)";
const char* kModelTail = R"(
[compartments]
central = "mg"
[rates]
central = "-cl/v*central"
[outputs]
conc = { expr = "central/v", unit = "mg/L" }
[routes]
iv = { into = "central" }
)";

}  // namespace

TEST_CASE("population: covariates and derived parameters by hand", "[population]") {
    test::TempDir dir("derived");
    const std::string path = dir.write("r.toml", R"(id = "p"
model = "zelmarin-renal"
[patient]
wt = "82 kg"
crcl = "60 mL/min"
[[doses]]
route = "iv"
amount = "1 g"
)");
    const regimen::Regimen r = input::load_regimen(path, {kSrc + "/models"});
    const auto v = r.parameter_values();
    const auto& m = r.model;
    // cl = 10 L/h · (82/70)^0.75 · (60/100)^0.6 and v1 = 12 L · 82/70 (computed by hand from the model file).
    CHECK(v[static_cast<std::size_t>(m.parameter_index("cl"))] == Approx(10.0 * std::pow(82.0 / 70.0, 0.75) * std::pow(0.6, 0.6)).epsilon(1e-14));
    CHECK(v[static_cast<std::size_t>(m.parameter_index("v1"))] == Approx(12.0 * 82.0 / 70.0).epsilon(1e-14));
    // The typical values when the patient says nothing: cl_pop and v1_pop themselves (computed by hand).
    CHECK(m.parameters[static_cast<std::size_t>(m.parameter_index("cl"))].value == Approx(10.0).epsilon(1e-15));
    // A random effect on top: cl · e^η, fu through the logit (computed from the closed form).
    std::vector<double> w = m.default_values();
    const std::vector<double> eta{0.2, -0.1, 0.5};
    model::individualize(m, w, eta);
    CHECK(w[static_cast<std::size_t>(m.parameter_index("cl"))] == Approx(10.0 * std::exp(0.2)).epsilon(1e-14));
    CHECK(w[static_cast<std::size_t>(m.parameter_index("v1"))] == Approx(12.0 * std::exp(-0.1)).epsilon(1e-14));
    const double z = std::log(0.8 / 0.2) + 0.5;
    CHECK(w[static_cast<std::size_t>(m.parameter_index("fu"))] == Approx(1.0 / (1.0 + std::exp(-z))).epsilon(1e-14));
}

TEST_CASE("population: per-kg and per-m2 amounts resolve against the patient", "[population]") {
    test::TempDir dir("per-size");
    const std::string path = dir.write("r.toml", R"(id = "p"
model = "one-compartment-iv"
[patient]
wt = "80 kg"
ht = "180 cm"
[[doses]]
route = "iv"
amount = "15 mg/kg"
[[doses]]
route = "iv"
amount = "75 mg/m2"
at = "12 h"
)");
    const regimen::Regimen r = input::load_regimen(path, {kSrc + "/models"});
    REQUIRE(r.doses.size() == 2);
    CHECK(r.doses[0].amount == Approx(1200.0));   // 15 mg/kg × 80 kg (computed by hand)
    // Mosteller (N Engl J Med 1987): BSA = √(180 cm × 80 kg / 3600) = 2.0 m² exactly (computed from the formula),
    // so 75 mg/m² gives 150 mg.
    CHECK(regimen::bsa_mosteller(80.0, 180.0) == Approx(2.0).epsilon(1e-15));
    CHECK(r.doses[1].amount == Approx(150.0).epsilon(1e-14));
    // Mosteller's formula at 170 cm and 70 kg: √(11900/3600) = 1.8181 m² (computed from the formula).
    CHECK(regimen::bsa_mosteller(70.0, 170.0) == Approx(1.818119).epsilon(1e-6));

    const std::string bad = dir.write("bad.toml", R"(id = "p"
model = "one-compartment-iv"
[[doses]]
route = "iv"
amount = "75 mg/m2"
)");
    try {
        input::load_regimen(bad, {kSrc + "/models"});
        FAIL("a per-m2 amount without a weight was accepted");
    } catch (const InputError& e) {
        const std::string msg = format_diagnostics(e.diagnostics());
        CHECK_THAT(msg, Catch::Contains("bad.toml:3:1: error: an amount per m2 needs the patient's weight"));
    }
}

TEST_CASE("population: the same output for 1, 2 and 4 threads; the same subjects under every regimen", "[population]") {
    test::TempDir dir("threads");
    std::string first_json, first_csv;
    for (int threads : {1, 2, 4}) {
        cli::PopulationOptions o;
        o.regimens = {kSrc + "/regimens/zelmarin-pop-q8h-30min.toml", kSrc + "/regimens/zelmarin-pop-q8h-4h.toml"};
        o.cohort = kSrc + "/cohorts/zelmarin-adults.toml";
        o.size = 60;
        o.seed = 5;
        o.threads = threads;
        o.json = dir.file("p" + std::to_string(threads) + ".json");
        o.csv = dir.file("p" + std::to_string(threads) + ".csv");
        o.date = "2026-12-02";
        o.progress = false;
        std::ostringstream out, err;
        REQUIRE(cli::population_command(o, out, err) == 0);
        std::ifstream j(o.json), c(o.csv);
        std::stringstream js, cs;
        js << j.rdbuf();
        cs << c.rdbuf();
        if (threads == 1) {
            first_json = js.str();
            first_csv = cs.str();
            CHECK_THAT(first_json, Catch::Contains("\"pta\": "));
            CHECK_THAT(out.str(), Catch::Contains("not clinical advice"));
        } else {
            CHECK(js.str() == first_json);
            CHECK(cs.str() == first_csv);
        }
    }
    // Identical subjects across regimens: covariates, random effects and parameters agree.
    const auto r1 = input::load_regimen(kSrc + "/regimens/zelmarin-pop-q8h-30min.toml", {kSrc + "/models"});
    const auto r2 = input::load_regimen(kSrc + "/regimens/zelmarin-pop-continuous.toml", {kSrc + "/models"});
    const auto cohort = input::load_cohort(kSrc + "/cohorts/zelmarin-adults.toml");
    population::Setup s;
    s.cohort = &cohort;
    s.size = 20;
    const auto res = population::run({r1, r2}, s);
    for (const auto& sub : res.subjects) {
        REQUIRE(sub.parameters.size() == 2);
        CHECK(sub.parameters[0] == sub.parameters[1]);
        CHECK(sub.eta.size() == 3);
        CHECK(sub.covariates.size() == 3);
    }
    CHECK(res.subjects[0].parameters[0] != res.subjects[1].parameters[0]);
}

TEST_CASE("population: errors in the new model tables are located", "[population][diagnostics]") {
    test::TempDir dir("model-errors");
    struct Case {
        const char* body;
        const char* expect;
    };
    const Case cases[] = {
        {"[derived]\ncl = { expr = \"cl_pop*wt\", unit = \"L/h\" }\n",
         "m.toml:9:16: error: derived parameter 'cl' is a quantity of dimension mass*volume/time, but its unit 'L/h' is a clearance"},
        {"[derived]\ncl = { expr = \"cl_pop*central/v\", unit = \"L/h\" }\n", "m.toml:9:23: error: 'central' cannot be used here: derived parameters are computed once per subject"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\nwt = \"30 %\"\n",
         "m.toml:11:1: error: 'wt' is a covariate: its spread belongs in a cohort file"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\nclx = \"30 %\"\n",
         "m.toml:11:1: error: variability for unknown parameter 'clx'"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\ncl = \"0 %\"\n",
         "m.toml:11:7: error: variability of 'cl': the coefficient of variation must be above 0 %"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\nv = { logit_sd = 0.5 }\n",
         "error: variability of 'v': a logit-normal spread is for fractions"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\ncl = \"30 %\"\nv = \"20 %\"\nfu = { logit_sd = 0.5 }\n"
         "[correlation]\ncl = { v = 0.9, fu = 0.9 }\nv = { fu = -0.9 }\n",
         "m.toml:14:1: error: these correlations are impossible together"},
        {"[derived]\ncl = { expr = \"cl_pop\", unit = \"L/h\" }\n[variability]\ncl = \"30 %\"\n[correlation]\ncl = { v = 0.5 }\n",
         "m.toml:13:8: error: correlation with 'v', which has no [variability] entry"},
    };
    for (const auto& c : cases) {
        const std::string path = dir.write("m.toml", std::string(kModelHead) + c.body + kModelTail);
        INFO(c.body);
        CHECK_THAT(errors_of(path), Catch::Contains(c.expect));
    }
}

TEST_CASE("population: errors in cohort files are located", "[population][diagnostics]") {
    test::TempDir dir("cohort-errors");
    struct Case {
        const char* body;
        const char* expect;
    };
    const Case cases[] = {
        {"[covariates]\nwt = { dist = \"gamma\", range = [\"1 kg\", \"2 kg\"] }\n",
         "c.toml:3:16: error: unknown distribution 'gamma'"},
        {"[covariates]\nwt = { dist = \"normal\", mean = \"70 kg\", sd = \"10 L\", range = [\"40 kg\", \"150 kg\"] }\n",
         "c.toml:3:50: error: expected an amount (mass), got '10 L' (volume)"},
        {"[covariates]\nwt = { dist = \"normal\", mean = \"30 kg\", sd = \"10 kg\", range = [\"40 kg\", \"150 kg\"] }\n",
         "c.toml:3:1: error: the mean of 'wt' is outside its range"},
        {"[covariates]\nwt = { dist = \"uniform\", range = [\"150 kg\", \"40 kg\"] }\n",
         "c.toml:3:34: error: the low end of 'range' is not below its high end"},
        {"[covariates]\nwt = { dist = \"uniform\", range = [\"40 kg\", \"150 kg\"] }\n[correlation]\nwt = { ht = 0.5 }\n",
         "c.toml:5:8: error: correlation with unknown covariate 'ht'"},
        {"", "error: no [covariates] and no [resample] in the cohort file"},
    };
    for (const auto& c : cases) {
        const std::string path = dir.write("c.toml", std::string("id = \"c\"\n") + c.body);
        INFO(c.body);
        CHECK_THAT(errors_of(path, true), Catch::Contains(c.expect));
    }
}
