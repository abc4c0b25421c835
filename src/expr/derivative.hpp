// Symbolic derivatives of expressions, from each operation's own rule (src/ops/).
#pragma once

#include <string_view>

#include "expr/expr.hpp"

namespace plateau::expr {

// ∂e/∂symbol, treating every other identifier as independent of it (parameters, compartments and t alike).
// The result shares subtrees with `e` and is lightly simplified (expr/build.hpp): the derivative of an
// expression that does not use `symbol` is the number 0. Long sums and products are walked in a loop.
Ptr derivative(const Ptr& e, std::string_view symbol);

}  // namespace plateau::expr
