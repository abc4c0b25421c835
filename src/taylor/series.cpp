#include "taylor/series.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "ops/all.hpp"

namespace plateau::taylor {

namespace {
bool is_state_or_time(OpCode op) { return op == OpCode::State || op == OpCode::Time; }
}  // namespace

Expander::Expander(Tape tape, int order)
    : tape_(std::move(tape)), order_(order), stride_(static_cast<std::size_t>(order) + 1) {
    if (order < 1) throw std::invalid_argument("Taylor order must be at least 1");
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    std::size_t rows = tape_.code.size();
    // A state's coefficients live in the row of its State instruction, so reading a state costs nothing; a
    // state no expression reads gets a row of its own after the tape's.
    state_row_.assign(ns, static_cast<std::size_t>(-1));
    for (std::size_t i = 0; i < tape_.code.size(); ++i) {
        const Instr& in = tape_.code[i];
        if (in.op == OpCode::State) state_row_[static_cast<std::size_t>(in.a)] = i;
        if (in.op == OpCode::Time) time_rows_.push_back(i);
    }
    for (auto& r : state_row_)
        if (r == static_cast<std::size_t>(-1)) r = rows++;
    // DivK becomes MulK by the reciprocal of its constant, kept in an extra row and refreshed by set_params.
    std::vector<std::pair<std::size_t, std::size_t>> reciprocals;
    for (std::size_t i = 0; i < tape_.code.size(); ++i) {
        const Instr& in = tape_.code[i];
        if (in.constant) {
            constant_.push_back(static_cast<int>(i));
            continue;
        }
        if (is_state_or_time(in.op)) continue;
        Op op{in.op, static_cast<std::uint32_t>(i * stride_), 0, 0};
        if (in.a >= 0) op.a = static_cast<std::uint32_t>(static_cast<std::size_t>(in.a) * stride_);
        if (in.b >= 0) op.b = static_cast<std::uint32_t>(static_cast<std::size_t>(in.b) * stride_);
        if (in.op == OpCode::DivK) {
            reciprocals.emplace_back(static_cast<std::size_t>(in.b), rows);
            op.op = OpCode::MulK;
            op.b = static_cast<std::uint32_t>(rows * stride_);
            ++rows;
        }
        varying_.push_back(op);
    }
    recip_ = std::move(reciprocals);
    coef_.assign(rows * stride_, 0.0);
    for (std::size_t r : time_rows_) coef_[r * stride_ + 1] = 1.0;  // t = t0 + τ: t[1] = 1, higher are 0
    inv_.assign(stride_ + 1, 0.0);
    for (std::size_t n = 1; n <= stride_; ++n) inv_[n] = 1.0 / static_cast<double>(n);
    params_.assign(static_cast<std::size_t>(tape_.n_params), 0.0);
    analyse_linear();
}

void Expander::analyse_linear() {
    const std::size_t nslots = tape_.code.size();
    affine_.assign(nslots, 0);
    for (std::size_t i = 0; i < nslots; ++i) {
        const Instr& in = tape_.code[i];
        auto aff = [&](int s) { return s >= 0 && affine_[static_cast<std::size_t>(s)] != 0; };
        bool v = false;
        if (in.constant) v = true;
        else switch (in.op) {
            case OpCode::State: v = true; break;
            case OpCode::Add: case OpCode::Sub: v = aff(in.a) && aff(in.b); break;
            case OpCode::Neg: case OpCode::AddK: case OpCode::SubK: case OpCode::MulK: case OpCode::DivK:
                v = aff(in.a);
                break;
            case OpCode::KSub: v = aff(in.b); break;
            default: v = false;  // t, products and quotients of varying slots, functions
        }
        affine_[i] = v ? 1 : 0;
    }
    linear_ = true;
    for (int s : tape_.rhs_slot)
        if (s >= 0 && !affine_[static_cast<std::size_t>(s)]) linear_ = false;
    out_affine_.clear();
    for (int s : tape_.output_slot) out_affine_.push_back(affine_[static_cast<std::size_t>(s)]);
    // The instructions the non-affine outputs need, in tape order (for the linear executor).
    std::vector<std::uint8_t> need(nslots, 0);
    for (std::size_t j = 0; j < tape_.output_slot.size(); ++j)
        if (!out_affine_[j]) need[static_cast<std::size_t>(tape_.output_slot[j])] = 1;
    for (std::size_t i = nslots; i-- > 0;) {
        if (!need[i] || tape_.code[i].constant) continue;
        const Instr& in = tape_.code[i];
        if (in.op == OpCode::State || in.op == OpCode::Time) continue;
        if (in.a >= 0) need[static_cast<std::size_t>(in.a)] = 1;
        if (in.b >= 0) need[static_cast<std::size_t>(in.b)] = 1;
    }
    output_code_.clear();
    for (const Op& op : varying_)
        if (need[op.r / stride_]) output_code_.push_back(op);
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    a_.assign(ns * ns, 0.0);
    a_start_.assign(ns + 1, 0);
    c_.assign(ns, 0.0);
    w_.assign(tape_.output_slot.size() * ns, 0.0);
    d_.assign(tape_.output_slot.size(), 0.0);
}

void Expander::set_params(std::span<const double> values) {
    if (values.size() != params_.size()) throw std::invalid_argument("set_params: wrong number of parameters");
    params_.assign(values.begin(), values.end());
    // Constant slots hold only order 0; their higher coefficients stay zero.
    for (int i : constant_) {
        const Instr& in = tape_.code[static_cast<std::size_t>(i)];
        const double a = in.a >= 0 && in.op != OpCode::Param ? row(static_cast<std::size_t>(in.a))[0] : 0.0;
        const double b = in.b >= 0 ? row(static_cast<std::size_t>(in.b))[0] : 0.0;
        double v = 0.0;
        switch (in.op) {
            case OpCode::Const: v = in.k; break;
            case OpCode::Param: v = params_[static_cast<std::size_t>(in.a)]; break;
            case OpCode::Add: v = ops::Add::value(a, b); break;
            case OpCode::Sub: v = ops::Sub::value(a, b); break;
            case OpCode::Mul: v = ops::Mul::value(a, b); break;
            case OpCode::Div: v = ops::Div::value(a, b); break;
            case OpCode::Neg: v = ops::Neg::value(a); break;
            case OpCode::PowK: v = ops::Pow::value(a, b); break;
#define PLATEAU_VALUE_CASE(T) \
    case OpCode::T: v = ops::T::value(a); break;
            PLATEAU_FUNCTIONS(PLATEAU_VALUE_CASE)
#undef PLATEAU_VALUE_CASE
            default: throw std::logic_error("non-constant op marked constant");
        }
        row(static_cast<std::size_t>(i))[0] = v;
    }
    for (const auto& [src, dst] : recip_) row(dst)[0] = 1.0 / row(src)[0];

    // Affine forms (coefficients of x_1..x_ns, then the constant part) of every affine slot, from the values
    // just computed: A, c of the right-hand sides and W, d of the affine outputs.
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states), w = ns + 1;
    form_.assign(tape_.code.size() * w, 0.0);
    for (std::size_t i = 0; i < tape_.code.size(); ++i) {
        if (!affine_[i]) continue;
        const Instr& in = tape_.code[i];
        double* f = form_.data() + i * w;
        if (in.constant) {
            f[ns] = row(i)[0];
            continue;
        }
        const double* fa = in.a >= 0 ? form_.data() + static_cast<std::size_t>(in.a) * w : nullptr;
        const double* fb = in.b >= 0 ? form_.data() + static_cast<std::size_t>(in.b) * w : nullptr;
        const double kb = in.b >= 0 ? row(static_cast<std::size_t>(in.b))[0] : 0.0;
        switch (in.op) {
            case OpCode::State: f[static_cast<std::size_t>(in.a)] = 1.0; break;
            case OpCode::Add: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] + fb[j]; break;
            case OpCode::Sub: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] - fb[j]; break;
            case OpCode::Neg: for (std::size_t j = 0; j < w; ++j) f[j] = -fa[j]; break;
            case OpCode::AddK: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] + (j == ns ? kb : 0.0); break;
            case OpCode::SubK: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] - (j == ns ? kb : 0.0); break;
            case OpCode::KSub:
                for (std::size_t j = 0; j < w; ++j) f[j] = (j == ns ? row(static_cast<std::size_t>(in.a))[0] : 0.0) - fb[j];
                break;
            case OpCode::MulK: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] * kb; break;
            case OpCode::DivK: for (std::size_t j = 0; j < w; ++j) f[j] = fa[j] / kb; break;
            default: break;
        }
    }
    for (std::size_t s = 0; s < ns; ++s) {
        const int r = tape_.rhs_slot[s];
        if (r < 0 || !affine_[static_cast<std::size_t>(r)]) continue;
        const double* f = form_.data() + static_cast<std::size_t>(r) * w;
        std::copy(f, f + ns, a_.begin() + static_cast<std::ptrdiff_t>(s * ns));
        c_[s] = f[ns];
    }
    // The non-zero entries of A by row, in column order: a sum that skips only exact zeros (0·x adds ±0 to a sum
    // that starts at +0) gives the dense sum bit for bit, and an augmented system (sensitivities) is mostly zeros.
    a_start_.assign(ns + 1, 0);
    a_col_.clear();
    a_val_.clear();
    for (std::size_t s = 0; s < ns; ++s) {
        for (std::size_t j = 0; j < ns; ++j)
            if (a_[s * ns + j] != 0.0) {
                a_col_.push_back(static_cast<std::uint32_t>(state_row_[j] * stride_));
                a_val_.push_back(a_[s * ns + j]);
            }
        a_start_[s + 1] = a_col_.size();
    }
    for (std::size_t j = 0; j < tape_.output_slot.size(); ++j) {
        if (!out_affine_[j]) continue;
        const double* f = form_.data() + static_cast<std::size_t>(tape_.output_slot[j]) * w;
        std::copy(f, f + ns, w_.begin() + static_cast<std::ptrdiff_t>(j * ns));
        d_[j] = f[ns];
    }
}

