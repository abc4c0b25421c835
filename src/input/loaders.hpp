// Internal to input/: the validating builders behind load_model and load_regimen.
#pragma once

#include <string>
#include <vector>

#include "input/fields.hpp"
#include "model/model.hpp"
#include "regimen/regimen.hpp"

namespace plateau::input::detail {

// Builds a model from a parsed file, reporting every problem into c.sink.
model::Model build_model(Ctx& c);

// A route constant that is out of range with some parameter values: a fraction outside [0, 1], a lag below 0,
// or either not finite.
struct RouteConstantProblem {
    int route = -1;
    bool lag = false;   // false: the fraction
    double value = 0.0;
};
std::vector<RouteConstantProblem> route_constant_problems(const model::Model& m, const std::vector<double>& values);

// "the fraction of route 'oral' is 1.2" / "the lag of route 'oral' is -1 h".
std::string route_constant_message(const std::string& route_name, const RouteConstantProblem& p);
std::string route_constant_expected(const RouteConstantProblem& p);

// [patient]: the model's covariates for this patient, and the body size (wt, ht) per-size amounts use.
void load_patient(Ctx& c, const Value& table, const model::Model& m, regimen::Regimen& r);

// Sets the amount of each per-kg / per-m² dose entry for the patient; reports a missing weight or height.
void resolve_per_size(Ctx& c, regimen::Regimen& r);

// A height: "178 cm" or "1.78 m", in cm. Throws TextError.
double parse_height(std::string_view text);

// Resolves and loads the model a regimen names (see load.hpp). On failure reports into c.sink (the model
// file's own diagnostics are copied) and returns false.
bool resolve_model(Ctx& c, const Value& ref, const std::vector<std::string>& model_dirs, model::Model& out);

}  // namespace plateau::input::detail
