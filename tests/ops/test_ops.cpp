// Every elementary operation of the table (src/ops/), checked from the table itself so that a new operation is
// checked as soon as it is listed: its derivative rule against central finite differences of its value, and its
// Taylor recurrence (through the tape and the executor, with varying and constant operands) against direct
// evaluation of the operation along the expanded curve. Then the symbolic derivative on model expressions.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "expr/build.hpp"
#include "expr/derivative.hpp"
#include "expr/expr.hpp"
#include "ops/table.hpp"
#include "taylor/series.hpp"
#include "taylor/tape.hpp"

using namespace plateau;

namespace {

expr::Ptr make(expr::Op op, expr::Ptr a, expr::Ptr b) {
    auto n = std::make_shared<expr::Node>();
    n->op = op;
    n->a = std::move(a);
    n->b = std::move(b);
    return n;
}

double eval(const expr::Node& e, const std::map<std::string, double>& vars) {
    return expr::evaluate(e, [&](std::string_view name) { return vars.at(std::string(name)); });
}

// Central difference of `e` in `name` (step h, error O(h²)).
double central(const expr::Node& e, std::map<std::string, double> vars, const std::string& name, double h) {
    const double x = vars.at(name);
    vars[name] = x + h;
    const double up = eval(e, vars);
    vars[name] = x - h;
    const double down = eval(e, vars);
    return (up - down) / (2.0 * h);
}

}  // namespace

TEST_CASE("ops: the table lists every operation once, with the names the parser accepts", "[ops]") {
    const auto all = ops::all();
    REQUIRE(all.size() >= 9);
    for (std::size_t i = 0; i < all.size(); ++i)
        for (std::size_t j = i + 1; j < all.size(); ++j) CHECK(all[i].op != all[j].op);
    for (const auto& e : all) {
        if (!e.function) continue;
        CHECK(ops::function_named(e.name) == e.op);
        // The parser reads each function's name as that operation.
        CHECK(expr::parse(std::string(e.name) + "(x)")->op == e.op);
    }
    CHECK(ops::function_phrase() == "exp, log or sqrt");  // common practice, no source: the message wording
    CHECK_FALSE(ops::function_named("abs").has_value());
}

TEST_CASE("ops: each derivative rule agrees with central differences of the operation's value", "[ops]") {
    // x = 1.3, y = 0.7: inside every operation's domain. Central differences with h = 1e-5 have error ~1e-10.
    const std::map<std::string, double> at{{"x", 1.3}, {"y", 0.7}};
    for (const auto& entry : ops::all()) {
        INFO("operation " << entry.name);
        const expr::Ptr e = make(entry.op, expr::var("x"), entry.arity == 2 ? expr::var("y") : nullptr);
        const double dx = eval(*expr::derivative(e, "x"), at);
        CHECK(dx == Approx(central(*e, at, "x", 1e-5)).epsilon(1e-8));  // computed by central differences
        const double dy = eval(*expr::derivative(e, "y"), at);
        if (entry.arity == 2) CHECK(dy == Approx(central(*e, at, "y", 1e-5)).epsilon(1e-8));  // same
        else CHECK(dy == 0.0);  // computed from the closed form: y does not appear
    }
}

