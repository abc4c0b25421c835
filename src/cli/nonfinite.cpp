#include "cli/nonfinite.hpp"

#include <cmath>
#include <optional>
#include <vector>

#include "cli/support.hpp"
#include "expr/expr.hpp"

namespace plateau::cli {

namespace {

constexpr const char* kRemedies =
    "usual remedies: keep the base of a fractional power above 0 (write (c/ec50 + 1e-9)^h, or use a whole-number "
    "exponent); the same for log() and sqrt() of a value that starts at 0 and for a division by a compartment "
    "that starts empty (divide by a parameter instead); check the parameter units and the signs of the rates "
    "when values grow without bound";

struct Culprit {
    const expr::Node* node = nullptr;
    std::string why;
};

// Evaluates `n`; records in `c` the innermost sub-expression whose value or Taylor series fails at this point.
double check(const expr::Node& n, const expr::ValueLookup& value, Culprit& c) {
    auto blame = [&](std::string why) {
        if (c.node == nullptr) c = Culprit{&n, std::move(why)};
    };
    double a = 0.0, b = 0.0, v = 0.0;
    if (n.a) a = check(*n.a, value, c);
    if (n.b) b = check(*n.b, value, c);
    switch (n.op) {
        case expr::Op::Num: v = n.num; break;
        case expr::Op::Var: v = value(n.name); break;
        case expr::Op::Add: v = a + b; break;
        case expr::Op::Sub: v = a - b; break;
        case expr::Op::Mul: v = a * b; break;
        case expr::Op::Div:
            if (b == 0.0) blame("divides by '" + expr::to_string(*n.b) + "', which is 0 there");
            v = a / b;
            break;
        case expr::Op::Pow:
            if (a <= 0.0 && std::isfinite(b) && std::floor(b) != b)
                blame("raises '" + expr::to_string(*n.a) + "', which is " + num(a) + " there, to the non-integer power " +
                      num(b) + (a == 0.0 ? ": its derivatives are infinite at 0" : ": not a real number"));
            else if (a == 0.0 && b < 0.0)
                blame("raises '" + expr::to_string(*n.a) + "', which is 0 there, to a negative power");
            v = std::pow(a, b);
            break;
        case expr::Op::Neg: v = -a; break;
        case expr::Op::Exp: v = std::exp(a); break;
        case expr::Op::Log:
            if (a <= 0.0) blame("takes the log of '" + expr::to_string(*n.a) + "', which is " + num(a) + " there");
            v = std::log(a);
            break;
        case expr::Op::Sqrt:
            if (a <= 0.0)
                blame("takes the square root of '" + expr::to_string(*n.a) + "', which is " + num(a) +
                      (a == 0.0 ? " there: its derivative is infinite at 0" : " there"));
            v = std::sqrt(a);
            break;
    }
    if (!std::isfinite(v)) blame("is not finite there");
    return v;
}

std::string where(const SourcePos& p) {
    if (p.file.empty() || p.line <= 0) return "";
    return " (" + p.file + ":" + std::to_string(p.line) + ":" + std::to_string(p.col) + ")";
}

}  // namespace

std::string explain_nonfinite(const regimen::Regimen& r, const sim::Simulation& s) {
    const model::Model& m = r.model;
    const std::vector<double> params = r.parameter_values();
    const std::size_t nc = m.compartments.size();
    const traj::Trajectory& tr = s.trajectory;

    // The state where the step failed: the amounts reached (just before that time) plus the doses given then.
    double t = s.failed_at;
    std::vector<double> x(nc, 0.0);
    double prev = -INFINITY;
    if (!tr.empty()) {
        for (std::size_t i = 0; i < nc; ++i) x[i] = tr.left_limit(static_cast<int>(i), t);
        prev = tr.step_start(tr.size() - 1);
        bool finite = true;
        for (double xi : x) finite = finite && std::isfinite(xi);
        if (!finite) {
            // The last step itself went non-finite: look where it started.
            t = prev;
            for (std::size_t i = 0; i < nc; ++i) x[i] = tr.value(static_cast<int>(i), t);
            prev = tr.size() > 1 ? tr.step_start(tr.size() - 2) : -INFINITY;
        }
    }
    for (const sim::Event& e : sim::build_events(m, params, s.doses))
        if (e.time > prev && e.time <= t)
            for (std::size_t i = 0; i < nc && i < e.bolus.size(); ++i) x[i] += e.bolus[i];

    const expr::ValueLookup value = [&](std::string_view name) -> double {
        if (name == "t") return t;
        if (const int i = m.compartment_index(name); i >= 0) return x[static_cast<std::size_t>(i)];
        if (const int i = m.parameter_index(name); i >= 0) return params[static_cast<std::size_t>(i)];
        return NAN;
    };
    auto report = [&](const expr::Node& e, const std::string& what, const SourcePos& pos) -> std::optional<std::string> {
        Culprit c;
        check(e, value, c);
        if (c.node == nullptr) return std::nullopt;
        return wrap_text(what + where(pos) + " at t = " + num(t) + " h: '" + expr::to_string(*c.node) + "' " + c.why,
                         2, 4, kWidth) +
               "\n  " + wrap_text(kRemedies, 2, 4, kWidth);
    };
    for (std::size_t i = 0; i < nc && i < m.rates.size(); ++i)
        if (m.rates[i].expr)
            if (auto msg = report(*m.rates[i].expr, "the rate of compartment '" + m.compartments[i].name + "'",
                                  m.rates[i].pos))
                return *msg;
    for (const auto& o : m.outputs)
        if (o.expr)
            if (auto msg = report(*o.expr, "output '" + o.name + "'", o.pos)) return *msg;
    return wrap_text("the model's expressions are not finite there: check the rates and parameter values (a "
                     "solution that grows without bound, a division by zero, log of zero, or x^a with a non-integer "
                     "a where x is 0, e.g. an empty compartment)",
                     2, 4, kWidth) +
           "\n  " + wrap_text(kRemedies, 2, 4, kWidth);
}

}  // namespace plateau::cli
