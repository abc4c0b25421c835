// Command-line parsing only: fills the option structs of cli/commands.hpp and calls the commands.
#include <CLI/CLI.hpp>

#include <algorithm>
#include <exception>
#include <iostream>
#include <string>
#include <vector>

#include "cli/commands.hpp"
#include "core/suggest.hpp"
#include "population/distribute.hpp"

namespace {

namespace cli = plateau::cli;

const char* const kExitCodes =
    "Exit codes: 0 ok, 1 bad input (files or options), 2 numerical failure, 3 internal error.";

std::string footer(const std::string& example) { return "\nExample:\n" + example + "\n\n" + kExitCodes; }

CLI::Validator tolerance_validator() {
    return CLI::Validator([](std::string& s) { return cli::tolerance_problem(s); }, "", "TOL");
}

// Counts and seeds are unsigned: without this, "-5" would wrap around to 18446744073709551611.
CLI::Validator whole_number_validator() {
    return CLI::Validator(
        [](std::string& s) {
            return s.find_first_not_of("0123456789") == std::string::npos && !s.empty()
                       ? std::string()
                       : "expected a whole number of 0 or more, got '" + s + "'";
        },
        "", "N");
}

CLI::Validator duration_validator() {
    return CLI::Validator([](std::string& s) { return cli::duration_problem(s); }, "", "DURATION");
}

void add_targets(CLI::App* app, cli::TargetOverrides& t) {
    app->add_option("--above", t.above, "Threshold for time above, e.g. 4mg/L (overrides the files)")->type_name("CONC");
    app->add_option("--window", t.window, "Therapeutic window, e.g. 10mg/L..20mg/L (overrides the files)")
        ->type_name("LOW..HIGH");
    app->add_option("--above-for", t.above_for, "Share of each interval above the threshold that meets it, e.g. 50%")
        ->type_name("SHARE");
    app->add_option("--auc24", t.auc24, "Steady-state AUC24 range that meets the target, e.g. 400..600")
        ->type_name("LOW..HIGH");
    app->add_option("--output", t.output, "The model output the figures are about (default: the files' target)")
        ->type_name("NAME");
}

void add_outputs(CLI::App* app, std::string& json, std::string& report, std::string& plot,
                 std::vector<std::string>& auc) {
    app->add_option("--json", json, "Write every figure as JSON to FILE ('-': standard output)")->type_name("FILE");
    app->add_option("--report", report, "Write a self-contained, printable HTML report")->type_name("FILE.html");
    app->add_option("--plot", plot, "Write the concentration-time figure (.png, .svg or .pdf)")->type_name("FILE");
    app->add_option("--auc", auc, "Also report the AUC over this window, e.g. 0h..24h (repeatable)")
        ->type_name("FROM..TO")
        ->expected(1)
        ->allow_extra_args(false)
        ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
}

void add_model_dirs(CLI::App* app, std::vector<std::string>& dirs) {
    app->add_option("--models", dirs, "Also look for models in DIR (repeatable)")
        ->type_name("DIR")
        ->check(CLI::ExistingDirectory)  // a misspelt folder would otherwise be skipped without a word
        ->expected(1)
        ->allow_extra_args(false)  // one directory per --models, so positionals after it stay positionals
        ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
}

// The parser library's wording for the mistakes people make, in plain words: an option given twice, an
// argument that is not an option of this command (with the closest one).
std::string plain_words(const CLI::ParseError& e, const CLI::App* sub) {
    const std::string what = e.what();
    const std::string at_most = ": At Most 1 required but received ";
    if (const auto p = what.find(at_most); p != std::string::npos) {
        const std::string name = what.substr(0, p);
        const std::string n = what.substr(p + at_most.size());
        return name + " given " + (n == "2" ? std::string("twice") : n + " times") + "; give it once";
    }
    const std::string extras = "not expected: ";
    if (const auto p = what.find(extras); sub != nullptr && p != std::string::npos) {
        std::vector<std::string> names;
        for (const CLI::Option* o : sub->get_options())
            for (const auto& l : o->get_lnames()) names.push_back("--" + l);
        // The library lists them last first. Values after an unknown option are that option's: name the option.
        std::vector<std::string> args;
        for (std::size_t start = p + extras.size(); start < what.size();) {
            const std::size_t space = std::min(what.find(' ', start), what.size());
            args.insert(args.begin(), what.substr(start, space - start));
            start = space + 1;
        }
        const bool any_option = std::any_of(args.begin(), args.end(), [](const std::string& a) { return !a.empty() && a[0] == '-'; });
        std::string out;
        for (const auto& arg : args) {
            if (arg.empty() || (any_option && arg[0] != '-')) continue;
            if (!out.empty()) out += "; ";
            if (arg[0] == '-')
                out += "unknown option '" + arg + "' for '" + sub->get_name() + "'" +
                       plateau::did_you_mean(arg.substr(0, arg.find('=')), names);
            else
                out += "unexpected argument '" + arg + "' ('" + sub->get_name() + "' takes " +
                       (sub->get_name() == "models" ? "one model id or model file" : "one regimen file") + ")";
        }
        return out;
    }
    return what;
}

}  // namespace

