// `plateau fit`: the individual (maximum a posteriori) parameters of a patient from measured levels, the
// doses actually given (the regimen) and the model's variability as the prior; optionally the regimen with the
// estimates written as overrides, for `run`, `compare` and `dose`.
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <sstream>

#include "cli/commands.hpp"
#include "cli/outputs.hpp"
#include "cli/support.hpp"
#include "fit/problem.hpp"
#include "fit/report.hpp"
#include "fit/write.hpp"
#include "input/load_levels.hpp"

namespace plateau::cli {

namespace {

constexpr int kBandPoints = 401;
constexpr int kBandDraws = 200;

bool same_path(const std::string& a, const std::string& b) {
    namespace fs = std::filesystem;
    if (a.empty() || b.empty() || a == "-" || b == "-") return false;
    std::error_code e1, e2, e3;
    if (fs::exists(a, e1) && fs::exists(b, e2)) return fs::equivalent(a, b, e3) && !e3;
    return fs::weakly_canonical(a, e1) == fs::weakly_canonical(b, e2) && !e1 && !e2;
}

void check_write(const FitOptions& opt, const std::vector<std::string>& inputs) {
    namespace fs = std::filesystem;
    if (opt.write.empty()) return;
    if (opt.write == "-") throw UsageError("--write: expected a file name, got '-'");
    for (const auto& in : inputs)
        if (same_path(opt.write, in)) throw UsageError("--write: " + cli::quoted(opt.write) + " is an input file; it would be overwritten");
    for (const auto* other : {&opt.json, &opt.report, &opt.plot})
        if (same_path(opt.write, *other)) throw UsageError("--write and another output name the same file " + cli::quoted(opt.write));
    std::error_code ec;
    const fs::path dir = fs::path(opt.write).parent_path();
    if (!dir.empty() && !fs::is_directory(dir, ec))
        throw UsageError("--write: cannot write " + cli::quoted(opt.write) + ": the folder " + cli::quoted(dir.string()) + " does not exist");
    if (fs::is_directory(opt.write, ec)) throw UsageError("--write: cannot write " + cli::quoted(opt.write) + ": it is a folder");
}

}  // namespace

int fit_command(const FitOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        if (!(opt.tol >= kMinTol && opt.tol <= kMaxTol))
            throw UsageError("--tol: expected a number from 1e-15 to 1e-3, got " + num(opt.tol, 6));
        if (opt.levels.empty()) throw UsageError("--levels: the file of measured levels is required");
        std::vector<std::string> inputs{opt.regimen, opt.levels};
        check_outputs(opt.json, opt.report, opt.plot, inputs);
        check_write(opt, inputs);

        regimen::Regimen r = load(opt.regimen, opt.model_dirs, {});
        inputs.push_back(r.model.path);
        check_outputs(opt.json, opt.report, opt.plot, inputs);
        check_write(opt, inputs);
        print_warnings(r, err);
        const model::Model& m = r.model;
        if (!m.residual)
            throw UsageError("model " + cli::quoted(m.id) + " (" + m.path + ") has no [residual] table: a fit needs the error "
                             "of a measured level, like [residual] proportional = \"15 %\"");
        if (m.variability.empty())
            throw UsageError("model " + cli::quoted(m.id) + " has no [variability] table: with no random effects there is "
                             "nothing to fit");
        const input::Levels levels = input::load_levels(opt.levels, m, m.residual->output, fit::level_context(r));
        const fit::Problem p = fit::make_problem(r, levels, opt.tol);
        const fit::Result res = fit::fit(p);

        fit::Band band;
        const bool figure = !opt.report.empty() || !opt.plot.empty();
        if (figure) {
            std::vector<double> times;
            for (int i = 0; i < kBandPoints; ++i) times.push_back(p.t_end * i / (kBandPoints - 1));
            band = fit::band(p, res, times, kBandDraws, 1);
        }
        fit::Report rep;
        rep.regimen = &r;
        rep.levels = &levels;
        rep.problem = &p;
        rep.result = &res;
        rep.band = figure ? &band : nullptr;
        rep.tol = opt.tol;
        rep.date = opt.date.empty() ? today() : opt.date;

        // Every file of the command is written together, or none is.
        std::vector<ExtraFile> files;
        if (!opt.json.empty() && opt.json != "-") {
            std::ostringstream js;
            fit::write_json(js, rep);
            files.push_back({opt.json, js.str(), "--json", "JSON      written to " + opt.json});
        }
        if (!opt.report.empty()) files.push_back({opt.report, fit::html(rep), "--report", "Report    written to " + opt.report});
        if (!opt.write.empty()) {
            regimen::Regimen w;
            try {
                w = fit::individualised(r, res);
            } catch (const std::runtime_error& e) {
                throw UsageError(std::string("--write: ") + e.what());
            }
            files.push_back({opt.write, fit::individualised_text(w, r.path, levels.path), "--write",
                             "Regimen   written to " + opt.write + " (run, compare or dose it as it is)"});
        }
        FigureFile fig;
        if (!opt.plot.empty())
            fig = {opt.plot, [&](const std::string& temp) { plot::render_file(fit::figure(rep), temp); },
                   "Plot      written to " + opt.plot};
        std::ostringstream written;
        write_all(files, fig, written);
        rep.trailer = written.str();
        if (opt.json == "-") fit::write_json(out, rep);
        fit::write_text(opt.json == "-" ? err : out, rep);
        return res.converged ? kExitOk : kExitNumerical;
    });
}

}  // namespace plateau::cli
