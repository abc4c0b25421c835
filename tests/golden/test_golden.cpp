// Golden tests of the terminal comparison report: the whole text of `plateau compare` for the demo regimens,
// with the date fixed, must equal the stored file byte for byte.
//
// To regenerate the golden files after an intended change of the report, run
//     PLATEAU_UPDATE_GOLDEN=1 build-<dir>/plateau_tests "[golden]"
// then review `git diff tests/golden/` before committing: every changed line is a change users will see.
// On a mismatch the test writes the actual output to a temporary file and prints the diff command.
#include <catch2/catch.hpp>

#include <cstdlib>
#include <iostream>
#include <filesystem>
#include <string>
#include <vector>

#include "../report/report_support.hpp"
#include "report/caution.hpp"
#include "report/format.hpp"

using namespace plateau;
using namespace plateau::reporttest;

namespace {

bool update_golden() {
    const char* v = std::getenv("PLATEAU_UPDATE_GOLDEN");
    return v && std::string(v) == "1";
}

std::string golden_path(const std::string& name) { return std::string(PLATEAU_TEST_DIR) + "/golden/" + name; }

// The paragraph of lines from `from` up to the next empty line (or the end), joined with single spaces.
std::string paragraph(const std::vector<std::string>& lines, std::size_t from) {
    std::string p;
    for (std::size_t i = from; i < lines.size() && !lines[i].empty(); ++i) {
        std::string l = lines[i];
        l.erase(0, l.find_first_not_of(' '));
        p += (p.empty() ? "" : " ") + l;
    }
    return p;
}

// Layout rules every terminal report keeps.
void check_layout(const std::string& text) {
    const auto lines = lines_of(text);
    REQUIRE(lines.size() > 4);
    for (std::size_t i = 0; i < lines.size(); ++i) {
        INFO("line " << i + 1 << ": " << lines[i]);
        CHECK(report::display_width(lines[i]) <= 100);  // fits 100 columns (common practice, no source)
        CHECK(lines[i].find('\x1b') == std::string::npos);  // no terminal escapes: the text is piped and saved
        CHECK(lines[i].find('\t') == std::string::npos);
        CHECK((lines[i].empty() || lines[i].back() != ' '));  // no trailing blanks
    }
    const std::string caution = std::string("CAUTION: ") + report::kCaution;
    CHECK(paragraph(lines, 0) == caution);  // the caution opens the report ...
    std::size_t last = lines.size();
    while (last > 0 && !lines[last - 1].empty()) --last;
    CHECK(paragraph(lines, last) == caution);  // ... and closes it
    CHECK(text.back() == '\n');
}

void check_golden(const std::string& name, const std::vector<std::string>& regimens) {
    const Result r = compare(compare_options(regimens));
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    check_layout(r.out);

    const std::string path = golden_path(name);
    if (update_golden()) {
        write_text(path, r.out);
        WARN("rewrote " << path);
    }
    REQUIRE(std::filesystem::exists(path));
    const std::string want = slurp(path);
    if (r.out != want) {
        const std::string actual =
            (std::filesystem::temp_directory_path() / ("plateau-golden-" + name + ".actual")).string();
        write_text(actual, r.out);
        // Printed unwrapped on standard error too, so that the command can be copied as it is.
        std::cerr << "golden mismatch: diff -u " << path << " " << actual << "\n"
                  << "  if the change is intended: PLATEAU_UPDATE_GOLDEN=1 plateau_tests \"[golden]\"\n";
        FAIL_CHECK("terminal report differs from " << path << "; actual output in " << actual);
    }
}

}  // namespace

TEST_CASE("golden: comparison of the four demo regimens", "[golden][report]") {
    check_golden("compare-zelmarin-four.txt", demo_regimens());
}

TEST_CASE("golden: comparison of 30-minute and 4-hour infusions", "[golden][report]") {
    check_golden("compare-zelmarin-30min-vs-4h.txt",
                 {source_path("regimens/zelmarin-q8h-30min.toml"), source_path("regimens/zelmarin-q8h-4h.toml")});
}

TEST_CASE("golden: each demo regimen on its own", "[golden][report]") {
    for (const auto& r : demo_regimens()) {
        const std::string stem = std::filesystem::path(r).stem().string();
        SECTION(stem) { check_golden("compare-" + stem + ".txt", {r}); }
    }
}

TEST_CASE("golden: the date and tolerance appear in the header", "[golden][report]") {
    cli::CompareOptions o = compare_options({source_path("regimens/zelmarin-q8h-4h.toml")});
    o.date = "2031-07-15";
    o.tol = 1e-8;
    const Result r = compare(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.out.find("Tolerance 1e-08, 2031-07-15;") != std::string::npos);
    check_layout(r.out);
}
