// A dosing regimen as plain data. Built by input/ from a regimen file. All values canonical (mg, L, h).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "core/diagnostic.hpp"
#include "model/model.hpp"

namespace plateau::regimen {

// How a dose amount is written: a fixed amount, per kg of body weight, or per m² of body-surface area.
enum class Per { None, Kg, M2 };

// A change to one dose of a series, as the patient took it: missed, taken late, or doubled.
struct Deviation {
    enum class Kind { Missed, Late, Doubled };
    Kind kind = Kind::Missed;
    long number = 0;          // 1-based dose number within its [[doses]] entry, in time order
    double delay = 0.0;       // h, for Late
    SourcePos pos;
};

// One [[doses]] entry: a single dose (count = 1), a series of `count` doses one `every` apart, or a daily
// pattern of clock times (several offsets within each `every`).
struct DoseSpec {
    std::string route;
    int route_index = -1;
    double amount = 0.0;      // mg, before the route's fraction (a per-size amount resolved for the patient)
    Per per_size = Per::None; // the amount as written is per kg of body weight or per m² of body-surface area
    double per_amount = 0.0;  // mg per kg or per m² when `per_size` is set
    double at = 0.0;          // h, start of the first repetition
    double every = 0.0;       // h, 0 for a single dose
    long count = 1;           // number of repetitions (from `count`, `until` or `days`)
    std::vector<double> offsets{0.0};  // h, sorted, within [0, every): the doses of one repetition
    double over = 0.0;        // h, infusion / zero-order input duration; 0 = bolus
    std::vector<Deviation> deviations;
    SourcePos pos;            // position of the [[doses]] table

    long doses() const { return count * static_cast<long>(offsets.size()); }  // doses as prescribed
    // Nominal time of dose number n (1-based, in time order), before any deviation.
    double dose_time(long n) const;
    double first_time() const { return at + offsets.front(); }
    double last_time() const { return dose_time(doses()); }
};

struct Targets {
    std::string output;                          // empty: the model's first output
    std::optional<double> above;                 // canonical output unit
    std::optional<std::pair<double, double>> window;
    std::optional<double> above_for;                   // fraction of each interval above `above` at steady
                                                       // state that meets the target (absent: the whole interval)
    std::optional<std::pair<double, double>> auc24;    // steady-state AUC over 24 h that meets the target
    SourcePos pos;
};

struct Horizon {
    double until = 0.0;       // h
    double step = 0.25;       // h, sampling grid for CSV and plots only
    SourcePos pos;
};

struct Override {
    std::string name;
    int index = -1;           // parameter index in the model
    double value = 0.0;
    SourcePos pos;
};

// One value of the [patient] table: a model covariate, or the body size the per-kg / per-m² amounts use.
struct PatientValue {
    std::string name;
    int index = -1;           // parameter index of the model's covariate; −1 for body size only (wt, ht)
    double value = 0.0;       // canonical (mg for a weight), or cm for the height
    SourcePos pos;
};

// The body size that per-kg and per-m² amounts resolve against.
struct BodySize {
    double weight_kg = 0.0;   // 0 = unknown
    double height_cm = 0.0;   // 0 = unknown
};

// Body-surface area in m² by the Mosteller formula (N Engl J Med 1987; 317:1098): √(height cm × weight kg / 3600).
double bsa_mosteller(double weight_kg, double height_cm);

// The amount of one dose entry for a body size (mg); `amount` for a fixed amount.
double resolved_amount(const DoseSpec& d, const BodySize& b);

// The names of the body-size values: weight (a covariate or a [patient] mass) and height (cm or m).
inline constexpr const char* kWeightName = "wt";
inline constexpr const char* kHeightName = "ht";

// Something in the file that runs, but not as written (shown as "file:line:col: warning: ...").
struct Warning {
    SourcePos pos;
    std::string message;
};

struct Regimen {
    std::string id;
    std::optional<double> start_clock;   // h after midnight at t = 0, when the file states it
    std::string about;
    std::string path;             // file it came from
    std::string model_ref;        // as written
    model::Model model;           // resolved and loaded
    std::vector<Override> overrides;
    std::vector<PatientValue> patient;   // [patient]
    std::vector<double> subject_values;  // when set: every parameter's value for a virtual subject, used as is
    std::vector<DoseSpec> doses;
    Targets targets;
    Horizon horizon;
    std::vector<Warning> warnings;

    // Model defaults with the overrides and the patient's covariates applied, derived parameters recomputed
    // (or subject_values when set).
    std::vector<double> parameter_values() const;
    // The patient's body size: [patient] wt / ht, else the model's typical covariate wt.
    BodySize body_size() const;
};

// Limits enforced by input/ (documented in the README).
inline constexpr double kMaxHorizonHours = 10.0 * 365.25 * 24.0;  // 10 years
inline constexpr long kMaxDoses = 100000;
inline constexpr long kMaxGridPoints = 2000000;

}  // namespace plateau::regimen
