// Expressions in model files: parsing, and dimension inference. No evaluation semantics beyond the tree.
#pragma once

#include <cstddef>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "ops/list.hpp"
#include "units/units.hpp"

namespace plateau::expr {

// Leaves (numbers, identifiers), then the operations of ops/list.hpp (each described in its file in src/ops/).
#define PLATEAU_OP_ENUM(T) T,
enum class Op { Num, Var, PLATEAU_OPERATORS(PLATEAU_OP_ENUM) PLATEAU_FUNCTIONS(PLATEAU_OP_ENUM) };
#undef PLATEAU_OP_ENUM

struct Node;
using Ptr = std::shared_ptr<const Node>;

struct Node {
    Op op = Op::Num;
    double num = 0.0;      // Op::Num
    std::string name;      // Op::Var
    Ptr a, b;              // operands (a for unary ops and functions)
    std::size_t begin = 0; // source span [begin, end) in the parsed text, 0-based byte offsets
    std::size_t end = 0;

    Node() = default;
    Node(const Node&) = default;
    Node& operator=(const Node&) = default;
    ~Node();  // frees long chains with a loop, not one nested call per node
};

// Parses +, -, *, /, ^ (right-associative, binds tighter than unary minus on its left: -x^2 = -(x^2)),
// unary minus and plus, parentheses, numbers (1, 1.5, .5, 1e-3, 2.5E+4), identifiers ([A-Za-z_][A-Za-z0-9_]*),
// and calls of the functions in ops/list.hpp (exp(x), log(x) natural, sqrt(x), ...). Any other function name (min, max, abs, ...) is rejected with a
// message saying a Taylor series cannot cross a kink or jump. Nesting deeper than 200 levels is an error.
// Throws plateau::TextError with the offset of the problem.
Ptr parse(std::string_view text);

// Dimension of an identifier, or nullopt if unknown.
using DimLookup = std::function<std::optional<units::Dim>(std::string_view name)>;

// Infers the dimension of `e`. Errors (TextError with the span of the offending sub-expression):
// unknown identifier; adding/subtracting unlike dimensions ("cannot add mg/L and mg"); exp/log/sqrt of a
// dimensioned value (sqrt allows even exponents); an exponent that is dimensioned; an exponent that is not a
// numeric constant when the base has a dimension; a non-integer constant exponent of a dimensioned base.
// `is_constant(name)` tells whether an identifier is constant over time (parameters are; compartments and `t`
// are not): exponents may only use constants.
units::Dim infer_dim(const Node& e, const DimLookup& lookup,
                     const std::function<bool(std::string_view)>& is_constant);

// The sums, differences, products and quotients down the left side of `e` (`e` first, appended to `chain`) and
// the operand below the last of them (`e` itself if it is none of these). A walk that loops over the chain and
// recurses only into right operands and other operations recurses as deep as the nesting (bounded by the
// parser), not once per term: a 10 000-term rate is a left-deep chain 10 000 long.
const Node* left_chain(const Node& e, std::vector<const Node*>& chain);

// Every identifier used, in order of first appearance.
std::vector<std::string> identifiers(const Node& e);

// The expression as text (fully parenthesised where needed), for messages and the report.
std::string to_string(const Node& e);

// Folds a constant expression of numbers only; nullopt if it uses an identifier.
std::optional<double> fold_number(const Node& e);

}  // namespace plateau::expr

namespace plateau::expr {

// Value of an identifier for evaluate(); throws if unknown.
using ValueLookup = std::function<double(std::string_view name)>;

// Evaluates `e` in double arithmetic (used for constant expressions such as a route's fraction or lag).
double evaluate(const Node& e, const ValueLookup& value);

}  // namespace plateau::expr
