#include "taylor/tape.hpp"

#include <cmath>
#include <map>
#include <stdexcept>
#include <tuple>
#include <vector>

namespace plateau::taylor {

namespace {

class Builder {
public:
    explicit Builder(const SystemSpec& spec) : spec_(spec) {
        tape_.n_states = static_cast<int>(spec.states.size());
        tape_.n_params = static_cast<int>(spec.params.size());
        tape_.state_names = spec.states;
    }

    Tape finish() { return std::move(tape_); }

    int emit(Instr in) {
        auto key = std::make_tuple(static_cast<int>(in.op), in.a, in.b, in.k);
        auto it = memo_.find(key);
        if (it != memo_.end()) return it->second;
        tape_.code.push_back(in);
        int slot = static_cast<int>(tape_.code.size()) - 1;
        memo_.emplace(key, slot);
        return slot;
    }

    bool is_const(int s) const { return tape_.code[static_cast<std::size_t>(s)].constant; }
    bool is_number(int s, double v) const {
        const auto& in = tape_.code[static_cast<std::size_t>(s)];
        return in.op == OpCode::Const && in.k == v;
    }

    int constant(double k) { return emit({OpCode::Const, -1, -1, k, true}); }

    int binary(OpCode op, int a, int b) {
        const bool ca = is_const(a), cb = is_const(b);
        if (ca && cb) {
            // Fold two numbers right away; parameter expressions stay symbolic (their values can change).
            const auto& ia = tape_.code[static_cast<std::size_t>(a)];
            const auto& ib = tape_.code[static_cast<std::size_t>(b)];
            if (ia.op == OpCode::Const && ib.op == OpCode::Const) {
                switch (op) {
                    case OpCode::Add: return constant(ia.k + ib.k);
                    case OpCode::Sub: return constant(ia.k - ib.k);
                    case OpCode::Mul: return constant(ia.k * ib.k);
                    case OpCode::Div: return constant(ia.k / ib.k);
                    default: break;
                }
            }
            return emit({op, a, b, 0.0, true});
        }
        switch (op) {
            case OpCode::Add:
                if (is_number(a, 0.0)) return b;
                if (is_number(b, 0.0)) return a;
                if (ca) return emit({OpCode::AddK, b, a, 0.0, false});
                if (cb) return emit({OpCode::AddK, a, b, 0.0, false});
                break;
            case OpCode::Sub:
                if (is_number(b, 0.0)) return a;
                if (ca) return emit({OpCode::KSub, a, b, 0.0, false});
                if (cb) return emit({OpCode::SubK, a, b, 0.0, false});
                break;
            case OpCode::Mul:
                if (is_number(a, 1.0)) return b;
                if (is_number(b, 1.0)) return a;
                if (ca) return emit({OpCode::MulK, b, a, 0.0, false});
                if (cb) return emit({OpCode::MulK, a, b, 0.0, false});
                break;
            case OpCode::Div:
                if (is_number(b, 1.0)) return a;
                if (cb) return emit({OpCode::DivK, a, b, 0.0, false});
                break;
            default: break;
        }
        return emit({op, a, b, 0.0, false});
    }

    int unary(OpCode op, int a) { return emit({op, a, -1, 0.0, is_const(a)}); }

    int power(int base, const expr::Node& exponent_node, int exponent) {
        if (auto v = expr::fold_number(exponent_node)) {
            const double k = *v;
            if (k == 0.0) return constant(1.0);
            if (k == 0.5) return unary(OpCode::Sqrt, base);
            // Whole powers become products (binary exponentiation), negative ones a quotient: they stay
            // analytic where the base is zero, which the general recurrence (it divides by the base) is not.
            if (k == std::floor(k) && std::abs(k) <= 64.0) {
                long m = static_cast<long>(std::abs(k));
                int result = -1, square = base;
                while (m > 0) {
                    if (m & 1) result = result < 0 ? square : binary(OpCode::Mul, result, square);
                    m >>= 1;
                    if (m > 0) square = binary(OpCode::Mul, square, square);
                }
                return k > 0 ? result : binary(OpCode::Div, constant(1.0), result);
            }
        }
        if (!is_const(exponent)) throw std::invalid_argument("exponent must be constant over time");
        return emit({OpCode::PowK, base, exponent, 0.0, is_const(base)});
    }

    int lookup(const std::string& name) {
        for (std::size_t i = 0; i < spec_.states.size(); ++i)
            if (spec_.states[i] == name) return emit({OpCode::State, static_cast<int>(i), -1, 0.0, false});
        for (std::size_t i = 0; i < spec_.params.size(); ++i)
            if (spec_.params[i] == name) return emit({OpCode::Param, static_cast<int>(i), -1, 0.0, true});
        if (name == "t") return emit({OpCode::Time, -1, -1, 0.0, false});
        throw std::invalid_argument("unknown identifier '" + name + "'");
    }

    int build(const expr::Node& n) {
        using expr::Op;
        switch (n.op) {
            case Op::Num: return constant(n.num);
            case Op::Var: return lookup(n.name);
            case Op::Add:
            case Op::Sub:
            case Op::Mul:
            case Op::Div: {
                // A loop along the chain of a long sum or product: one recursive call per term overflows the stack.
                std::vector<const expr::Node*> chain;
                int acc = build(*expr::left_chain(n, chain));
                for (auto it = chain.rbegin(); it != chain.rend(); ++it) {
                    const expr::Node& c = **it;
                    const OpCode code = c.op == Op::Add ? OpCode::Add
                                        : c.op == Op::Sub ? OpCode::Sub
                                        : c.op == Op::Mul ? OpCode::Mul
                                                          : OpCode::Div;
                    acc = binary(code, acc, build(*c.b));
                }
                return acc;
            }
            case Op::Neg: {
                int a = build(*n.a);
                if (tape_.code[static_cast<std::size_t>(a)].op == OpCode::Const)
                    return constant(-tape_.code[static_cast<std::size_t>(a)].k);
                return unary(OpCode::Neg, a);
            }
#define PLATEAU_BUILD_CASE(T) \
    case Op::T: return unary(OpCode::T, build(*n.a));
            PLATEAU_FUNCTIONS(PLATEAU_BUILD_CASE)
#undef PLATEAU_BUILD_CASE
            case Op::Pow: {
                int base = build(*n.a);
                int e = build(*n.b);
                return power(base, *n.b, e);
            }
        }
        throw std::logic_error("unhandled expression node");
    }

private:
    const SystemSpec& spec_;
    Tape tape_;
    std::map<std::tuple<int, int, int, double>, int> memo_;
};

}  // namespace

Tape compile(const SystemSpec& spec) {
    if (spec.rhs.size() != spec.states.size())
        throw std::invalid_argument("compile: one right-hand side per state is required");
    Builder b(spec);
    std::vector<int> rhs, outs;
    for (const auto& e : spec.rhs) rhs.push_back(e ? b.build(*e) : -1);
    for (const auto& e : spec.outputs) {
        if (!e) throw std::invalid_argument("compile: null output expression");
        outs.push_back(b.build(*e));
    }
    Tape t = b.finish();
    t.rhs_slot = std::move(rhs);
    t.output_slot = std::move(outs);
    return t;
}

}  // namespace plateau::taylor
