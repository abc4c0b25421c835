// Inputs at and beyond the documented limits: deep nesting in quantities and expressions, very long rates,
// dimension powers that would overflow, totals that are not finite numbers, model paths that are not model
// files, and inputs that once reached undefined behaviour in toml++. Each gives a located error (or works),
// never a crash. Messages and positions are this project's own contract; "common practice, no source" for all.
#include <catch2/catch.hpp>

#include "../support/temp_dir.hpp"

#include <filesystem>
#include <fstream>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "cli/commands.hpp"
#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "diagnose.hpp"
#include "input/load.hpp"
#include "units/units.hpp"

namespace {

namespace fs = std::filesystem;
using plateau::Diagnostic;
using plateau::InputError;
using TempDir = plateau::test::TempDir;

const std::string kTests = PLATEAU_TEST_DIR;
const std::string kLimits = kTests + "/diagnostics/limits/";
const std::vector<std::string> kModelDirs{kTests + "/data/models"};

std::vector<Diagnostic> diagnose(const std::string& path, bool regimen) {
    return plateau::test::diagnose(path, regimen, kModelDirs);
}

std::string first_line(const Diagnostic& d, const std::string& dir) {
    std::string s = plateau::format_diagnostic(d);
    s = s.substr(0, s.find('\n'));
    if (s.rfind(dir, 0) == 0) s = s.substr(dir.size());
    return s;
}

struct Case {
    const char* file;
    const char* first;     // first line of the first (only) diagnostic, path shortened to the file name
    const char* expected;  // its "expected" text
};

const Case kCases[] = {
    {"model-unit-power-overflow.toml",
     "model-unit-power-overflow.toml:7:22: error: the unit '(L^12)^12' has a power of mass, volume or time beyond 64",
     "powers of mg, L and h from -64 to 64"},
    {"model-unit-factor-overflow.toml",
     "model-unit-factor-overflow.toml:7:20: error: the unit '(kg^6)^9' is too large or too small to represent",
     "a unit whose size in mg, L and h is between 1e-308 and 1e308"},
    {"model-rate-power-overflow.toml",
     "model-rate-power-overflow.toml:12:33: error: the dimension of 'central^1000' has a power of mass, volume or "
     "time beyond 64",
     "powers of mg, L and h from -64 to 64"},
    {"model-rate-power-wraps.toml",
     "model-rate-power-wraps.toml:12:29: error: the dimension of 'one^256' has a power of mass, volume or time beyond 64",
     "powers of mg, L and h from -64 to 64"},
    {"model-toml-unicode-bare.toml",
     "model-toml-unicode-bare.toml:3:7: error: invalid TOML: error while parsing key-value pair: expected a comment or "
     "whitespace, saw '\xCE\xBC'",
     ""},
    {"model-toml-open-bracket.toml",
     "model-toml-open-bracket.toml:3:2: error: invalid TOML: error while parsing key: expected bare key starting "
     "character or string delimiter, saw '\\n'",
     ""},
    {"regimen-total-overflow.toml",
     "regimen-total-overflow.toml:5:1: error: the total amount of [[doses]] entries 1 to 1 is beyond what a double can "
     "hold",
     "amounts, rates and times whose totals stay below 1e308 (mg, h)"},
    {"regimen-rate-underflow.toml",
     "regimen-rate-underflow.toml:4:1: error: the infusion length (amount / rate) of [[doses]] entry 1 is beyond what "
     "a double can hold",
     "amounts, rates and times whose totals stay below 1e308 (mg, h)"},
};

// A one-compartment model whose rate and parameter w are given.
std::string model_text(const std::string& rate, const std::string& w = "1 L") {
    return "id = \"case-model\"\n\n[parameters]\ncl = { value = \"5 L/h\" }\nv = { value = \"40 L\" }\n"
           "r = { value = \"0 mg/h\" }\nw = { value = \"" + w + "\" }\n\n[compartments]\ncentral = \"mg\"\n\n"
           "[rates]\ncentral = \"" + rate + "\"\n\n[outputs]\nconc = { expr = \"central/v*w/w\", unit = \"mg/L\" }\n\n"
           "[routes]\niv = { into = \"central\" }\n";
}

std::string repeat(const std::string& s, int n) {
    std::string out;
    for (int i = 0; i < n; ++i) out += s;
    return out;
}

}  // namespace

TEST_CASE("input: limit cases give their exact located diagnostic", "[input][diagnostics][limits]") {
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(kLimits))
        if (e.path().extension() == ".toml") ++files;
    CHECK(files == std::size(kCases));
    for (const Case& c : kCases) {
        INFO("case " << c.file);
        const bool regimen = std::string(c.file).rfind("regimen-", 0) == 0;
        const std::vector<Diagnostic> ds = diagnose(kLimits + c.file, regimen);
        REQUIRE(ds.size() == 1);
        CHECK(first_line(ds.front(), kLimits) == c.first);
        CHECK(ds.front().expected == c.expected);
    }
}

