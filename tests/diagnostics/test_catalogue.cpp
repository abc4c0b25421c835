// The catalogue of bad input files: each file under cases/ has one defect (or, for the *-several files, a few),
// and the first diagnostic is checked to the letter, with its line and column. Messages and positions are
// this project's own contract; "common practice, no source" for all of them.
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>
#include <vector>

#include "core/diagnostic.hpp"
#include "diagnose.hpp"
#include "input/load.hpp"

namespace {

namespace fs = std::filesystem;
using plateau::Diagnostic;
using plateau::InputError;

const std::string kTests = PLATEAU_TEST_DIR;
const std::string kCases = kTests + "/diagnostics/cases/";
const std::vector<std::string> kModelDirs{kTests + "/data/models"};

struct Case {
    const char* file;
    bool regimen;
    int count;              // diagnostics expected
    const char* first;      // first line of the first diagnostic, path shortened to the file name
    const char* expected;   // its "expected" text; <tests> stands for the test directory
};

const Case kCatalogue[] = {
    {"model-compartment-volume.toml", false, 1,
     "model-compartment-volume.toml:13:12: error: compartment 'central' must hold an amount, but 'L' is a volume",
     "a mass unit, like \"mg\""},
    {"model-deep-parentheses.toml", false, 1,
     "model-deep-parentheses.toml:16:212: error: expression nested too deeply (more than 200 levels)",
     "at most 200 levels of parentheses, signs or powers"},
    {"model-duplicate-name.toml", false, 1,
     "model-duplicate-name.toml:13:1: error: duplicate name 'gut': already used by the parameter on line 10",
     "names unique across parameters, compartments and outputs"},
    {"model-empty.toml", false, 1,
     "model-empty.toml:1:1: error: empty file: no model in it",
     "a model file with id, [parameters], [compartments], [rates], [outputs] and [routes]"},
    {"model-exp-dimensioned.toml", false, 1,
     "model-exp-dimensioned.toml:17:34: error: exp of a dimensioned value (L) in 'exp(-v)'; its argument must be dimensionless",
     ""},
    {"model-fraction-above-one.toml", false, 1,
     "model-fraction-above-one.toml:23:36: error: the fraction of route 'oral' is 1.2 with the default parameter values",
     "a fraction from 0 to 1"},
    {"model-fraction-uses-compartment.toml", false, 1,
     "model-fraction-uses-compartment.toml:23:38: error: 'gut' cannot be used here: route fractions and lags may use parameters only",
     "one of: ka, cl, v, f, tlag"},
    {"model-lag-not-time.toml", false, 1,
     "model-lag-not-time.toml:23:47: error: the lag of route 'oral' must be a time, but it is a rate constant (1/time)",
     "a time: a parameter like \"tlag\" or a duration like \"30 min\""},
    {"model-id-after-table.toml", false, 1,
     "model-id-after-table.toml:5:1: error: 'id' is inside the [parameters] table that starts on line 4: in TOML, every key after a [header] line belongs to that table",
     "the line id = \"...\" at the top of the file, before the first [header]"},
    {"model-malformed.toml", false, 1,
     "model-malformed.toml:6:25: error: invalid TOML: error while parsing inline table: expected key or closing '}', saw '\\n'",
     ""},
    {"model-min-in-rate.toml", false, 1,
     "model-min-in-rate.toml:17:12: error: function 'min' is not allowed: a Taylor series cannot follow a kink or a jump; use a smooth expression",
     "exp, log or sqrt"},
    {"model-missing-id.toml", false, 1,
     "model-missing-id.toml:1:1: error: missing key 'id' in the model file",
     "id = \"<model name>\""},
    {"model-name-t.toml", false, 1,
     "model-name-t.toml:10:1: error: the name 't' is reserved",
     "a name other than t, exp, log, sqrt"},
    {"model-negative-lag.toml", false, 1,
     "model-negative-lag.toml:24:47: error: the lag of route 'oral' is -0.5 h with the default parameter values",
     "a lag of 0 h or more"},
    {"model-negative-volume.toml", false, 1,
     "model-negative-volume.toml:7:19: error: 'v' must be more than 0 (it is a volume), got -40 L",
     "a volume above 0 L"},
    {"model-no-outputs.toml", false, 1,
     "model-no-outputs.toml:19:1: error: no outputs in [outputs]",
     "at least one line like conc = { expr = \"central/v\", unit = \"mg/L\" }"},
    {"model-output-unit-mismatch.toml", false, 1,
     "model-output-unit-mismatch.toml:20:18: error: output 'conc' is an amount (mass), but its unit 'mg/L' is a concentration (mass/volume)",
     "an expression that is a concentration (mass/volume), or a unit that matches it"},
    {"model-output-parameter-wrong-unit.toml", false, 1,
     "model-output-parameter-wrong-unit.toml:20:18: error: output 'conc' is an input rate (mass/time), but its unit 'mg/L' is a concentration (mass/volume)",
     "an expression that is a concentration (mass/volume), or a unit that matches it"},
    {"model-parameter-wrong-unit.toml", false, 1,
     "model-parameter-wrong-unit.toml:17:12: error: cannot subtract mg^2/L from mg/h in 'ka*gut - cl/v*central'",
     "both sides in the same unit"},
    {"model-residual-additive-unit.toml", false, 1,
     "model-residual-additive-unit.toml:24:17: error: expected a concentration (mass/volume), got '0.2 mg' (mass)",
     "a concentration (mass/volume)"},
    {"model-residual-empty.toml", false, 1,
     "model-residual-empty.toml:23:1: error: [residual] gives neither a proportional nor an additive error",
     "proportional = \"15 %\", additive = \"0.2 mg/L\" (in the output's unit), or both"},
    {"model-residual-unknown-output.toml", false, 1,
     "model-residual-unknown-output.toml:24:11: error: [residual] is for unknown output 'cnc'; did you mean 'conc'?",
     "one of: conc"},
    {"model-residual-zero.toml", false, 1,
     "model-residual-zero.toml:24:17: error: the proportional error must be above 0 % and at most 1000 %",
     "a coefficient of variation like \"15 %\""},
    {"model-rate-cannot-add.toml", false, 1,
     "model-rate-cannot-add.toml:17:12: error: cannot subtract mg*L/h from mg/h in 'ka*gut - cl*central'",
     "both sides in the same unit"},
    {"model-rate-missing.toml", false, 1,
     "model-rate-missing.toml:13:1: error: no rate for compartment 'central'",
     "a line in [rates]: central = \"<expression>\" (\"0\" if it does not change)"},
    {"model-rate-unknown-compartment.toml", false, 1,
     "model-rate-unknown-compartment.toml:18:1: error: rate for unknown compartment 'periph'",
     "one of: gut, central"},
    {"model-rate-wrong-dimension.toml", false, 1,
     "model-rate-wrong-dimension.toml:16:12: error: the rate of compartment 'gut' is a rate constant (1/time), not an amount per time",
     "an amount per time (mg/h), like \"-cl/v*central\""},
    {"model-route-unknown-compartment.toml", false, 1,
     "model-route-unknown-compartment.toml:23:18: error: route 'oral' goes into unknown compartment 'stomach'",
     "one of: gut, central"},
    {"model-several.toml", false, 4,
     "model-several.toml:6:20: error: unknown unit 'litres' in '40 litres'",
     "a unit such as mg, L, h, mg/L, L/h, 1/h"},
    {"model-unknown-identifier.toml", false, 1,
     "model-unknown-identifier.toml:17:21: error: unknown identifier 'kel'",
     "one of: ka, cl, v, f, tlag, gut, central, t"},
    {"model-unknown-identifier-suggested.toml", false, 1,
     "model-unknown-identifier-suggested.toml:12:16: error: unknown identifier 'vv'; did you mean 'v'?",
     "one of: cl, v, central, t"},
    {"model-unknown-key-output.toml", false, 1,
     "model-unknown-key-output.toml:20:30: error: unknown key 'units' in output 'conc'; did you mean 'unit'?",
     "one of: expr, unit, about"},
    {"model-unknown-key-parameter.toml", false, 1,
     "model-unknown-key-parameter.toml:5:29: error: unknown key 'abut' in parameter 'ka'; did you mean 'about'?",
     "one of: value, about"},
    {"model-unknown-key-route.toml", false, 1,
     "model-unknown-key-route.toml:23:24: error: unknown key 'fractoin' in route 'oral'; did you mean 'fraction'?",
     "one of: into, fraction, lag"},
    {"model-unknown-key-top.toml", false, 1,
     "model-unknown-key-top.toml:3:1: error: unknown key 'sumary' in a model file; did you mean 'summary'?",
     "one of: id, summary, parameters, covariates, derived, compartments, rates, outputs, routes, variability, "
     "correlation, residual"},
    {"model-unknown-unit.toml", false, 1,
     "model-unknown-unit.toml:7:22: error: unknown unit 'litres' in '40 litres'",
     "a unit such as mg, L, h, mg/L, L/h, 1/h"},
    {"model-unknown-unit-suggested.toml", false, 1,
     "model-unknown-unit-suggested.toml:6:23: error: unknown unit 'hh' in '5 L/hh'; did you mean 'h'?",
     "a unit such as mg, L, h, mg/L, L/h, 1/h"},
    {"model-wrong-type-id.toml", false, 1,
     "model-wrong-type-id.toml:2:6: error: 'id' must be a string, not an integer",
     "id = \"<model name>\""},
    {"regimen-negative-clearance.toml", true, 1,
     "regimen-negative-clearance.toml:6:7: error: 'cl' cannot be negative (got -5 L/h): with a unit (L/h) it is a physical quantity",
     "a value of 0 or more"},
    {"regimen-above-wrong-unit.toml", true, 1,
     "regimen-above-wrong-unit.toml:13:12: error: expected a concentration (mass/volume), got '4 mg' (mass)",
     "a concentration (mass/volume)"},
    {"regimen-amount-number.toml", true, 1,
     "regimen-amount-number.toml:7:10: error: 'amount' must be a string, not an integer",
     "a string with a unit, like \"250 mg\""},
    {"regimen-amount-per-weight.toml", true, 1,
     "regimen-amount-per-weight.toml:5:1: error: an amount per kg needs the patient's weight",
     "[patient] wt = \"70 kg\" (or a model with a covariate wt)"},
    {"regimen-amount-time.toml", true, 1,
     "regimen-amount-time.toml:7:15: error: expected an amount (mass), got '500 h' (time)",
     "an amount (mass)"},
    {"regimen-clock-bad-time.toml", true, 1,
     "regimen-clock-bad-time.toml:9:7: error: 'at': not a time of day (00:00 to 23:59) in '25:30'",
     "a clock time like \"14:00\" (24-hour, HH:MM), or \"day 2 14:00\""},
    {"regimen-clock-without-start.toml", true, 1,
     "regimen-clock-without-start.toml:8:7: error: 'at' is a clock time, but the file does not say the clock time at t = 0",
     "start_clock = \"08:00\" at the top of the file (the clock time at t = 0), or a time since the start like \"6 h\""},
    {"regimen-count-and-until.toml", true, 1,
     "regimen-count-and-until.toml:10:10: error: 'count' and 'until' cannot both be given",
     "one of them: count = <number of doses> or until = \"<time>\""},
    {"regimen-count-float.toml", true, 1,
     "regimen-count-float.toml:9:9: error: 'count' must be an integer, not a float (1e+09)",
     "a whole number of doses from 1 to 100000, like 20"},
    {"regimen-count-huge.toml", true, 1,
     "regimen-count-huge.toml:9:9: error: 'count' is 1000000000, outside 1 to 100000",
     "a whole number of doses from 1 to 100000, like 20"},
    {"regimen-count-zero.toml", true, 1,
     "regimen-count-zero.toml:9:9: error: 'count' is 0, outside 1 to 100000",
     "a whole number of doses from 1 to 100000, like 20"},
    {"regimen-dose-after-horizon.toml", true, 1,
     "regimen-dose-after-horizon.toml:5:1: error: [[doses]] entry 1 (route 'oral'): dose 7 of 10, at 48 h, is at the end of the horizon, where it can have no effect",
     "a [horizon] until later than 72 h, or fewer doses"},
    {"regimen-every-alone.toml", true, 1,
     "regimen-every-alone.toml:8:10: error: 'every' needs 'count' or 'until' to say when the doses stop",
     "count = <number of doses> or until = \"<time>\" in this [[doses]] entry"},
    {"regimen-every-zero.toml", true, 1,
     "regimen-every-zero.toml:8:10: error: 'every' must be more than 0, got '0 h'",
     "an interval above 0, like \"8 h\""},
    {"regimen-horizon-20-years.toml", true, 1,
     "regimen-horizon-20-years.toml:16:10: error: the horizon '7305 d' (175320 h) is longer than 10 years",
     "at most 10 years (87660 h)"},
    {"regimen-inf-at.toml", true, 1,
     "regimen-inf-at.toml:10:7: error: 'inf' is not a finite number",
     "a finite number, e.g. '250 mg'"},
    {"regimen-late-too-late.toml", true, 1,
     "regimen-late-too-late.toml:10:27: error: 'by' must be more than 0 and less than the time to the next dose (8 h)",
     "a delay like \"2 h\""},
    {"regimen-missed-no-such-time.toml", true, 1,
     "regimen-missed-no-such-time.toml:11:12: error: 'missed': this [[doses]] entry has no dose at day 2 14:00",
     "a dose number from 1 to 6, or its time like \"day 3 22:00\" or \"16 h\""},
    {"regimen-missed-out-of-range.toml", true, 1,
     "regimen-missed-out-of-range.toml:10:11: error: 'missed': this [[doses]] entry has no dose 4",
     "a dose number from 1 to 3, or its time like \"16 h\""},
    {"regimen-missing-model-file.toml", true, 1,
     "regimen-missing-model-file.toml:3:10: error: cannot find the model file '../models/none.toml'",
     "a model file at <tests>/diagnostics/models/none.toml, <tests>/data/models/none.toml"},
    {"regimen-nan-amount.toml", true, 1,
     "regimen-nan-amount.toml:7:11: error: 'nan' is not a finite number",
     "a finite number, e.g. '250 mg'"},
    {"regimen-negative-amount.toml", true, 1,
     "regimen-negative-amount.toml:7:11: error: the amount must be more than 0, got '-500 mg'",
     "an amount above 0, like \"250 mg\""},
    {"regimen-model-after-table.toml", true, 1,
     "regimen-model-after-table.toml:6:1: error: 'model' is inside the [parameters] table that starts on line 4: in TOML, every key after a [header] line belongs to that table",
     "the line model = \"...\" at the top of the file, before the first [header]"},
    {"regimen-no-doses.toml", true, 1,
     "regimen-no-doses.toml:1:1: error: missing key 'doses' in the regimen file",
     "at least one [[doses]] section with route and amount, like route = \"iv\", amount = \"500 mg\""},
    {"regimen-over-and-rate.toml", true, 1,
     "regimen-over-and-rate.toml:11:9: error: 'over' and 'rate' cannot both be given",
     "one of them: over = \"<duration>\" or rate = \"<amount per time>\""},
    {"regimen-override-fraction.toml", true, 1,
     "regimen-override-fraction.toml:6:5: error: the fraction of route 'oral' is 1.5 with the parameter values of this regimen",
     "a fraction from 0 to 1"},
    {"regimen-override-lag.toml", true, 1,
     "regimen-override-lag.toml:6:9: error: 'tlag' cannot be negative (got -1 h): with a unit (min) it is a physical quantity",
     "a value of 0 or more"},
    {"regimen-override-unknown.toml", true, 1,
     "regimen-override-unknown.toml:6:1: error: unknown parameter 'kel' in model 'simple-oral'",
     "one of: ka, cl, v, f, tlag"},
    {"regimen-override-wrong-dimension.toml", true, 1,
     "regimen-override-wrong-dimension.toml:6:9: error: expected a clearance (volume/time), got '5 L' (volume)",
     "a clearance (volume/time)"},
    {"regimen-rate-per-area.toml", true, 1,
     "regimen-rate-per-area.toml:8:15: error: '100 mg/m^2/h' is a dose per body weight or surface area, which is not supported yet (it will come with patient covariates)",
     "the rate for this patient, like \"2 g/h\""},
    {"regimen-several.toml", true, 6,
     "regimen-several.toml:6:9: error: expected a clearance (volume/time), got '5 L' (volume)",
     "a clearance (volume/time)"},
    {"regimen-step-too-small.toml", true, 1,
     "regimen-step-too-small.toml:17:9: error: the output grid would have 1.728e+07 points",
     "at most 2000000 points: a step of at least 2.4e-05 h"},
    {"regimen-times-with-every.toml", true, 1,
     "regimen-times-with-every.toml:11:1: error: 'every' cannot be given with 'times'",
     "times = [...] with days = <number of days> (the times repeat every day from day 1)"},
    {"regimen-times-without-days.toml", true, 1,
     "regimen-times-without-days.toml:6:1: error: missing key 'days' in [[doses]] with 'times'",
     "days = <whole number of days from 1 to 100000>"},
    {"regimen-total-too-many.toml", true, 1,
     "regimen-total-too-many.toml:17:1: error: too many doses: 120003 in [[doses]] entries 1 to 3",
     "at most 100000 doses in all [[doses]] entries"},
    {"regimen-unknown-key-doses.toml", true, 1,
     "regimen-unknown-key-doses.toml:8:1: error: unknown key 'evry' in [[doses]]; did you mean 'every'?",
     "one of: route, amount, at, every, count, until, over, rate, times, days, missed, late, doubled"},
    {"regimen-unknown-key-horizon.toml", true, 1,
     "regimen-unknown-key-horizon.toml:16:1: error: unknown key 'unitl' in [horizon]; did you mean 'until'?",
     "one of: until, step"},
    {"regimen-unknown-key-targets.toml", true, 1,
     "regimen-unknown-key-targets.toml:13:1: error: unknown key 'abov' in [targets]; did you mean 'above'?",
     "one of: output, above, above_for, window, auc24"},
    {"regimen-unknown-key-top.toml", true, 1,
     "regimen-unknown-key-top.toml:4:1: error: unknown key 'abuot' in a regimen file; did you mean 'about'?",
     "one of: id, model, about, start_clock, parameters, patient, doses, targets, horizon"},
    {"regimen-unknown-model.toml", true, 1,
     "regimen-unknown-model.toml:3:10: error: unknown model 'simple-orl'; did you mean 'simple-oral'?",
     "one of: simple-oral, two-comp-iv; or a path to a .toml file relative to this regimen"},
    {"regimen-unknown-output.toml", true, 1,
     "regimen-unknown-output.toml:12:11: error: unknown output 'cnc' in model 'simple-oral'; did you mean 'conc'?",
     "one of: conc, conc_ng"},
    {"regimen-unknown-route.toml", true, 1,
     "regimen-unknown-route.toml:6:10: error: unknown route 'orla'; did you mean 'oral'?",
     "one of: oral, iv"},
    {"regimen-until-too-many.toml", true, 1,
     "regimen-until-too-many.toml:9:10: error: 'until' gives 144000 doses in this [[doses]] entry",
     "at most 100000 doses"},
    {"regimen-window-reversed.toml", true, 1,
     "regimen-window-reversed.toml:14:10: error: the low end of 'window' ('20 mg/L') is above its high end ('10 mg/L')",
     "window = [low, high] with 0 <= low <= high, like [\"10 mg/L\", \"20 mg/L\"]"},
    {"regimen-zero-amount.toml", true, 1,
     "regimen-zero-amount.toml:7:11: error: the amount must be more than 0, got '0 mg'",
     "an amount above 0, like \"250 mg\""},
};

// Diagnostics that carry a note at another place: the file, and the note's first line.
struct NoteCase {
    const char* file;
    const char* note;
};

const NoteCase kNotes[] = {
    {"model-parameter-wrong-unit.toml",
     "model-parameter-wrong-unit.toml:6:19: note: 'cl' is an amount (mass) here; this rate needs a clearance (volume/time)"},
    {"model-output-parameter-wrong-unit.toml",
     "model-output-parameter-wrong-unit.toml:8:19: note: 'vc' is a duration (time) here; output 'conc' (mg/L) needs a volume"},
    {"model-rate-cannot-add.toml",
     "model-rate-cannot-add.toml:6:19: note: 'cl' is a clearance (volume/time) here; this rate needs a rate constant (1/time)"},
};

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
    for (std::size_t p = s.find(from); p != std::string::npos; p = s.find(from, p + to.size())) s.replace(p, from.size(), to);
    return s;
}

