// sqrt(a): the square root. The argument is dimensionless or a square (L^2 gives L).
#pragma once

#include <cmath>
#include <cstddef>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Sqrt {
    static constexpr const char* name = "sqrt";
    static constexpr int arity = 1;

    static DimOut dim(units::Dim a) {
        if (a.mass % 2 != 0 || a.volume % 2 != 0 || a.time % 2 != 0)
            return {{}, "sqrt of a value in " + unit_text(a) +
                            " in '@'; its argument must be dimensionless or a square such as L^2",
                    {}, false};
        return dim_ok(units::Dim{a.mass / 2, a.volume / 2, a.time / 2});
    }
    static double value(double a, double = 0.0) { return std::sqrt(a); }
    // r[n] = (a[n] − Σ_{j=1..n−1} r[j]·r[n−j]) / (2·r[0])  (Griewank & Walther, 2nd ed., ch. 13)
    static void series(double* r, const double* a, std::size_t n, const double*) {
        if (n == 0) {
            r[0] = std::sqrt(a[0]);
            return;
        }
        double s = a[n];
        for (std::size_t j = 1; j < n; ++j) s -= r[j] * r[n - j];
        r[n] = s / (2.0 * r[0]);
    }
    // d sqrt(a) = da / (2·sqrt(a))
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr&) {
        return expr::div(da, expr::mul(expr::num(2.0), self));
    }
};

}  // namespace plateau::ops
