#include "cli/commands.hpp"

#include <sstream>

#include "cli/outputs.hpp"
#include "cli/support.hpp"
#include "plot/plot.hpp"
#include "verdict/verdicts.hpp"
#include "report/compare.hpp"

namespace plateau::cli {

int compare_command(const CompareOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        if (opt.regimens.empty()) throw UsageError("no regimens given; expected one or more regimen files");
        if (opt.regimens.size() > 26)
            throw UsageError("at most 26 regimens can be compared at once, got " + std::to_string(opt.regimens.size()));
        if (!(opt.tol >= kMinTol && opt.tol <= kMaxTol))
            throw UsageError("--tol: expected a number from 1e-15 to 1e-3, got " + num(opt.tol, 6));
        check_outputs(opt.json, opt.report, opt.plot, opt.regimens);
        std::vector<std::pair<double, double>> windows;
        for (const auto& w : opt.auc) windows.push_back(parse_time_window(w, "--auc"));

        // Load and check everything before anything runs: all files, then the shared output and unit.
        std::vector<regimen::Regimen> loaded;
        std::vector<Diagnostic> problems;
        for (const auto& path : opt.regimens) {
            try {
                loaded.push_back(load(path, opt.model_dirs, opt.targets));
                print_warnings(loaded.back(), err);
            } catch (const InputError& e) {
                problems.insert(problems.end(), e.diagnostics().begin(), e.diagnostics().end());
            }
        }
        if (!problems.empty()) throw InputError(problems);
        std::vector<std::string> inputs = opt.regimens;  // no output may replace a regimen or a model file
        for (const auto& r : loaded) inputs.push_back(r.model.path);
        check_outputs(opt.json, opt.report, opt.plot, inputs);
        const auto& r0 = loaded.front();
        const auto& o0 = r0.model.outputs[static_cast<std::size_t>(output_of_target(r0))];
        for (const auto& r : loaded) {
            const auto& o = r.model.outputs[static_cast<std::size_t>(output_of_target(r))];
            if (o.name != o0.name || o.unit.dim != o0.unit.dim || o.unit.factor != o0.unit.factor)
                throw UsageError("regimens compare one output in one unit: " + quoted(r0.path) + " measures " +
                                 quoted(o0.name + " (" + o0.unit_text + ")") + " but " + quoted(r.path) +
                                 " measures " + quoted(o.name + " (" + o.unit_text + ")") +
                                 "; set [targets] output to the same output in every file, or give --output NAME");
        }

        std::vector<std::string> notes = verdict::unify_targets(loaded);
        for (std::size_t i = 0; i < opt.regimens.size(); ++i)
            for (std::size_t j = 0; j < i; ++j)
                if (opt.regimens[i] == opt.regimens[j])
                    notes.push_back(verdict::letter_for(i) + " is the same file as " + verdict::letter_for(j) + ".");
        sim::Options so;
        so.tol = opt.tol;
        std::vector<report::Candidate> cs;
        for (std::size_t i = 0; i < loaded.size(); ++i) {
            cs.push_back(evaluate(std::move(loaded[i]), so, windows));
            cs.back().letter = verdict::letter_for(i);
        }
        const bool stdout_taken = opt.json == "-";
        std::ostream& text = stdout_taken ? err : out;
        report::CompareHeader h;
        h.tolerance = opt.tol;
        h.date = opt.date.empty() ? today() : opt.date;
        h.notes = notes;
        std::ostringstream written;
        write_outputs(cs, opt.json, opt.report, opt.plot, opt.tol, written, out, false, h.date);
        h.trailer = written.str();
        report::write_compare_text(text, cs, h);
        return kExitOk;
    });
}

}  // namespace plateau::cli
