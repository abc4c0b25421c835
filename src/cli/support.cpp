#include "cli/support.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <system_error>

#include "core/diagnostic.hpp"
#include "input/load.hpp"
#include "report/caution.hpp"
#include "report/csv.hpp"
#include "report/format.hpp"
#include "sim/events.hpp"
#include "taylor/stepper.hpp"
#include "units/units.hpp"

namespace plateau::cli {

// Helpers shared by the commands (declared in cli/support.hpp).


std::string num(double x, int digits) { return report::general(x, digits); }

std::string plural(std::size_t n, std::string_view word) {
    std::string s = std::to_string(n) + ' ' + std::string(word);
    if (n != 1) s += 's';
    return s;
}

std::string_view trim(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    return s;
}

std::string quoted(std::string_view s) {
    return "'" + std::string(s) + "'";
}

std::string join(const std::vector<std::string>& v, std::string_view sep) {
    std::string s;
    for (std::size_t i = 0; i < v.size(); ++i) {
        if (i > 0) s += sep;
        s += v[i];
    }
    return s;
}

std::string with_unit(double value, const std::string& unit_text, int digits) {
    return unit_text.empty() ? num(value, digits) : num(value, digits) + ' ' + unit_text;
}


std::string hours(double h) {
    std::string s = num(h) + " h";
    if (h >= 48.0) s += " (" + num(h / 24.0) + " d)";
    return s;
}

std::vector<std::string> model_dirs(const std::vector<std::string>& extra) {
    // Folders named on the command line first: their models win over the built-in ones of the same id.
    std::vector<std::string> dirs = extra;
    const std::vector<std::string> defaults = input::default_model_dirs();
    dirs.insert(dirs.end(), defaults.begin(), defaults.end());
    return dirs;
}

// Aligned columns; the last column is wrapped to the terminal width.
std::string format_table(const std::vector<std::vector<std::string>>& rows, std::size_t indent) {
    std::vector<std::size_t> w;
    for (const auto& r : rows)
        for (std::size_t i = 0; i + 1 < r.size(); ++i) {
            if (w.size() <= i) w.resize(i + 1, 0);
            w[i] = std::max(w[i], r[i].size());
        }
    std::string out;
    for (const auto& r : rows) {
        std::string line(indent, ' ');
        for (std::size_t i = 0; i + 1 < r.size(); ++i) {
            line += r[i];
            line.append(w[i] - r[i].size() + 2, ' ');
        }
        if (!r.empty()) line += wrap_text(r.back(), line.size(), line.size(), kWidth);
        while (!line.empty() && line.back() == ' ') line.pop_back();
        out += line + '\n';
    }
    return out;
}

void labelled(std::ostream& out, std::string_view label, std::string_view text) {
    std::string line(label);
    line.resize(kLabel, ' ');
    out << line << wrap_text(text, kLabel, kLabel, kWidth) << '\n';
}

// Formats an InputError; falls back to its message when it carries no diagnostics.
std::string format_error(const InputError& e) {
    if (e.diagnostics().empty()) return std::string("error: ") + e.what() + '\n';
    return format_diagnostics(e.diagnostics());
}


int output_of_target(const regimen::Regimen& r) {
    if (r.model.outputs.empty()) return -1;
    if (r.targets.output.empty()) return 0;
    const int i = r.model.output_index(r.targets.output);
    return i < 0 ? 0 : i;
}



// ---------------------------------------------------------------------------------------------- validators

std::string wrap_text(std::string_view text, std::size_t first_indent, std::size_t indent, std::size_t width) {
    std::string out;
    std::size_t col = first_indent;
    bool line_empty = true;
    std::size_t i = 0;
    while (i < text.size()) {
        while (i < text.size() && text[i] == ' ') ++i;
        std::size_t j = i;
        while (j < text.size() && text[j] != ' ') ++j;
        if (j == i) break;
        const std::string_view word = text.substr(i, j - i);
        if (!line_empty && col + 1 + word.size() > width) {
            out += '\n';
            out.append(indent, ' ');
            col = indent;
            line_empty = true;
        }
        if (!line_empty) {
            out += ' ';
            ++col;
        }
        out += word;
        col += word.size();
        line_empty = false;
        i = j;
    }
    return out;
}

namespace {

constexpr const char* kTimeHint = "a time such as 15min, 2h or 1d (plain numbers are hours)";

// The tolerance in `text`, or a problem message (without the option name).
std::string read_tolerance(std::string_view text, double& x) {
    const std::string_view t = trim(text);
    const std::string problem = "expected a number from 1e-15 to 1e-3, got " + quoted(t);
    const auto res = std::from_chars(t.data(), t.data() + t.size(), x);
    if (t.empty() || res.ec != std::errc() || res.ptr != t.data() + t.size() || !std::isfinite(x)) return problem;
    if (!(x >= kMinTol && x <= kMaxTol)) return problem;
    return {};
}

// A time in hours from `text` (plain number: hours), or a problem message (without the option name).
std::string read_duration(std::string_view text, double& hours_out) {
    const std::string_view t = trim(text);
    const std::string problem = std::string("expected ") + kTimeHint + ", got " + quoted(t);
    if (t.empty() || t.find('%') != std::string_view::npos) return problem;
    units::Quantity q;
    try {
        q = units::parse_quantity(t);
    } catch (const TextError&) {
        return problem;
    }
    if (!q.dim.dimensionless() && q.dim != units::kTime) return problem;
    hours_out = q.value;
    return {};
}

}  // namespace

double parse_tolerance(std::string_view text) {
    double x = 0.0;
    if (std::string p = read_tolerance(text, x); !p.empty()) throw UsageError("--tol: " + p);
    return x;
}

double parse_duration(std::string_view text, std::string_view what) {
    double h = 0.0;
    if (std::string p = read_duration(text, h); !p.empty()) throw UsageError(std::string(what) + ": " + p);
    return h;
}

std::string tolerance_problem(std::string_view text) {
    double x = 0.0;
    return read_tolerance(text, x);
}

std::string duration_problem(std::string_view text) {
    double h = 0.0;
    std::string p = read_duration(text, h);
    if (p.empty() && !(h > 0.0)) p = "expected a positive time, got " + quoted(trim(text));
    return p;
}

std::vector<double> parse_times(std::string_view text) {
    std::vector<double> out;
    std::size_t start = 0, item = 1;
    while (true) {
        const std::size_t comma = text.find(',', start);
        const std::string_view piece =
            trim(text.substr(start, comma == std::string_view::npos ? std::string_view::npos : comma - start));
        if (piece.empty())
            throw UsageError("--times: entry " + std::to_string(item) + " of " + quoted(text) +
                             " is empty; expected times separated by commas, e.g. 0.5,1,2h,30min");
        const double t = parse_duration(piece, "--times");
        if (t < 0.0)
            throw UsageError("--times: " + quoted(piece) +
                             " is before 0; expected times from 0 to the end of the horizon");
        out.push_back(t);
        if (out.size() > static_cast<std::size_t>(regimen::kMaxGridPoints))
            throw UsageError("--times: more than " + std::to_string(regimen::kMaxGridPoints) + " times");
        if (comma == std::string_view::npos) break;
        start = comma + 1;
        ++item;
    }
    return out;
}

}  // namespace plateau::cli
