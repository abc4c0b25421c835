#include "trajectory/trajectory.hpp"

#include <algorithm>
#include <stdexcept>

#include "trajectory/poly.hpp"

namespace plateau::traj {

Trajectory::Trajectory(int n_series, int order) : n_series_(n_series), order_(order) {
    if (n_series < 1 || order < 0) throw std::invalid_argument("Trajectory: bad shape");
}

void Trajectory::append(double t0, double h, std::span<const double> coeffs) {
    const std::size_t stride = static_cast<std::size_t>(order_ + 1);
    if (coeffs.size() != stride * static_cast<std::size_t>(n_series_))
        throw std::invalid_argument("Trajectory::append: wrong number of coefficients");
    if (!(h > 0.0)) throw std::invalid_argument("Trajectory::append: step length must be positive");
    t0_.push_back(t0);
    h_.push_back(h);
    c_.insert(c_.end(), coeffs.begin(), coeffs.end());
}

std::span<const double> Trajectory::poly(std::size_t k, int series) const {
    const std::size_t stride = static_cast<std::size_t>(order_ + 1);
    const std::size_t off = (k * static_cast<std::size_t>(n_series_) + static_cast<std::size_t>(series)) * stride;
    return {c_.data() + off, stride};
}

std::size_t Trajectory::step_at(double t) const {
    if (t0_.empty()) throw std::out_of_range("Trajectory is empty");
    auto it = std::upper_bound(t0_.begin(), t0_.end(), t);
    if (it == t0_.begin()) return 0;
    return static_cast<std::size_t>(it - t0_.begin()) - 1;
}

double Trajectory::value(int series, double t) const {
    std::size_t k = step_at(t);
    return horner(poly(k, series), t - t0_[k]);
}

double Trajectory::left_limit(int series, double t) const {
    std::size_t k = step_at(t);
    if (k > 0 && t <= t0_[k]) --k;  // t is a step boundary: take the step that ends there
    return horner(poly(k, series), t - t0_[k]);
}

double Trajectory::derivative(int series, double t) const {
    std::size_t k = step_at(t);
    return horner_derivative(poly(k, series), t - t0_[k]);
}

double Trajectory::integral(int series, double a, double b) const {
    if (t0_.empty()) return 0.0;
    double sign = 1.0;
    if (b < a) { std::swap(a, b); sign = -1.0; }
    a = std::max(a, start());
    b = std::min(b, end());
    if (!(b > a)) return 0.0;
    double sum = 0.0;
    for (std::size_t k = step_at(a); k < t0_.size() && t0_[k] < b; ++k) {
        const double lo = std::max(a, t0_[k]) - t0_[k];
        const double hi = std::min(b, t0_[k] + h_[k]) - t0_[k];
        if (hi <= lo) continue;
        auto p = poly(k, series);
        sum += integral_from_zero(p, hi) - integral_from_zero(p, lo);
    }
    return sign * sum;
}

namespace {
template <class F>
std::vector<double> collect(const Trajectory& tr, double a, double b, F&& per_step) {
    std::vector<double> out;
    if (tr.empty() || !(b > a)) return out;
    for (std::size_t k = tr.step_at(a); k < tr.size() && tr.step_start(k) < b; ++k) {
        const double t0 = tr.step_start(k);
        for (double tau : per_step(k)) {
            const double t = t0 + tau;
            if (t > a && t < b) out.push_back(t);
        }
    }
    std::sort(out.begin(), out.end());
    return out;
}
}  // namespace

std::vector<double> Trajectory::level_roots(int series, double level, double a, double b) const {
    std::vector<double> r = collect(*this, a, b, [&](std::size_t k) { return roots_in(poly(k, series), level, h_[k]); });
    // A root on a boundary where the series is continuous belongs to the step that starts there.
    for (double t : boundaries(a, b)) {
        const double before = left_limit(series, t) - level, after = value(series, t) - level;
        const double scale = std::abs(level) + std::abs(before) + std::abs(after);
        const bool continuous = std::abs(before - after) <= 1e-12 * std::max(scale, 1e-300);
        if (continuous && (after == 0.0 || (before < 0) != (after < 0) || std::abs(after) <= 4e-16 * scale))
            r.push_back(t);
    }
    std::sort(r.begin(), r.end());
    r.erase(std::unique(r.begin(), r.end(), [](double x, double y) { return y - x <= 1e-12 * std::max(1.0, std::abs(y)); }),
            r.end());
    return r;
}

std::vector<double> Trajectory::critical_points(int series, double a, double b) const {
    return collect(*this, a, b, [&](std::size_t k) { return critical_points_in(poly(k, series), h_[k]); });
}

std::vector<double> Trajectory::boundaries(double a, double b) const {
    std::vector<double> out;
    if (t0_.empty()) return out;
    for (std::size_t k = step_at(a); k < t0_.size(); ++k) {
        if (t0_[k] >= b) break;
        if (t0_[k] > a) out.push_back(t0_[k]);
    }
    return out;
}

}  // namespace plateau::traj
