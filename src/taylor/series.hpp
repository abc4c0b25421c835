// Normalised Taylor coefficients x[n] = x^(n)(t0)/n! of every state and output, by the standard recurrences
// over the tape (Moore 1966; Griewank & Walther, Evaluating Derivatives, 2nd ed., ch. 13).
//
// Two executors share one coefficient array (slots × (order + 1), a slot's coefficients contiguous):
// - generic: the tape pre-decoded into (operation, result, operand offsets) with the constant slots and the
//   state/time reads taken out of the loop; one pass over the varying instructions per order;
// - linear: when every right-hand side is affine in the states with coefficients that depend on parameters
//   only (found from the expression graph), x[1] = A·x[0] + c + u and x[n+1] = A·x[n]/(n+1) for n ≥ 1, with A
//   and c evaluated once per parameter set. Outputs that are affine in the states are y[n] = W·x[n] (+ d at
//   n = 0); other outputs run the generic loop on the states' coefficients.
#pragma once

#include <cstdint>
#include <span>
#include <utility>
#include <vector>

#include "taylor/tape.hpp"

namespace plateau::taylor {

class Expander {
public:
    Expander(Tape tape, int order);

    // Parameter values, in the order of SystemSpec::params; recomputes the constant slots (and A, c, W, d).
    void set_params(std::span<const double> values);

    int order() const { return order_; }
    int n_states() const { return tape_.n_states; }
    int n_outputs() const { return static_cast<int>(tape_.output_slot.size()); }
    int n_series() const { return n_states() + n_outputs(); }
    const Tape& tape() const { return tape_; }

    // True when the right-hand sides are affine in the states with constant coefficients (the linear executor).
    bool linear() const { return linear_; }
    // A (n_states × n_states, row-major) of the linear executor; meaningful when linear().
    std::span<const double> linear_matrix() const { return a_; }
    // c of the linear executor (the constant part of the right-hand sides).
    std::span<const double> linear_offset() const { return c_; }
    // True when output j is affine in the states with constant coefficients: y = W_j·x + d_j.
    bool output_affine(int j) const { return out_affine_[static_cast<std::size_t>(j)] != 0; }
    // Row j of W (n_states values) and d_j; meaningful when output_affine(j).
    std::span<const double> output_weights(int j) const {
        return {w_.data() + static_cast<std::size_t>(j) * static_cast<std::size_t>(n_states()),
                static_cast<std::size_t>(n_states())};
    }
    double output_offset(int j) const { return d_[static_cast<std::size_t>(j)]; }

    // Expands around (t0, x0) with constant inputs u (one per state, added to its derivative; may be empty for
    // none). Writes n_series × (order + 1) coefficients, series-major: states first, then outputs.
    void expand(double t0, std::span<const double> x0, std::span<const double> u, std::span<double> out);

    // Order-0 values of the outputs at (t, x): the outputs evaluated without expanding.
    void outputs_at(double t, std::span<const double> x, std::span<double> out);

private:
    struct Op {
        OpCode op;
        std::uint32_t r, a, b;  // offsets of the result and operand rows in coef_
    };
    void eval_order(const std::vector<Op>& code, int n);
    void set_time(double t0);
    void expand_generic(std::span<const double> x0, std::span<const double> u);
    void expand_linear(std::span<const double> x0, std::span<const double> u);
    void analyse_linear();
    double* row(std::size_t slot) { return coef_.data() + slot * stride_; }

    Tape tape_;
    int order_;
    std::size_t stride_;
    std::vector<double> coef_;            // rows × (order + 1): the tape's slots, then extra state rows
    std::vector<std::size_t> state_row_;  // row holding each state's coefficients
    std::vector<std::size_t> time_rows_;  // rows of Time instructions
    std::vector<int> constant_;           // constant instruction indices, in order
    std::vector<Op> varying_;             // every varying instruction except State and Time, pre-decoded
    std::vector<Op> output_code_;         // the part of varying_ the non-affine outputs need (linear executor)
    std::vector<double> inv_;             // inv_[n] = 1/n, n = 1 .. order + 1
    std::vector<std::pair<std::size_t, std::size_t>> recip_;  // (constant row, row of its reciprocal)
    std::vector<double> params_;

    bool linear_ = false;
    std::vector<std::uint8_t> affine_;     // per slot: affine in the states with constant coefficients
    std::vector<std::uint8_t> out_affine_; // per output
    std::vector<double> a_, c_;            // A (n_states × n_states, row-major), c (n_states)
    std::vector<std::size_t> a_start_;     // A's non-zero entries: row s is [a_start_[s], a_start_[s + 1])
    std::vector<std::uint32_t> a_col_;     // offset of the column's state row in coef_
    std::vector<double> a_val_;
    std::vector<double> w_, d_;            // W (n_outputs × n_states), d (n_outputs)
    std::vector<double> form_;             // scratch: affine forms of every slot, (n_states + 1) each
};

}  // namespace plateau::taylor
