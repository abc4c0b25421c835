#include "taylor/series.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace plateau::taylor {

Expander::Expander(Tape tape, int order)
    : tape_(std::move(tape)), order_(order), stride_(static_cast<std::size_t>(order) + 1) {
    if (order < 1) throw std::invalid_argument("Taylor order must be at least 1");
    coef_.assign(tape_.code.size() * stride_, 0.0);
    state_coef_.assign(static_cast<std::size_t>(tape_.n_states) * stride_, 0.0);
    for (std::size_t i = 0; i < tape_.code.size(); ++i)
        (tape_.code[i].constant ? constant_ : varying_).push_back(static_cast<int>(i));
    params_.assign(static_cast<std::size_t>(tape_.n_params), 0.0);
}

void Expander::set_params(std::span<const double> values) {
    if (values.size() != params_.size()) throw std::invalid_argument("set_params: wrong number of parameters");
    params_.assign(values.begin(), values.end());
    // Constant slots hold only order 0; their higher coefficients stay zero.
    for (int i : constant_) {
        const Instr& in = tape_.code[static_cast<std::size_t>(i)];
        const double a = in.a >= 0 && in.op != OpCode::Param ? slot(in.a)[0] : 0.0;  // Param: a is an index
        const double b = in.b >= 0 ? slot(in.b)[0] : 0.0;
        double v = 0.0;
        switch (in.op) {
            case OpCode::Const: v = in.k; break;
            case OpCode::Param: v = params_[static_cast<std::size_t>(in.a)]; break;
            case OpCode::Add: v = a + b; break;
            case OpCode::Sub: v = a - b; break;
            case OpCode::Mul: v = a * b; break;
            case OpCode::Div: v = a / b; break;
            case OpCode::Neg: v = -a; break;
            case OpCode::Exp: v = std::exp(a); break;
            case OpCode::Log: v = std::log(a); break;
            case OpCode::Sqrt: v = std::sqrt(a); break;
            case OpCode::PowK: v = std::pow(a, b); break;
            default: throw std::logic_error("non-constant op marked constant");
        }
        slot(i)[0] = v;
    }
}

void Expander::eval_order(int n) {
    const std::size_t un = static_cast<std::size_t>(n);
    const double dn = static_cast<double>(n);
    for (int i : varying_) {
        const Instr& in = tape_.code[static_cast<std::size_t>(i)];
        double* r = slot(i);
        const double* a = in.a >= 0 ? slot(in.a) : nullptr;
        const double* b = in.b >= 0 ? slot(in.b) : nullptr;
        double v = 0.0;
        switch (in.op) {
            case OpCode::State: v = state_coef_[static_cast<std::size_t>(in.a) * stride_ + un]; break;
            case OpCode::Time: v = 0.0; break;  // t[0] and t[1] are set by expand()
            case OpCode::Add: v = a[n] + b[n]; break;
            case OpCode::Sub: v = a[n] - b[n]; break;
            case OpCode::Neg: v = -a[n]; break;
            case OpCode::AddK: v = n == 0 ? a[0] + b[0] : a[n]; break;
            case OpCode::SubK: v = n == 0 ? a[0] - b[0] : a[n]; break;
            case OpCode::KSub: v = n == 0 ? a[0] - b[0] : -b[n]; break;
            case OpCode::MulK: v = a[n] * b[0]; break;
            case OpCode::DivK: v = a[n] / b[0]; break;
            case OpCode::Mul:
                for (std::size_t j = 0; j <= un; ++j) v += a[un - j] * b[j];
                break;
            case OpCode::Div: {
                double s = a[n];
                for (std::size_t j = 1; j <= un; ++j) s -= r[un - j] * b[j];
                v = s / b[0];
                break;
            }
            case OpCode::Exp:
                if (n == 0) {
                    v = std::exp(a[0]);
                } else {
                    for (std::size_t j = 1; j <= un; ++j) v += static_cast<double>(j) * a[j] * r[un - j];
                    v /= dn;
                }
                break;
            case OpCode::Log:
                if (n == 0) {
                    v = std::log(a[0]);
                } else {
                    double s = 0.0;
                    for (std::size_t j = 1; j < un; ++j) s += static_cast<double>(j) * r[j] * a[un - j];
                    v = (a[n] - s / dn) / a[0];
                }
                break;
            case OpCode::Sqrt:
                if (n == 0) {
                    v = std::sqrt(a[0]);
                } else {
                    double s = a[n];
                    for (std::size_t j = 1; j < un; ++j) s -= r[j] * r[un - j];
                    v = s / (2.0 * r[0]);
                }
                break;
            case OpCode::PowK: {
                const double alpha = b[0];
                if (n == 0) {
                    v = std::pow(a[0], alpha);
                } else {
                    double s = 0.0;
                    for (std::size_t j = 0; j < un; ++j)
                        s += (dn * alpha - static_cast<double>(j) * (alpha + 1.0)) * a[un - j] * r[j];
                    v = s / (dn * a[0]);
                }
                break;
            }
            case OpCode::Const:
            case OpCode::Param: break;  // constant, never here
        }
        if (in.op != OpCode::Time) r[n] = v;
    }
}

void Expander::expand(double t0, std::span<const double> x0, std::span<const double> u, std::span<double> out) {
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    if (x0.size() != ns) throw std::invalid_argument("expand: wrong state size");
    if (out.size() != static_cast<std::size_t>(n_series()) * stride_)
        throw std::invalid_argument("expand: wrong output size");
    for (std::size_t i = 0; i < tape_.code.size(); ++i)
        if (tape_.code[i].op == OpCode::Time) {
            double* r = slot(static_cast<int>(i));
            std::fill(r, r + stride_, 0.0);
            r[0] = t0;
            if (order_ >= 1) r[1] = 1.0;
        }
    for (std::size_t s = 0; s < ns; ++s) state_coef_[s * stride_] = x0[s];
    for (int n = 0; n <= order_; ++n) {
        eval_order(n);
        if (n == order_) break;
        const std::size_t un = static_cast<std::size_t>(n);
        for (std::size_t s = 0; s < ns; ++s) {
            const int fs = tape_.rhs_slot[s];
            double f = fs >= 0 ? slot(fs)[un] : 0.0;
            if (n == 0 && !u.empty()) f += u[s];
            state_coef_[s * stride_ + un + 1] = f / static_cast<double>(n + 1);
        }
    }
    std::copy(state_coef_.begin(), state_coef_.end(), out.begin());
    auto it = out.begin() + static_cast<std::ptrdiff_t>(ns * stride_);
    for (int os : tape_.output_slot) {
        const double* r = slot(os);
        std::copy(r, r + stride_, it);
        it += static_cast<std::ptrdiff_t>(stride_);
    }
}

void Expander::outputs_at(double t, std::span<const double> x, std::span<double> out) {
    for (std::size_t i = 0; i < tape_.code.size(); ++i)
        if (tape_.code[i].op == OpCode::Time) slot(static_cast<int>(i))[0] = t;
    for (std::size_t s = 0; s < x.size(); ++s) state_coef_[s * stride_] = x[s];
    eval_order(0);
    for (std::size_t j = 0; j < tape_.output_slot.size() && j < out.size(); ++j) out[j] = slot(tape_.output_slot[j])[0];
}

}  // namespace plateau::taylor
