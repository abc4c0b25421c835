// The README's JSON schema against the keys the report model writes, both ways: every documented key is
// produced (by a run with every target, a run without a steady state, a comparison and a population), and
// every produced key is documented. The README tables are read as they are: a row names its keys in the first
// cell and, in its second, their structure as `{a, b: {c}, d: [{e}]}`; `x\|y: {...}` gives x and y one
// structure; an all-capitals name (NAME) stands for any key.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cctype>
#include <set>
#include <stdexcept>
#include <string>
#include <vector>

#include "json_mini.hpp"
#include "report_support.hpp"

using namespace plateau;
using namespace plateau::reporttest;
namespace json = plateau::jsonmini;

namespace {

using Paths = std::set<std::string>;

// ---- the README

class Shape {
public:
    Shape(std::string_view text, std::string where) : t_(text), where_(std::move(where)) {}
    void expand(const std::string& prefix, Paths& out) {
        structure(prefix, out);
        skip();
        if (i_ != t_.size()) fail("text after the structure");
    }

private:
    [[noreturn]] void fail(const std::string& what) const {
        FAIL(where_ << ": " << what << " at " << i_ << " in `" << t_ << "`");
        throw std::logic_error("unreachable");
    }
    void skip() {
        while (i_ < t_.size() && t_[i_] == ' ') ++i_;
    }
    bool eat(char c) {
        skip();
        if (i_ < t_.size() && t_[i_] == c) {
            ++i_;
            return true;
        }
        return false;
    }
    std::string name() {
        skip();
        const std::size_t from = i_;
        while (i_ < t_.size() && (std::isalnum(static_cast<unsigned char>(t_[i_])) || t_[i_] == '_')) ++i_;
        if (i_ == from) fail("expected a key");
        std::string n(t_.substr(from, i_ - from));
        const bool capitals = std::none_of(n.begin(), n.end(), [](char c) { return std::islower(static_cast<unsigned char>(c)); });
        return capitals ? "*" : n;
    }
    void structure(const std::string& prefix, Paths& out) {
        if (eat('{')) {
            do {
                std::vector<std::string> names{name()};
                while (eat('|')) names.push_back(name());
                Paths inner;
                const bool nested = eat(':');
                if (nested) structure("", inner);
                for (const auto& n : names) {
                    out.insert(prefix + n);
                    for (const auto& p : inner) out.insert(prefix + n + "/" + p);
                }
            } while (eat(','));
            if (!eat('}')) fail("expected '}'");
        } else if (eat('[')) {
            skip();
            if (i_ < t_.size() && (t_[i_] == '{' || t_[i_] == '[')) {
                Paths inner;
                structure("", inner);
                for (const auto& p : inner) out.insert(prefix + "[]/" + p);
            } else {
                do name(); while (eat(','));   // an array of plain values: [low, high]
            }
            if (!eat(']')) fail("expected ']'");
        } else {
            fail("expected '{' or '['");
        }
    }
    std::string_view t_;
    std::string where_;
    std::size_t i_ = 0;
};

std::vector<std::string> cells_of(const std::string& line) {
    std::vector<std::string> cells;
    std::string cell;
    for (std::size_t i = 1; i < line.size(); ++i) {
        if (line[i] == '\\' && i + 1 < line.size() && line[i + 1] == '|') {
            cell += '|';
            ++i;
        } else if (line[i] == '|') {
            cells.push_back(cell);
            cell.clear();
        } else {
            cell += line[i];
        }
    }
    return cells;
}

std::vector<std::string> code_spans(const std::string& cell) {
    std::vector<std::string> spans;
    for (std::size_t a = cell.find('`'); a != std::string::npos;) {
        const std::size_t b = cell.find('`', a + 1);
        if (b == std::string::npos) break;
        spans.push_back(cell.substr(a + 1, b - a - 1));
        a = cell.find('`', b + 1);
    }
    return spans;
}

// The key paths of the README table whose header starts with `header`.
Paths documented(const std::string& header) {
    const auto lines = lines_of(slurp(source_path("README.md")));
    Paths out;
    std::size_t k = 0;
    while (k < lines.size() && lines[k].rfind(header, 0) != 0) ++k;
    REQUIRE(k < lines.size());   // the README has the table
    for (k += 2; k < lines.size() && !lines[k].empty() && lines[k][0] == '|'; ++k) {
        const auto cells = cells_of(lines[k]);
        REQUIRE(cells.size() >= 2);
        const auto keys = code_spans(cells[0]);
        std::string shape;
        for (const auto& s : code_spans(cells[1]))
            if (!s.empty() && (s[0] == '{' || s[0] == '[')) {
                shape = s;
                break;
            }
        for (const auto& key : keys) {
            out.insert(key);
            if (!shape.empty()) Shape(shape, "README line " + std::to_string(k + 1)).expand(key + "/", out);
        }
    }
    return out;
}

// ---- what is written

void collect(const json::Value& v, const std::string& prefix, Paths& out) {
    if (v.kind == json::Value::Kind::object) {
        for (const auto& m : v.keys) {
            out.insert(prefix + m.name);
            collect(m.value, prefix + m.name + "/", out);
        }
    } else if (v.kind == json::Value::Kind::array) {
        for (const auto& item : v.items)
            if (item.kind == json::Value::Kind::object || item.kind == json::Value::Kind::array)
                collect(item, prefix + "[]/", out);
    }
}

Paths produced(const json::Value& v) {
    Paths out;
    collect(v, "", out);
    return out;
}

std::vector<std::string> split(const std::string& path) {
    std::vector<std::string> parts;
    std::size_t from = 0;
    for (std::size_t slash; (slash = path.find('/', from)) != std::string::npos; from = slash + 1)
        parts.push_back(path.substr(from, slash - from));
    parts.push_back(path.substr(from));
    return parts;
}

bool matches(const std::string& pattern, const std::string& path) {
    const auto a = split(pattern), b = split(path);
    if (a.size() != b.size()) return false;
    for (std::size_t i = 0; i < a.size(); ++i)
        if (a[i] != "*" && a[i] != b[i]) return false;
    return true;
}

// Both ways: every documented pattern matches a written key, every written key matches a documented pattern.
void check_both_ways(const Paths& docs, const Paths& written) {
    for (const auto& d : docs) {
        INFO("documented in the README but never written: " << d);
        CHECK(std::any_of(written.begin(), written.end(), [&](const std::string& w) { return matches(d, w); }));
    }
    for (const auto& w : written) {
        INFO("written but not documented in the README: " << w);
        CHECK(std::any_of(docs.begin(), docs.end(), [&](const std::string& d) { return matches(d, w); }));
    }
}

json::Value run_json(const TempDir& dir, const std::string& regimen, const std::string& name, bool targets) {
    cli::RunOptions o;
    o.regimen = regimen;
    o.json = dir.file(name);
    if (targets) {
        o.targets.above = "4mg/L";
        o.targets.window = "4mg/L..40mg/L";
        o.targets.auc24 = "200..400";
        o.auc = {"0h..24h"};
    }
    const Result r = run(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    return json::parse(slurp(o.json));
}

const char* kRising = R"(id = "mm-over"
model = "one-compartment-mm-iv"
[parameters]
vmax = "490 mg/d"
[[doses]]
route = "iv"
amount = "300 mg"
every = "12 h"
count = 10
)";

}  // namespace

