// Operations on one polynomial given by its coefficients c[0] + c[1]·τ + ... + c[n]·τ^n.
#pragma once

#include <span>
#include <vector>

namespace plateau::traj {

// p(τ) by Horner's rule.
double horner(std::span<const double> c, double tau);

// p'(τ).
double horner_derivative(std::span<const double> c, double tau);

// ∫_0^τ p(s) ds, exactly: Σ c_k τ^{k+1}/(k+1).
double integral_from_zero(std::span<const double> c, double tau);

// All real roots of p(τ) − level inside the open interval (0, h), sorted. Isolation: Descartes' rule of signs
// with bisection on the polynomial rescaled to [0, 1] (the Collins–Akritas method); refinement: TOMS 748.
// A root of even multiplicity (a touch without sign change) may or may not be reported; callers that need sign
// information evaluate the polynomial between roots.
std::vector<double> roots_in(std::span<const double> c, double level, double h);

// True when p(τ) − level cannot vanish on [0, h] (an O(d) bound: |p(τ) − p(0)| ≤ Σ_{k≥1} |c_k|·h^k).
bool no_root_possible(std::span<const double> c, double level, double h);

// Roots of p'(τ) in (0, h): the interior critical points of p.
std::vector<double> critical_points_in(std::span<const double> c, double h);

}  // namespace plateau::traj
