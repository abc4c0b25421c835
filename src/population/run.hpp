// A virtual population through one or more regimens: subject i has the same covariates and random effects under
// every regimen (common random numbers), so regimen differences are not Monte Carlo noise. Each subject is
// simulated, measured and reduced to its figures; its step polynomials are dropped, only the values on a coarse
// grid are kept (as float) for the bands.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "population/cohort.hpp"
#include "regimen/regimen.hpp"
#include "sim/simulate.hpp"

namespace plateau::population {

struct Setup {
    const Cohort* cohort = nullptr;  // null: the regimen's patient (or the model's typical covariates) for all
    std::size_t size = 1000;
    std::uint64_t seed = 1;
    int threads = 1;
    sim::Options options;
    int band_points = 241;           // grid over each regimen's horizon for the bands
    std::function<void(std::size_t done)> progress;   // called from worker threads now and then (may be empty)
    // This process's share (population/distribute.hpp): subjects first, first + stride, ...; the others are left
    // empty in the result.
    std::size_t first = 0, stride = 1;
};

enum class Status : std::uint8_t { Ok, NoSteadyState, Failed };

// A subject's figures under one regimen (canonical units; NaN where a figure does not exist).
struct Figures {
    Status status = Status::Ok;
    double first_peak = 0.0;      // peak of the first dosing interval
    double ss_peak = 0.0, ss_trough = 0.0, ss_average = 0.0, ss_auc24 = 0.0;
    double above_pct = 0.0;       // time above the threshold at steady state, % of the interval
    double first_reached = 0.0;   // time the threshold is first reached (h)
    double level = 0.0;           // highest threshold this subject meets (kept for the PTA curve)
    std::vector<signed char> met; // per target: 1 met, 0 not, −1 not assessed
};

struct Subject {
    std::vector<double> covariates;   // cohort values, in Cohort::names() order (empty without a cohort)
    std::vector<double> eta;          // random effects, in the model's variability order
    std::vector<std::vector<double>> parameters;   // per regimen: every parameter's value
    std::vector<double> weight_kg;    // per regimen: the body size the per-kg amounts used
};

struct Result {
    std::vector<Subject> subjects;
    std::vector<std::vector<Figures>> figures;   // [regimen][subject]
    std::vector<std::vector<float>> bands;       // [regimen] subject-major, band_points per subject
    std::vector<std::vector<double>> band_times; // [regimen]
    std::vector<std::string> covariate_names;
};


// How `run` draws subjects for one model and cohort, prepared once: subject i's covariates and random effects,
// and its parameter values and body size under a regimen. Other searches over the same virtual patients (the dose
// search) use it, so subject i is the same patient everywhere. Throws std::invalid_argument for a cohort
// covariate the model does not have.
class Drawer {
public:
    Drawer(const model::Model& m, const Cohort* cohort, std::uint64_t seed);
    // Subject i's covariates (cohort order) and random effects into `sub`.
    void draw(std::size_t i, Subject& sub) const;
    // The subject's parameter values under a regimen whose own values are `base` (its overrides and patient
    // applied: Regimen::parameter_values()); `body` gets the body size its per-kg and per-m² amounts use.
    std::vector<double> values(const regimen::Regimen& r, const std::vector<double>& base, const Subject& sub,
                               regimen::BodySize& body) const;
    const std::vector<std::string>& covariate_names() const { return names_; }

private:
    struct Slot {
        int param = -1;
        bool weight = false, height = false;
    };
    const model::Model* model_;
    const Cohort* cohort_;
    std::uint64_t seed_;
    std::vector<std::string> names_;
    std::vector<Slot> slots_;
    std::vector<double> cov_chol_, eta_chol_;
};

// Runs the population. All regimens must use the same model (the same random effects apply). Throws
// std::invalid_argument for a cohort covariate the model does not have.
Result run(const std::vector<regimen::Regimen>& regimens, const Setup& setup);

}  // namespace plateau::population