TEST_CASE("ops: each Taylor recurrence reproduces the operation along a curve", "[ops]") {
    // g(t) = 1.3 + 0.5t + 0.2t², h(t) = 0.7 + 0.3t + 0.1t² (polynomials: their own series are exact), k = 0.7 a
    // parameter. The expansion of op(g, h), op(g, k) and op(k, g) around t0 = 0.4 to order 16, summed at τ ≤ 0.3,
    // must equal op evaluated at t0 + τ: the nearest singularity (a zero of g or h) is over 2 away, so the
    // truncation error is below (0.3/2)^17 ≈ 1e-14.
    const expr::Ptr g = expr::parse("1.3 + 0.5*t + 0.2*t*t");
    const expr::Ptr h = expr::parse("0.7 + 0.3*t + 0.1*t*t");
    const expr::Ptr k = expr::var("k");
    const int order = 16;
    const double t0 = 0.4;
    for (const auto& entry : ops::all()) {
        std::vector<std::pair<std::string, expr::Ptr>> cases;
        if (entry.arity == 1) cases.emplace_back("op(g)", make(entry.op, g, nullptr));
        else if (entry.constant_operand) cases.emplace_back("op(g, k)", make(entry.op, g, k));
        else {
            cases.emplace_back("op(g, h)", make(entry.op, g, h));
            cases.emplace_back("op(g, k)", make(entry.op, g, k));
            cases.emplace_back("op(k, g)", make(entry.op, k, g));
        }
        for (const auto& [label, e] : cases) {
            INFO("operation " << entry.name << ", " << label);
            taylor::SystemSpec spec;
            spec.params = {"k"};
            spec.outputs = {e};
            taylor::Expander ex(taylor::compile(spec), order);
            const std::vector<double> kv{0.7};
            ex.set_params(kv);
            std::vector<double> c(static_cast<std::size_t>(order) + 1);
            ex.expand(t0, {}, {}, c);
            for (double tau : {0.0, 0.05, 0.1, 0.2, 0.3}) {
                double sum = 0.0;
                for (std::size_t n = c.size(); n-- > 0;) sum = sum * tau + c[n];
                const double direct = eval(*e, {{"t", t0 + tau}, {"k", 0.7}});
                CHECK(sum == Approx(direct).epsilon(1e-13));  // computed by direct evaluation
            }
        }
    }
}

TEST_CASE("expr: derivative of model expressions, with light simplification", "[expr][ops]") {
    auto d = [](const std::string& text, const std::string& symbol) {
        return expr::to_string(*expr::derivative(expr::parse(text), symbol));
    };
    // Computed from the closed form (rules of differentiation), printed after simplification.
    CHECK(d("ka*gut - cl/v*central", "central") == "-(cl/v)");
    CHECK(d("ka*gut - cl/v*central", "gut") == "ka");
    CHECK(d("ka*gut - cl/v*central", "t") == "0");
    CHECK(d("central/v", "central") == "1/v");
    CHECK(d("x^2", "x") == "2*x");
    CHECK(d("exp(-k*t)", "k") == "exp(-k*t)*-t");
    CHECK(d("3 + x", "x") == "1");

    // Michaelis–Menten elimination: ∂/∂c (vmax·c/(km + c)) = vmax·km/(km + c)², ∂/∂km = −vmax·c/(km + c)².
    const expr::Ptr mm = expr::parse("vmax*c/(km + c)");
    const std::map<std::string, double> at{{"vmax", 50.0}, {"c", 3.0}, {"km", 2.0}};
    CHECK(eval(*expr::derivative(mm, "c"), at) == Approx(50.0 * 2.0 / 25.0).epsilon(1e-15));   // closed form
    CHECK(eval(*expr::derivative(mm, "km"), at) == Approx(-50.0 * 3.0 / 25.0).epsilon(1e-15)); // closed form

    // A parameter exponent: ∂(c^h)/∂h = c^h·ln c (computed from the closed form).
    const expr::Ptr hill = expr::parse("c^h");
    CHECK(eval(*expr::derivative(hill, "h"), {{"c", 3.0}, {"h", 1.5}}) ==
          Approx(std::pow(3.0, 1.5) * std::log(3.0)).epsilon(1e-15));
}

TEST_CASE("expr: derivative of a 5 000-term sum walks the chain without deep recursion", "[expr][ops]") {
    std::string text = "x";
    for (int i = 1; i < 5000; ++i) text += " + " + std::to_string(i % 7) + "*x";
    const expr::Ptr e = expr::parse(text);
    // Σ (i mod 7) for i = 1..4999, plus 1: computed from the closed form (714 full cycles of 21, then 1).
    CHECK(eval(*expr::derivative(e, "x"), {{"x", 2.0}}) == 714.0 * 21.0 + 1.0 + 1.0);
}
