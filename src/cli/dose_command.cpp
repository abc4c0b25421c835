// `plateau dose`: the maintenance dose per candidate interval × infusion length that meets every target at
// steady state, rounded to a preparable step, optionally with a loading dose; the recommended one written as a
// regimen file.
#include <algorithm>
#include <filesystem>
#include <sstream>

#include "cli/commands.hpp"
#include "cli/evaluate.hpp"
#include "cli/outputs.hpp"
#include "cli/support.hpp"
#include "dose/print.hpp"
#include "dose/search.hpp"
#include "dose/write.hpp"
#include "input/load_cohort.hpp"
#include "population/distribute.hpp"
#include "units/units.hpp"

namespace plateau::cli {

namespace {

// A comma-separated list of durations; each > 0, or ≥ 0 with `zero_ok` (0 = bolus).
std::vector<double> duration_list(const std::string& text, std::string_view what, bool zero_ok) {
    std::vector<double> out;
    std::size_t start = 0;
    while (true) {
        const std::size_t comma = text.find(',', start);
        const std::string_view piece =
            trim(std::string_view(text).substr(start, comma == std::string::npos ? std::string::npos : comma - start));
        if (piece.empty())
            throw UsageError(std::string(what) + ": an empty entry in " + cli::quoted(text) +
                             "; expected durations separated by commas, e.g. 6h,8h,12h");
        const double h = parse_duration(piece, what);
        if (h < 0.0 || (!zero_ok && h == 0.0))
            throw UsageError(std::string(what) + ": expected " +
                             (zero_ok ? "0 (bolus) or a positive time" : "a positive time") + ", got " +
                             cli::quoted(piece));
        if (h > regimen::kMaxHorizonHours)
            throw UsageError(std::string(what) + ": " + cli::quoted(piece) + " is longer than the 10-year limit");
        out.push_back(h);
        if (out.size() > 50) throw UsageError(std::string(what) + ": at most 50 entries");
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    return out;
}

double amount_of(const std::string& text, std::string_view what) {
    units::Quantity q;
    try {
        q = units::parse_quantity(text);
    } catch (const TextError& e) {
        throw UsageError(std::string(what) + ": " + e.what());
    }
    if (q.dim.dimensionless()) q.dim = units::kMass;  // a plain number is mg
    if (q.dim != units::kMass || !(q.value > 0.0))
        throw UsageError(std::string(what) + ": expected a positive amount like 250mg or 0.5g, got " +
                         cli::quoted(text));
    return q.value;
}

// "90%" or "0.9": a share above 0 and at most 1.
double pta_share(const std::string& text) {
    units::Quantity q;
    try {
        q = units::parse_quantity(text);
    } catch (const TextError& e) {
        throw UsageError(std::string("--pta: ") + e.what());
    }
    if (!q.dim.dimensionless() || !(q.value > 0.0 && q.value <= 1.0))
        throw UsageError("--pta: expected a share above 0 % and at most 100 %, like 90% or 0.9, got " +
                         cli::quoted(text));
    return q.value;
}

constexpr std::size_t kMaxPatients = 1'000'000;
constexpr int kMaxThreads = 256;

// The recommended candidate as a regimen: the template's model, parameters, targets and horizon, the found doses.
regimen::Regimen recommended_regimen(const dose::Template& t, const dose::Found& f, const std::string& rule) {
    std::optional<double> load;
    if (f.loading && f.loading->problem.empty()) load = f.loading->dose;
    regimen::Regimen r = dose::variant(t, f.shape, f.dose, load);
    r.id = t.regimen.id + "-dose";
    r.about = num(f.dose, 6) + " mg every " + dose::duration_text(f.shape.tau) +
              dose::delivery_text(t, f.shape.over) +
              (load ? ", " + num(*load, 6) + " mg loading dose first" : "") + " (the dose search's " + rule +
              ", from " + t.regimen.id + ")";
    return r;
}

// Where --json and --write go, and what the command prints about them.
std::string write_outputs(const DoseOptions& opt, const std::string& json, const regimen::Regimen* best,
                          const std::string& header, std::ostream& out) {
    std::ostringstream written;
    if (!opt.json.empty()) {
        if (opt.json == "-")
            out << json;
        else {
            write_file(opt.json, json, "--json");
            written << "JSON      written to " << opt.json << '\n';
        }
    }
    if (!opt.write.empty()) {
        if (best == nullptr) {
            written << "Regimen   not written to " << opt.write << ": no candidate "
                    << (opt.pta.empty() ? "meets every target" : "reaches the PTA") << "\n";
        } else {
            write_file(opt.write, dose::regimen_text(*best, header), "--write");
            written << "Regimen   written to " << opt.write << " (run or compare it as it is)\n";
        }
    }
    return written.str();
}

// --pta: per candidate the population dose over the virtual patients; only process 0 of an MPI job reports.
int population_half(const DoseOptions& opt, const dose::Template& t, const std::vector<dose::Goal>& goals,
                    const dose::Request& q, const dose::PopulationRequest& pq, const dose::Measure& measure,
                    std::ostream& out, std::ostream& err) {
    std::vector<std::vector<dose::Patient>> ps;
    try {
        ps = dose::patients(t, goals, q, pq, measure);
    } catch (const std::invalid_argument& e) {
        throw UsageError(std::string(e.what()) + (opt.cohort.empty() ? "" : " (cohort " + cli::quoted(opt.cohort) + ")"));
    } catch (const std::runtime_error& e) {
        throw UsageError(e.what());
    }
    if (population::place().rank != 0) return kExitOk;
    std::vector<dose::PopulationDose> ds;
    for (std::size_t s = 0; s < q.shapes.size(); ++s)
        ds.push_back(dose::population_dose(q.shapes[s], ps[s], pq.share, q.round_step));

    dose::Report rep;
    rep.tmpl = &t;
    rep.goals = goals;
    rep.request = q;
    rep.tolerance = opt.tol;
    rep.recommended = dose::rank(ds);
    rep.population = &pq;
    rep.who = pq.cohort ? "cohort '" + pq.cohort->id + "' (" + pq.cohort->path + ")"
                        : "the template's patient with the model's variability";
    const regimen::Regimen& r = t.regimen;
    if (!r.doses[t.series].deviations.empty())
        rep.notes.push_back(
            "The template's missed, late or doubled doses are left out: candidates are measured as prescribed.");
    std::ostringstream js;
    if (!opt.json.empty()) dose::write_json(js, rep, ds);
    std::optional<regimen::Regimen> best;
    const std::string rule = dose::population_rule(pq.share);
    if (rep.recommended >= 0) {
        const dose::PopulationDose& d = ds[static_cast<std::size_t>(rep.recommended)];
        best = dose::variant(t, d.shape, d.at.dose);
        best->id = r.id + "-pta";
        best->about = num(d.at.dose, 6) + " mg every " + dose::duration_text(d.shape.tau) +
                      dose::delivery_text(t, d.shape.over) +
                      " (the dose search's " + rule + " over " + std::to_string(pq.size) + " virtual patients, " +
                      rep.who + ", seed " + std::to_string(pq.seed) + ", from " + r.id + ")";
    }
    rep.trailer = write_outputs(opt, js.str(), best ? &*best : nullptr,
                                "Written by plateau dose from " + r.path +
                                    ": a population dose for the virtual patients named in 'about'.\n"
                                    "Research simulation only, not clinical advice.",
                                out);
    dose::write_text(opt.json == "-" ? err : out, rep, ds);
    return kExitOk;
}

}  // namespace

int dose_command(const DoseOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        if (!(opt.tol >= kMinTol && opt.tol <= kMaxTol))
            throw UsageError("--tol: expected a number from 1e-15 to 1e-3, got " + num(opt.tol, 6));
        check_outputs(opt.json, "", "", {opt.regimen});
        if (!opt.write.empty()) {
            namespace fs = std::filesystem;
            std::error_code e1, e2, e3;
            auto same = [&](const std::string& a, const std::string& b) {
                return !b.empty() && fs::weakly_canonical(a, e1) == fs::weakly_canonical(b, e2) && !e1 && !e2;
            };
            if (opt.write == "-") throw UsageError("--write: expected a file name, got '-'");
            if (same(opt.write, opt.regimen))
                throw UsageError("--write: " + cli::quoted(opt.write) + " is an input file; it would be overwritten");
            if (same(opt.write, opt.json))
                throw UsageError("--write and --json name the same file " + cli::quoted(opt.write));
            const fs::path dir = fs::path(opt.write).parent_path();
            if (!dir.empty() && !fs::is_directory(dir, e3))
                throw UsageError("--write: cannot write " + cli::quoted(opt.write) + ": the folder " +
                                 cli::quoted(dir.string()) + " does not exist");
            if (fs::is_directory(opt.write, e3))
                throw UsageError("--write: cannot write " + cli::quoted(opt.write) + ": it is a folder");
        }
        dose::Request q;
        q.loading = opt.loading;
        if (!opt.round.empty()) q.round_step = amount_of(opt.round, "--round");
        const bool pop = !opt.pta.empty();
        dose::PopulationRequest pq;
        if (pop) {
            pq.share = pta_share(opt.pta);
            if (opt.loading)
                throw UsageError("--loading is for one patient: with --pta the population dose is searched without it");
            if (opt.size < 1 || opt.size > kMaxPatients)
                throw UsageError("--size: expected 1 to " + std::to_string(kMaxPatients) + " patients, got " +
                                 std::to_string(opt.size));
            if (opt.threads < 1 || opt.threads > kMaxThreads)
                throw UsageError("--threads: expected 1 to " + std::to_string(kMaxThreads) + ", got " +
                                 std::to_string(opt.threads));
            pq.size = opt.size;
            pq.seed = opt.seed;
            pq.threads = opt.threads;
        } else if (!opt.cohort.empty()) {
            throw UsageError("--cohort is for --pta: give the share of patients to reach, e.g. --pta 90%");
        }

        TargetOverrides targets = opt.targets;
        // A single AUC24 value asks for that value exactly.
        if (!targets.auc24.empty() && targets.auc24.find("..") == std::string::npos)
            targets.auc24 = targets.auc24 + ".." + targets.auc24;
        dose::Template t = dose::make_template(load(opt.regimen, opt.model_dirs, targets));
        const regimen::Regimen& r = t.regimen;
        std::error_code ec0;
        // The model file is an input too: no output may replace it, by any spelling or link.
        std::vector<std::string> inputs = {opt.regimen, r.model.path};
        if (!opt.cohort.empty()) inputs.push_back(opt.cohort);
        check_outputs(opt.json, "", "", inputs);
        for (const auto& in : inputs)
            if (!opt.write.empty() && std::filesystem::equivalent(opt.write, in, ec0) && !ec0)
                throw UsageError("--write: " + cli::quoted(opt.write) + " is an input file; it would be overwritten");
        if (!opt.write.empty()) {
            std::error_code ec;
            if (std::filesystem::equivalent(opt.write, r.model.path, ec) && !ec)
                throw UsageError("--write: " + cli::quoted(opt.write) + " is the model file; it would be overwritten");
        }
        const model::Output& o = r.model.outputs[static_cast<std::size_t>(output_of_target(r))];
        const std::vector<dose::Goal> goals = dose::goals_of(r.targets, o);
        if (std::none_of(goals.begin(), goals.end(), [](const dose::Goal& g) { return g.side != dose::Side::Upper; }))
            throw UsageError("nothing to search for in " + cli::quoted(r.path) +
                             ": give a target that needs a dose, --above 4mg/L, --window with a low end above 0, "
                             "or --auc24 (a value or a range), or set one in [targets]");

        const regimen::DoseSpec& spec = r.doses[t.series];
        const std::vector<double> taus = opt.intervals.empty() ? std::vector<double>{spec.every}
                                                               : duration_list(opt.intervals, "--intervals", false);
        const std::vector<double> overs =
            opt.over.empty() ? std::vector<double>{spec.over} : duration_list(opt.over, "--over", true);
        for (double tau : taus)
            for (double over : overs) q.shapes.push_back({tau, over});

        sim::Options so;
        so.tol = opt.tol;
        const dose::Measure measure = [&](regimen::Regimen v) { return evaluate(std::move(v), so, {}); };
        if (pop) {
            if (std::any_of(goals.begin(), goals.end(), [](const dose::Goal& g) { return g.side == dose::Side::Exact; }))
                throw UsageError("--pta with one AUC24 value: no patient hits one value exactly; give a range, "
                                 "--auc24 400..600");
            population::Cohort cohort;
            if (!opt.cohort.empty()) cohort = input::load_cohort(opt.cohort);
            pq.cohort = opt.cohort.empty() ? nullptr : &cohort;
            return population_half(opt, t, goals, q, pq, measure, out, err);
        }
        std::vector<dose::Found> found = dose::search(t, goals, q, measure);

        dose::Report rep;
        rep.tmpl = &t;
        rep.goals = goals;
        rep.request = q;
        rep.tolerance = opt.tol;
        rep.recommended = dose::rank(found);
        if (!spec.deviations.empty())
            rep.notes.push_back(
                "The template's missed, late or doubled doses are left out: candidates are measured "
                "as prescribed.");
        if (q.loading && r.doses.size() > 1)
            rep.notes.push_back(
                "With --loading, the template's single doses are left out: the loading dose is the "
                "first dose of each candidate.");

        std::ostringstream js;
        if (!opt.json.empty()) dose::write_json(js, rep, found);
        std::optional<regimen::Regimen> best;
        if (rep.recommended >= 0)
            best = recommended_regimen(t, found[static_cast<std::size_t>(rep.recommended)], dose::rule(goals));
        rep.trailer = write_outputs(opt, js.str(), best ? &*best : nullptr,
                                    "Written by plateau dose from " + r.path +
                                        ". Research simulation only, not clinical advice.",
                                    out);
        dose::write_text(opt.json == "-" ? err : out, rep, found);
        return kExitOk;
    });
}

}  // namespace plateau::cli
