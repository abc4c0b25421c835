// The population half of the dose search: per candidate shape, the smallest dose whose probability of target
// attainment (PTA: every target met at steady state) reaches a share, on the same virtual patients at every dose
// (common random numbers: patient i has the same covariates and random effects whatever the dose).
//
// Exact, not a grid of doses: each patient's figures rise with the dose, so patient i meets every target exactly
// on [need_i, cap_i] (solved by the single-patient search to 1e-12 relative; cap_i = +inf without an upper goal),
// and PTA(D) = #{i : need_i <= D <= cap_i} / N. Without an upper goal the population dose is an order statistic
// of the need_i. Patients who meet the targets at no dose, have no steady state, whose figures are not monotone
// or whose run fails count as not attaining (never dropped).
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "dose/search.hpp"
#include "population/cohort.hpp"

namespace plateau::dose {

struct PopulationRequest {
    const population::Cohort* cohort = nullptr;  // null: the template's patient for everyone, random effects only
    std::size_t size = 1000;
    std::uint64_t seed = 1;
    int threads = 1;
    double share = 0.9;  // the PTA to reach, (0, 1]
};

// What the search found for one virtual patient.
enum class PatientStatus { Meets, NoDose, NoSteadyState, NotMonotone, Failed };

struct Patient {
    PatientStatus status = PatientStatus::Failed;
    double need = 0.0, cap = 0.0;  // mg, when Meets
};

// PTA at one dose.
struct PtaPoint {
    double dose = 0.0;  // mg
    std::size_t attained = 0, total = 0;
    double pta = 0.0;
    std::pair<double, double> ci95{0.0, 0.0};  // Wilson score interval, as `population` reports
};

struct PopulationDose {
    Shape shape;
    bool found = false;                 // some dose reaches the share
    double exact = 0.0;                 // mg: the smallest dose whose PTA reaches the share (an order statistic)
    PtaPoint at;                        // at the dose given (rounded up with a step); when not found: the best PTA
    std::optional<PtaPoint> step_down;  // one rounding step lower (below the share by construction)
    double median = 0.0;                // mg: median of need_i over the patients with one (NaN for none)
    std::size_t no_dose = 0, no_steady_state = 0, not_monotone = 0, failed = 0;
    double daily() const { return at.dose * 24.0 / shape.tau; }
    std::size_t cannot() const { return no_dose + no_steady_state + not_monotone + failed; }
};

// Patients attaining every target at `dose`.
std::size_t attaining(const std::vector<Patient>& ps, double dose);

// The population dose of one shape from its patients (exact counting; `step` > 0 rounds up to the smallest
// multiple whose PTA reaches the share).
PopulationDose population_dose(const Shape& s, const std::vector<Patient>& ps, double share, double step);

// Every patient of the population under every shape of the request: [shape][patient]. Spread over the processes
// of an MPI job (population/distribute.hpp) and over `threads` in each; only process 0 gets every patient.
// Throws std::invalid_argument for a cohort that does not fit the model, std::runtime_error for draws that
// stay outside the cohort's ranges.
std::vector<std::vector<Patient>> patients(const Template& t, const std::vector<Goal>& goals, const Request& q,
                                           const PopulationRequest& p, const Measure& m);

// Orders the candidates: those reaching the share first, by daily dose; then by the best PTA. Returns the index
// of the recommended one (the first, when it reaches the share), or −1.
int rank(std::vector<PopulationDose>& ds);

std::string population_rule(double share);

}  // namespace plateau::dose
