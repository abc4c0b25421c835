#include "sim/mass_balance.hpp"

#include <algorithm>
#include <cmath>

namespace plateau::sim {

MassBalance::MassBalance(const taylor::Expander& ex, std::span<const double> x0, double tol, bool enabled)
    : active_(enabled && ex.linear()), n_(static_cast<std::size_t>(ex.n_states())), tol_(tol) {
    if (!active_) return;
    a_.assign(ex.linear_matrix().begin(), ex.linear_matrix().end());
    c_.assign(ex.linear_offset().begin(), ex.linear_offset().end());
    start_.assign(x0.begin(), x0.end());
    start_.resize(n_, 0.0);
    bolus_.assign(n_, 0.0);
    infused_.assign(n_, 0.0);
    integral_.assign(n_, 0.0);
    inv_.resize(static_cast<std::size_t>(ex.order()) + 1);
    for (std::size_t k = 0; k < inv_.size(); ++k) inv_[k] = 1.0 / static_cast<double>(k + 1);
    for (double v : start_) largest_ = std::max(largest_, std::abs(v));
}

void MassBalance::add_bolus(std::span<const double> bolus) {
    if (!active_) return;
    for (std::size_t i = 0; i < n_; ++i) bolus_[i] += bolus[i];
}

void MassBalance::add_step(std::span<const double> coeffs, std::size_t stride, std::size_t n_series, double h,
                           std::span<const double> u) {
    if (!active_) return;
    const std::size_t p1 = std::min(stride, inv_.size());
    for (std::size_t j = 0; j < n_; ++j) {
        // ∫_0^h Σ_k c_k τ^k dτ = h·Σ_k c_k h^k/(k+1), by Horner.
        const double* c = coeffs.data() + j * stride;
        double s = 0.0;
        for (std::size_t k = p1; k-- > 0;) s = s * h + c[k] * inv_[k];
        integral_[j] += s * h;
        if (!u.empty()) infused_[j] += u[j] * h;
    }
    double n = 0.0;  // the step rule's scale N: the largest series value at the step's start
    for (std::size_t s = 0; s < n_series; ++s) n = std::max(n, std::abs(coeffs[s * stride]));
    largest_ = std::max(largest_, n);
    scale_sum_ += 2.0 * n;  // the start of this step and the end of the one before
    elapsed_ += h;
}

bool MassBalance::check(double t, std::span<const double> x, MassBalanceFailure& failure) const {
    if (!active_) return true;
    double delivered = 0.0, in_body = 0.0, end = 0.0;
    for (std::size_t i = 0; i < n_; ++i) {
        delivered += bolus_[i] + infused_[i];
        in_body += x[i];
        end = std::max(end, std::abs(x[i]));
    }
    // The allowance's scale is Σ_k (N_k + N_{k+1}) + M rather than Σ_k N_k + M (the header's outline): a step that
    // starts from nothing (an infusion into empty compartments) is controlled relative to where it goes, so each
    // step counts both of its ends (N_{k+1} the start of the next step; the last step's end is x).
    const double scales = scale_sum_ + end + largest_;
    // What compartment i should hold, and its allowance.
    auto balance = [&](std::size_t i, double& allowed) {
        double e = start_[i] + bolus_[i] + infused_[i] + c_[i] * elapsed_;
        double gross = std::abs(start_[i]) + std::abs(bolus_[i]) + std::abs(infused_[i]) + std::abs(c_[i]) * elapsed_;
        for (std::size_t j = 0; j < n_; ++j) {
            e += a_[i * n_ + j] * integral_[j];
            gross += std::abs(a_[i * n_ + j] * integral_[j]);
        }
        allowed = 2.0 * tol_ * scales + 64.0 * 0x1p-53 * gross;
        return e;
    };
    double worst = 0.0;
    int which = -1;
    for (std::size_t i = 0; i < n_; ++i) {
        double allowed = 0.0;
        const double e = balance(i, allowed);
        const double off = std::abs(x[i] - e);
        if (off <= allowed) continue;  // (a NaN is out of balance)
        const double excess = std::isnan(off) ? HUGE_VAL : off / allowed;
        if (which < 0 || excess > worst) {
            worst = excess;
            which = static_cast<int>(i);
        }
    }
    if (which < 0) return true;
    const auto w = static_cast<std::size_t>(which);
    failure.compartment = which;
    failure.time = t;
    failure.held = x[w];
    failure.expected = balance(w, failure.allowed);
    failure.delivered = delivered;
    failure.in_body = in_body;
    double eliminated = 0.0;
    for (std::size_t i = 0; i < n_; ++i) {
        eliminated -= c_[i] * elapsed_;
        for (std::size_t j = 0; j < n_; ++j) eliminated -= a_[i * n_ + j] * integral_[j];
    }
    failure.eliminated = eliminated;
    return false;
}

}  // namespace plateau::sim
