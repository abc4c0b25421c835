// A compartment model as plain data. Built by input/ from a model file; read by sim/, taylor/, metrics/, report/.
// All values are canonical (mg, L, h). Expressions refer to parameters, compartments (amounts) and `t`.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "units/units.hpp"

namespace plateau::model {

struct Parameter {
    std::string name;
    double value = 0.0;      // canonical
    units::Dim dim{};
    std::string unit_text;   // as written in the file, for display ("L/h"); empty for dimensionless
    units::Unit unit{};      // parsed unit_text, for converting back
    std::string about;
    SourcePos pos;           // position of the value
};

struct Compartment {
    std::string name;
    std::string unit_text;   // an amount unit as written ("mg")
    units::Unit unit{};
    SourcePos pos;
};

struct Rate {                // d(amount)/dt of one compartment
    std::string text;
    expr::Ptr expr;          // null: no rate given (zero)
    SourcePos pos;           // position of the first character inside the string
};

struct Output {
    std::string name;
    std::string text;
    expr::Ptr expr;
    std::string unit_text;   // declared display unit ("mg/L", "ng/mL")
    units::Unit unit{};
    std::string about;
    SourcePos pos;
};

struct Route {
    std::string name;
    int into = -1;               // compartment index
    std::string fraction_text;   // expression over parameters; empty = 1
    expr::Ptr fraction;          // null = 1
    std::string lag_text;        // expression over parameters (a time); empty = none
    expr::Ptr lag;               // null = 0
    SourcePos pos;
};

struct Model {
    std::string id;
    std::string summary;
    std::string path;                 // file it came from (empty for models built in code)
    std::vector<Parameter> parameters;
    std::vector<Compartment> compartments;
    std::vector<Rate> rates;          // one per compartment, same order
    std::vector<Output> outputs;
    std::vector<Route> routes;

    int parameter_index(std::string_view name) const;
    int compartment_index(std::string_view name) const;
    int output_index(std::string_view name) const;
    int route_index(std::string_view name) const;
    std::vector<double> default_values() const;   // parameter values in order
};

// Evaluates a constant expression (fraction, lag) with the given parameter values.
double evaluate_constant(const Model& m, const expr::Node& e, const std::vector<double>& parameter_values);

}  // namespace plateau::model
