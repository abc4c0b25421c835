// The levels CSV reader: columns found by name, every cell checked, every problem located (line and byte
// column of the cell). Nothing is returned unless the whole file is good.
#include "input/load_levels.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "input/clock.hpp"
#include "input/load.hpp"
#include "regimen/regimen.hpp"
#include "regimen/time.hpp"
#include "units/units.hpp"

namespace plateau::input {

namespace {

struct Cell {
    std::string text;   // trimmed
    int col = 1;        // 1-based byte column of its first character (of the raw cell when empty)
};

std::vector<Cell> split(const std::string& line) {
    std::vector<Cell> cells;
    std::size_t start = 0;
    while (true) {
        const std::size_t comma = line.find(',', start);
        const std::size_t end = comma == std::string::npos ? line.size() : comma;
        std::size_t a = start, b = end;
        while (a < b && (line[a] == ' ' || line[a] == '\t')) ++a;
        while (b > a && (line[b - 1] == ' ' || line[b - 1] == '\t' || line[b - 1] == '\r')) --b;
        cells.push_back({line.substr(a, b - a), static_cast<int>(a + 1)});
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    return cells;
}

std::optional<double> number(const std::string& s) {
    if (s.empty()) return std::nullopt;
    const char* first = s.data();
    if (*first == '+') ++first;
    double x = 0.0;
    const auto [ptr, ec] = std::from_chars(first, s.data() + s.size(), x);
    if (ec != std::errc() || ptr != s.data() + s.size()) return std::nullopt;
    return x;
}

// The reverse of the CSV column naming (report/csv.hpp): "mg_per_L" -> "mg/L", "mg_h_per_L" -> "mg*h/L".
std::string unit_of_suffix(std::string s) {
    for (std::size_t p = s.find("_per_"); p != std::string::npos; p = s.find("_per_")) s.replace(p, 5, "/");
    std::replace(s.begin(), s.end(), '_', '*');
    return s;
}

// "14:05" as hours of the day; nullopt if malformed.
std::optional<double> hour_of_day(const std::string& s) {
    const std::size_t colon = s.find(':');
    if (colon == std::string::npos || colon == 0 || colon > 2 || s.size() - colon != 3) return std::nullopt;
    int h = 0, m = 0;
    for (std::size_t i = 0; i < s.size(); ++i) {
        if (i == colon) continue;
        if (s[i] < '0' || s[i] > '9') return std::nullopt;
        (i < colon ? h : m) = (i < colon ? h : m) * 10 + (s[i] - '0');
    }
    if (h > 23 || m > 59) return std::nullopt;
    return h + m / 60.0;
}

std::string g(double x) {
    std::ostringstream o;
    o << x;
    return o.str();
}

class Reader {
public:
    Reader(const std::string& path, const model::Model& m, int output, const LevelContext& ctx)
        : path_(path), m_(m), ctx_(ctx) {
        out_.path = path;
        out_.output = output;
    }

    Levels read(const std::string& text) {
        const model::Output& o = m_.outputs.at(static_cast<std::size_t>(out_.output));
        const std::string example_col = o.name + "_" + (o.unit_text.empty() ? "" : unit_suffix(o.unit_text));
        std::istringstream in(text);
        std::string line;
        int n = 0;
        bool header = false;
        std::map<double, int> seen;   // time -> line
        while (std::getline(in, line)) {
            ++n;
            if (n == 1 && line.rfind("\xEF\xBB\xBF", 0) == 0) line.replace(0, 3, "   ");  // a byte-order mark
            std::size_t first = line.find_first_not_of(" \t\r");
            if (first == std::string::npos || line[first] == '#') continue;
            std::vector<Cell> cells = split(line);
            if (!header) {
                header = true;
                header_line_ = n;
                read_header(cells, n, o, example_col);
                if (!sink_.empty()) break;
                continue;
            }
            read_row(cells, n, o, seen);
            if (sink_.size() > 50) break;
        }
        if (!header)
            error(1, 1, "empty file: no levels in it",
                  "a header line like time_h," + example_col + ", then one line per level");
        else if (sink_.empty() && out_.levels.empty())
            error(header_line_, 1, "no levels in the file, only its header",
                  "one line per level after the header, like 8," + std::string("12.5"));
        sink_.throw_if_any();
        std::sort(out_.levels.begin(), out_.levels.end(), [](const Level& a, const Level& b) { return a.t < b.t; });
        return std::move(out_);
    }

private:
    static std::string unit_suffix(const std::string& unit_text) {
        std::string s;
        for (char c : unit_text) {
            if (c == '/') s += "_per_";
            else if (c == '*') s += '_';
            else if (c != ' ' && c != '^') s += c;
        }
        return s;
    }

    void error(int line, int col, std::string message, std::string expected, int length = 1) {
        sink_.error(SourcePos{path_, line, col}, std::move(message), std::move(expected), length);
    }

    void read_header(const std::vector<Cell>& cells, int line, const model::Output& o, const std::string& example_col) {
        columns_ = cells.size();
        for (std::size_t i = 0; i < cells.size(); ++i) {
            const Cell& c = cells[i];
            if (c.text == "day") day_ = static_cast<int>(i);
            else if (c.text == "clock") clock_ = static_cast<int>(i);
            else if (c.text.rfind("time_", 0) == 0) {
                try {
                    const units::Unit u = units::parse_unit(unit_of_suffix(c.text.substr(5)));
                    if (u.dim == units::kTime) {
                        if (time_ >= 0)
                            error(line, c.col, "a second time column '" + c.text + "'", "one time column",
                                  static_cast<int>(c.text.size()));
                        time_ = static_cast<int>(i);
                        time_factor_ = u.factor;
                    }
                } catch (const TextError&) {
                }
            } else if (c.text.rfind(o.name + "_", 0) == 0) {
                const std::string suffix = unit_of_suffix(c.text.substr(o.name.size() + 1));
                units::Unit u;
                try {
                    u = units::parse_unit(suffix);
                } catch (const TextError&) {
                    continue;   // another column that starts like the output's name
                }
                if (u.dim != o.unit.dim) {
                    error(line, c.col,
                          "column '" + c.text + "' is " + units::dim_name(u.dim) + ", but output '" + o.name + "' is " +
                              units::dim_name(o.unit.dim),
                          "a column named " + o.name + "_<unit> with a unit of " + units::dim_name(o.unit.dim) +
                              ", like " + example_col,
                          static_cast<int>(c.text.size()));
                    continue;
                }
                if (level_ >= 0) {
                    error(line, c.col, "a second column for output '" + o.name + "': '" + c.text + "'",
                          "one column of levels", static_cast<int>(c.text.size()));
                    continue;
                }
                level_ = static_cast<int>(i);
                out_.column = c.text;
                out_.unit = u;
                out_.unit_text = suffix;
            }
        }
        if (time_ < 0 && (day_ < 0 || clock_ < 0))
            error(line, 1, "no time column in the header",
                  "a column time_h (hours since the start) or the two columns day and clock");
        else if (time_ < 0 && !ctx_.start_clock)
            error(line, cells[static_cast<std::size_t>(clock_)].col,
                  "the columns day and clock need the clock time at t = 0, but the regimen does not say it",
                  detail::start_clock_hint() + " in the regimen file, or a column time_h", 5);
        if (level_ < 0 && sink_.empty())
            error(line, 1, "no column for output '" + o.name + "' in the header",
                  "a column named " + o.name + "_<unit>, like " + example_col);
    }

    double cell_time(const std::vector<Cell>& cells, int line, bool& ok) {
        if (time_ >= 0) {
            const Cell& c = cells[static_cast<std::size_t>(time_)];
            const auto x = number(c.text);
            if (!x || !std::isfinite(*x)) {
                error(line, c.col, "'" + c.text + "' is not a time", "a number of hours since the start, like 8.5",
                      std::max<int>(1, static_cast<int>(c.text.size())));
                ok = false;
                return 0.0;
            }
            return *x * time_factor_;
        }
        const Cell& d = cells[static_cast<std::size_t>(day_)];
        const Cell& c = cells[static_cast<std::size_t>(clock_)];
        const auto day = number(d.text);
        if (!day || !(*day >= 1.0 && *day <= 10000.0) || *day != std::floor(*day)) {
            error(line, d.col, "'" + d.text + "' is not a day number", "a whole day number, 1 for the day of t = 0",
                  std::max<int>(1, static_cast<int>(d.text.size())));
            ok = false;
        }
        const auto hour = hour_of_day(c.text);
        if (!hour) {
            error(line, c.col, "'" + c.text + "' is not a time of day", "a clock time like 14:00 (24-hour, HH:MM)",
                  std::max<int>(1, static_cast<int>(c.text.size())));
            ok = false;
        }
        if (!ok) return 0.0;
        detail::ClockTime ct{static_cast<long>(*day), *hour};
        return detail::hours_from_start(ct, *ctx_.start_clock);
    }

    void read_row(const std::vector<Cell>& cells, int line, const model::Output& o, std::map<double, int>& seen) {
        if (cells.size() != columns_) {
            error(line, 1,
                  "this line has " + std::to_string(cells.size()) + (cells.size() == 1 ? " field" : " fields") +
                      ", the header has " + std::to_string(columns_),
                  "one value per column, separated by commas");
            return;
        }
        if (out_.levels.size() >= kMaxLevels) {
            if (out_.levels.size() == kMaxLevels)
                error(line, 1, "too many levels: more than " + std::to_string(kMaxLevels),
                      "at most " + std::to_string(kMaxLevels) + " levels in one file");
            out_.levels.push_back({});
            return;
        }
        bool ok = true;
        const double t = cell_time(cells, line, ok);
        const Cell& c = cells[static_cast<std::size_t>(level_)];
        const int len = std::max<int>(1, static_cast<int>(c.text.size()));
        Level lv;
        lv.text = c.text;
        lv.pos = SourcePos{path_, line, c.col};
        lv.below = !c.text.empty() && c.text[0] == '<';
        const std::string digits = lv.below ? std::string(detail_trim(c.text.substr(1))) : c.text;
        const auto x = number(digits);
        const std::string unit = out_.unit_text;
        if (!x || !std::isfinite(*x)) {
            error(line, c.col, c.text.empty() ? "no level in this line" : "'" + c.text + "' is not a level",
                  "a number in " + unit + ", like 12.5, or <0.5 for a level below the quantification limit 0.5", len);
            ok = false;
        } else if (lv.below && !(*x > 0.0)) {
            error(line, c.col, "the quantification limit must be above 0, got '" + c.text + "'",
                  "<limit with a limit above 0, like <0.5", len);
            ok = false;
        } else if (*x < 0.0) {
            error(line, c.col, "a level cannot be negative, got '" + c.text + "'",
                  "a level of 0 " + unit + " or more (<limit for one below the quantification limit)", len);
            ok = false;
        }
        if (!ok) return;
        lv.value = *x * out_.unit.factor;
        lv.t = t;
        const int tcol = time_ >= 0 ? cells[static_cast<std::size_t>(time_)].col : cells[static_cast<std::size_t>(day_)].col;
        if (regimen::before(t, ctx_.first_dose)) {
            error(line, tcol, "the level at " + g(t) + " h comes before the first dose (at " + g(ctx_.first_dose) + " h)",
                  "levels taken at or after the first dose of the regimen");
            return;
        }
        if (t > regimen::kMaxHorizonHours) {
            error(line, tcol, "the level at " + g(t) + " h is more than 10 years after the start",
                  "a time of at most 10 years (87660 h)");
            return;
        }
        for (const auto& [when, at_line] : seen)
            if (regimen::same_instant(when, t)) {
                error(line, tcol, "a second level at " + g(t) + " h (the first is on line " + std::to_string(at_line) + ")",
                      "one level per time");
                return;
            }
        seen.emplace(t, line);
        (void)o;
        out_.levels.push_back(std::move(lv));
    }

    static std::string_view detail_trim(std::string_view s) {
        while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
        return s;
    }

    std::string path_;
    const model::Model& m_;
    LevelContext ctx_;
    Levels out_;
    DiagnosticSink sink_;
    std::size_t columns_ = 0;
    int header_line_ = 1;
    int time_ = -1, day_ = -1, clock_ = -1, level_ = -1;
    double time_factor_ = 1.0;
};

}  // namespace

Levels parse_levels(const std::string& text, const std::string& path, const model::Model& m, int output,
                    const LevelContext& ctx) {
    if (text.find('\0') != std::string::npos)
        throw InputError({Diagnostic(SourcePos{path, 1, 1}, "not a text file (it has a NUL byte)",
                                     "a CSV text file of levels")});
    return Reader(path, m, output, ctx).read(text);
}

Levels load_levels(const std::string& path, const model::Model& m, int output, const LevelContext& ctx) {
    namespace fs = std::filesystem;
    const SourcePos file_pos{path, 0, 0};
    auto fail = [&](std::string what) { return InputError({Diagnostic(file_pos, std::move(what), "a CSV file of levels")}); };
    std::error_code ec;
    const auto status = fs::status(path, ec);
    if (ec || !fs::exists(status)) throw fail("cannot read file: it does not exist");
    if (fs::is_directory(status)) throw fail("cannot read file: it is a directory");
    std::ifstream f(path, std::ios::binary);
    if (!f) throw fail("cannot read file");
    std::string text;
    char buf[65536];
    while (f && static_cast<long long>(text.size()) <= kMaxFileBytes) {
        f.read(buf, sizeof buf);
        text.append(buf, static_cast<std::size_t>(f.gcount()));
    }
    if (f.bad()) throw fail("cannot read file: read error");
    if (static_cast<long long>(text.size()) > kMaxFileBytes) throw fail("file too large: more than 4 MiB");
    return parse_levels(text, path, m, output, ctx);
}

}  // namespace plateau::input
