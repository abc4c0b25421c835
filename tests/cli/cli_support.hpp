// Helpers for the command-line tests: fixture paths, running the command functions into strings, reading CSV.
#pragma once

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <sstream>
#include <string>
#include <vector>

#include <unistd.h>

#include "cli/commands.hpp"

namespace plateau::clitest {

// The per-process temporary folder (system temp directory, folder named after the process id).
inline std::filesystem::path temp_dir() {
    const auto dir = std::filesystem::temp_directory_path() / ("plateau-tests-" + std::to_string(::getpid()));
    std::filesystem::create_directories(dir);
    return dir;
}

inline std::string data_path(const std::string& name) {
    return std::string(PLATEAU_TEST_DIR) + "/cli/data/" + name;
}

struct Result {
    int code = -1;
    std::string out;
    std::string err;
};

inline Result run(const cli::RunOptions& o) {
    std::ostringstream out, err;
    Result r;
    r.code = cli::run_command(o, out, err);
    r.out = out.str();
    r.err = err.str();
    return r;
}

inline Result compare(const cli::CompareOptions& o) {
    std::ostringstream out, err;
    Result r;
    r.code = cli::compare_command(o, out, err);
    r.out = out.str();
    r.err = err.str();
    return r;
}

inline Result check(const cli::CheckOptions& o) {
    std::ostringstream out, err;
    Result r;
    r.code = cli::check_command(o, out, err);
    r.out = out.str();
    r.err = err.str();
    return r;
}

inline Result models(const cli::ModelsOptions& o) {
    std::ostringstream out, err;
    Result r;
    r.code = cli::models_command(o, out, err);
    r.out = out.str();
    r.err = err.str();
    return r;
}

inline std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) lines.push_back(l);
    return lines;
}

// Rows of comma-separated cells (no quoting: plateau never writes any).
inline std::vector<std::vector<std::string>> parse_csv(const std::string& text) {
    std::vector<std::vector<std::string>> rows;
    for (const auto& l : lines_of(text)) {
        std::vector<std::string> cells;
        std::size_t start = 0;
        while (true) {
            const std::size_t comma = l.find(',', start);
            cells.push_back(l.substr(start, comma == std::string::npos ? std::string::npos : comma - start));
            if (comma == std::string::npos) break;
            start = comma + 1;
        }
        rows.push_back(cells);
    }
    return rows;
}

inline double cell(const std::vector<std::vector<std::string>>& rows, std::size_t row, std::size_t col) {
    return std::strtod(rows.at(row).at(col).c_str(), nullptr);
}

// The first number on the line that starts with `label` (a run summary line such as "Maximum   7.43 mg/L").
inline double number_after(const std::string& text, const std::string& label) {
    for (auto l : lines_of(text)) {
        l.erase(0, l.find_first_not_of(' '));  // figure rows are indented
        if (l.rfind(label, 0) == 0) return std::strtod(l.c_str() + label.size(), nullptr);
    }
    return -1e300;
}

// The number that follows `word` on the line that starts with `label` ("Maximum ... at 1.98 h").
inline double number_after_word(const std::string& text, const std::string& label, const std::string& word) {
    for (auto l : lines_of(text))
        if (l.erase(0, l.find_first_not_of(' ')); l.rfind(label, 0) == 0) {
            const std::size_t p = l.find(word);
            if (p == std::string::npos) return -1e300;
            return std::strtod(l.c_str() + p + word.size(), nullptr);
        }
    return -1e300;
}

inline std::size_t longest_line(const std::string& text) {
    std::size_t n = 0;
    for (const auto& l : lines_of(text)) n = std::max(n, l.size());
    return n;
}

inline bool contains(const std::string& text, const std::string& part) {
    return text.find(part) != std::string::npos;
}

}  // namespace plateau::clitest
