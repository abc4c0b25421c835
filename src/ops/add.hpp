// a + b. Operands of one dimension (a literal 0 may be added to anything: expr/analyze.cpp).
#pragma once

#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Add {
    static constexpr const char* name = "+";
    static constexpr int arity = 2;

    static DimOut dim(units::Dim a, units::Dim b) {
        if (a == b) return dim_ok(a);
        return {{}, "cannot add " + unit_text(a) + " and " + unit_text(b) + " in '@'", "both sides in the same unit",
                false};
    }
    static double value(double a, double b) { return a + b; }
    // r[n] = a[n] + b[n]
    static void series(double* r, const double* a, const double* b, std::size_t n) { r[n] = a[n] + b[n]; }
    // b constant (order 0 only): r[0] = a[0] + b[0], r[n] = a[n]
    static void series_k(double* r, const double* a, const double* b, std::size_t n) {
        r[n] = n == 0 ? a[0] + b[0] : a[n];
    }
    // d(a + b) = da + db
    static expr::Ptr derivative(const expr::Ptr&, const expr::Ptr& da, const expr::Ptr& db) {
        return expr::add(da, db);
    }
};

}  // namespace plateau::ops
