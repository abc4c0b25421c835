// `plateau population` as a user runs it: refusals before anything runs, and what the outputs hold.
#include <catch2/catch.hpp>

#include <fstream>
#include <functional>
#include <sstream>

#include "cli/commands.hpp"
#include "../support/temp_dir.hpp"

using namespace plateau;

namespace {

const std::string kSrc = PLATEAU_SOURCE_DIR;

cli::PopulationOptions demo(std::size_t size) {
    cli::PopulationOptions o;
    o.regimens = {kSrc + "/regimens/zelmarin-pop-q8h-30min.toml", kSrc + "/regimens/zelmarin-pop-q8h-4h.toml"};
    o.cohort = kSrc + "/cohorts/zelmarin-adults.toml";
    o.size = size;
    o.progress = false;
    o.date = "2026-12-02";
    return o;
}

}  // namespace

TEST_CASE("population command: bad requests are refused with a reason", "[population][cli]") {
    struct Case {
        std::function<void(cli::PopulationOptions&)> change;
        const char* expect;
    };
    const Case cases[] = {
        {[](auto& o) { o.size = 0; }, "error: --size: expected 1 to 1000000 patients, got 0"},
        {[](auto& o) { o.threads = 0; }, "error: --threads: expected 1 to 256, got 0"},
        {[](auto& o) { o.regimens.push_back(kSrc + "/regimens/zelmarin-q8h-30min.toml"); },
         "error: a population runs one model"},
        {[](auto& o) { o.pta_curve = "1mg/L..64mg/L"; o.targets.output = "conc"; },  // the file's threshold is for free
         "error: --pta-curve needs a threshold target"},
        {[](auto& o) { o.targets.above = "4mg/L"; o.pta_curve = "4mg/L..1mg/L"; },
         "error: --pta-curve: expected 0 < low <= high"},
        {[](auto& o) { o.cohort = kSrc + "/models/zelmarin-renal.toml"; }, "unknown key 'summary' in a cohort file"},
    };
    for (const auto& c : cases) {
        cli::PopulationOptions o = demo(10);
        o.regimens = {kSrc + "/regimens/zelmarin-pop-q8h-30min.toml"};
        c.change(o);
        std::ostringstream out, err;
        INFO(c.expect);
        CHECK(cli::population_command(o, out, err) == cli::kExitBadInput);
        CHECK_THAT(err.str(), Catch::Contains(c.expect));
        CHECK(out.str().empty());
    }
}

TEST_CASE("population command: a cohort covariate the model does not have is refused", "[population][cli]") {
    test::TempDir dir("pop-cohort");
    cli::PopulationOptions o = demo(10);
    o.cohort = dir.write("c.toml", "id = \"c\"\n[covariates]\nage = { dist = \"uniform\", range = [\"18\", \"90\"] }\n");
    std::ostringstream out, err;
    CHECK(cli::population_command(o, out, err) == cli::kExitBadInput);
    CHECK_THAT(err.str(), Catch::Contains("the cohort gives 'age', which is not a covariate of model 'zelmarin-renal'"));
}

TEST_CASE("population command: JSON and CSV hold every regimen, target and patient", "[population][cli]") {
    test::TempDir dir("pop-out");
    cli::PopulationOptions o = demo(25);
    o.targets.above = "4mg/L";
    o.pta_curve = "1mg/L..8mg/L";
    o.json = dir.file("p.json");
    o.csv = dir.file("p.csv");
    o.report = dir.file("p.html");
    std::ostringstream out, err;
    REQUIRE(cli::population_command(o, out, err) == 0);
    std::stringstream js, cs, hs;
    js << std::ifstream(o.json).rdbuf();
    cs << std::ifstream(o.csv).rdbuf();
    hs << std::ifstream(o.report).rdbuf();
    CHECK_THAT(js.str(), Catch::Contains("\"regimen\": \"zelmarin-pop-q8h-4h\""));
    CHECK_THAT(js.str(), Catch::Contains("\"kind\": \"above\""));
    CHECK_THAT(js.str(), Catch::Contains("\"ci95\": ["));
    CHECK_THAT(js.str(), Catch::Contains("\"pta_curve\": [{\"threshold\": 1,"));
    CHECK_THAT(js.str(), Catch::Contains("\"caution\""));
    // A header and one row per patient and regimen (common practice, no source).
    std::size_t lines = 0;
    for (char ch : cs.str()) lines += ch == '\n';
    CHECK(lines == 1 + 25 * 2);
    CHECK_THAT(cs.str(), Catch::StartsWith("subject,regimen,status,cohort_wt_kg,cohort_ht_cm,cohort_crcl_mL_per_min,eta_cl,"));
    CHECK_THAT(hs.str(), Catch::Contains("not clinical advice"));
    CHECK_THAT(hs.str(), Catch::Contains("Probability of target attainment"));
    CHECK_THAT(out.str(), Catch::Contains("Probability of target attainment (PTA), with the Wilson score 95 % interval"));
}
