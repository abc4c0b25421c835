// Walks over parsed expressions: dimension inference, identifiers, printing, folding and evaluation.
// The parser bounds the nesting depth; the walks below recurse only where nesting grows and loop along chains of
// sums and products (left-deep: a 10 000-term rate is a chain 10 000 long), so their depth follows the nesting.
#include <algorithm>
#include <charconv>
#include <cmath>
#include <stdexcept>
#include <string>
#include <vector>

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

// True if `n` prints with a leading '-' (decides "-(-x)" over "--x"); follows the left operands in a loop.
bool prints_minus_first(const Node* n) {
    for (;;) {
        switch (n->op) {
            case Op::Num: return std::signbit(n->num);
            case Op::Neg: return true;
            case Op::Add:
            case Op::Sub: n = n->a.get(); break;
            case Op::Mul:
            case Op::Div:
                if (precedence(*n->a) < 2) return false;
                n = n->a.get();
                break;
            default: return false;
        }
    }
}

// Prints with an explicit stack of pieces (a node still to print, or fixed text), not one call per node: a
// sum of thousands of terms is a chain thousands deep.
void print(const Node& root, std::string& out) {
    struct Piece {
        const Node* node;
        const char* text;
    };
    std::vector<Piece> todo{{&root, nullptr}};
    auto text = [&](const char* t) { todo.push_back({nullptr, t}); };
    // Pushed in reverse: the stack pops the last piece first.
    auto operand = [&](const Node& n, bool parens) {
        if (parens) text(")");
        todo.push_back({&n, nullptr});
        if (parens) text("(");
    };
    while (!todo.empty()) {
        const Piece piece = todo.back();
        todo.pop_back();
        if (piece.node == nullptr) {
            out += piece.text;
            continue;
        }
        const Node& n = *piece.node;
        switch (n.op) {
            case Op::Num:
                if (std::signbit(n.num)) {
                    out += '-';
                    out += format_number(-n.num);
                } else {
                    out += format_number(n.num);
                }
                break;
            case Op::Var: out += n.name; break;
            case Op::Add:
            case Op::Sub:
                operand(*n.b, precedence(*n.b) <= 1);
                text(n.op == Op::Add ? " + " : " - ");
                operand(*n.a, precedence(*n.a) < 1);
                break;
            case Op::Mul:
            case Op::Div:
                operand(*n.b, precedence(*n.b) <= 2);
                text(n.op == Op::Mul ? "*" : "/");
                operand(*n.a, precedence(*n.a) < 2);
                break;
            case Op::Neg:
                operand(*n.a, precedence(*n.a) < 3 || prints_minus_first(n.a.get()));
                text("-");
                break;
            case Op::Pow:
                // Right-associative and tighter than unary minus: (-x)^2 and (a^b)^c need parentheses, a^-b does not.
                operand(*n.b, precedence(*n.b) < 3);
                text("^");
                operand(*n.a, precedence(*n.a) <= 4);
                break;
            case Op::Exp:
            case Op::Log:
            case Op::Sqrt:
                text(")");
                todo.push_back({n.a.get(), nullptr});
                text(n.op == Op::Exp ? "exp(" : n.op == Op::Log ? "log(" : "sqrt(");
                break;
        }
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

// Every node of `root` in source order (left operand before right), with an explicit stack.
template <class Visit>
void walk(const Node& root, Visit&& visit) {
    std::vector<const Node*> todo{&root};
    while (!todo.empty()) {
        const Node* n = todo.back();
        todo.pop_back();
        if (!visit(*n)) return;
        if (n->b) todo.push_back(n->b.get());
        if (n->a) todo.push_back(n->a.get());
    }
}

// The first identifier that is not constant over time, or nullptr.
const Node* first_varying(const Node& root, const std::function<bool(std::string_view)>& is_constant) {
    const Node* found = nullptr;
    walk(root, [&](const Node& n) {
        if (n.op == Op::Var && !is_constant(n.name)) found = &n;
        return found == nullptr;
    });
    return found;
}

bool is_chain(Op op) { return op == Op::Add || op == Op::Sub || op == Op::Mul || op == Op::Div; }

[[noreturn]] void fail(const Node& at, std::string message, std::string expected = {}) {
    throw TextError(std::move(message), at.begin, at.end > at.begin ? at.end - at.begin : 1, std::move(expected));
}

units::Dim infer_pow(const Node& e, const DimLookup& lookup, const std::function<bool(std::string_view)>& is_constant);

// A dimension that left the range the checks can hold (mg^64 and beyond) is refused where it arose.
units::Dim checked(const Node& at, units::Dim d) {
    if (!d.in_range())
        fail(at, "the dimension of '" + snippet(at) + "' has a power of mass, volume or time beyond " +
                     std::to_string(units::kMaxDimExponent),
             "powers of mg, L and h from -" + std::to_string(units::kMaxDimExponent) + " to " +
                 std::to_string(units::kMaxDimExponent));
    return d;
}

units::Dim infer(const Node& e, const DimLookup& lookup, const std::function<bool(std::string_view)>& is_constant) {
    switch (e.op) {
        case Op::Num: return units::kNone;
        case Op::Var: {
            const auto d = lookup(e.name);
            if (!d) fail(e, "unknown identifier '" + e.name + "'");
            return checked(e, *d);
        }
        case Op::Add:
        case Op::Sub:
        case Op::Mul:
        case Op::Div: {
            std::vector<const Node*> spine;
            units::Dim da = infer(*left_chain(e, spine), lookup, is_constant);
            for (auto it = spine.rbegin(); it != spine.rend(); ++it) {
                const Node& s = **it;
                const units::Dim db = infer(*s.b, lookup, is_constant);
                if (s.op == Op::Mul || s.op == Op::Div) {
                    da = checked(s, s.op == Op::Mul ? da * db : da / db);
                    continue;
                }
                if (is_zero_literal(*s.a)) {
                    da = db;
                    continue;
                }
                if (is_zero_literal(*s.b)) continue;
                if (!(da == db)) {
                    const std::string what = s.op == Op::Add
                                                 ? "cannot add " + unit_text(da) + " and " + unit_text(db)
                                                 : "cannot subtract " + unit_text(db) + " from " + unit_text(da);
                    fail(s, what + " in '" + snippet(s) + "'", "both sides in the same unit");
                }
            }
            return da;
        }
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
    return checked(e, base.pow(static_cast<long long>(*k)));
}

void collect(const Node& root, std::vector<std::string>& out) {
    walk(root, [&](const Node& n) {
        if (n.op == Op::Var && std::find(out.begin(), out.end(), n.name) == out.end()) out.push_back(n.name);
        return true;
    });
}

bool has_var(const Node& root) {
    bool found = false;
    walk(root, [&](const Node& n) {
        found = n.op == Op::Var;
        return !found;
    });
    return found;
}

}  // namespace

const Node* left_chain(const Node& e, std::vector<const Node*>& chain) {
    const Node* n = &e;
    while (is_chain(n->op)) {
        chain.push_back(n);
        n = n->a.get();
    }
    return n;
}

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
        case Op::Add:
        case Op::Sub:
        case Op::Mul:
        case Op::Div: {
            std::vector<const Node*> spine;
            double x = evaluate(*left_chain(e, spine), value);
            for (auto it = spine.rbegin(); it != spine.rend(); ++it) {
                const Node& s = **it;
                const double y = evaluate(*s.b, value);
                x = s.op == Op::Add ? x + y : s.op == Op::Sub ? x - y : s.op == Op::Mul ? x * y : x / y;
            }
            return x;
        }
        case Op::Pow: return std::pow(evaluate(*e.a, value), evaluate(*e.b, value));
        case Op::Neg: return -evaluate(*e.a, value);
        case Op::Exp: return std::exp(evaluate(*e.a, value));
        case Op::Log: return std::log(evaluate(*e.a, value));
        case Op::Sqrt: return std::sqrt(evaluate(*e.a, value));
    }
    return 0.0;
}

}  // namespace plateau::expr
