// What every operation file shares: the form of a dimension rule's answer and the unit wording of messages.
#pragma once

#include <charconv>
#include <cstddef>
#include <string>

#include "units/units.hpp"

namespace plateau::ops {

// The answer of a dimension rule: the result's dimension, or a problem. In `problem`, "@" stands for the
// expression being checked and "#" for its second operand (expr/analyze.cpp puts their text there).
struct DimOut {
    units::Dim dim{};
    std::string problem;        // empty: fine
    std::string expected;       // what would be accepted (may be empty)
    bool blame_operand = false; // the error points at the second operand (an exponent), not the whole expression
};

inline DimOut dim_ok(units::Dim d) { return DimOut{d, {}, {}, false}; }

// A unit for a message: "a dimensionless number" or the canonical unit.
inline std::string unit_text(units::Dim d) {
    return d.dimensionless() ? "a dimensionless number" : units::canonical_unit(d);
}

// A number as printed in expressions and messages (shortest form that reads back exactly).
inline std::string number_text(double v) {
    char buf[64];
    const auto res = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, res.ptr);
}

}  // namespace plateau::ops
