// The report model's own rules: how a value is shown, how figures are found by key, and that the shared
// figures have one label and one unit.
#include <catch2/catch.hpp>

#include <stdexcept>

#include "report/figures.hpp"
#include "report/model.hpp"
#include "report/run_model.hpp"
#include "report_support.hpp"

using namespace plateau;
using namespace plateau::reporttest;
using report::Form;
using report::Node;
using report::Value;

TEST_CASE("report: a value is shown in its form, an absent one with its reason", "[report][model]") {
    // Formatting rules of report/format (common practice, no source): 4 significant digits, trailing zeros
    // dropped; a fraction as a percentage with one decimal.
    CHECK(report::shown(Value::of(12.3456), Form::Number, 4) == "12.35");
    CHECK(report::shown(Value::of(10.0), Form::Number, 6) == "10");
    CHECK(report::shown(Value::of(0.634), Form::Percent, 4) == "63.4 %");
    CHECK(report::shown(Value::absent(), Form::Number, 4) == "—");
    CHECK(report::shown(Value::absent("never"), Form::Number, 4) == "never");
    Value doses = Value::count(9);
    doses.tag = "(9000)";
    CHECK(report::shown(doses, Form::Integer, 4) == "9 (9000)");
    CHECK(report::shown(Value::yes_no(true), Form::Number, 4) == "yes");
    CHECK(report::label_with_unit("Steady-state peak", "mg/L") == "Steady-state peak (mg/L)");
    CHECK(report::label_with_unit("Doses", "") == "Doses");
}

TEST_CASE("report: figures are found by key path, a missing one is absent", "[report][model]") {
    Node d;
    d.shape = Node::Shape::Group;
    Node& ss = d.group("steady_state", "Steady state");
    ss.leaf("peak", Value::of(53.36), "Peak", "mg/L");
    Node& ts = ss.list("troughs");
    ts.item().leaf("value", Value::of(2.59));
    ts.item().leaf("value", Value::of(2.61));
    CHECK(d.at("steady_state/peak").value.number == 53.36);
    CHECK(d.at("steady_state/peak").label == "Peak");
    CHECK(d.at("steady_state/troughs/1/value").value.number == 2.61);
    CHECK(d.find("steady_state/troughs/2") == nullptr);
    CHECK(d.find("steady_state/window_hours") == nullptr);
    CHECK_THROWS_AS(d.at("above/hours"), std::logic_error);
}

TEST_CASE("report: a shared figure has one label and a unit that follows the output", "[report][model]") {
    model::Output o;
    o.unit_text = "ng/mL";
    // The AUC unit of a concentration in ng/mL is ng·h/mL (common practice, no source).
    CHECK(report::unit_text(report::figure_info("ss_auc24").measure, o) == "ng·h/mL");
    CHECK(report::unit_text(report::figure_info("ss_peak").measure, o) == "ng/mL");
    CHECK(report::figure_info("first_reached").label == "First reaches threshold");
    CHECK_THROWS_AS(report::figure_info("no_such_figure"), std::logic_error);
}

TEST_CASE("report: the run model holds the exposure figures in the output's unit", "[report][model]") {
    // 3 g per 24 h into CL = 8 L/h with fu = 0.8: free Css = fu·R/CL = 12.5 mg/L and AUC24 = 300 mg·h/L
    // (computed from the closed form).
    const auto cs = candidates({source_path("regimens/zelmarin-continuous.toml")});
    const Node doc = report::run_model(cs.front().regimen, cs.front().sim, cs.front().exposure, 1e-10);
    CHECK(doc.at("unit").value.text == "mg/L");
    CHECK(doc.at("steady_state/average").value.number == Approx(12.5).epsilon(1e-9));
    CHECK(doc.at("steady_state/auc24").value.number == Approx(300.0).epsilon(1e-9));
    CHECK(doc.at("steady_state/auc24").unit == "mg·h/L");
    CHECK(doc.at("steady_state/constant").value.flag);
    CHECK(doc.at("caution").value.text.find("not clinical advice") != std::string::npos);
}