void Expander::eval_order(const std::vector<Op>& code, int n) {
    const std::size_t un = static_cast<std::size_t>(n);
    double* base = coef_.data();
    const double* inv = inv_.data();
    for (const Op& op : code) {
        double* r = base + op.r;
        const double* a = base + op.a;
        const double* b = base + op.b;
        // The hot loop calls each operation's inline rule (src/ops/); the constant-operand variants are the
        // operation's own cheaper forms.
        switch (op.op) {
            case OpCode::Add: ops::Add::series(r, a, b, un); break;
            case OpCode::Sub: ops::Sub::series(r, a, b, un); break;
            case OpCode::Neg: ops::Neg::series(r, a, un); break;
            case OpCode::AddK: ops::Add::series_k(r, a, b, un); break;
            case OpCode::SubK: ops::Sub::series_k(r, a, b, un); break;
            case OpCode::KSub: ops::Sub::series_ka(r, a, b, un); break;
            case OpCode::MulK: ops::Mul::series_k(r, a, b, un); break;
            case OpCode::Mul: ops::Mul::series(r, a, b, un); break;
            case OpCode::Div: ops::Div::series(r, a, b, un); break;
            case OpCode::PowK: ops::Pow::series(r, a, b, un); break;
#define PLATEAU_SERIES_CASE(T) \
    case OpCode::T: ops::T::series(r, a, un, inv); break;
            PLATEAU_FUNCTIONS(PLATEAU_SERIES_CASE)
#undef PLATEAU_SERIES_CASE
            default: break;  // Const, Param (constant), State, Time, DivK (decoded away): never here
        }
    }
}

