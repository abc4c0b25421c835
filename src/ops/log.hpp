// log(a): the natural logarithm. Dimensionless argument and result.
#pragma once

#include <cmath>
#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Log {
    static constexpr const char* name = "log";
    static constexpr int arity = 1;

    static DimOut dim(units::Dim a) {
        if (a.dimensionless()) return dim_ok(units::kNone);
        return {{}, "log of a dimensioned value (" + unit_text(a) + ") in '@'; its argument must be dimensionless", {},
                false};
    }
    static double value(double a, double = 0.0) { return std::log(a); }
    // r[n] = (a[n] − (1/n)·Σ_{j=1..n−1} j·r[j]·a[n−j]) / a[0]  (Griewank & Walther, 2nd ed., ch. 13)
    static void series(double* r, const double* a, std::size_t n, const double* inv) {
        if (n == 0) {
            r[0] = std::log(a[0]);
            return;
        }
        double s = 0.0;
        for (std::size_t j = 1; j < n; ++j) s += static_cast<double>(j) * r[j] * a[n - j];
        r[n] = (a[n] - s * inv[n]) / a[0];
    }
    // d log(a) = da / a
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr&) {
        return expr::div(da, self->a);
    }
};

}  // namespace plateau::ops
