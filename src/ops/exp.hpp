// exp(a): the natural exponential. Dimensionless argument and result.
// This file is the pattern for a new function: name, arity, dimension rule, value, Taylor recurrence, derivative.
#pragma once

#include <cmath>
#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Exp {
    static constexpr const char* name = "exp";
    static constexpr int arity = 1;

    static DimOut dim(units::Dim a) {
        if (a.dimensionless()) return dim_ok(units::kNone);
        return {{}, "exp of a dimensioned value (" + unit_text(a) + ") in '@'; its argument must be dimensionless", {},
                false};
    }
    static double value(double a, double = 0.0) { return std::exp(a); }
    // r[n] = (1/n)·Σ_{j=1..n} j·a[j]·r[n−j]; inv[n] = 1/n  (Griewank & Walther, 2nd ed., ch. 13)
    static void series(double* r, const double* a, std::size_t n, const double* inv) {
        if (n == 0) {
            r[0] = std::exp(a[0]);
            return;
        }
        double v = 0.0;
        for (std::size_t j = 1; j <= n; ++j) v += static_cast<double>(j) * a[j] * r[n - j];
        r[n] = v * inv[n];
    }
    // d exp(a) = exp(a)·da
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr&) {
        return expr::mul(self, da);
    }
};

}  // namespace plateau::ops
