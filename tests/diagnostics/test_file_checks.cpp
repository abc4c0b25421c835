// Files that are not model or regimen files at all (missing, empty, binary, huge, not TOML), files with several
// problems, and positions of problems inside strings. Messages and positions are this project's own contract;
// "common practice, no source" for all of them.
#include <catch2/catch.hpp>

#include "../support/temp_dir.hpp"

#include <chrono>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "input/load.hpp"

namespace {

namespace fs = std::filesystem;
using plateau::Diagnostic;
using plateau::InputError;

const std::string kTests = PLATEAU_TEST_DIR;
const std::string kCases = kTests + "/diagnostics/cases/";
const std::vector<std::string> kModelDirs{kTests + "/data/models"};

using TempDir = plateau::test::TempDir;

std::vector<Diagnostic> model_errors(const std::string& path) {
    try {
        plateau::input::load_model(path);
    } catch (const InputError& e) {
        return e.diagnostics();
    }
    return {};
}

std::vector<Diagnostic> regimen_errors(const std::string& path) {
    try {
        plateau::input::load_regimen(path, kModelDirs);
    } catch (const InputError& e) {
        return e.diagnostics();
    }
    return {};
}

// "line:col: message" of each diagnostic.
std::vector<std::string> located(const std::vector<Diagnostic>& ds) {
    std::vector<std::string> out;
    for (const auto& d : ds) out.push_back(std::to_string(d.pos.line) + ":" + std::to_string(d.pos.col) + ": " + d.message);
    return out;
}

const char* kModelText = R"(id = "tmp"
[compartments]
c = "mg"
[rates]
c = "-c/t"
[outputs]
o = { expr = "c", unit = "mg" }
)";

}  // namespace

TEST_CASE("input: a complete diagnostic shows file, line, column, the line, a caret and what was expected",
          "[input][diagnostics]") {
    auto ds = regimen_errors(kCases + "regimen-unknown-key-doses.toml");
    REQUIRE(ds.size() == 1);
    CHECK(plateau::format_diagnostics(ds) ==
          kCases + "regimen-unknown-key-doses.toml:8:1: error: unknown key 'evry' in [[doses]]; did you mean 'every'?\n"
                   "  evry = \"8 h\"\n"
                   "  ^~~~\n"
                   "  expected: one of: route, amount, at, every, count, until, over, rate, times, days, missed, late, doubled\n");

    // Inside a string: the caret is under the offending unit, not under the quote.
    ds = regimen_errors(kCases + "regimen-amount-time.toml");
    REQUIRE(ds.size() == 1);
    CHECK(plateau::format_diagnostics(ds) ==
          kCases + "regimen-amount-time.toml:7:15: error: expected an amount (mass), got '500 h' (time)\n"
                   "  amount = \"500 h\"\n"
                   "                ^\n"
                   "  expected: an amount (mass)\n");
}

TEST_CASE("input: all the problems of a model file are reported at once, in file order", "[input][diagnostics]") {
    auto ds = model_errors(kCases + "model-several.toml");
    CHECK(located(ds) == std::vector<std::string>{
                             "6:20: unknown unit 'litres' in '40 litres'",
                             "10:1: no rate for compartment 'central'",
                             "14:1: rate for unknown compartment 'periph'",
                             "17:26: unknown identifier 'V'; did you mean 'v'?",
                         });
    // The unknown identifier lists every parameter, also the one whose value was wrong.
    REQUIRE(ds.size() == 4);
    CHECK(ds[3].expected == "one of: ka, v, gut, central, t");
}

TEST_CASE("input: all the problems of a regimen file are reported at once, in file order", "[input][diagnostics]") {
    auto ds = regimen_errors(kCases + "regimen-several.toml");
    CHECK(located(ds) == std::vector<std::string>{
                             "6:9: expected a clearance (volume/time), got '5 L' (volume)",
                             "9:10: unknown route 'orla'; did you mean 'oral'?",
                             "12:9: 'count' is 0, outside 1 to 100000",
                             "13:9: 'over' must be more than 0, got '-1 h'",
                             "16:11: unknown output 'cnc' in model 'simple-oral'; did you mean 'conc'?",
                             "19:12: unknown unit 'years' in '2 years'",
                         });
}

TEST_CASE("input: a missing file, a directory, an empty file", "[input][diagnostics]") {
    TempDir tmp;
    const std::string missing = (tmp.path / "nothing.toml").string();
    auto ds = model_errors(missing);
    REQUIRE(ds.size() == 1);
    CHECK(plateau::format_diagnostic(ds[0]) == missing + ": error: cannot read file: it does not exist\n");

    ds = regimen_errors(tmp.path.string());
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].message == "cannot read file: it is a directory");
    CHECK(ds[0].pos.file == tmp.path.string());

    const std::string empty = tmp.write("empty.toml", "");
    ds = regimen_errors(empty);
    REQUIRE(ds.size() == 1);
    CHECK(plateau::format_diagnostic(ds[0]) == empty + ":1:1: error: empty file: no regimen in it\n"
                                                       "  expected: a regimen file with id, model and [[doses]]\n");
    // Comments only: just as empty.
    ds = model_errors(tmp.write("comments.toml", "# nothing here\n\n"));
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].message == "empty file: no model in it");
}

