// a − b. Operands of one dimension (a literal 0 may be subtracted from anything: expr/analyze.cpp).
#pragma once

#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Sub {
    static constexpr const char* name = "-";
    static constexpr int arity = 2;

    static DimOut dim(units::Dim a, units::Dim b) {
        if (a == b) return dim_ok(a);
        return {{}, "cannot subtract " + unit_text(b) + " from " + unit_text(a) + " in '@'",
                "both sides in the same unit", false};
    }
    static double value(double a, double b) { return a - b; }
    // r[n] = a[n] − b[n]
    static void series(double* r, const double* a, const double* b, std::size_t n) { r[n] = a[n] - b[n]; }
    // b constant: r[0] = a[0] − b[0], r[n] = a[n]
    static void series_k(double* r, const double* a, const double* b, std::size_t n) {
        r[n] = n == 0 ? a[0] - b[0] : a[n];
    }
    // a constant: r[0] = a[0] − b[0], r[n] = −b[n]
    static void series_ka(double* r, const double* a, const double* b, std::size_t n) {
        r[n] = n == 0 ? a[0] - b[0] : -b[n];
    }
    // d(a − b) = da − db
    static expr::Ptr derivative(const expr::Ptr&, const expr::Ptr& da, const expr::Ptr& db) {
        return expr::sub(da, db);
    }
};

}  // namespace plateau::ops
