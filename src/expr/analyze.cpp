// Walks over parsed expressions: dimension inference, identifiers, printing, folding and evaluation.
// The parser bounds the nesting depth and the number of terms, so plain recursion here stays shallow.
#include <charconv>
#include <cmath>
#include <stdexcept>
#include <string>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"

namespace plateau::expr {

namespace {

constexpr std::size_t kSnippetMax = 80;
constexpr double kMaxIntExponent = 1000.0;

std::string format_number(double v) {
    char buf[64];
    const auto res = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, res.ptr);
}

// Binding strength when printing: sums < products < unary minus < powers < atoms.
int precedence(const Node& n) {
    switch (n.op) {
        case Op::Add:
        case Op::Sub: return 1;
        case Op::Mul:
        case Op::Div: return 2;
        case Op::Neg: return 3;
        case Op::Pow: return 4;
        case Op::Num: return std::signbit(n.num) ? 3 : 5;  // a negative literal prints like -x
        default: return 5;
    }
}

void print(const Node& n, std::string& out);

void print_operand(const Node& n, bool parens, std::string& out) {
    if (parens) out += '(';
    print(n, out);
    if (parens) out += ')';
}

void print(const Node& n, std::string& out) {
    switch (n.op) {
        case Op::Num:
            if (std::signbit(n.num)) {
                out += '-';
                out += format_number(-n.num);
            } else {
                out += format_number(n.num);
            }
            return;
        case Op::Var: out += n.name; return;
        case Op::Add:
        case Op::Sub:
            print_operand(*n.a, precedence(*n.a) < 1, out);
            out += n.op == Op::Add ? " + " : " - ";
            print_operand(*n.b, precedence(*n.b) <= 1, out);
            return;
        case Op::Mul:
        case Op::Div:
            print_operand(*n.a, precedence(*n.a) < 2, out);
            out += n.op == Op::Mul ? '*' : '/';
            print_operand(*n.b, precedence(*n.b) <= 2, out);
            return;
        case Op::Neg: {
            out += '-';
            std::string inner;
            print(*n.a, inner);
            // "-(-x)" rather than "--x".
            const bool parens = precedence(*n.a) < 3 || (!inner.empty() && inner.front() == '-');
            if (parens) out += '(';
            out += inner;
            if (parens) out += ')';
            return;
        }
        case Op::Pow:
            // Right-associative and tighter than unary minus: (-x)^2 and (a^b)^c need parentheses, a^-b does not.
            print_operand(*n.a, precedence(*n.a) <= 4, out);
            out += '^';
            print_operand(*n.b, precedence(*n.b) < 3, out);
            return;
        case Op::Exp:
        case Op::Log:
        case Op::Sqrt:
            out += n.op == Op::Exp ? "exp(" : n.op == Op::Log ? "log(" : "sqrt(";
            print(*n.a, out);
            out += ')';
            return;
    }
}

// The expression as quoted in a message, shortened if very long.
std::string snippet(const Node& n) {
    std::string s = to_string(n);
    if (s.size() > kSnippetMax) s = s.substr(0, kSnippetMax - 3) + "...";
    return s;
}

// A unit for a message; canonical_unit gives "" for pure numbers.
std::string unit_text(units::Dim d) {
    return d.dimensionless() ? "a dimensionless number" : units::canonical_unit(d);
}

// A literal 0 (or -0) may be added to a value of any dimension.
bool is_zero_literal(const Node& n) {
    if (n.op == Op::Num) return n.num == 0.0;
    if (n.op == Op::Neg) return is_zero_literal(*n.a);
    return false;
}

// The first identifier that is not constant over time, or nullptr.
const Node* first_varying(const Node& n, const std::function<bool(std::string_view)>& is_constant) {
    if (n.op == Op::Var) return is_constant(n.name) ? nullptr : &n;
    if (n.a)
        if (const Node* v = first_varying(*n.a, is_constant)) return v;
    if (n.b)
        if (const Node* v = first_varying(*n.b, is_constant)) return v;
    return nullptr;
}

[[noreturn]] void fail(const Node& at, std::string message, std::string expected = {}) {
    throw TextError(std::move(message), at.begin, at.end > at.begin ? at.end - at.begin : 1, std::move(expected));
}

units::Dim infer_pow(const Node& e, const DimLookup& lookup, const std::function<bool(std::string_view)>& is_constant);

units::Dim infer(const Node& e, const DimLookup& lookup, const std::function<bool(std::string_view)>& is_constant) {
    switch (e.op) {
        case Op::Num: return units::kNone;
        case Op::Var: {
            const auto d = lookup(e.name);
            if (!d) fail(e, "unknown identifier '" + e.name + "'");
            return *d;
        }
        case Op::Add:
        case Op::Sub: {
            const units::Dim da = infer(*e.a, lookup, is_constant);
            const units::Dim db = infer(*e.b, lookup, is_constant);
            if (is_zero_literal(*e.a)) return db;
            if (is_zero_literal(*e.b)) return da;
            if (!(da == db)) {
                const std::string what = e.op == Op::Add
                                             ? "cannot add " + unit_text(da) + " and " + unit_text(db)
                                             : "cannot subtract " + unit_text(db) + " from " + unit_text(da);
                fail(e, what + " in '" + snippet(e) + "'", "both sides in the same unit");
            }
            return da;
        }
        case Op::Mul: return infer(*e.a, lookup, is_constant) * infer(*e.b, lookup, is_constant);
        case Op::Div: return infer(*e.a, lookup, is_constant) / infer(*e.b, lookup, is_constant);
        case Op::Neg: return infer(*e.a, lookup, is_constant);
        case Op::Exp:
        case Op::Log: {
            const units::Dim d = infer(*e.a, lookup, is_constant);
            if (!d.dimensionless())
                fail(e, std::string(e.op == Op::Exp ? "exp" : "log") + " of a dimensioned value (" + unit_text(d) +
                            ") in '" + snippet(e) + "'; its argument must be dimensionless");
            return units::kNone;
        }
        case Op::Sqrt: {
            const units::Dim d = infer(*e.a, lookup, is_constant);
            if (d.mass % 2 != 0 || d.volume % 2 != 0 || d.time % 2 != 0)
                fail(e, "sqrt of a value in " + unit_text(d) + " in '" + snippet(e) +
                            "'; its argument must be dimensionless or a square such as L^2");
            return units::Dim{d.mass / 2, d.volume / 2, d.time / 2};
        }
        case Op::Pow: return infer_pow(e, lookup, is_constant);
    }
    return units::kNone;
}

units::Dim infer_pow(const Node& e, const DimLookup& lookup, const std::function<bool(std::string_view)>& is_constant) {
    const units::Dim base = infer(*e.a, lookup, is_constant);
    const units::Dim ex = infer(*e.b, lookup, is_constant);
    if (first_varying(*e.b, is_constant) != nullptr)
        fail(*e.b, "exponent must be a constant: '" + snippet(*e.b) + "' in '" + snippet(e) + "' varies over time",
             "numbers and parameters only");
    if (!ex.dimensionless())
        fail(*e.b, "exponent '" + snippet(*e.b) + "' has a dimension (" + unit_text(ex) + ") in '" + snippet(e) +
                       "'; it must be dimensionless");
    if (base.dimensionless()) return units::kNone;
    const std::optional<double> k = fold_number(*e.b);
    const char* const expected = "a whole-number exponent such as 2 or -1 (sqrt() gives a square root)";
    if (!k)
        fail(*e.b, "the exponent of a dimensioned value (" + unit_text(base) + ") must be a whole number, not '" +
                       snippet(*e.b) + "', in '" + snippet(e) + "'",
             expected);
    if (!std::isfinite(*k) || std::floor(*k) != *k || std::fabs(*k) > kMaxIntExponent)
        fail(*e.b, "the exponent of a dimensioned value (" + unit_text(base) + ") must be a whole number, not " +
                       format_number(*k) + ", in '" + snippet(e) + "'",
             expected);
    return base.pow(static_cast<int>(*k));
}

void collect(const Node& n, std::vector<std::string>& out) {
    if (n.op == Op::Var) {
        for (const auto& s : out)
            if (s == n.name) return;
        out.push_back(n.name);
        return;
    }
    if (n.a) collect(*n.a, out);
    if (n.b) collect(*n.b, out);
}

bool has_var(const Node& n) {
    if (n.op == Op::Var) return true;
    return (n.a && has_var(*n.a)) || (n.b && has_var(*n.b));
}

}  // namespace

