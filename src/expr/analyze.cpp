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
#include "ops/all.hpp"
#include "ops/table.hpp"

namespace plateau::expr {

namespace {

constexpr std::size_t kSnippetMax = 80;
std::string format_number(double v) { return ops::number_text(v); }

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
            default:  // a function: name(argument)
                text(")");
                todo.push_back({n.a.get(), nullptr});
                text("(");
                text(ops::entry(n.op).name);
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

// A dimension that left the range the checks can hold (mg^64 and beyond) is refused where it arose.
units::Dim checked(const Node& at, units::Dim d) {
    if (!d.in_range())
        fail(at, "the dimension of '" + snippet(at) + "' has a power of mass, volume or time beyond " +
                     std::to_string(units::kMaxDimExponent),
             "powers of mg, L and h from -" + std::to_string(units::kMaxDimExponent) + " to " +
                 std::to_string(units::kMaxDimExponent));
    return d;
}

// Applies an operation's dimension rule (src/ops/): its answer, or its problem as an error at `e` (or at the
// second operand), with "@" and "#" replaced by the text of `e` and of that operand.
units::Dim apply(const Node& e, const ops::DimOut& r) {
    if (r.problem.empty()) return checked(e, r.dim);
    std::string message;
    for (char c : r.problem) {
        if (c == '@') message += snippet(e);
        else if (c == '#' && e.b) message += snippet(*e.b);
        else message += c;
    }
    fail(r.blame_operand && e.b ? *e.b : e, std::move(message), r.expected);
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
                if (s.op == Op::Add || s.op == Op::Sub) {
                    // A literal 0 may be added to (or subtracted from) a value of any dimension.
                    if (is_zero_literal(*s.a)) {
                        da = db;
                        continue;
                    }
                    if (is_zero_literal(*s.b)) continue;
                }
                switch (s.op) {
                    case Op::Add: da = apply(s, ops::Add::dim(da, db)); break;
                    case Op::Sub: da = apply(s, ops::Sub::dim(da, db)); break;
                    case Op::Mul: da = apply(s, ops::Mul::dim(da, db)); break;
                    default: da = apply(s, ops::Div::dim(da, db)); break;
                }
            }
            return da;
        }
        case Op::Neg: return apply(e, ops::Neg::dim(infer(*e.a, lookup, is_constant)));
        case Op::Pow: {
            const units::Dim base = infer(*e.a, lookup, is_constant);
            const units::Dim ex = infer(*e.b, lookup, is_constant);
            const bool constant = first_varying(*e.b, is_constant) == nullptr;
            return apply(e, ops::Pow::dim(base, ex, constant, constant ? fold_number(*e.b) : std::nullopt));
        }
#define PLATEAU_DIM_CASE(T) \
    case Op::T: return apply(e, ops::T::dim(infer(*e.a, lookup, is_constant)));
        PLATEAU_FUNCTIONS(PLATEAU_DIM_CASE)
#undef PLATEAU_DIM_CASE
    }
    return units::kNone;
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
            for (auto it = spine.rbegin(); it != spine.rend(); ++it) x = ops::value((*it)->op, x, evaluate(*(*it)->b, value));
            return x;
        }
        default: return ops::value(e.op, evaluate(*e.a, value), e.b ? evaluate(*e.b, value) : 0.0);
    }
}

}  // namespace plateau::expr
