#include "expr/derivative.hpp"

#include <vector>

#include "expr/build.hpp"
#include "ops/table.hpp"

namespace plateau::expr {

namespace {

bool is_chain(Op op) { return op == Op::Add || op == Op::Sub || op == Op::Mul || op == Op::Div; }

}  // namespace

Ptr derivative(const Ptr& e, std::string_view symbol) {
    switch (e->op) {
        case Op::Num: return num(0.0);
        case Op::Var: return num(e->name == symbol ? 1.0 : 0.0);
        default: break;
    }
    if (is_chain(e->op)) {
        // A left-deep chain (a 10 000-term sum) is walked in a loop; recursion follows the right operands only.
        std::vector<Ptr> chain;
        Ptr n = e;
        while (is_chain(n->op)) {
            chain.push_back(n);
            n = n->a;
        }
        Ptr d = derivative(n, symbol);
        for (auto it = chain.rbegin(); it != chain.rend(); ++it) d = ops::derivative(*it, d, derivative((*it)->b, symbol));
        return d;
    }
    const Ptr da = derivative(e->a, symbol);
    const Ptr db = e->b ? derivative(e->b, symbol) : num(0.0);
    return ops::derivative(e, da, db);
}

}  // namespace plateau::expr
