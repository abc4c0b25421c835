// `plateau dose` end to end: rounding, infeasible windows, non-monotone user models, the written regimen, and
// the errors of a bad request.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "../cli/cli_support.hpp"
#include "../report/json_mini.hpp"
#include "dose_support.hpp"
#include "../support/temp_dir.hpp"

namespace {

using namespace plateau;

clitest::Result dose_cmd(const cli::DoseOptions& o) {
    std::ostringstream out, err;
    clitest::Result r;
    r.code = cli::dose_command(o, out, err);
    r.out = out.str();
    r.err = err.str();
    return r;
}

std::string slurp(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    return std::string(std::istreambuf_iterator<char>(f), {});
}

std::string demo(const std::string& name) {
    return std::string(PLATEAU_SOURCE_DIR) + "/regimens/" + name;
}

// A level that rises with the amount and then falls (a user model a dose search cannot trust).
const char* kHumpModel = R"toml(id = "hump"
summary = "Test model: the level turns down at large amounts"
[parameters]
k = { value = "0.2 1/h", about = "elimination rate constant" }
v = { value = "10 L", about = "volume" }
a = { value = "100 mg", about = "amount where the level turns down" }
[compartments]
central = "mg"
[rates]
central = "-k*central"
[outputs]
level = { expr = "central/v*exp(-central/a)", unit = "mg/L" }
[routes]
iv = { into = "central" }
)toml";

}  // namespace

TEST_CASE("dose: the rounded dose meets every target and the next step down does not", "[dose]") {
    cli::TargetOverrides t;
    const auto s = dosetest::search(demo("zelmarin-q8h-4h.toml"), t, {{8.0, 4.0}, {12.0, 0.5}, {6.0, 3.0}}, 250.0);
    for (const auto& f : s.found) {
        if (f.outcome != dose::Outcome::Meets) continue;
        // Rounded up to a multiple of 250 mg (common practice, no source).
        CHECK(std::fmod(f.dose, 250.0) == 0.0);
        CHECK(f.dose >= f.exact);
        CHECK(f.dose - f.exact < 250.0);
        CHECK(dosetest::all_met(*f.at));
        CHECK_FALSE(dosetest::all_met(dosetest::measure_at(s, f.shape, f.dose - 250.0)));
    }
    // The demo question: every 8 h as 4-hour infusions, free level above 4 mg/L inside 4 .. 40 mg/L. The
    // template's 1 g gives a steady trough of 4.345 mg/L (README demo table), so fewer than 1000 mg suffice but
    // 750 mg do not (linear model: trough proportional to the dose; computed from that figure).
    const auto& q8 = *std::find_if(s.found.begin(), s.found.end(), [](const auto& f) { return f.shape.tau == 8.0; });
    CHECK(q8.outcome == dose::Outcome::Meets);
    CHECK(q8.exact == Approx(4.0 / 4.345 * 1000.0).epsilon(2e-3));
    CHECK(q8.dose == 1000.0);
}

TEST_CASE("dose: an infeasible window says so with the figures at the best compromise, exit 0", "[dose]") {
    test::TempDir d("dose");
    // t½ = 4 h, a bolus every 24 h: the steady-state peak is 2^6 = 64 times the trough (computed from the closed
    // form), so no dose keeps the whole range inside 4 .. 8 mg/L.
    const std::string path = d.write(
        "wide.toml",
        "id = \"wide\"\nmodel = \"one-compartment-iv\"\n[parameters]\ncl = \"" +
            dosetest::g17(std::log(2.0) / 4.0 * 10.0) +
            " L/h\"\nv = \"10 L\"\n[[doses]]\nroute = \"iv\"\namount = \"100 mg\"\nevery = \"24 h\"\ncount = 5\n"
            "[targets]\noutput = \"conc\"\nwindow = [\"4 mg/L\", \"8 mg/L\"]\n");
    const auto s = dosetest::search(path, {}, {{24.0, 0.0}});
    const auto& f = s.found.at(0);
    CHECK(f.outcome == dose::Outcome::Infeasible);
    CHECK_THAT(f.message, Catch::Contains("the peak leaves the window before the lowest value enters it"));
    // The compromise: lowest/4 = 8/peak, so lowest = 4·8/64 ... = sqrt(4·8/64) (computed from the closed form).
    const auto& st = *f.at->exposure.steady;
    CHECK(st.minimum.value * st.peak.value == Approx(32.0).epsilon(1e-9));
    CHECK(st.peak.value / st.minimum.value == Approx(64.0).epsilon(1e-9));

    cli::DoseOptions o;
    o.regimen = path;
    o.write = d.file("none.toml");
    const auto r = dose_cmd(o);
    CHECK(r.code == 0);
    CHECK_THAT(r.out, Catch::Contains("no dose fits"));
    CHECK_THAT(r.out, Catch::Contains("not written to"));
    CHECK_FALSE(std::filesystem::exists(o.write));
    CHECK_THAT(r.out, Catch::Contains("No candidate meets every target"));
    CHECK_THAT(r.out, Catch::StartsWith("CAUTION: "));
}

