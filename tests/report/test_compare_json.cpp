// The comparison's figures against `plateau run --json` for each regimen, and the comparison table's cells
// against the JSON values rounded the way the table shows them.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "json_mini.hpp"
#include "report/caution.hpp"
#include "report/compare_model.hpp"
#include "report/format.hpp"
#include "report_support.hpp"

using namespace plateau;
using namespace plateau::reporttest;
namespace json = plateau::jsonmini;

namespace {

json::Value run_json(const std::string& regimen, const TempDir& dir, const std::string& name) {
    cli::RunOptions o;
    o.regimen = regimen;
    o.json = dir.file(name);
    const Result r = run(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    return json::parse(slurp(o.json));
}

json::Value compare_json(const std::vector<std::string>& regimens, const TempDir& dir) {
    cli::CompareOptions o = compare_options(regimens);
    o.json = dir.file("compare.json");
    const Result r = compare(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    CHECK(r.out.find("JSON      written to " + o.json) != std::string::npos);
    return json::parse(slurp(o.json));
}

}  // namespace

TEST_CASE("report: the compare JSON holds, per regimen, exactly the figures of plateau run --json", "[report][json]") {
    TempDir dir("compare-vs-run");
    const auto regimens = demo_regimens();
    const json::Value all = compare_json(regimens, dir);
    REQUIRE(json::at(all, "regimens").items.size() == regimens.size());
    CHECK(json::at(all, "caution").s == report::kCaution);

    for (std::size_t i = 0; i < regimens.size(); ++i) {
        INFO("regimen " << regimens[i]);
        const json::Value one = run_json(regimens[i], dir, "run-" + std::to_string(i) + ".json");
        const json::Value& mine = json::at(all, "regimens/" + std::to_string(i));

        // The figures a reader compares, one by one, so that a failure names the figure (common practice, no
        // source: the same regimen through the same engine gives the same numbers, to the last printed digit).
        for (const char* path : {"intervals/0/peak", "intervals/0/peak_time", "steady_state/peak",
                                 "steady_state/trough", "steady_state/average", "steady_state/auc",
                                 "steady_state/auc24", "steady_state/above_fraction", "steady_state/above_hours",
                                 "steady_state/window_hours", "steady_state/above_high_hours",
                                 "steady_state/within_10pct", "steady_state/accumulation", "days/0/auc",
                                 "days/0/above_hours", "above/first_reached", "above/fraction", "window/fraction",
                                 "auc/value", "peak/value", "doses/count", "doses/total_mg"}) {
            INFO(path);
            CHECK(json::number(mine, path) == json::number(one, path));
        }
        // And everything else too: every key, every value, in the same order.
        std::map<std::string, std::string> a, b;
        json::leaves(mine, "", a);
        json::leaves(one, "", b);
        CHECK(a.size() == b.size());
        for (const auto& [path, value] : b) {
            INFO(path);
            REQUIRE(a.count(path) == 1);
            CHECK(a[path] == value);
        }
    }
}

TEST_CASE("report: comparison table cells are the JSON figures rounded as displayed", "[report][json]") {
    TempDir dir("rows-vs-json");
    const auto regimens = demo_regimens();
    const json::Value all = compare_json(regimens, dir);
    const auto cs = candidates(regimens);
    const auto rows = report::comparison_table(cs).rows;
    REQUIRE(rows.size() == 14);  // every row applies: all four repeat, have a threshold and a window (the worst
                                 // day is day 1 for each, so that row is left out)

    // What each row shows, taken from one regimen's JSON object, formatted as the table formats it.
    using Cell = std::string (*)(const json::Value&);
    const std::map<std::string, Cell> expected{
        {"Doses (total mg)",
         [](const json::Value& j) {
             return std::to_string(static_cast<long>(json::number(j, "doses/count"))) + " (" +
                    report::num(json::number(j, "doses/total_mg"), 4) + ")";
         }},
        {"First-dose peak", [](const json::Value& j) { return report::num(json::number(j, "intervals/0/peak")); }},
        {"Steady-state peak", [](const json::Value& j) { return report::num(json::number(j, "steady_state/peak")); }},
        {"Steady-state trough",
         [](const json::Value& j) { return report::num(json::number(j, "steady_state/trough")); }},
        {"Steady-state average",
         [](const json::Value& j) { return report::num(json::number(j, "steady_state/average")); }},
        {"AUC24, day 1", [](const json::Value& j) { return report::num(json::number(j, "days/0/auc")); }},
        {"AUC24, steady state",
         [](const json::Value& j) { return report::num(json::number(j, "steady_state/auc24")); }},
        {"Time above threshold, day 1",
         [](const json::Value& j) { return report::num(json::number(j, "days/0/above_hours"), 4); }},
        {"Time above threshold, worst day",
         [](const json::Value& j) {
             // The full day with the least time above (ties: the first).
             const auto& days = json::at(j, "days").items;
             std::size_t worst = 0;
             for (std::size_t d = 0; d < days.size(); ++d)
                 if (json::number(days[d], "above_hours") < json::number(days[worst], "above_hours")) worst = d;
             return report::num(json::number(days[worst], "above_hours"), 4) + " d" + std::to_string(worst + 1);
         }},
        {"Time above threshold, ss",
         [](const json::Value& j) { return report::percent(json::number(j, "steady_state/above_fraction")); }},
        {"First reaches threshold",
         [](const json::Value& j) { return report::num(json::number(j, "above/first_reached"), 4); }},
        {"Time in window, ss",
         [](const json::Value& j) {
             return report::percent(json::number(j, "steady_state/window_hours") /
                                    json::number(j, "steady_state/interval"));
         }},
        {"Time above window, ss",
         [](const json::Value& j) {
             return report::percent(json::number(j, "steady_state/above_high_hours") /
                                    json::number(j, "steady_state/interval"));
         }},
        {"Within 10 % of steady state",
         [](const json::Value& j) { return report::num(json::number(j, "steady_state/within_10pct"), 4); }},
    };

    for (const auto& row : rows) {
        INFO("row '" << row.label << "'");
        REQUIRE(row.cells.size() == regimens.size());
        if (row.label == "Dose per day") {
            // 1 g every 8 h and 3 g over each 24 h are both 3000 mg/day (computed from the regimen files); the
            // JSON has no such figure.
            CHECK(row.unit == "mg/day");
            for (std::size_t i = 0; i < row.cells.size(); ++i) CHECK(report::shown(row, i) == "3000");
            continue;
        }
        const auto it = expected.find(row.label);
        REQUIRE(it != expected.end());  // a new row needs its JSON counterpart here
        for (std::size_t i = 0; i < regimens.size(); ++i) {
            INFO("regimen " << cs[i].letter << " " << regimens[i]);
            CHECK(report::shown(row, i) == it->second(json::at(all, "regimens/" + std::to_string(i))));
        }
    }
}

TEST_CASE("report: continuous infusion figures in the table match the closed form", "[report][json]") {
    // 3 g per 24 h into CL = 8 L/h with fu = 0.8: free Css = fu·R/CL = 0.8 · 125 / 8 = 12.5 mg/L, peak = trough
    // = average, and AUC24 = 300 mg·h/L (computed from the closed form).
    const auto cs = candidates({source_path("regimens/zelmarin-continuous.toml")});
    const auto f = verdict::figures_of(cs.front());
    REQUIRE(f.ss_peak);
    CHECK(*f.ss_peak == Approx(12.5).epsilon(1e-9));
    CHECK(*f.ss_trough == Approx(12.5).epsilon(1e-9));
    CHECK(*f.ss_average == Approx(12.5).epsilon(1e-9));
    CHECK(*f.auc24_ss == Approx(300.0).epsilon(1e-9));
    CHECK(f.dose_per_day == Approx(3000.0).epsilon(1e-12));
    for (const auto& row : report::comparison_table(cs).rows) {
        if (row.key == "ss_peak" || row.key == "ss_trough") CHECK(report::shown(row, 0) == "12.5");
        if (row.key == "ss_auc24") CHECK(report::shown(row, 0) == "300");
    }
}

TEST_CASE("report: --auc windows appear in the comparison table with the JSON values", "[report][json]") {
    TempDir dir("auc-windows");
    cli::CompareOptions o = compare_options(demo_regimens());
    o.auc = {"0h..24h", "48..72"};
    o.json = dir.file("c.json");
    const Result r = compare(o);
    REQUIRE(r.code == cli::kExitOk);
    const json::Value all = json::parse(slurp(o.json));
    for (std::size_t w = 0; w < 2; ++w) {
        const std::string label = w == 0 ? "AUC 0–24 h (mg·h/L)" : "AUC 48–72 h (mg·h/L)";
        const auto line_at = r.out.find(label);
        REQUIRE(line_at != std::string::npos);
        const std::string line = r.out.substr(line_at, r.out.find('\n', line_at) - line_at);
        for (std::size_t i = 0; i < 4; ++i) {
            // The table shows the JSON value rounded as displayed.
            const double v = json::number(json::at(all, "regimens/" + std::to_string(i)),
                                          "auc_windows/" + std::to_string(w) + "/value");
            CHECK(line.find(report::num(v)) != std::string::npos);
        }
    }
    // The same-daily-dose regimens all reach AUC24 = 300 mg·h/L at steady state; day 3 (48–72 h) is close to it
    // for the regimens without a loading dose (computed from the closed form: fu·dose per day/CL = 300).
    const double a = json::number(json::at(all, "regimens/1"), "auc_windows/1/value");
    CHECK(a == Approx(300.0).epsilon(0.01));
}

TEST_CASE("report: a comparison judges every regimen against one set of targets", "[report]") {
    TempDir dir("one-target-set");
    const std::string body = "model = \"one-compartment-iv\"\n[[doses]]\nroute = \"iv\"\namount = \"100 mg\"\n"
                             "every = \"12 h\"\ncount = 10\n[targets]\n";
    const std::string a = dir.write("a.toml", "id = \"a\"\n" + body + "above = \"2 mg/L\"\n");
    const std::string b = dir.write("b.toml", "id = \"b\"\n" + body + "above = \"3 mg/L\"\n");
    cli::CompareOptions o = compare_options({a, b});
    o.json = dir.file("c.json");
    const Result r = compare(o);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.out.find("Targets: threshold 2 mg/L") != std::string::npos);
    CHECK(r.out.find("Note: B's file sets other targets than the ones compared here") != std::string::npos);
    // Both regimens are the same, so both get the same verdict and the same figures against 2 mg/L.
    const json::Value all = json::parse(slurp(o.json));
    CHECK(json::number(json::at(all, "regimens/0"), "above/threshold") == 2.0);
    CHECK(json::number(json::at(all, "regimens/1"), "above/threshold") == 2.0);
    CHECK(json::number(json::at(all, "regimens/1"), "steady_state/above_fraction") ==
          json::number(json::at(all, "regimens/0"), "steady_state/above_fraction"));
}

TEST_CASE("report: the JSON says which doses form the steady-state cycle and the trough before each", "[report][json]") {
    // Day 2's evening dose missed in a 06:00/14:00/22:00 schedule: the cycle is the prescribed pattern, one
    // 1 g 30-minute infusion every 8 h (the clock times are 8 h apart).
    TempDir dir("cycle-json");
    const json::Value j = run_json(source_path("examples/zelmarin-missed-dose/missed-evening.toml"), dir, "c.json");
    CHECK(json::number(j, "steady_state/cycle/period") == 8.0);
    CHECK(json::at(j, "steady_state/cycle/doses").items.size() == 1);
    CHECK(json::number(j, "steady_state/cycle/doses/0/offset") == 0.0);
    CHECK(json::number(j, "steady_state/cycle/doses/0/amount_mg") == 1000.0);
    CHECK(json::number(j, "steady_state/cycle/doses/0/over") == 0.5);
    CHECK(json::at(j, "steady_state/cycle/doses/0/route").s == "iv");
    CHECK(json::at(j, "steady_state/troughs").items.size() == 1);
    CHECK(json::number(j, "steady_state/troughs/0/value") == json::number(j, "steady_state/trough"));
    CHECK(json::number(j, "doses/count") == 11.0);  // 12 prescribed, one missed
}