// Runs the loader on a file and returns its diagnostics (empty if it loaded).
std::vector<Diagnostic> diagnose(const std::string& path, bool regimen) {
    return plateau::test::diagnose(path, regimen, kModelDirs);
}

std::string first_line(const Diagnostic& d, const std::string& dir) {
    std::string s = plateau::format_diagnostic(d);
    s = s.substr(0, s.find('\n'));
    return replace_all(s, dir, "");
}

}  // namespace

TEST_CASE("input: every bad file in the catalogue gives its exact first diagnostic", "[input][diagnostics]") {
    // Every file of the cases directory is in the table.
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(kCases))
        if (e.path().extension() == ".toml") ++files;
    CHECK(files == std::size(kCatalogue));
    CHECK(std::size(kCatalogue) >= 30);

    for (const Case& c : kCatalogue) {
        INFO("case " << c.file);
        REQUIRE(fs::exists(kCases + c.file));
        std::vector<Diagnostic> ds = diagnose(kCases + c.file, c.regimen);
        REQUIRE(!ds.empty());
        CHECK(static_cast<int>(ds.size()) == c.count);
        CHECK(first_line(ds.front(), kCases) == c.first);
        CHECK(replace_all(ds.front().expected, kTests, "<tests>") == c.expected);
        // Every diagnostic names its file, line and column.
        for (const auto& d : ds) {
            CHECK(d.pos.file == kCases + c.file);
            CHECK(d.pos.line > 0);
            CHECK(d.pos.col > 0);
        }
    }
}

TEST_CASE("input: a wrong dimension gets a note at the parameter that would fix it", "[input][diagnostics]") {
    for (const NoteCase& c : kNotes) {
        INFO("case " << c.file);
        std::vector<Diagnostic> ds = diagnose(kCases + c.file, false);
        REQUIRE(ds.size() == 1);
        REQUIRE(ds.front().notes.size() == 1);
        // The note is printed after the error, with its own location, source line and caret.
        const std::string text = replace_all(plateau::format_diagnostics(ds), kCases, "");
        const std::size_t at = text.find(c.note);
        CHECK(at != std::string::npos);
        const std::size_t caret = text.find('^', at);
        REQUIRE(caret != std::string::npos);
        CHECK(text.compare(caret - 2, 2, "  ") == 0);  // under the value, on the line after the note's source line
    }
    // "-ka" where "-ka*gut" was meant: ka has the right unit in the other rate, so it gets no note.
    std::vector<Diagnostic> ds = diagnose(kCases + "model-rate-wrong-dimension.toml", false);
    REQUIRE(ds.size() == 1);
    CHECK(ds.front().notes.empty());
}
