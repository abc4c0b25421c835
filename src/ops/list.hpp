// The list of elementary operations. Each has one file in src/ops/ holding everything about it: name, arity,
// dimension rule, evaluation, Taylor recurrence and derivative. The enums of expr/ and taylor/ and every switch
// over functions are generated from these lists, so a new function is its file plus one entry here.
// Light on purpose (macros only): expr/expr.hpp includes it.
#pragma once

// Operators of the grammar (infix and unary minus): their precedence lives in the parser, their rules in their files.
#define PLATEAU_OPERATORS(X) X(Add) X(Sub) X(Mul) X(Div) X(Pow) X(Neg)

// Functions of one argument, called as name(x). Adding one: src/ops/<name>.hpp (see exp.hpp), an entry here and
// its include in ops/table.hpp; tests/unit/test_ops.cpp checks it from the table.
#define PLATEAU_FUNCTIONS(X) X(Exp) X(Log) X(Sqrt)