TEST_CASE("input: 50 000 nested parentheses in a quantity are an error at the 201st", "[input][diagnostics][limits]") {
    TempDir dir("limits");
    const std::string w = "40 " + repeat("(", 50000) + "L" + repeat(")", 50000);
    const std::string path = dir.write("deep-unit.toml", model_text("-cl/v*central", w));
    const std::vector<Diagnostic> ds = diagnose(path, false);
    REQUIRE(ds.size() == 1);
    CHECK(ds.front().pos.line == 7);
    CHECK(ds.front().pos.col == 16 + 3 + 200);  // the text starts at column 16, "40 " and 200 '(' pass
    CHECK(ds.front().message.find("is nested more than 200 parentheses deep") != std::string::npos);
    CHECK(ds.front().message.size() < 120);  // the message quotes the start of the text, not all 100 KB
}

TEST_CASE("input: 50 000 nested parentheses in a rate are an error, not a stack overflow",
          "[input][diagnostics][limits]") {
    TempDir dir("limits");
    const std::string path = dir.write("deep-rate.toml", model_text(repeat("(", 50000) + "r" + repeat(")", 50000)));
    const std::vector<Diagnostic> ds = diagnose(path, false);
    REQUIRE(ds.size() == 1);
    CHECK(ds.front().message == "expression nested too deeply (more than 200 levels)");
    CHECK(ds.front().pos.col == 12 + 200);  // the text starts at column 12; the 201st '(' is refused
}

TEST_CASE("input: a rate of 9 999 terms loads and a rate of 10 001 is refused", "[input][diagnostics][limits]") {
    TempDir dir("limits");
    // -cl/v*central has 3 terms; the limit is 10 000 (expr/parse.cpp).
    const std::string ok = dir.write("long.toml", model_text("-cl/v*central" + repeat(" + r", 9996)));
    CHECK(diagnose(ok, false).empty());
    const std::string products = dir.write("long-product.toml", model_text("-cl/v*central" + repeat("*1", 9996)));
    CHECK(diagnose(products, false).empty());
    // ... and runs: the tape is built with a loop along the sum. 100 mg into 40 L peaks at 2.5 mg/L at t = 0
    // (computed from the closed form; r is 0 mg/h).
    dir.write("r.toml", "id = \"long\"\nmodel = \"long.toml\"\n\n[[doses]]\nroute = \"iv\"\namount = \"100 mg\"\n");
    plateau::cli::RunOptions o;
    o.regimen = dir.file("r.toml");
    std::ostringstream out, err;
    REQUIRE(plateau::cli::run_command(o, out, err) == plateau::cli::kExitOk);
    CHECK(out.str().find("2.5 mg/L at 0 h") != std::string::npos);
    const std::string bad = dir.write("too-long.toml", model_text("-cl/v*central" + repeat(" + r", 9998)));
    const std::vector<Diagnostic> ds = diagnose(bad, false);
    REQUIRE(ds.size() == 1);
    CHECK(ds.front().message == "expression too long (more than 10000 terms)");
}

TEST_CASE("expr: long sums print, evaluate and infer in a loop", "[expr][limits]") {
    const std::string text = "1" + repeat(" + 1", 9998);
    const plateau::expr::Ptr e = plateau::expr::parse(text);
    CHECK(plateau::expr::to_string(*e) == text);
    CHECK(plateau::expr::evaluate(*e, [](std::string_view) { return 0.0; }) == 9999.0);  // computed by hand
    CHECK(plateau::expr::infer_dim(*e, [](std::string_view) -> std::optional<plateau::units::Dim> { return std::nullopt; },
                                   [](std::string_view) { return true; }) == plateau::units::kNone);
    // The printer keeps a leading minus inside a negation: -(-x) and -(-1*x), not --x.
    CHECK(plateau::expr::to_string(*plateau::expr::parse("-(-x)")) == "-(-x)");
    CHECK(plateau::expr::to_string(*plateau::expr::parse("-(-x*y - z)")) == "-(-x*y - z)");
    CHECK(plateau::expr::to_string(*plateau::expr::parse("(a - b) - (c - d)*e^-f^2")) == "a - b - (c - d)*e^-f^2");
}

TEST_CASE("units: dimension powers saturate beyond 64 and never wrap around", "[units][limits]") {
    using plateau::units::Dim;
    const Dim l{0, 1, 0};
    CHECK(l.pow(64).in_range());
    CHECK_FALSE(l.pow(65).in_range());
    // 256^4 = 2^32 wraps a 32-bit int to 0: the saturated power stays out of range instead.
    CHECK_FALSE(l.pow(256).pow(256).pow(256).pow(256).in_range());
    CHECK_FALSE((l.pow(64) * l).in_range());
    CHECK_FALSE((l.pow(-64) / l).in_range());
    CHECK(l.pow(2147483647LL * 4).volume == 65);
}