TEST_CASE("dose: a user model whose level falls with the dose gives a plain message, exit 0", "[dose]") {
    test::TempDir d("dose");
    d.write("hump.toml", kHumpModel);
    const std::string path =
        d.write("t.toml",
                "id = \"t\"\nmodel = \"hump.toml\"\n[[doses]]\nroute = \"iv\"\namount = \"1000 mg\"\n"
                "every = \"12 h\"\ncount = 6\n[targets]\nabove = \"1 mg/L\"\n");
    const auto s = dosetest::search(path, {}, {{12.0, 0.0}});
    CHECK(s.found.at(0).outcome == dose::Outcome::NonMonotone);
    CHECK_THAT(s.found.at(0).message, Catch::Contains("the figure falls from"));
    cli::DoseOptions o;
    o.regimen = path;
    const auto r = dose_cmd(o);
    CHECK(r.code == 0);
    CHECK_THAT(r.out, Catch::Contains("not monotone"));
    CHECK_THAT(r.out, Catch::Contains("a dose search needs figures that rise with the dose"));
}

TEST_CASE("dose: the written regimen runs and compares unchanged and gives the reported figures", "[dose]") {
    test::TempDir d("dose");
    cli::DoseOptions o;
    o.regimen = demo("zelmarin-q8h-4h.toml");
    o.intervals = "6h,8h,12h";
    o.over = "0.5h,4h";
    o.round = "250mg";
    o.loading = true;
    o.write = d.file("found.toml");
    o.json = d.file("found.json");
    const auto r = dose_cmd(o);
    REQUIRE(r.code == 0);
    CHECK_THAT(r.out, Catch::Contains("smallest daily dose meeting every target"));
    CHECK_THAT(r.out, Catch::Contains("Regimen   written to"));

    const auto js = jsonmini::parse(slurp(o.json));
    const double best = jsonmini::number(js, "recommended");
    const std::string path = "candidates/" + std::to_string(static_cast<int>(best));
    const double trough = jsonmini::number(js, path + "/steady_state/trough");
    CHECK(jsonmini::at(js, "candidates").items.size() == 6);

    cli::RunOptions ro;
    ro.regimen = o.write;
    ro.json = d.file("run.json");
    const auto run = clitest::run(ro);
    CHECK(run.code == 0);
    const auto rj = jsonmini::parse(slurp(ro.json));
    // The same regimen measured by `run` gives the trough the search reported (same pipeline; common practice).
    CHECK(jsonmini::number(rj, "steady_state/trough") == Approx(trough).epsilon(1e-12));
    CHECK(jsonmini::at(rj, "targets/0/met").b);

    cli::CompareOptions co;
    co.regimens = {o.regimen, o.write};
    co.report = d.file("both.html");
    const auto cmp = clitest::compare(co);
    CHECK(cmp.code == 0);
    CHECK(cmp.err.empty());
    // The HTML report of the template against the found regimen names both.
    const std::string html = slurp(co.report);
    CHECK_THAT(html, Catch::Contains("zelmarin-q8h-4h-dose"));
    CHECK_THAT(html, Catch::Contains("smallest daily dose meeting every target"));

    // And `dose` reads it back as a template: the search finds the same maintenance dose again.
    cli::DoseOptions again;
    again.regimen = o.write;
    again.round = "250mg";
    again.json = d.file("again.json");
    REQUIRE(dose_cmd(again).code == 0);
    const auto aj = jsonmini::parse(slurp(again.json));
    CHECK(jsonmini::number(aj, "candidates/0/dose_mg") == jsonmini::number(js, path + "/dose_mg"));
}

TEST_CASE("dose: a bad request exits 1 with a clear message", "[dose]") {
    test::TempDir d("dose");
    cli::DoseOptions o;
    SECTION("two repeating series") {
        o.regimen =
            d.write("two.toml",
                    "id = \"two\"\nmodel = \"one-compartment-iv\"\n[[doses]]\nroute = \"iv\"\namount = \"1 g\"\n"
                    "every = \"8 h\"\ncount = 3\n[[doses]]\nroute = \"iv\"\namount = \"1 g\"\nat = \"24 h\"\n"
                    "every = \"12 h\"\ncount = 3\n[targets]\nabove = \"1 mg/L\"\n");
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("two.toml:3:1: error: one of 2 repeating dose series"));
    }
    SECTION("no repeating series") {
        o.regimen = d.write("single.toml",
                            "id = \"single\"\nmodel = \"one-compartment-iv\"\n[[doses]]\nroute = \"iv\"\n"
                            "amount = \"1 g\"\n[targets]\nabove = \"1 mg/L\"\n");
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("no repeating dose series to vary"));
    }
    SECTION("nothing to search for") {
        o.regimen = demo("zelmarin-q8h-4h.toml");
        o.targets.output = "conc";  // the file's thresholds belong to 'free'
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("nothing to search for"));
    }
    SECTION("a zero interval") {
        o.regimen = demo("zelmarin-q8h-4h.toml");
        o.intervals = "8h,0h";
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("--intervals: expected a positive time, got '0h'"));
    }
    SECTION("a rounding step that is not an amount") {
        o.regimen = demo("zelmarin-q8h-4h.toml");
        o.round = "250mL";
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("--round: expected a positive amount like 250mg"));
    }
    SECTION("writing over the template") {
        o.regimen = demo("zelmarin-q8h-4h.toml");
        o.write = o.regimen;
        const auto r = dose_cmd(o);
        CHECK(r.code == 1);
        CHECK_THAT(r.err, Catch::Contains("is an input file"));
    }
}

