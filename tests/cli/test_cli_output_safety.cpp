// Output files are written safely: never over an input (model or regimen) by any spelling or link, never into
// something that is not a regular file, through a fresh temporary name (a planted link at a predictable name is
// never followed), all of one command's files or none, no debris left on failure, and a plot is only said to
// be written once the file gnuplot left is a whole PNG. Messages are this project's own contract; "common
// practice, no source" for all of them.
#include <catch2/catch.hpp>

#include "cli_support.hpp"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include <sys/stat.h>

#include "../support/temp_dir.hpp"

using namespace plateau;
using namespace plateau::clitest;
namespace fs = std::filesystem;

namespace {

// A regimen and the model it names, both in `dir`: the model is a path beside the regimen.
std::string regimen_with_local_model(const test::TempDir& dir) {
    fs::copy_file(std::string(PLATEAU_SOURCE_DIR) + "/models/one-compartment-iv.toml", dir.file("model.toml"));
    return dir.write("regimen.toml", "id = \"r\"\nmodel = \"model.toml\"\n\n[[doses]]\nroute = \"iv\"\n"
                                     "amount = \"100 mg\"\n\n[horizon]\nuntil = \"24 h\"\n");
}

std::string read(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    return std::string((std::istreambuf_iterator<char>(f)), std::istreambuf_iterator<char>());
}

// Files in `dir` whose names start with ".plateau-": temporary files left behind.
int debris(const test::TempDir& dir) {
    int n = 0;
    for (const auto& e : fs::directory_iterator(dir.path))
        if (e.path().filename().string().rfind(".plateau-", 0) == 0) ++n;
    return n;
}

}  // namespace

TEST_CASE("cli: no output replaces the model file, by any spelling or link", "[cli][outputs]") {
    test::TempDir dir("safety");
    const std::string regimen = regimen_with_local_model(dir);
    const std::string model_text = read(dir.file("model.toml"));
    fs::create_symlink("model.toml", dir.path / "link.json");
    fs::create_hard_link(dir.file("model.toml"), dir.file("hard.csv"));
    const std::string spellings[] = {dir.file("model.toml"), (dir.path / "." / "model.toml").string(),
                                     dir.file("link.json"), dir.file("hard.csv")};
    for (const std::string& target : spellings) {
        INFO("target " << target);
        cli::RunOptions o;
        o.regimen = regimen;
        o.json = target;
        Result r = run(o);
        CHECK(r.code == cli::kExitBadInput);
        CHECK(contains(r.err, "is an input file; it would be overwritten"));
        o.json.clear();
        o.csv = target;
        r = run(o);
        CHECK(r.code == cli::kExitBadInput);
        CHECK(contains(r.err, "--csv: "));
        cli::CompareOptions c;
        c.regimens = {regimen};
        c.json = target;
        r = compare(c);
        CHECK(r.code == cli::kExitBadInput);
        CHECK(contains(r.err, "is an input file; it would be overwritten"));
    }
    CHECK(read(dir.file("model.toml")) == model_text);
    CHECK(debris(dir) == 0);
}

TEST_CASE("cli: outputs into a pipe, a device or a folder are refused; '-' is standard output", "[cli][outputs]") {
    test::TempDir dir("safety");
    const std::string regimen = regimen_with_local_model(dir);
    REQUIRE(::mkfifo(dir.file("pipe.json").c_str(), 0600) == 0);
    fs::create_directory(dir.path / "folder.json");
    fs::create_symlink("missing-target", dir.path / "dangling.json");
    const struct {
        std::string target;
        const char* kind;
    } cases[] = {{dir.file("pipe.json"), "it is a named pipe"},
                 {"/dev/null", "it is a device"},
                 {dir.file("folder.json"), "it is a folder"},
                 {dir.file("dangling.json"), "it is a link to a missing file"}};
    for (const auto& c : cases) {
        INFO("target " << c.target);
        cli::RunOptions o;
        o.regimen = regimen;
        o.json = c.target;
        const Result r = run(o);
        CHECK(r.code == cli::kExitBadInput);
        CHECK(contains(r.err, c.kind));
        CHECK(contains(r.err, "or '-' for standard output"));
    }
    struct stat st{};
    REQUIRE(::lstat(dir.file("pipe.json").c_str(), &st) == 0);
    CHECK(S_ISFIFO(st.st_mode));  // still a pipe, not replaced by a regular file
    CHECK(fs::is_symlink(dir.path / "dangling.json"));
}