static int plateau_main(int argc, char** argv) {
    CLI::App app{"plateau: dosing regimens through compartment models, with peaks, troughs and AUC\n"
                 "taken exactly from the polynomials of high-order Taylor series steps."};
    app.name("plateau");
    app.set_version_flag("--version", std::string("plateau ") + cli::kVersion);
    app.require_subcommand(1);
    app.get_formatter()->column_width(26);
    app.footer(footer("  plateau compare a.toml b.toml --report report.html\n"
                      "  plateau run my-regimen.toml --csv out.csv --step 10min\n"
                      "  plateau check models/*.toml my-regimen.toml\n"
                      "  plateau models one-compartment-oral"));

    cli::RunOptions run_opt;
    CLI::App* run = app.add_subcommand("run", "Simulate a regimen and print a summary (optionally a CSV)");
    run->add_option("regimen", run_opt.regimen, "Regimen file (.toml)")->required()->type_name("REGIMEN");
    run->add_option("--tol", run_opt.tol, "Integration tolerance, 1e-15 to 1e-3 (default 1e-10)")
        ->check(tolerance_validator())
        ->type_name("TOL");
    run->add_option("--csv", run_opt.csv, "Write the sampled trajectory to FILE ('-': standard output)")
        ->type_name("FILE");
    run->add_option("--times", run_opt.times, "CSV at these times only: 0.5,1,2h,30min (plain numbers: hours)")
        ->type_name("LIST");
    run->add_option("--step", run_opt.step, "CSV grid step instead of the regimen's, e.g. 15min")
        ->check(duration_validator())
        ->type_name("DURATION");
    std::string intervals;
    run->add_option("--intervals", intervals, "'all' prints every dosing interval, not the first and last few")
        ->check(CLI::Validator(
            [](std::string& v) { return v == "all" || v == "some" ? std::string() : "expected 'all' or 'some', got '" + v + "'"; },
            "", "all"))
        ->type_name("all|some");
    run->add_flag("--clock", run_opt.clock, "Also show times as day and clock time (the file's start_clock)");
    add_outputs(run, run_opt.json, run_opt.report, run_opt.plot, run_opt.auc);
    add_targets(run, run_opt.targets);
    add_model_dirs(run, run_opt.model_dirs);
    run->footer(footer("  plateau run my-regimen.toml\n"
                       "  plateau run my-regimen.toml --csv out.csv --step 10min\n"
                       "  plateau run my-regimen.toml --csv - --times 0.5,1,2h,1d\n"
                       "  plateau run my-regimen.toml --json - --auc 0h..24h --above 4mg/L\n"
                       "  plateau run my-regimen.toml --report report.html --plot curve.png\n"
                       "With --csv - or --json -, that output goes to standard output and the summary to standard\n"
                       "error."));

    cli::CompareOptions cmp_opt;
    CLI::App* cmp = app.add_subcommand("compare", "Compare regimens side by side (table, targets, report)");
    cmp->add_option("regimens", cmp_opt.regimens, "Regimen files (.toml) sharing one output")
        ->required()
        ->type_name("REGIMEN...");
    cmp->add_option("--tol", cmp_opt.tol, "Integration tolerance, 1e-15 to 1e-3 (default 1e-10)")
        ->check(tolerance_validator())
        ->type_name("TOL");
    add_outputs(cmp, cmp_opt.json, cmp_opt.report, cmp_opt.plot, cmp_opt.auc);
    add_targets(cmp, cmp_opt.targets);
    add_model_dirs(cmp, cmp_opt.model_dirs);
    cmp->footer(footer("  plateau compare a.toml b.toml c.toml --report report.html --plot overlay.png\n"
                       "  plateau compare a.toml b.toml --above 2mg/L --above-for 50% --json -\n"
                       "Regimens may differ in anything but must share the output and its unit."));

    cli::PopulationOptions pop_opt;
    CLI::App* pop = app.add_subcommand("population", "Virtual patients through regimens: PTA, percentiles, bands");
    pop->add_option("regimens", pop_opt.regimens, "Regimen files (.toml) of one model")->required()->type_name("REGIMEN...");
    pop->add_option("--cohort", pop_opt.cohort, "Cohort file: the covariates of the virtual patients")->type_name("FILE");
    pop->add_option("--size", pop_opt.size, "Number of virtual patients (default 1000)")->check(whole_number_validator())->type_name("N");
    pop->add_option("--seed", pop_opt.seed, "Seed: the same seed gives the same patients (default 1)")->check(whole_number_validator())->type_name("S");
    pop->add_option("--threads", pop_opt.threads, "Threads (the output does not depend on it; default 1)")->check(whole_number_validator())->type_name("N");
    pop->add_option("--tol", pop_opt.tol, "Integration tolerance, 1e-15 to 1e-3 (default 1e-10)")
        ->check(tolerance_validator())
        ->type_name("TOL");
    pop->add_option("--csv", pop_opt.csv, "One row per patient and regimen ('-': standard output)")->type_name("FILE");
    pop->add_option("--pta-curve", pop_opt.pta_curve, "PTA at doubling thresholds, e.g. 0.25mg/L..64mg/L")->type_name("LOW..HIGH");
    pop->add_option("--thresholds", pop_opt.thresholds, "Threshold distribution file: the expected attainment")->type_name("FILE");
    std::vector<std::string> pop_auc;
    add_outputs(pop, pop_opt.json, pop_opt.report, pop_opt.plot, pop_auc);
    pop->remove_option(pop->get_option("--auc"));
    add_targets(pop, pop_opt.targets);
    add_model_dirs(pop, pop_opt.model_dirs);
    pop->footer(footer("  plateau population a.toml b.toml --cohort cohorts/adults.toml --size 2000 --above 4mg/L\n"
                       "  plateau population a.toml --above 2mg/L --pta-curve 0.25mg/L..64mg/L --json - --threads 2"));

    cli::CheckOptions check_opt;
    CLI::App* check = app.add_subcommand("check", "Validate model, regimen, cohort and threshold files without simulating");
    check->add_option("files", check_opt.files, "Model, regimen, cohort or threshold-distribution files")
        ->required()
        ->type_name("FILE");
    add_model_dirs(check, check_opt.model_dirs);
    check->footer(footer("  plateau check my-model.toml my-regimen.toml"));

    cli::ModelsOptions models_opt;
    CLI::App* models = app.add_subcommand("models", "List the available models, or describe one");
    models->add_option("id", models_opt.id, "Model id, or path of a model file, to describe")->type_name("ID|FILE");
    add_model_dirs(models, models_opt.model_dirs);
    models->footer(footer("  plateau models\n  plateau models two-compartment-iv --models ./my-models\n"
                          "  plateau models ./my-models/my-model.toml"));

    cli::DoseOptions dose_opt;
    CLI::App* dose = app.add_subcommand("dose", "Find the dose per interval and infusion length that meets the targets");
    dose->add_option("regimen", dose_opt.regimen, "Template regimen file (.toml) with one repeating series")
        ->required()
        ->type_name("REGIMEN");
    dose->add_option("--intervals", dose_opt.intervals, "Candidate intervals, e.g. 6h,8h,12h,24h")->type_name("LIST");
    dose->add_option("--over", dose_opt.over, "Candidate infusion lengths, e.g. 0.5h,3h,4h (0: bolus)")->type_name("LIST");
    dose->add_option("--round", dose_opt.round, "Round doses up to a multiple of this amount, e.g. 250mg")
        ->type_name("AMOUNT");
    dose->add_flag("--loading", dose_opt.loading, "Also the loading dose that starts at the steady-state trough");
    dose->add_option("--write", dose_opt.write, "Write the recommended regimen as a regimen file")->type_name("FILE.toml");
    dose->add_option("--json", dose_opt.json, "Write every candidate as JSON to FILE ('-': standard output)")
        ->type_name("FILE");
    dose->add_option("--tol", dose_opt.tol, "Integration tolerance, 1e-15 to 1e-3 (default 1e-10)")
        ->check(tolerance_validator())
        ->type_name("TOL");
    dose->add_option("--pta", dose_opt.pta, "Per candidate the smallest dose whose PTA reaches this share, e.g. 90%")
        ->type_name("SHARE");
    dose->add_option("--cohort", dose_opt.cohort, "Virtual patients for --pta (default: the template's patient, "
                                                  "random effects only)")->type_name("FILE");
    dose->add_option("--size", dose_opt.size, "Virtual patients for --pta (default 1000)")->check(whole_number_validator())->type_name("N");
    dose->add_option("--seed", dose_opt.seed, "Seed of the virtual patients (default 1)")->check(whole_number_validator())->type_name("S");
    dose->add_option("--threads", dose_opt.threads, "Worker threads for --pta (default 1)")->check(whole_number_validator())->type_name("N");
    add_targets(dose, dose_opt.targets);
    add_model_dirs(dose, dose_opt.model_dirs);
    dose->footer(footer("  plateau dose regimens/zelmarin-q8h-4h.toml --round 250mg\n"
                        "  plateau dose my-regimen.toml --intervals 6h,8h,12h --over 0.5h,4h --above 4mg/L --loading\n"
                        "  plateau dose my-regimen.toml --auc24 400 --round 250mg --write found.toml\n"
                        "  plateau dose regimens/zelmarin-pop-q8h-4h.toml --cohort cohorts/zelmarin-adults.toml --pta 90% "
                        "--round 250mg\n"
                        "--auc24 with one value asks for that AUC24 exactly; a range asks for a dose inside it."));

    cli::FitOptions fit_opt;
    CLI::App* fit = app.add_subcommand("fit", "Individual parameters from measured levels (maximum a posteriori)");
    fit->add_option("regimen", fit_opt.regimen, "Regimen file (.toml): the doses given and the patient")
        ->required()
        ->type_name("REGIMEN");
    fit->add_option("--levels", fit_opt.levels, "Measured levels (CSV: time_h and a column like conc_mg_per_L)")
        ->required()
        ->type_name("LEVELS.csv");
    fit->add_option("--write", fit_opt.write, "Write the regimen with the individual estimates as overrides")
        ->type_name("FILE.toml");
    fit->add_option("--tol", fit_opt.tol, "Integration tolerance, 1e-15 to 1e-3 (default 1e-10)")
        ->check(tolerance_validator())
        ->type_name("TOL");
    std::vector<std::string> fit_auc;
    add_outputs(fit, fit_opt.json, fit_opt.report, fit_opt.plot, fit_auc);
    fit->remove_option(fit->get_option("--auc"));
    add_model_dirs(fit, fit_opt.model_dirs);
    fit->footer(footer("  plateau fit my-regimen.toml --levels levels.csv --write individual.toml\n"
                       "  plateau fit my-regimen.toml --levels levels.csv --report fit.html --plot fit.png --json -"));

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        if (e.get_exit_code() == 0) return app.exit(e);  // --help, --version
        std::string where = "plateau";
        for (const CLI::App* sub : app.get_subcommands()) where += " " + sub->get_name();
        const CLI::App* sub = app.get_subcommands().empty() ? nullptr : app.get_subcommands().front();
        std::string what = plain_words(e, sub);
        if (sub == nullptr) {
            // No command was recognised: say which ones there are, in our words.
            std::vector<std::string> commands;  // from the table of subcommands, in its order
            std::string list;
            for (const CLI::App* c : app.get_subcommands([](CLI::App*) { return true; })) {
                commands.push_back(c->get_name());
                list += (list.empty() ? "" : ", ") + c->get_name();
            }
            what = argc > 1 && argv[1][0] != '-' ? "unknown command '" + std::string(argv[1]) + "'" : "no command given";
            what += "; expected one of: " + list;
            if (argc > 1 && argv[1][0] != '-') what += plateau::did_you_mean(argv[1], commands);
        }
        std::cerr << "error: " << what << "\n(run '" << where << " --help' for usage)\n";
        return cli::kExitBadInput;
    }
    // An option given an empty value ("--plot ''") is a mistake, not a request for the default.
    for (const CLI::App* sub : app.get_subcommands())
        for (const CLI::Option* o : sub->get_options())
            for (const auto& v : o->results())
                if (o->count() > 0 && v.empty()) {
                    std::cerr << "error: " << o->get_name() << ": expected a value, got an empty string\n";
                    return cli::kExitBadInput;
                }

    try {
        run_opt.all_intervals = intervals == "all";
        if (*run) return cli::run_command(run_opt, std::cout, std::cerr);
        if (*cmp) return cli::compare_command(cmp_opt, std::cout, std::cerr);
        if (*pop) return cli::population_command(pop_opt, std::cout, std::cerr);
        if (*check) return cli::check_command(check_opt, std::cout, std::cerr);
        if (*models) return cli::models_command(models_opt, std::cout, std::cerr);
        if (*dose) return cli::dose_command(dose_opt, std::cout, std::cerr);
        if (*fit) return cli::fit_command(fit_opt, std::cout, std::cerr);
    } catch (const std::exception& e) {
        std::cerr << "internal error: " << e.what() << '\n';
        return cli::kExitInternal;
    }
    return cli::kExitBadInput;
}

namespace {
// Where the output of every process but the first goes in an MPI job: nowhere.
struct Discard : std::streambuf {
    int overflow(int c) override { return traits_type::not_eof(c); }
    std::streamsize xsputn(const char*, std::streamsize n) override { return n; }
};
}  // namespace

// In an MPI job (population/distribute.hpp) every process parses and checks the same input, so an error is
// found by all; only process 0 prints, and all return the worst exit code. Without MPI: plateau_main as is.
int main(int argc, char** argv) {
    namespace population = plateau::population;
    population::start_processes(&argc, &argv);
    Discard discard;
    std::streambuf* const out = std::cout.rdbuf();
    std::streambuf* const err = std::cerr.rdbuf();
    if (population::place().rank != 0) {
        std::cout.rdbuf(&discard);
        std::cerr.rdbuf(&discard);
    }
    const int code = population::agree_exit_code(plateau_main(argc, argv));
    std::cout.rdbuf(out);
    std::cerr.rdbuf(err);
    population::stop_processes();
    return code;
}
