// Building expressions in code (derivatives, sensitivity equations) with light simplification: numbers fold,
// 0·x = 0, 1·x = x, x + 0 = x, x − 0 = x, 0 − x = −x, 0/x = 0, x/1 = x, x^1 = x, x^0 = 1, −(−x) = x.
// Built nodes carry no source span.
#pragma once

#include <string>

#include "expr/expr.hpp"

namespace plateau::expr {

Ptr num(double v);
Ptr var(std::string name);
Ptr add(const Ptr& a, const Ptr& b);
Ptr sub(const Ptr& a, const Ptr& b);
Ptr mul(const Ptr& a, const Ptr& b);
Ptr div(const Ptr& a, const Ptr& b);
Ptr pow(const Ptr& a, const Ptr& b);
Ptr neg(const Ptr& a);
Ptr call(Op function, const Ptr& a);  // a function of one argument (exp, log, sqrt, ...)

// True when `e` is the number v.
bool is_number(const Ptr& e, double v);

}  // namespace plateau::expr
