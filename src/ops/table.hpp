// The operations as a table, for code that handles them uniformly (the parser's function names, evaluation,
// derivatives, the reserved names of model files, the tests that check every operation).
// Hot loops do not go through here: they call the operation's own inline functions (include "ops/all.hpp").
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "expr/expr.hpp"

namespace plateau::ops {

struct Entry {
    expr::Op op;
    const char* name;         // function name, or the operator's symbol
    int arity;                // 1 or 2
    bool function;            // called as name(x)
    bool constant_operand;    // the second operand must be constant over time (the exponent of ^)
};

// Every operation (operators, then functions), in the order of the lists in ops/list.hpp.
std::span<const Entry> all();
const Entry& entry(expr::Op op);  // throws std::logic_error for Num and Var

// The function called `name`, if there is one.
std::optional<expr::Op> function_named(std::string_view name);
// Names of the functions in list order, and as a phrase for messages: "exp, log or sqrt".
std::vector<std::string> function_names();
std::string function_phrase();

// The operation's value (b ignored for one-argument operations).
double value(expr::Op op, double a, double b);

// The derivative of `self` (an operation node) from those of its operands: da (and db; null or 0 for one
// operand).
expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr& db);

}  // namespace plateau::ops
