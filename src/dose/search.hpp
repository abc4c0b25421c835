// The dose search over candidate shapes (interval × infusion length): for each, the smallest maintenance dose
// meeting every target at steady state (or the dose hitting an exact target), rounded up to a preparable step
// and measured again there; optionally the loading dose; then the candidates ranked by daily dose.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "dose/goals.hpp"
#include "dose/shape.hpp"
#include "dose/solve.hpp"
#include "report/compare.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::dose {

// Simulates and measures one regimen (the command passes its single-regimen pipeline).
using Measure = std::function<report::Candidate(regimen::Regimen)>;

struct Request {
    std::vector<Shape> shapes;
    double round_step = 0.0;  // mg; 0 = no rounding
    bool loading = false;
};

enum class Outcome {
    Meets,        // every target met at the reported dose
    FallsShort,   // a dose was found, but some target is not met at it (exact goal, or rounding broke one)
    Infeasible,   // the lower goals need more than the upper goals allow: figures at the best compromise
    NonMonotone,  // a figure fell while the dose rose: no dose is trusted
    Unreachable,  // no dose reaches a goal (or no steady state)
};

struct Loading {
    double exact = 0.0;         // mg, solved
    double dose = 0.0;          // mg, rounded like the maintenance dose
    double first_value = 0.0;   // the matched figure over the first interval at `dose`
    double steady_value = 0.0;  // its steady-state value
    std::string figure;         // "trough" or "time above (h)"
    std::string problem;        // when it could not be solved
};

struct Found {
    Shape shape;
    Outcome outcome = Outcome::Unreachable;
    double exact = 0.0;                   // mg, the solved dose (or the compromise)
    double dose = 0.0;                    // mg, after rounding (= exact without rounding)
    std::string deciding;                 // label of the goal that set the dose
    std::string message;                  // plain words for anything but Meets
    std::optional<report::Candidate> at;  // measured at `dose` (absent when nothing could be measured)
    std::vector<verdict::Verdict> verdicts;
    std::optional<Loading> loading;
    double miss = 0.0;  // with an exact goal: |figure at `dose` − value| / value (rounding moves it)
    double daily() const { return dose * 24.0 / shape.tau; }
};

// One patient's doses meeting every target at steady state: from `need` to `cap` (both met; cap = +inf when no
// upper goal limits the dose). Outcome Meets, or Unreachable (no dose reaches a lower goal, or no steady state
// even at a thousandth of the template's dose: `no_steady_state`), Infeasible (need > cap), NonMonotone.
struct Limits {
    Outcome outcome = Outcome::Meets;
    bool no_steady_state = false;
    double need = 0.0, cap = 0.0;
};

// The limits for one shape, without an exact goal (a population search has none).
Limits limits(const Template& t, const std::vector<Goal>& goals, const Shape& s, const Measure& m);

// Searches every shape. `goals` must hold at least one lower or exact goal.
std::vector<Found> search(const Template& t, const std::vector<Goal>& goals, const Request& q, const Measure& m);

// Orders the candidates: those meeting every target first, then (with an exact goal) the closest to it at the
// dose given, then by daily dose. Returns the index of the recommended one (the first, when it meets every
// target), or −1.
int rank(std::vector<Found>& fs);

// The rule `rank` recommends by, in words.
std::string rule(const std::vector<Goal>& goals);

std::string outcome_name(Outcome o);

}  // namespace plateau::dose