void Expander::set_time(double t0) {
    for (std::size_t r : time_rows_) coef_[r * stride_] = t0;
}

void Expander::expand_generic(std::span<const double> x0, std::span<const double> u) {
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    for (std::size_t s = 0; s < ns; ++s) row(state_row_[s])[0] = x0[s];
    for (int n = 0; n <= order_; ++n) {
        eval_order(varying_, n);
        if (n == order_) break;
        const std::size_t un = static_cast<std::size_t>(n);
        const double inv = inv_[un + 1];
        for (std::size_t s = 0; s < ns; ++s) {
            const int fs = tape_.rhs_slot[s];
            double f = fs >= 0 ? row(static_cast<std::size_t>(fs))[un] : 0.0;
            if (n == 0 && !u.empty()) f += u[s];
            row(state_row_[s])[un + 1] = f * inv;
        }
    }
}

void Expander::expand_linear(std::span<const double> x0, std::span<const double> u) {
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    double* base = coef_.data();
    // x[1] = A·x[0] + c + u; x[n+1] = A·x[n]/(n+1).
    for (std::size_t s = 0; s < ns; ++s) base[state_row_[s] * stride_] = x0[s];
    for (std::size_t n = 0; n < static_cast<std::size_t>(order_); ++n) {
        const double inv = inv_[n + 1];
        for (std::size_t s = 0; s < ns; ++s) {
            double f = 0.0;
            for (std::size_t k = a_start_[s]; k < a_start_[s + 1]; ++k) f += a_val_[k] * base[a_col_[k] + n];
            if (n == 0) f += c_[s] + (u.empty() ? 0.0 : u[s]);
            base[state_row_[s] * stride_ + n + 1] = f * inv;
        }
    }
    if (!output_code_.empty())
        for (int n = 0; n <= order_; ++n) eval_order(output_code_, n);
}

