// Normalised Taylor coefficients x[n] = x^(n)(t0)/n! of every state and output, by the standard recurrences
// over the tape (Moore 1966; Griewank & Walther, Evaluating Derivatives, 2nd ed., ch. 13).
#pragma once

#include <span>
#include <vector>

#include "taylor/tape.hpp"

namespace plateau::taylor {

class Expander {
public:
    Expander(Tape tape, int order);

    // Parameter values, in the order of SystemSpec::params; recomputes the constant slots.
    void set_params(std::span<const double> values);

    int order() const { return order_; }
    int n_states() const { return tape_.n_states; }
    int n_outputs() const { return static_cast<int>(tape_.output_slot.size()); }
    int n_series() const { return n_states() + n_outputs(); }
    const Tape& tape() const { return tape_; }

    // Expands around (t0, x0) with constant inputs u (one per state, added to its derivative; may be empty for
    // none). Writes n_series × (order + 1) coefficients, series-major: states first, then outputs.
    void expand(double t0, std::span<const double> x0, std::span<const double> u, std::span<double> out);

    // Order-0 values of the outputs at (t, x): the outputs evaluated without expanding.
    void outputs_at(double t, std::span<const double> x, std::span<double> out);

private:
    void eval_order(int n);
    double* slot(int s) { return coef_.data() + static_cast<std::size_t>(s) * stride_; }

    Tape tape_;
    int order_;
    std::size_t stride_;
    std::vector<double> coef_;       // slots × (order + 1)
    std::vector<int> varying_;       // non-constant instruction indices, in order
    std::vector<int> constant_;      // constant instruction indices, in order
    std::vector<double> params_;
    std::vector<double> state_coef_; // states × (order + 1)
};

}  // namespace plateau::taylor