TEST_CASE("input: a model path in a regimen reads only model files and never echoes another file",
          "[input][diagnostics][limits]") {
    TempDir dir("limits");
    auto regimen = [&](const std::string& name, const std::string& model) {
        return dir.write(name, "id = \"r\"\nmodel = \"" + model +
                                   "\"\n\n[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\n");
    };
    dir.write("secret.toml", "SECRET_TOKEN = \"do-not-print\"\nx = [\n");
    dir.write("notes.toml", "SECRET_TOKEN = \"do-not-print\"\n");
    fs::create_symlink("/proc/self/environ", dir.path / "environ.toml");
    const struct {
        const char* model;
        const char* message;
    } cases[] = {
        {"/proc/self/environ", "the model path '/proc/self/environ' does not name a .toml file"},
        {"../../../../../../proc/self/environ", "the model path '../../../../../../proc/self/environ' does not name a "
                                                ".toml file"},
        {"environ.toml", "links to a file that is not a .toml file"},
        {"secret.toml", "is not a model file: invalid TOML: error while parsing array: encountered end-of-file at "
                        "line 2, column 6"},
        {"notes.toml", "is not a model file: it has no [compartments]"},
    };
    for (const auto& c : cases) {
        INFO("model = " << c.model);
        const std::string path = regimen("r.toml", c.model);
        const std::vector<Diagnostic> ds = diagnose(path, true);
        REQUIRE(ds.size() == 1);
        CHECK(ds.front().pos.file == path);
        CHECK(ds.front().pos.line == 2);
        CHECK_THAT(ds.front().message, Catch::Matchers::Contains(c.message));
        const std::string shown = plateau::format_diagnostics(ds);
        CHECK(shown.find("do-not-print") == std::string::npos);
        CHECK(shown.find("PATH=") == std::string::npos);
    }
}

TEST_CASE("fuzz: every kept fuzz input runs cleanly through what its target checks", "[input][diagnostics][limits]") {
    // fuzz/regressions/<target>-*: inputs that once made a fuzz target fail. Each must now give its target's
    // clean answer: a located error or a result, never a crash or another exception.
    const fs::path dir = fs::path(PLATEAU_SOURCE_DIR) / "fuzz" / "regressions";
    std::size_t seen = 0;
    for (const auto& e : fs::directory_iterator(dir)) {
        const std::string name = e.path().filename().string();
        INFO("fuzz/regressions/" << name);
        std::ifstream in(e.path(), std::ios::binary);
        std::stringstream ss;
        ss << in.rdbuf();
        const std::string text = ss.str();
        ++seen;
        if (name.rfind("expr-", 0) == 0) {
            // Parses; its printed form parses back to the same text, or is refused at the nesting limit.
            plateau::expr::Ptr p;
            try {
                p = plateau::expr::parse(text);
            } catch (const plateau::TextError& err) {
                CHECK(err.offset() <= text.size());
                continue;
            }
            const std::string printed = plateau::expr::to_string(*p);
            std::string again, refused;
            try {
                again = plateau::expr::to_string(*plateau::expr::parse(printed));
            } catch (const plateau::TextError& err) {
                refused = err.what();
            }
            if (refused.empty()) CHECK(again == printed);
            else CHECK(refused == "expression nested too deeply (more than 200 levels)");
        } else if (name.rfind("unit-", 0) == 0) {
            try {
                (void)plateau::units::parse_quantity(text);
            } catch (const plateau::TextError& err) {
                CHECK(err.offset() <= text.size());
            }
        } else {
            const bool regimen = name.rfind("regimen-", 0) == 0;
            REQUIRE((regimen || name.rfind("model-", 0) == 0));
            TempDir tmp("regression");
            for (const Diagnostic& d : diagnose(tmp.write("input.toml", text), regimen)) CHECK(d.pos.line >= 1);
        }
    }
    CHECK(seen >= 1);
}

TEST_CASE("fuzz: the expression whose printed form nests past the limit parses, and its print is refused there",
          "[expr][limits]") {
    // fuzz/regressions/expr-deep-unary-prints-deeper: 127 signs in a row parse (under 200 levels); printed with
    // a parenthesis per sign, the text nests past 200 and is refused at the limit, not misread.
    std::ifstream in(fs::path(PLATEAU_SOURCE_DIR) / "fuzz" / "regressions" / "expr-deep-unary-prints-deeper");
    std::stringstream ss;
    ss << in.rdbuf();
    const plateau::expr::Ptr p = plateau::expr::parse(ss.str());
    REQUIRE(p);
    const std::string printed = plateau::expr::to_string(*p);
    CHECK(printed.size() > ss.str().size());
    CHECK_THROWS_WITH(plateau::expr::parse(printed), "expression nested too deeply (more than 200 levels)");
}