void Expander::expand(double t0, std::span<const double> x0, std::span<const double> u, std::span<double> out) {
    const std::size_t ns = static_cast<std::size_t>(tape_.n_states);
    if (x0.size() != ns) throw std::invalid_argument("expand: wrong state size");
    if (out.size() != static_cast<std::size_t>(n_series()) * stride_)
        throw std::invalid_argument("expand: wrong output size");
    set_time(t0);
    if (linear_) expand_linear(x0, u);
    else expand_generic(x0, u);
    double* o = out.data();
    for (std::size_t s = 0; s < ns; ++s, o += stride_) std::copy_n(row(state_row_[s]), stride_, o);
    for (std::size_t j = 0; j < tape_.output_slot.size(); ++j, o += stride_) {
        if (linear_ && out_affine_[j]) {
            // y[n] = W_j·x[n] (+ d_j at order 0): the output's series without running its instructions.
            const double* wj = w_.data() + j * ns;
            for (std::size_t n = 0; n < stride_; ++n) {
                double v = n == 0 ? d_[j] : 0.0;
                for (std::size_t s = 0; s < ns; ++s) v += wj[s] * out[s * stride_ + n];
                o[n] = v;
            }
        } else {
            std::copy_n(row(static_cast<std::size_t>(tape_.output_slot[j])), stride_, o);
        }
    }
}

void Expander::outputs_at(double t, std::span<const double> x, std::span<double> out) {
    set_time(t);
    for (std::size_t s = 0; s < x.size(); ++s) row(state_row_[s])[0] = x[s];
    eval_order(varying_, 0);
    for (std::size_t j = 0; j < tape_.output_slot.size() && j < out.size(); ++j)
        out[j] = row(static_cast<std::size_t>(tape_.output_slot[j]))[0];
}

}  // namespace plateau::taylor
