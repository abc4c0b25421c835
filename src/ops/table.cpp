#include "ops/table.hpp"

#include <stdexcept>

#include "ops/all.hpp"

namespace plateau::ops {

namespace {

#define PLATEAU_OPERATOR_ENTRY(T) Entry{expr::Op::T, T::name, T::arity, false, expr::Op::T == expr::Op::Pow},
#define PLATEAU_FUNCTION_ENTRY(T) Entry{expr::Op::T, T::name, T::arity, true, false},
const Entry kAll[] = {PLATEAU_OPERATORS(PLATEAU_OPERATOR_ENTRY) PLATEAU_FUNCTIONS(PLATEAU_FUNCTION_ENTRY)};
#undef PLATEAU_OPERATOR_ENTRY
#undef PLATEAU_FUNCTION_ENTRY

}  // namespace

std::span<const Entry> all() { return kAll; }

const Entry& entry(expr::Op op) {
    for (const Entry& e : kAll)
        if (e.op == op) return e;
    throw std::logic_error("ops::entry: not an operation");
}

std::optional<expr::Op> function_named(std::string_view name) {
    for (const Entry& e : kAll)
        if (e.function && name == e.name) return e.op;
    return std::nullopt;
}

std::vector<std::string> function_names() {
    std::vector<std::string> out;
    for (const Entry& e : kAll)
        if (e.function) out.emplace_back(e.name);
    return out;
}

std::string function_phrase() {
    const std::vector<std::string> names = function_names();
    std::string out;
    for (std::size_t i = 0; i < names.size(); ++i) {
        if (i > 0) out += i + 1 == names.size() ? " or " : ", ";
        out += names[i];
    }
    return out;
}

double value(expr::Op op, double a, double b) {
    switch (op) {
#define PLATEAU_VALUE_CASE(T) \
    case expr::Op::T: return T::value(a, b);
        PLATEAU_OPERATORS(PLATEAU_VALUE_CASE)
        PLATEAU_FUNCTIONS(PLATEAU_VALUE_CASE)
#undef PLATEAU_VALUE_CASE
        case expr::Op::Num:
        case expr::Op::Var: break;
    }
    throw std::logic_error("ops::value: not an operation");
}

expr::Ptr derivative(const expr::Ptr& self, const expr::Ptr& da, const expr::Ptr& db) {
    switch (self->op) {
#define PLATEAU_DERIVATIVE_CASE(T) \
    case expr::Op::T: return T::derivative(self, da, db);
        PLATEAU_OPERATORS(PLATEAU_DERIVATIVE_CASE)
        PLATEAU_FUNCTIONS(PLATEAU_DERIVATIVE_CASE)
#undef PLATEAU_DERIVATIVE_CASE
        case expr::Op::Num:
        case expr::Op::Var: break;
    }
    throw std::logic_error("ops::derivative: not an operation");
}

}  // namespace plateau::ops
