// The commands behind `plateau run`, `plateau check` and `plateau models`, as plain functions: each takes its
// options, writes results to `out` and problems to `err`, and returns the exit code. main.cpp only parses the
// command line into these structs; tests call the functions directly.
#pragma once

#include <cstdint>
#include <ostream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "regimen/regimen.hpp"
#include "cli/evaluate.hpp"
#include "sim/simulate.hpp"

namespace plateau::cli {

inline constexpr const char* kVersion = "0.1.0";

// Exit codes (documented in --help).
inline constexpr int kExitOk = 0;
inline constexpr int kExitBadInput = 1;
inline constexpr int kExitNumerical = 2;
inline constexpr int kExitInternal = 3;

// Tolerance range accepted by --tol.
inline constexpr double kMinTol = 1e-15;
inline constexpr double kMaxTol = 1e-3;

// A bad command-line value; the message is one line, without the "error: " prefix.
class UsageError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct RunOptions {
    std::string regimen;                  // regimen file
    double tol = 1e-10;                   // integration tolerance, kMinTol..kMaxTol
    std::string csv;                      // "" none, "-" standard output, else a file
    std::string times;                    // "" or a comma-separated list of times for the CSV ("0.5,1,2h,30min")
    std::string step;                     // "" or a duration overriding the regimen's grid step ("15min")
    std::vector<std::string> model_dirs;  // searched after the built-in models
    std::string json;                     // "" none, "-" standard output, else a file: every figure as JSON
    bool all_intervals = false;           // --intervals all: print every dosing interval
    bool clock = false;                   // --clock: times also as day and clock time (needs start_clock)
    std::vector<std::string> auc;         // extra AUC windows, "0h..24h"
    std::string report;                   // HTML report file
    std::string plot;                     // figure file (.png, .svg, .pdf)
    TargetOverrides targets;              // --above, --window, --above-for, --auc24
};

struct CompareOptions {
    std::vector<std::string> regimens;
    double tol = 1e-10;
    std::string json;                     // "" none, "-" standard output, else a file: an array of regimens
    std::string report;
    std::string plot;
    std::vector<std::string> auc;
    TargetOverrides targets;
    std::vector<std::string> model_dirs;
    std::string date;                     // "" = today (tests fix it for stable output)
};

struct PopulationOptions {
    std::vector<std::string> regimens;
    std::string cohort;                   // cohort file; "" = the regimen's patient for everyone
    std::size_t size = 1000;
    std::uint64_t seed = 1;
    int threads = 1;
    double tol = 1e-10;
    std::string json, csv, report, plot;  // "" none; json and csv may be "-" (standard output)
    std::string pta_curve;                // "0.25mg/L..64mg/L": PTA at doubling thresholds
    std::string thresholds;               // threshold distribution file: expected attainment
    TargetOverrides targets;
    std::vector<std::string> model_dirs;
    std::string date;                     // "" = today
    bool progress = true;                 // a progress line on standard error when it is a terminal
};

struct CheckOptions {
    std::vector<std::string> files;
    std::vector<std::string> model_dirs;
};

struct ModelsOptions {
    std::string id;  // "" lists every model
    std::vector<std::string> model_dirs;
};

struct DoseOptions {
    std::string regimen;                  // the template: model, route, targets, one repeating series
    double tol = 1e-10;
    TargetOverrides targets;              // as in run; --auc24 may be one value (hit exactly)
    std::string intervals;                // "6h,8h,12h" (default: the template's interval)
    std::string over;                     // "0.5h,4h", 0 = bolus (default: the template's infusion length)
    std::string round;                    // "250mg": doses rounded up to multiples of it
    bool loading = false;                 // also the loading dose
    std::string json;                     // "" none, "-" standard output, else a file
    std::string write;                    // the recommended regimen as a regimen file
    std::vector<std::string> model_dirs;
    // The population half: per candidate the smallest dose whose PTA reaches `pta` over virtual patients.
    std::string pta;                      // "90%" or "0.9"; "" = one patient (the template's)
    std::string cohort;                   // cohort file ("" = the template's patient, random effects only)
    std::size_t size = 1000;
    std::uint64_t seed = 1;
    int threads = 1;
};

struct FitOptions {
    std::string regimen;                  // the doses actually given and the patient's covariates
    std::string levels;                   // CSV of measured levels (input/load_levels.hpp)
    double tol = 1e-10;
    std::string json, report, plot;       // "" none; json may be "-" (standard output)
    std::string write;                    // the regimen with the individual estimates as overrides
    std::vector<std::string> model_dirs;
    std::string date;                     // "" = today
};

int run_command(const RunOptions& opt, std::ostream& out, std::ostream& err);
int compare_command(const CompareOptions& opt, std::ostream& out, std::ostream& err);
int population_command(const PopulationOptions& opt, std::ostream& out, std::ostream& err);
int check_command(const CheckOptions& opt, std::ostream& out, std::ostream& err);
int models_command(const ModelsOptions& opt, std::ostream& out, std::ostream& err);
int dose_command(const DoseOptions& opt, std::ostream& out, std::ostream& err);
int fit_command(const FitOptions& opt, std::ostream& out, std::ostream& err);

// Validators shared with main.cpp: "" when the text is acceptable, else a one-line message without the option
// name ("expected a number from 1e-15 to 1e-3, got 'abc'"). duration_problem also refuses times <= 0.
std::string tolerance_problem(std::string_view text);
std::string duration_problem(std::string_view text);

// A tolerance from text; throws UsageError.
double parse_tolerance(std::string_view text);
// A duration in hours: a plain number is hours, or a number with a time unit ("30min", "2 h", "1d").
// `what` names the option in messages ("--step"). Throws UsageError.
double parse_duration(std::string_view text, std::string_view what);
// A comma-separated list of times (each as in parse_duration, may be 0). Throws UsageError.
std::vector<double> parse_times(std::string_view text);

// The summary printed by `run`: regimen, model, doses, horizon, solver, the target output at the end, its
// maximum and AUC over the horizon, and the caution line.
void print_run_summary(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s, const RunOptions& opt);

// Greedy word wrap: the first line continues after `first_indent` columns already used, later lines start with
// `indent` spaces; no line longer than `width` unless a single word is.
std::string wrap_text(std::string_view text, std::size_t first_indent, std::size_t indent, std::size_t width = 100);

}  // namespace plateau::cli
