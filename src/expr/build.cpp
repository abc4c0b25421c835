#include "expr/build.hpp"

#include "ops/table.hpp"

namespace plateau::expr {

namespace {

Ptr node(Op op, Ptr a, Ptr b) {
    auto n = std::make_shared<Node>();
    n->op = op;
    n->a = std::move(a);
    n->b = std::move(b);
    return n;
}

bool is_num(const Ptr& e) { return e && e->op == Op::Num; }

// Two numbers fold to one (by the operation's own evaluation).
Ptr fold_or(Op op, const Ptr& a, const Ptr& b) {
    if (is_num(a) && (!b || is_num(b))) return num(ops::value(op, a->num, b ? b->num : 0.0));
    return node(op, a, b);
}

}  // namespace

bool is_number(const Ptr& e, double v) { return is_num(e) && e->num == v; }

Ptr num(double v) {
    auto n = std::make_shared<Node>();
    n->op = Op::Num;
    n->num = v;
    return n;
}

Ptr var(std::string name) {
    auto n = std::make_shared<Node>();
    n->op = Op::Var;
    n->name = std::move(name);
    return n;
}

Ptr add(const Ptr& a, const Ptr& b) {
    if (is_number(a, 0.0)) return b;
    if (is_number(b, 0.0)) return a;
    return fold_or(Op::Add, a, b);
}

Ptr sub(const Ptr& a, const Ptr& b) {
    if (is_number(b, 0.0)) return a;
    if (is_number(a, 0.0)) return neg(b);
    return fold_or(Op::Sub, a, b);
}

Ptr mul(const Ptr& a, const Ptr& b) {
    if (is_number(a, 0.0) || is_number(b, 0.0)) return num(0.0);
    if (is_number(a, 1.0)) return b;
    if (is_number(b, 1.0)) return a;
    if (is_number(a, -1.0)) return neg(b);
    if (is_number(b, -1.0)) return neg(a);
    return fold_or(Op::Mul, a, b);
}

Ptr div(const Ptr& a, const Ptr& b) {
    if (is_number(a, 0.0) && !is_number(b, 0.0)) return num(0.0);
    if (is_number(b, 1.0)) return a;
    return fold_or(Op::Div, a, b);
}

Ptr pow(const Ptr& a, const Ptr& b) {
    if (is_number(b, 1.0)) return a;
    if (is_number(b, 0.0)) return num(1.0);
    return fold_or(Op::Pow, a, b);
}

Ptr neg(const Ptr& a) {
    if (is_num(a)) return num(-a->num);
    if (a->op == Op::Neg) return a->a;
    return node(Op::Neg, a, nullptr);
}

Ptr call(Op function, const Ptr& a) { return fold_or(function, a, nullptr); }

}  // namespace plateau::expr
