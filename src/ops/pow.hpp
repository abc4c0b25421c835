// a ^ b with b constant over time (numbers and parameters). A dimensioned base needs a whole-number exponent.
// (taylor/tape.cpp turns whole-number powers up to 64 into products and a power of 0.5 into sqrt.)
#pragma once

#include <cmath>
#include <cstddef>
#include <optional>

#include "expr/build.hpp"
#include "ops/op.hpp"

namespace plateau::ops {

struct Pow {
    static constexpr const char* name = "^";
    static constexpr int arity = 2;
    static constexpr double kMaxIntExponent = 1000.0;

    // `exponent_constant`: b uses no compartment and not t; `exponent`: b folded to a number, when it is one.
    static DimOut dim(units::Dim base, units::Dim ex, bool exponent_constant, std::optional<double> exponent) {
        if (!exponent_constant)
            return {{}, "exponent must be a constant: '#' in '@' varies over time", "numbers and parameters only", true};
        if (!ex.dimensionless())
            return {{}, "exponent '#' has a dimension (" + unit_text(ex) + ") in '@'; it must be dimensionless", {},
                    true};
        if (base.dimensionless()) return dim_ok(units::kNone);
        const char* const expected = "a whole-number exponent such as 2 or -1 (sqrt() gives a square root)";
        if (!exponent)
            return {{}, "the exponent of a dimensioned value (" + unit_text(base) + ") must be a whole number, not '#', in '@'",
                    expected, true};
        const double k = *exponent;
        if (!std::isfinite(k) || std::floor(k) != k || std::fabs(k) > kMaxIntExponent)
            return {{}, "the exponent of a dimensioned value (" + unit_text(base) + ") must be a whole number, not " +
                            number_text(k) + ", in '@'",
                    expected, true};
        return dim_ok(base.pow(static_cast<long long>(k)));
    }
    static double value(double a, double b) { return std::pow(a, b); }
    // b constant, α = b[0]: r[n] = (1/(n·a[0]))·Σ_{j=0..n−1} (n·α − j·(α+1))·a[n−j]·r[j]
    // (Griewank & Walther, Evaluating Derivatives, 2nd ed., ch. 13)
    static void series(double* r, const double* a, const double* b, std::size_t n) {
        const double alpha = b[0];
        if (n == 0) {
            r[0] = std::pow(a[0], alpha);
            return;
        }
        const double dn = static_cast<double>(n);
        double s = 0.0;
        for (std::size_t j = 0; j < n; ++j) s += (dn * alpha - static_cast<double>(j) * (alpha + 1.0)) * a[n - j] * r[j];
        r[n] = s / (dn * a[0]);
    }
    // d(a^b) = b·a^(b−1)·da + a^b·log(a)·db
    static expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr& db) {
        const expr::Ptr& a = self->a;
        const expr::Ptr& b = self->b;
        expr::Ptr d = expr::mul(expr::mul(b, expr::pow(a, expr::sub(b, expr::num(1.0)))), da);
        if (!expr::is_number(db, 0.0)) d = expr::add(d, expr::mul(expr::mul(self, expr::call(expr::Op::Log, a)), db));
        return d;
    }
};

}  // namespace plateau::ops
