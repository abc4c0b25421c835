// `plateau population`: a virtual population through one or more regimens, on the same patients.
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <mutex>
#include <sstream>

#include "cli/commands.hpp"
#include "cli/outputs.hpp"
#include "cli/support.hpp"
#include "input/load_cohort.hpp"
#include "population/distribute.hpp"
#include "population/reduce.hpp"
#include "population/run.hpp"
#include "report/population_report.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::cli {

namespace {

constexpr std::size_t kMaxSubjects = 1'000'000;
constexpr int kMaxThreads = 256;

std::vector<double> curve_thresholds(const std::string& text, const model::Output& o) {
    const auto dots = text.find("..");
    if (dots == std::string::npos) throw UsageError("--pta-curve: expected LOW..HIGH, like 0.25mg/L..64mg/L, got " + quoted(text));
    auto one = [&](std::string_view part) {
        units::Quantity q;
        try {
            q = units::parse_quantity(trim(part));
        } catch (const TextError& e) {
            throw UsageError(std::string("--pta-curve: ") + e.what());
        }
        if (q.dim.dimensionless()) return q.value * o.unit.factor;
        if (q.dim != o.unit.dim)
            throw UsageError("--pta-curve: expected " + units::dim_name(o.unit.dim) + " like 0.25" + o.unit_text + ", got " +
                             quoted(part));
        return q.value;
    };
    const double lo = one(std::string_view(text).substr(0, dots)), hi = one(std::string_view(text).substr(dots + 2));
    if (!(lo > 0.0) || !(hi >= lo)) throw UsageError("--pta-curve: expected 0 < low <= high, got " + quoted(text));
    if (hi / lo > std::pow(2.0, 40)) throw UsageError("--pta-curve: at most 40 doublings from low to high, got " + quoted(text));
    return population::doubling(lo, hi);
}

}  // namespace