TEST_CASE("dose: an exact AUC24 is rounded to the nearest step and the closest candidate is recommended", "[dose]") {
    cli::DoseOptions o;
    o.regimen = demo("zelmarin-q8h-4h.toml");
    o.targets.auc24 = "400";  // one value: AUC24 = 400 exactly
    o.intervals = "8h,6h";
    o.round = "250mg";
    o.json = "-";
    const auto r = dose_cmd(o);
    REQUIRE(r.code == 0);
    const auto js = jsonmini::parse(r.out);  // JSON on standard output, the table on standard error
    CHECK_THAT(r.err, Catch::Contains("Dose search"));
    // CL = 8 L/h and fu = 0.8: AUC24 of the free level = 0.8 · daily dose / CL, so 4000 mg a day gives 400
    // mg·h/L (computed from the closed form AUC = F·D/CL, reference identity 11).
    const auto& c = jsonmini::at(js, "candidates");
    REQUIRE(c.items.size() == 2);
    CHECK(jsonmini::number(js, "recommended") == 0);
    CHECK(jsonmini::number(js, "candidates/0/interval") == 6.0);  // 1000 mg every 6 h hits 400 exactly
    CHECK(jsonmini::number(js, "candidates/0/dose_mg") == 1000.0);
    CHECK(jsonmini::number(js, "candidates/0/steady_state/auc24") == Approx(400.0).epsilon(1e-9));
    // Every 8 h: 1333.33 mg solved, 1250 mg the nearest 250-mg step (not 1500: nearest, not up).
    CHECK(jsonmini::number(js, "candidates/1/solved_mg") == Approx(4000.0 / 3.0).epsilon(1e-9));
    CHECK(jsonmini::number(js, "candidates/1/dose_mg") == 1250.0);
    CHECK(jsonmini::at(js, "rule").s == "closest to the exact target, then smallest daily dose, meeting every target");
}

TEST_CASE("dose: a maintenance series of several clock times a day is refused", "[dose]") {
    test::TempDir d("dose");
    cli::DoseOptions o;
    o.regimen = d.write("clock.toml",
                        "id = \"clock\"\nmodel = \"one-compartment-iv\"\nstart_clock = \"08:00\"\n"
                        "[[doses]]\nroute = \"iv\"\namount = \"1 g\"\n"
                        "times = [\"08:00\", \"20:00\"]\ndays = 3\n[targets]\nabove = \"1 mg/L\"\n");
    const auto r = dose_cmd(o);
    CHECK(r.code == 1);
    CHECK_THAT(r.err, Catch::Contains("clock.toml:4:1: error: the maintenance series gives several clock times"));
}

TEST_CASE("dose: the README excerpt is what the command prints", "[dose]") {
    test::TempDir d("dose");
    const std::string readme = slurp(std::string(PLATEAU_SOURCE_DIR) + "/README.md");
    const std::size_t at = readme.find("Dose search — template zelmarin-q8h-4h");
    REQUIRE(at != std::string::npos);
    const std::size_t from = readme.rfind("```text\n", at) + 8;
    const std::string excerpt = readme.substr(from, readme.find("```", from) - from);

    cli::DoseOptions o;
    o.regimen = demo("zelmarin-q8h-4h.toml");
    o.intervals = "8h";
    o.over = "4h";
    o.targets.above = "4mg/L";
    o.round = "250mg";
    o.loading = true;
    o.write = d.file("zelmarin-found.toml");
    const auto r = dose_cmd(o);
    REQUIRE(r.code == 0);
    // Paths differ (absolute here, relative in the README) and so may the wrapping: compare words.
    auto words = [](std::string s, const std::vector<std::string>& strip) {
        for (const auto& p : strip)
            for (std::size_t k; (k = s.find(p)) != std::string::npos;) s.erase(k, p.size());
        std::string w;
        std::istringstream in(s);
        for (std::string x; in >> x;) w += x + ' ';
        return w;
    };
    CHECK(words(r.out, {std::string(PLATEAU_SOURCE_DIR) + "/", d.path.string() + "/"}) == words(excerpt, {}));
}
