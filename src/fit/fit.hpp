// The individual (maximum a posteriori) fit of a model's random effects η to measured levels:
//   objective(η) = −2 log posterior = Σ_i [(y_i − f_i)²/σ_i² + ln σ_i²] + ηᵀ Ω⁻¹ η   (constants left out)
// with σ_i² from the model's [residual] table, and, for a level below its quantification limit L (Beal, J
// Pharmacokinet Pharmacodyn 2001, method M3), the term −2 ln Φ((L − f_i)/σ_i) instead. Covariates stay fixed.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "model/model.hpp"
#include "sim/events.hpp"
#include "sim/simulate.hpp"

namespace plateau::fit {

struct Observation {
    double t = 0.0;          // h
    double y = 0.0;          // canonical; for a censored level, its quantification limit
    bool below = false;      // below the quantification limit
};

struct Problem {
    const model::Model* model = nullptr;
    std::vector<double> base;              // parameter values before the random effects (overrides, covariates)
    std::vector<sim::Dose> doses;
    int output = 0;
    model::Residual residual;
    std::vector<Observation> obs;
    double t_end = 0.0;                    // simulate to here (≥ every level time)
    sim::Options options;
};

// One term of the objective at prediction f: its value, df-derivative and the Gauss–Newton (expected
// information) weight, so that Σ weight·JᵀJ approximates the Hessian.
struct Term {
    double value = 0.0;
    double slope = 0.0;
    double weight = 0.0;
};
Term term(const model::Residual& r, const Observation& o, double f);

// −2 ln Φ(z) and its derivative in z, accurate far into the lower tail.
double minus_two_log_cdf(double z);
double minus_two_log_cdf_slope(double z);

// The parameter values of a subject with random effects η (model::individualize on `base`) and their exact
// derivatives: jac[i * n + k] = ∂value_i/∂η_k (n = η count). Varied parameters by their spread's derivative,
// derived parameters by the chain rule through their expressions.
std::vector<double> individual_values(const Problem& p, const std::vector<double>& eta);
std::vector<double> parameter_jacobian(const model::Model& m, const std::vector<double>& base, const std::vector<double>& eta);

struct Evaluation {
    bool ok = false;                       // the simulation finished
    std::vector<double> f;                 // predictions at the levels
    double objective = 0.0;
    std::vector<double> gradient;          // n
    std::vector<double> hessian;           // n×n, Gauss–Newton (expected information), row-major
    std::vector<double> jac;               // levels × n: ∂f/∂η
};

// The objective at η; with `derivatives`, also its gradient and Gauss–Newton Hessian.
Evaluation evaluate(const Problem& p, const std::vector<double>& eta, bool derivatives);

struct Start {
    std::vector<double> from;
    std::vector<double> eta;
    double objective = 0.0;
    int iterations = 0;
    bool converged = false;
};

struct Estimate {
    int index = -1;                        // parameter index
    double value = 0.0;                    // individual estimate
    double population = 0.0;               // the same patient at η = 0 (covariates applied)
    double se = 0.0;                       // approximate standard error (Laplace, delta method)
};

struct Result {
    std::vector<double> eta;
    std::vector<double> eta_se;
    std::vector<double> covariance;        // of η, n×n: 2·H⁻¹ (the inverse of half the Hessian)
    std::vector<double> values;            // every parameter's individual value
    std::vector<Estimate> estimates;       // the parameters that η moves, in model order
    std::vector<double> pred;              // at each level
    std::vector<double> sd;                // σ at each level
    double objective = 0.0;
    int iterations = 0;
    bool converged = false;
    std::vector<Start> starts;
    std::vector<std::string> notes;        // disagreeing starts, a flat optimum
};

// Levenberg–Marquardt from several starts (η = 0 and ±1.5 ω along each axis); the best is the result.
// Throws NumericalError when the model cannot be simulated at η = 0.
Result fit(const Problem& p);

// The fitted curve and its 90 % band at `times`: `draws` samples of the Laplace posterior N(η̂, covariance)
// (Philox keyed on `seed` and the draw number), the 5th and 95th percentile at each time. Canonical units.
struct Band {
    std::vector<double> times, fitted, population, low, high;
    int draws = 0;
    int failed = 0;                        // draws whose simulation failed (left out)
};
Band band(const Problem& p, const Result& r, const std::vector<double>& times, int draws = 200, std::uint64_t seed = 1);

}  // namespace plateau::fit
