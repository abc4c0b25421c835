// −a (unary minus).
#pragma once

#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Neg {
    static constexpr const char* name = "-";
    static constexpr int arity = 1;

    static DimOut dim(units::Dim a) { return dim_ok(a); }
    static double value(double a, double = 0.0) { return -a; }
    // r[n] = −a[n]
    static void series(double* r, const double* a, std::size_t n) { r[n] = -a[n]; }
    // d(−a) = −da
    static expr::Ptr derivative(const expr::Ptr&, const expr::Ptr& da, const expr::Ptr&) { return expr::neg(da); }
};

}  // namespace plateau::ops