TEST_CASE("report: the README's matcher of documented keys", "[report][json]") {
    // The matcher itself (common practice, no source): a wildcard takes one key, never a whole path.
    CHECK(matches("parameters/*/value", "parameters/cl/value"));
    CHECK_FALSE(matches("parameters/*/value", "parameters/cl/unit"));
    CHECK_FALSE(matches("parameters/*", "parameters/cl/value"));
    CHECK(matches("intervals/[]/peak", "intervals/[]/peak"));
    Paths p;
    Shape("{a, b|c: {d}, e: [{f}], g: [low, high]}", "test").expand("x/", p);
    CHECK(p == Paths{"x/a", "x/b", "x/b/d", "x/c", "x/c/d", "x/e", "x/e/[]/f", "x/g"});
}

TEST_CASE("report: the README documents every key of run and compare JSON, and only those", "[report][json]") {
    TempDir dir("json-schema-run");
    // A run with every target and an --auc window, a run of a regimen without a steady state (its reason), and
    // the comparison of the demo regimens.
    Paths run_keys = produced(run_json(dir, demo_regimens()[0], "a.json", true));
    for (const auto& p : produced(run_json(dir, dir.write("rising.toml", kRising), "b.json", false))) run_keys.insert(p);
    check_both_ways(documented("| key (run)"), run_keys);

    cli::CompareOptions o = compare_options(demo_regimens());
    o.json = dir.file("c.json");
    const Result r = compare(o);
    REQUIRE(r.code == cli::kExitOk);
    Paths docs{"regimens", "caution"};
    for (const auto& d : documented("| key (run)")) docs.insert("regimens/[]/" + d);
    Paths written = produced(json::parse(slurp(o.json)));
    // The comparison's regimens have no --auc window and no AUC24 range: those keys come from the run above.
    for (const auto& p : run_keys) written.insert("regimens/[]/" + p);
    check_both_ways(docs, written);
}

TEST_CASE("report: the README documents every key of population JSON, and only those", "[report][json][population]") {
    TempDir dir("json-schema-population");
    cli::PopulationOptions o;
    o.regimens = {source_path("regimens/zelmarin-pop-q8h-30min.toml"), source_path("regimens/zelmarin-pop-q8h-4h.toml")};
    o.cohort = source_path("cohorts/zelmarin-adults.toml");
    o.size = 20;
    o.progress = false;
    o.date = "2026-12-02";
    o.targets.above = "4mg/L";
    o.targets.window = "4mg/L..40mg/L";
    o.targets.auc24 = "200..400";
    o.pta_curve = "1mg/L..8mg/L";
    o.thresholds = source_path("cohorts/zelmarin-thresholds.toml");
    o.json = dir.file("p.json");
    std::ostringstream out, err;
    REQUIRE(cli::population_command(o, out, err) == cli::kExitOk);
    check_both_ways(documented("| key (population)"), produced(json::parse(slurp(o.json))));
}
