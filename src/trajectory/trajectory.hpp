// Dense output of an integration: a sequence of steps, each with its start time, length and Taylor
// coefficients for every series (the states, then the outputs). Everything asked of a trajectory is answered
// from these polynomials: values, limits at step boundaries, exact integrals, roots.
#pragma once

#include <cstddef>
#include <span>
#include <vector>

namespace plateau::traj {

class Trajectory {
public:
    Trajectory() = default;
    // `order` is the polynomial degree; each step stores n_series × (order + 1) coefficients.
    Trajectory(int n_series, int order);

    // Appends a step starting at t0 (must equal the previous step's end) of length h > 0.
    // `coeffs` holds series-major coefficients: coeffs[s * (order + 1) + k].
    void append(double t0, double h, std::span<const double> coeffs);

    int n_series() const { return n_series_; }
    int order() const { return order_; }
    std::size_t size() const { return t0_.size(); }
    bool empty() const { return t0_.empty(); }
    double start() const { return t0_.empty() ? 0.0 : t0_.front(); }
    double end() const { return t0_.empty() ? 0.0 : t0_.back() + h_.back(); }
    double step_start(std::size_t k) const { return t0_[k]; }
    double step_length(std::size_t k) const { return h_[k]; }
    std::span<const double> poly(std::size_t k, int series) const;

    // Index of the step whose half-open interval [t0, t0 + h) holds t (the last step for t = end()).
    std::size_t step_at(double t) const;

    // Value at t, right-continuous: at a dose time the value just after the dose. At end(), the left limit.
    double value(int series, double t) const;
    // Value just before t (the left limit); at start(), the value at start().
    double left_limit(int series, double t) const;
    // Time derivative at t (from the right; at end(), from the left).
    double derivative(int series, double t) const;

    // Exact integral of a series over [a, b] (clamped to the trajectory).
    double integral(int series, double a, double b) const;

    // Times in (a, b) where the series equals `level`, sorted, each once: roots inside steps (poly.hpp
    // roots_in) and roots on step boundaries where the series is continuous. A jump across the level at a dose
    // is not a root (metrics/level.hpp counts it as a crossing).
    std::vector<double> level_roots(int series, double level, double a, double b) const;

    // Interior critical points (roots of the derivative) in (a, b), sorted.
    std::vector<double> critical_points(int series, double a, double b) const;

    // Step boundaries strictly inside (a, b), sorted.
    std::vector<double> boundaries(double a, double b) const;

private:
    int n_series_ = 0;
    int order_ = 0;
    std::vector<double> t0_;
    std::vector<double> h_;
    std::vector<double> c_;
};

}  // namespace plateau::traj
