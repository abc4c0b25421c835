// a / b. The dimensions divide. (The executor turns a division by a constant into a product by its reciprocal.)
#pragma once

#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Div {
    static constexpr const char* name = "/";
    static constexpr int arity = 2;

    static DimOut dim(units::Dim a, units::Dim b) { return dim_ok(a / b); }
    static double value(double a, double b) { return a / b; }
    // r[n] = (a[n] − Σ_{j=1..n} r[n−j]·b[j]) / b[0]
    static void series(double* r, const double* a, const double* b, std::size_t n) {
        double s = a[n];
        for (std::size_t j = 1; j <= n; ++j) s -= r[n - j] * b[j];
        r[n] = s / b[0];
    }
    // d(a/b) = (da − (a/b)·db) / b
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr& db) {
        return expr::div(expr::sub(da, expr::mul(self, db)), self->b);
    }
};

}  // namespace plateau::ops
