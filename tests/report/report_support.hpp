// Helpers for the report, golden and example tests: the demo regimen paths, a fresh temporary directory, the
// compare command into strings, candidates built the way the commands build them, and file reading.
#pragma once

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <unistd.h>

#include "../cli/cli_support.hpp"
#include "../support/temp_dir.hpp"
#include "cli/commands.hpp"
#include "core/escape.hpp"
#include "cli/evaluate.hpp"
#include "report/compare.hpp"

namespace plateau::reporttest {

namespace fs = std::filesystem;

inline std::string source_path(const std::string& rel) { return std::string(PLATEAU_SOURCE_DIR) + "/" + rel; }

// The four demo regimens, in the order the demo compares them (the 30-minute infusions are the reference, A).
inline std::vector<std::string> demo_regimens() {
    return {source_path("regimens/zelmarin-q8h-30min.toml"), source_path("regimens/zelmarin-q8h-4h.toml"),
            source_path("regimens/zelmarin-load-q8h-4h.toml"), source_path("regimens/zelmarin-continuous.toml")};
}

using TempDir = plateau::test::TempDir;

// Sets (or, with nullptr, unsets) PLATEAU_GNUPLOT_PATH for a scope and restores what was there.
struct GnuplotOverride {
    bool had = false;
    std::string old;
    explicit GnuplotOverride(const char* program) {
        if (const char* v = std::getenv("PLATEAU_GNUPLOT_PATH")) {
            had = true;
            old = v;
        }
        if (program) ::setenv("PLATEAU_GNUPLOT_PATH", program, 1);
        else ::unsetenv("PLATEAU_GNUPLOT_PATH");
    }
    ~GnuplotOverride() {
        if (had) ::setenv("PLATEAU_GNUPLOT_PATH", old.c_str(), 1);
        else ::unsetenv("PLATEAU_GNUPLOT_PATH");
    }
    GnuplotOverride(const GnuplotOverride&) = delete;
    GnuplotOverride& operator=(const GnuplotOverride&) = delete;
};

// Whether the build found gnuplot (figures are then required to work).
inline bool gnuplot_configured() {
    const std::string configured = PLATEAU_GNUPLOT;
    return !configured.empty() && configured.find("NOTFOUND") == std::string::npos;
}

inline std::string slurp(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

inline void write_text(const std::string& path, const std::string& text) {
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out << text;
}

using clitest::Result;
using clitest::compare;
using clitest::run;

// Compare options with a fixed date, so that the output does not change from day to day.
inline cli::CompareOptions compare_options(const std::vector<std::string>& regimens) {
    cli::CompareOptions o;
    o.regimens = regimens;
    o.date = "2026-01-01";
    return o;
}

// The candidates exactly as `plateau compare` builds them (load, simulate, measure, letter).
inline std::vector<report::Candidate> candidates(const std::vector<std::string>& regimens) {
    sim::Options so;
    std::vector<report::Candidate> cs;
    for (std::size_t i = 0; i < regimens.size(); ++i) {
        cs.push_back(cli::evaluate(cli::load(regimens[i], {}, {}), so, {}));
        cs.back().letter = verdict::letter_for(i);
    }
    return cs;
}

inline std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) lines.push_back(l);
    return lines;
}

inline std::size_t count_of(const std::string& text, const std::string& part) {
    std::size_t n = 0;
    for (std::size_t at = text.find(part); at != std::string::npos; at = text.find(part, at + part.size())) ++n;
    return n;
}

inline std::string html_escape(const std::string& s) { return xml_escape(s); }

}  // namespace plateau::reporttest