int population_command(const PopulationOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        if (opt.regimens.empty()) throw UsageError("no regimens given; expected one or more regimen files");
        if (opt.regimens.size() > 26)
            throw UsageError("at most 26 regimens at once, got " + std::to_string(opt.regimens.size()));
        if (opt.size < 1 || opt.size > kMaxSubjects)
            throw UsageError("--size: expected 1 to " + std::to_string(kMaxSubjects) + " patients, got " + std::to_string(opt.size));
        if (opt.threads < 1 || opt.threads > kMaxThreads)
            throw UsageError("--threads: expected 1 to " + std::to_string(kMaxThreads) + ", got " + std::to_string(opt.threads));
        if (!(opt.tol >= kMinTol && opt.tol <= kMaxTol))
            throw UsageError("--tol: expected a number from 1e-15 to 1e-3, got " + num(opt.tol, 6));
        std::vector<std::string> inputs = opt.regimens;
        if (!opt.cohort.empty()) inputs.push_back(opt.cohort);
        if (!opt.thresholds.empty()) inputs.push_back(opt.thresholds);
        check_outputs(opt.json, opt.report, opt.plot, inputs, opt.csv);
        if (opt.json == "-" && opt.csv == "-") throw UsageError("--json - and --csv - cannot both go to standard output");

        // Everything is loaded and checked before anything runs.
        std::vector<regimen::Regimen> loaded;
        std::vector<Diagnostic> problems;
        auto collect = [&](auto&& f) {
            try {
                f();
            } catch (const InputError& e) {
                problems.insert(problems.end(), e.diagnostics().begin(), e.diagnostics().end());
            }
        };
        for (const auto& path : opt.regimens) collect([&] { loaded.push_back(load(path, opt.model_dirs, opt.targets)); });
        population::Cohort cohort;
        population::ThresholdDist dist;
        if (!opt.cohort.empty()) collect([&] { cohort = input::load_cohort(opt.cohort); });
        if (!opt.thresholds.empty()) collect([&] { dist = input::load_thresholds(opt.thresholds); });
        if (!problems.empty()) throw InputError(problems);
        // The model files and a cohort's table of observed covariates are inputs too: no output may replace one.
        for (const auto& r : loaded) inputs.push_back(r.model.path);
        if (!cohort.table_path.empty()) inputs.push_back(cohort.table_path);
        check_outputs(opt.json, opt.report, opt.plot, inputs, opt.csv);
        const auto& r0 = loaded.front();
        const auto& o0 = r0.model.outputs[static_cast<std::size_t>(output_of_target(r0))];
        for (const auto& r : loaded) {
            if (r.model.id != r0.model.id || r.model.path != r0.model.path)
                throw UsageError("a population runs one model: " + quoted(r0.path) + " uses " + quoted(r0.model.id) + " but " +
                                 quoted(r.path) + " uses " + quoted(r.model.id) +
                                 " (each patient must be the same under every regimen)");
            const auto& o = r.model.outputs[static_cast<std::size_t>(output_of_target(r))];
            if (o.name != o0.name)
                throw UsageError("regimens are compared on one output: " + quoted(r0.path) + " measures " + quoted(o0.name) +
                                 " but " + quoted(r.path) + " measures " + quoted(o.name) + "; give --output NAME");
        }
        std::vector<std::string> notes = verdict::unify_targets(loaded);
        std::vector<double> curve;
        if (!opt.pta_curve.empty()) {
            if (!loaded.front().targets.above)
                throw UsageError("--pta-curve needs a threshold target: add --above (its share --above-for applies to every threshold)");
            curve = curve_thresholds(opt.pta_curve, o0);
        }
        if (!opt.thresholds.empty()) {
            if (!loaded.front().targets.above)
                throw UsageError("--thresholds needs a threshold target: add --above");
            if (dist.dim != o0.unit.dim)
                throw UsageError("--thresholds: the thresholds in " + quoted(opt.thresholds) + " are " + units::dim_name(dist.dim) +
                                 ", but the output " + quoted(o0.name) + " is " + units::dim_name(o0.unit.dim));
        }

        population::Setup setup;
        setup.cohort = opt.cohort.empty() ? nullptr : &cohort;
        setup.size = opt.size;
        setup.seed = opt.seed;
        setup.threads = opt.threads;
        setup.options.tol = opt.tol;
        // The bands on the first regimen's grid (its [horizon] step), at most 1001 points per regimen.
        setup.band_points = static_cast<int>(
            std::clamp(std::round(r0.horizon.until / r0.horizon.step) + 1.0, 2.0, 1001.0));
        // In an MPI job every process runs a share; process 0 gathers it all and alone shows progress and writes.
        const population::Place place = population::place();
        const bool show = opt.progress && place.rank == 0 && isatty(STDERR_FILENO) == 1;
        const auto start = std::chrono::steady_clock::now();
        std::mutex progress_mutex;
        double last_shown = -1.0;
        if (show)
            setup.progress = [&](std::size_t done) {
                std::lock_guard<std::mutex> lock(progress_mutex);
                const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
                done = std::min(opt.size, done * static_cast<std::size_t>(place.ranks));   // about: process 0's share × K
                if (secs - last_shown < 0.2 && done < opt.size) return;   // at most five lines a second
                last_shown = secs;
                const double rate = secs > 0 ? static_cast<double>(done) / secs : 0.0;
                const double left = rate > 0 ? static_cast<double>(opt.size - done) / rate : 0.0;
                std::fprintf(stderr, "\r%zu of %zu patients, %.0f per second, %.0f s left   ", done, opt.size, rate, left);
            };
        population::Result result;
        try {
            result = population::run_shared(loaded, setup);
        } catch (const std::invalid_argument& e) {
            throw UsageError(std::string(e.what()) + (opt.cohort.empty() ? "" : " (cohort " + quoted(opt.cohort) + ")"));
        } catch (const std::runtime_error& e) {
            throw UsageError(e.what());
        }
        if (show) std::fprintf(stderr, "\r%80s\r", "");
        if (place.rank != 0) return kExitOk;

        report::PopulationRun pr;
        pr.regimens = &loaded;
        pr.result = &result;
        pr.cohort = setup.cohort;
        pr.thresholds = opt.thresholds.empty() ? nullptr : &dist;
        pr.size = opt.size;
        pr.seed = opt.seed;
        pr.tol = opt.tol;
        pr.date = opt.date.empty() ? today() : opt.date;
        for (std::size_t r = 0; r < loaded.size(); ++r) {
            const auto& o = loaded[r].model.outputs[static_cast<std::size_t>(output_of_target(loaded[r]))];
            std::vector<std::pair<std::string, std::string>> kinds;
            for (const auto& v : verdict::verdicts(loaded[r].targets, o, metrics::Exposure{})) kinds.emplace_back(v.kind, v.what);
            pr.summaries.push_back(population::summarize(result.figures[r], result.bands[r], setup.band_points, kinds, curve,
                                                         pr.thresholds));
        }

        // Every file of the command is written together, or none is.
        std::ostringstream written;
        std::vector<ExtraFile> files;
        auto emit = [&](const std::string& path, const char* what, auto&& writer) {
            if (path.empty()) return;
            std::ostringstream s;
            writer(s);
            if (path == "-") out << s.str();
            else files.push_back({path, s.str(), what, "Wrote " + path});
        };
        emit(opt.json, "--json", [&](std::ostream& s) { report::write_population_json(s, pr); });
        emit(opt.csv, "--csv", [&](std::ostream& s) { report::write_population_csv(s, pr); });
        emit(opt.report, "--report", [&](std::ostream& s) { s << report::population_html(pr); });
        FigureFile figure;
        if (!opt.plot.empty())
            figure = {opt.plot, [&](const std::string& temp) { plot::render_file(report::overview_figure(pr), temp); },
                      "Wrote " + opt.plot};
        write_all(files, figure, written);
        std::string trailer;
        for (const auto& n : notes) trailer += "Note: " + n + "\n";
        trailer += written.str();
        const bool stdout_taken = opt.json == "-" || opt.csv == "-";
        report::write_population_text(stdout_taken ? err : out, pr, trailer);
        return kExitOk;
    });
}

}  // namespace plateau::cli
