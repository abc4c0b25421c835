// A compartment model as plain data. Built by input/ from a model file; read by sim/, taylor/, metrics/, report/.
// All values are canonical (mg, L, h). Expressions refer to parameters, compartments (amounts) and `t`.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "units/units.hpp"

namespace plateau::model {

// Where a parameter's value comes from. Covariates and derived parameters are parameters to the engine (one
// constant slot each on the tape); they differ only in how a subject's value is set, once per subject.
enum class ParamKind { Fixed, Covariate, Derived };

struct Parameter {
    std::string name;
    ParamKind kind = ParamKind::Fixed;
    std::string expr_text;   // Derived: the expression as written
    expr::Ptr expr;          // Derived: over fixed parameters, covariates and earlier derived parameters
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

// Between-subject variability of one parameter: a random effect η ~ N(0, ω²) (jointly normal with the others).
enum class Spread {
    LogNormal,    // typical × exp(η)               ("30 %": CV, ω² = ln(1 + CV²))
    LogitNormal,  // logistic(logit(typical) + η)   (fractions that must stay inside (0, 1))
    Normal,       // typical + η                     (ω in the parameter's canonical unit)
};

struct Variability {
    std::string name;
    int index = -1;            // parameter index
    Spread spread = Spread::LogNormal;
    double omega = 0.0;        // standard deviation of η
    double cv = 0.0;           // LogNormal: the coefficient of variation as written (fraction)
    std::string text;          // as written, for display ("30 %")
    SourcePos pos;
};

// The residual error of measured levels of one output (an individual fit's likelihood): a level y is normal
// around the prediction f with variance σ² = additive² + (proportional·f)².
struct Residual {
    int output = -1;               // output index the levels measure
    double additive = 0.0;         // canonical unit of the output; 0 = none
    double proportional = 0.0;     // fraction of the prediction; 0 = none
    std::string additive_text;     // as written ("0.2 mg/L"), for display
    std::string proportional_text; // as written ("15 %")
    SourcePos pos;                 // the [residual] table
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
    std::vector<Variability> variability;   // in file order
    std::vector<double> correlation;        // variability.size()² row-major; empty = independent
    std::optional<Residual> residual;       // [residual]; absent: the model cannot be fitted to levels

    int parameter_index(std::string_view name) const;
    int compartment_index(std::string_view name) const;
    int output_index(std::string_view name) const;
    int route_index(std::string_view name) const;
    std::vector<double> default_values() const;   // parameter values in order
};

// The model's parameter values for one subject: `values` holds every parameter (covariates set to the
// subject's), derived parameters are recomputed from them in order, then the random effects `eta` (one per
// variability entry, may be empty = typical subject) are applied. Fixed parameters get theirs before the derived
// ones are computed, so a derived parameter sees a varied input.
void individualize(const Model& m, std::vector<double>& values, std::span<const double> eta);

// The covariance Ω of the random effects (ω_i ω_j ρ_ij), row-major.
std::vector<double> omega_matrix(const Model& m);

// Lower Cholesky factor of a symmetric n×n matrix (row-major); empty if it is not positive definite.
std::vector<double> cholesky(const std::vector<double>& a, std::size_t n);

// Evaluates a constant expression (fraction, lag) with the given parameter values.
double evaluate_constant(const Model& m, const expr::Node& e, const std::vector<double>& parameter_values);

}  // namespace plateau::model