units::Dim infer_dim(const Node& e, const DimLookup& lookup,
                     const std::function<bool(std::string_view)>& is_constant) {
    return infer(e, lookup, is_constant);
}

std::vector<std::string> identifiers(const Node& e) {
    std::vector<std::string> out;
    collect(e, out);
    return out;
}

std::string to_string(const Node& e) {
    std::string out;
    print(e, out);
    return out;
}

std::optional<double> fold_number(const Node& e) {
    if (has_var(e)) return std::nullopt;
    return evaluate(e, [](std::string_view) -> double { throw std::logic_error("fold_number: identifier"); });
}

double evaluate(const Node& e, const ValueLookup& value) {
    switch (e.op) {
        case Op::Num: return e.num;
        case Op::Var: return value(e.name);
        case Op::Add: return evaluate(*e.a, value) + evaluate(*e.b, value);
        case Op::Sub: return evaluate(*e.a, value) - evaluate(*e.b, value);
        case Op::Mul: return evaluate(*e.a, value) * evaluate(*e.b, value);
        case Op::Div: return evaluate(*e.a, value) / evaluate(*e.b, value);
        case Op::Pow: return std::pow(evaluate(*e.a, value), evaluate(*e.b, value));
        case Op::Neg: return -evaluate(*e.a, value);
        case Op::Exp: return std::exp(evaluate(*e.a, value));
        case Op::Log: return std::log(evaluate(*e.a, value));
        case Op::Sqrt: return std::sqrt(evaluate(*e.a, value));
    }
    return 0.0;
}

}  // namespace plateau::expr