TEST_CASE("cli: a planted link at a predictable temporary name is never followed", "[cli][outputs]") {
    test::TempDir dir("safety");
    const std::string regimen = regimen_with_local_model(dir);
    fs::create_symlink(dir.file("victim"), dir.path / "out.json.part");
    cli::RunOptions o;
    o.regimen = regimen;
    o.json = dir.file("out.json");
    o.csv = dir.file("a.json.part");  // once the temporary name of out.json
    const Result r = run(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK_FALSE(fs::exists(dir.file("victim")));
    CHECK(read(dir.file("out.json")).front() == '{');
    CHECK(read(dir.file("a.json.part")).rfind("time_h,", 0) == 0);
    CHECK(contains(r.out, "CSV "));
    CHECK(contains(r.out, "JSON      written to"));
    CHECK(debris(dir) == 0);
}

TEST_CASE("cli: --report takes only .html or .htm files", "[cli][outputs]") {
    test::TempDir dir("safety");
    cli::RunOptions o;
    o.regimen = regimen_with_local_model(dir);
    o.report = dir.file("report.pdf");
    const Result r = run(o);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(contains(r.err, "is not an .html file: use a file ending in .html or .htm"));
}

TEST_CASE("cli: a truncated plot fails the command and no file is written", "[cli][outputs]") {
    test::TempDir dir("safety");
    // A stand-in for gnuplot that writes only the first bytes of a PNG where it is told to, as on a full disk.
    const std::string fake = dir.write("fake-gnuplot", "#!/bin/sh\n[ \"$1\" = --version ] && exit 0\n"
                                                       "out=$(sed -n \"s/^set output '\\(.*\\)'$/\\1/p\")\n"
                                                       "printf '\\211PNG\\r\\n\\032\\nxx' > \"$out\"\n");
    fs::permissions(fake, fs::perms::owner_all);
    const char* old = std::getenv("PLATEAU_GNUPLOT_PATH");
    const std::string saved = old ? old : "";
    ::setenv("PLATEAU_GNUPLOT_PATH", fake.c_str(), 1);
    cli::RunOptions o;
    o.regimen = regimen_with_local_model(dir);
    o.json = dir.file("out.json");
    o.csv = dir.file("out.csv");
    o.plot = dir.file("out.png");
    const Result r = run(o);
    if (old) ::setenv("PLATEAU_GNUPLOT_PATH", saved.c_str(), 1);
    else ::unsetenv("PLATEAU_GNUPLOT_PATH");
    CHECK(r.code != cli::kExitOk);
    CHECK(contains(r.err, "gnuplot did not write a complete png file for"));
    CHECK_FALSE(contains(r.out, "written to"));
    CHECK_FALSE(fs::exists(o.json));  // all or nothing: the JSON and the CSV were ready but are not kept
    CHECK_FALSE(fs::exists(o.csv));
    CHECK_FALSE(fs::exists(o.plot));
    CHECK(debris(dir) == 0);
}

TEST_CASE("cli: no population output replaces the cohort's table of observed covariates", "[cli][outputs]") {
    test::TempDir dir("safety");
    const std::string regimen = regimen_with_local_model(dir);
    const std::string table = "wt\n60\n80\n";
    dir.write("patients.csv", table);
    const std::string cohort = dir.write("cohort.toml", "id = \"c\"\n[resample]\nfile = \"patients.csv\"\n"
                                                        "units = { wt = \"kg\" }\n");
    cli::PopulationOptions o;
    o.regimens = {regimen};
    o.cohort = cohort;
    o.size = 4;
    o.progress = false;
    o.csv = dir.file("patients.csv");
    std::ostringstream out, err;
    CHECK(cli::population_command(o, out, err) == cli::kExitBadInput);
    CHECK(contains(err.str(), "is an input file; it would be overwritten"));
    CHECK(read(dir.file("patients.csv")) == table);
    CHECK(debris(dir) == 0);
}
