#include "report/csv.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "core/diagnostic.hpp"
#include "report/format.hpp"
#include "regimen/regimen.hpp"
#include "regimen/time.hpp"
#include "units/units.hpp"

namespace plateau::report {

namespace {

// Grid points closer than this to the end are the end.
double end_tolerance(double end) { return regimen::instant_tolerance(end); }

void append_number(std::string& line, double x) { line += general(x, kCsvDigits); }

std::string short_number(double x) { return general(x, 6); }

// A duration given in hours, in the unit that reads best: "0.01 s", "15 min", "24 h".
std::string readable_duration(double h) {
    if (h < 1.0 / 60.0) return short_number(h * 3600.0) + " s";
    if (h < 1.0) return short_number(h * 60.0) + " min";
    return short_number(h) + " h";
}

}  // namespace

std::string csv_column_name(std::string_view name, std::string_view unit_text) {
    std::string out(name);
    if (unit_text.empty()) return out;
    out += '_';
    for (char c : unit_text) {
        switch (c) {
            case '/': out += "_per_"; break;
            case '*': out += '_'; break;
            case '%': out += "pct"; break;
            case '^': case ' ': case '\t': case ',': case '"': break;
            default: out += c;
        }
    }
    return out;
}

long grid_point_count(double end, double step) {
    if (!(step > 0.0) || !(end > 0.0)) return 1;
    const double ratio = end / step;
    if (!(ratio < 1e15)) return std::numeric_limits<long>::max();
    const double tol = end_tolerance(end);
    // n: the last index with n*step strictly before the end (0 is always a point).
    long n = static_cast<long>(std::floor(ratio));
    while (n > 0 && static_cast<double>(n) * step >= end - tol) --n;
    while (static_cast<double>(n + 1) * step < end - tol) ++n;
    return n + 2;
}

std::vector<double> grid_times(double end, double step) {
    const long count = grid_point_count(end, step);
    if (count > regimen::kMaxGridPoints) {
        const std::string n = count == std::numeric_limits<long>::max() ? "more than 1e15" : std::to_string(count);
        Diagnostic d;
        d.message = "the sampling grid would have " + n + " points (horizon " + readable_duration(end) + ", step " +
                    readable_duration(step) + ")";
        d.expected =
            "at most " + std::to_string(regimen::kMaxGridPoints) + " points: a larger step or a shorter horizon";
        throw InputError({d});
    }
    std::vector<double> t;
    t.reserve(static_cast<std::size_t>(count));
    if (count == 1) {
        t.push_back(std::max(0.0, end));
        return t;
    }
    for (long i = 0; i + 1 < count; ++i) t.push_back(static_cast<double>(i) * step);
    t.push_back(end);
    return t;
}

void write_csv(std::ostream& out, const sim::Simulation& s, const model::Model& m, std::span<const double> times) {
    const traj::Trajectory& tr = s.trajectory;
    if (tr.empty() && !times.empty()) throw std::logic_error("write_csv: empty trajectory");

    std::string line = "time_h";
    for (const auto& o : m.outputs) line += ',' + csv_column_name(o.name, o.unit_text);
    for (const auto& c : m.compartments) line += ',' + csv_column_name(c.name, c.unit_text);
    line += '\n';
    out << line;

    const int n_out = static_cast<int>(m.outputs.size());
    const int n_compartments = static_cast<int>(m.compartments.size());
    std::string block;
    block.reserve(1 << 16);
    for (double t : times) {
        append_number(block, t);
        for (int i = 0; i < n_out; ++i) {
            block += ',';
            append_number(block, units::to_unit(tr.value(s.output_series(i), t),
                                                 m.outputs[static_cast<std::size_t>(i)].unit));
        }
        for (int i = 0; i < n_compartments; ++i) {
            block += ',';
            append_number(block, units::to_unit(tr.value(i, t), m.compartments[static_cast<std::size_t>(i)].unit));
        }
        block += '\n';
        if (block.size() > (1 << 16) - 512) {
            out << block;
            block.clear();
        }
    }
    out << block;
}

}  // namespace plateau::report