TEST_CASE("input: a binary file and a file with invalid UTF-8 are not text files", "[input][diagnostics]") {
    TempDir tmp;
    std::string bytes = "id = \"x\"\n\x89PNG\x1a";
    bytes.push_back('\0');
    bytes += "\x01\x02\xff\xfe\n";
    const std::string bin = tmp.write("picture.toml", bytes);
    auto ds = model_errors(bin);
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].message == "not a text file: it contains a NUL byte");
    CHECK(ds[0].pos.line == 2);   // the NUL is the 6th byte of line 2
    CHECK(ds[0].pos.col == 6);

    const std::string latin1 = tmp.write("latin1.toml", "id = \"caf\xe9\"\n");
    ds = model_errors(latin1);
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].message == "not a text file: invalid UTF-8 byte sequence");
    CHECK(ds[0].pos.line == 1);
    CHECK(ds[0].pos.col == 10);
}

TEST_CASE("input: a 50 MB file is refused before it is read", "[input][diagnostics]") {
    TempDir tmp;
    const std::string big = (tmp.path / "big.toml").string();
    {
        std::ofstream out(big, std::ios::binary);
        const std::string line = "# " + std::string(1021, 'x') + "\n";   // 1 KiB lines
        for (int i = 0; i < 50 * 1024; ++i) out << line;
    }
    REQUIRE(fs::file_size(big) == 50ull * 1024 * 1024);
    const auto start = std::chrono::steady_clock::now();
    auto ds = model_errors(big);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].message == "file too large: 52428800 bytes (input files are at most 4 MiB)");
    CHECK(ds[0].expected == "a model or regimen file of at most 4194304 bytes");
    CHECK(seconds < 0.5);   // only the size is looked at (common practice, no source)
}

TEST_CASE("input: TOML syntax errors are reported where the parser stops", "[input][diagnostics]") {
    TempDir tmp;
    auto ds = regimen_errors(tmp.write("r.toml", "id = \"r\"\nmodel = \"simple-oral\"\n[[doses]\n"));
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].pos.line == 3);
    CHECK(ds[0].pos.col == 9);
    CHECK(ds[0].message.rfind("invalid TOML: ", 0) == 0);
}

TEST_CASE("input: positions inside strings follow escapes, multi-line strings and UTF-8", "[input][diagnostics]") {
    TempDir tmp;
    // Line 3 has three two-byte characters before the value: columns count bytes.
    const std::string path = tmp.write("u.toml",
                                       "id = \"u\"\n"
                                       "[parameters]\n"
                                       "ka = { about = \"\xC2\xB5\xC2\xB5\xC2\xB5\", value = \"1.2 1/x\" }\n"
                                       "[compartments]\n"
                                       "c = \"mg\"\n"
                                       "[rates]\n"
                                       "c = \"-c*t + \\u006Bel\"\n"
                                       "[outputs]\n"
                                       "o = { expr = \"\"\"\n"
                                       " c*zz\"\"\", unit = \"mg\" }\n");
    CHECK(located(model_errors(path)) == std::vector<std::string>{
                                              "3:41: unknown unit 'x' in '1.2 1/x'",
                                              "7:13: unknown identifier 'kel'",   // at the escape that spells 'k'
                                              "10:4: unknown identifier 'zz'",
                                          });
}

TEST_CASE("input: a regimen whose model has errors reports the model's problems first", "[input][diagnostics]") {
    TempDir tmp;
    const std::string model = tmp.write("bad-model.toml", std::string(kModelText) + "[routes]\niv = { into = \"c2\" }\n");
    const std::string reg = tmp.write("r.toml", "id = \"r\"\nmodel = \"bad-model.toml\"\n[[doses]]\nroute = \"iv\"\n"
                                                "amount = \"-1 mg\"\n");
    auto ds = regimen_errors(reg);
    REQUIRE(ds.size() == 3);
    CHECK(ds[0].pos.file == model);
    CHECK(ds[0].message == "route 'iv' goes into unknown compartment 'c2'; did you mean 'c'?");
    CHECK(ds[1].pos.file == reg);
    CHECK(ds[1].message == "the model 'bad-model.toml' (" + model + ") has errors");
    // The regimen's own problems that do not need the model are still found.
    CHECK(ds[2].message == "the amount must be more than 0, got '-1 mg'");
}

TEST_CASE("input: a billion doses are refused by counting, not by expanding", "[input][diagnostics]") {
    TempDir tmp;
    const std::string reg = tmp.write("r.toml", "id = \"r\"\nmodel = \"simple-oral\"\n[[doses]]\nroute = \"iv\"\n"
                                                "amount = \"1 mg\"\nevery = \"0.01 s\"\nuntil = \"100 d\"\n");
    const auto start = std::chrono::steady_clock::now();
    auto ds = regimen_errors(reg);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    REQUIRE(ds.size() == 1);
    // 100 d / 0.01 s = 8.64e8 doses (computed from the numbers above)
    CHECK(ds[0].message == "'until' gives 8.64e+08 doses in this [[doses]] entry");
    CHECK(seconds < 0.5);   // common practice, no source
}

TEST_CASE("input: a dose past the end of the horizon is named", "[input][diagnostics]") {
    TempDir tmp;
    const std::string reg = tmp.write("r.toml", "id = \"r\"\nmodel = \"simple-oral\"\n"
                                                "[[doses]]\nroute = \"iv\"\namount = \"1 mg\"\n"
                                                "[[doses]]\nroute = \"oral\"\namount = \"1 mg\"\nat = \"30 h\"\n"
                                                "[horizon]\nuntil = \"1 d\"\n");
    auto ds = regimen_errors(reg);
    CHECK(located(ds) == std::vector<std::string>{
                             "6:1: [[doses]] entry 2 (route 'oral'): the dose at 30 h is after the horizon ends at 24 h"});
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].expected == "a [horizon] until later than 30 h, or fewer doses");
}
