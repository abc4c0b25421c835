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

// The recommended candidate as a regimen: the template's model, parameters, targets and horizon, the found doses.
regimen::Regimen recommended_regimen(const dose::Template& t, const dose::Found& f, const std::string& rule) {
    std::optional<double> load;
    if (f.loading && f.loading->problem.empty()) load = f.loading->dose;
    regimen::Regimen r = dose::variant(t, f.shape, f.dose, load);
    r.id = t.regimen.id + "-dose";
    r.about = num(f.dose, 6) + " mg every " + dose::duration_text(f.shape.tau) +
              (f.shape.over > 0 ? " as infusions over " + dose::duration_text(f.shape.over) : " as a bolus") +
              (load ? ", " + num(*load, 6) + " mg loading dose first" : "") + " (the dose search's " + rule +
              ", from " + t.regimen.id + ")";
    return r;
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

        TargetOverrides targets = opt.targets;
        // A single AUC24 value asks for that value exactly.
        if (!targets.auc24.empty() && targets.auc24.find("..") == std::string::npos)
            targets.auc24 = targets.auc24 + ".." + targets.auc24;
        dose::Template t = dose::make_template(load(opt.regimen, opt.model_dirs, targets));
        const regimen::Regimen& r = t.regimen;
        // The model file is an input too: no output may replace it, by any spelling or link.
        check_outputs(opt.json, "", "", {opt.regimen, r.model.path});
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

        std::ostringstream written;
        if (!opt.json.empty()) {
            std::ostringstream js;
            dose::write_json(js, rep, found);
            if (opt.json == "-")
                out << js.str();
            else {
                write_file(opt.json, js.str(), "--json");
                written << "JSON      written to " << opt.json << '\n';
            }
        }
        if (!opt.write.empty()) {
            if (rep.recommended < 0) {
                written << "Regimen   not written to " << opt.write << ": no candidate meets every target\n";
            } else {
                const regimen::Regimen best =
                    recommended_regimen(t, found[static_cast<std::size_t>(rep.recommended)], dose::rule(goals));
                write_file(opt.write,
                           dose::regimen_text(best, "Written by plateau dose from " + r.path +
                                                        ". Research simulation only, not clinical advice."),
                           "--write");
                written << "Regimen   written to " << opt.write << " (run or compare it as it is)\n";
            }
        }
        rep.trailer = written.str();
        dose::write_text(opt.json == "-" ? err : out, rep, found);
        return kExitOk;
    });
}

}  // namespace plateau::cli
