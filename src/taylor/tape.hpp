// A model's right-hand sides and outputs as one flat tape of elementary operations (a DAG with shared
// subexpressions, in topological order), ready for Taylor-coefficient recurrences. Knows nothing of doses.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "expr/expr.hpp"

namespace plateau::taylor {

// What to compile: names of the states and parameters, one right-hand side per state (null = 0) and the
// outputs. Identifiers in the expressions: states, parameters and `t`.
struct SystemSpec {
    std::vector<std::string> states;
    std::vector<std::string> params;
    std::vector<expr::Ptr> rhs;
    std::vector<expr::Ptr> outputs;
};

enum class OpCode : std::uint8_t {
    Const,     // k
    Param,     // parameter a
    State,     // state a
    Time,      // t
    Add, Sub, Mul, Div, Neg,
    AddK,      // slot a + constant slot b          (b has order 0 only)
    SubK,      // slot a − constant slot b
    KSub,      // constant slot a − slot b
    MulK,      // slot a × constant slot b
    DivK,      // slot a ÷ constant slot b
#define PLATEAU_OPCODE(T) T,
    PLATEAU_FUNCTIONS(PLATEAU_OPCODE)  // functions of one argument (ops/list.hpp): slot a
#undef PLATEAU_OPCODE
    PowK,      // slot a ^ constant slot b (b's order-0 value)
};

struct Instr {
    OpCode op = OpCode::Const;
    int a = -1;
    int b = -1;
    double k = 0.0;        // Const value
    bool constant = false; // depends on constants and parameters only: one coefficient, computed once
};

struct Tape {
    int n_states = 0;
    int n_params = 0;
    std::vector<Instr> code;      // slot i is the result of code[i]
    std::vector<int> rhs_slot;    // per state; −1 = zero right-hand side
    std::vector<int> output_slot; // per output
    std::vector<std::string> state_names;
};

// Merges all expressions into one DAG (structurally equal subexpressions share a slot), folds constants and
// chooses the cheap variants (×k, +k) where one operand is constant. Whole-number powers (up to 64) become
// products, negative ones a quotient, so states that start at zero stay analytic. Throws std::invalid_argument on an unknown
// identifier (input/ has already reported such errors with file positions).
Tape compile(const SystemSpec& spec);

}  // namespace plateau::taylor
