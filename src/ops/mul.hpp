// a · b. The dimensions multiply.
#pragma once

#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Mul {
    static constexpr const char* name = "*";
    static constexpr int arity = 2;

    static DimOut dim(units::Dim a, units::Dim b) { return dim_ok(a * b); }
    static double value(double a, double b) { return a * b; }
    // r[n] = Σ_{j=0..n} a[n−j]·b[j]  (Griewank & Walther, Evaluating Derivatives, 2nd ed., ch. 13)
    static void series(double* r, const double* a, const double* b, std::size_t n) {
        double v = 0.0;
        for (std::size_t j = 0; j <= n; ++j) v += a[n - j] * b[j];
        r[n] = v;
    }
    // b constant: r[n] = a[n]·b[0]
    static void series_k(double* r, const double* a, const double* b, std::size_t n) { r[n] = a[n] * b[0]; }
    // d(a·b) = da·b + a·db
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr& db) {
        return expr::add(expr::mul(da, self->b), expr::mul(self->a, db));
    }
};

}  // namespace plateau::ops
