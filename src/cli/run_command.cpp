#include "cli/commands.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <sstream>

#include "cli/evaluate.hpp"
#include "cli/outputs.hpp"
#include "cli/support.hpp"
#include "regimen/time.hpp"
#include "report/exposure_text.hpp"
#include "core/diagnostic.hpp"
#include "input/load.hpp"
#include "report/caution.hpp"
#include "report/csv.hpp"
#include "units/units.hpp"

namespace plateau::cli {

// ---------------------------------------------------------------------------------------------- run

void print_run_summary(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                       const RunOptions& opt) {
    const model::Model& m = r.model;
    labelled(out, "Regimen", r.id + " (" + r.path + ")");
    if (!r.about.empty()) labelled(out, "", r.about);
    labelled(out, "Model", m.id + " (" + m.path + "): " + m.summary);
    if (!r.overrides.empty()) {
        std::vector<std::string> parts;
        for (const auto& o : r.overrides) {
            const auto& p = m.parameters[static_cast<std::size_t>(o.index)];
            parts.push_back(o.name + " = " +
                            with_unit(units::to_unit(o.value, p.unit), p.unit_text, kParameterDigits));
        }
        labelled(out, "Overrides", join(parts));
    }

    double total = 0.0;
    std::vector<std::string> routes;
    for (const auto& d : s.doses) {
        total += d.amount;
        const std::string& name = m.routes[static_cast<std::size_t>(d.route)].name;
        if (std::find(routes.begin(), routes.end(), name) == routes.end()) routes.push_back(name);
    }
    std::string doses = plural(s.doses.size(), "dose");
    if (!routes.empty()) doses += " (" + join(routes) + ")";
    doses += ", " + num(total) + " mg in total";
    if (s.doses.size() == 1) doses += ", at " + num(s.doses.front().time) + " h";
    if (s.doses.size() > 1)
        doses += ", from " + num(s.doses.front().time) + " h to " + num(s.doses.back().time) + " h";
    labelled(out, "Doses", doses);
    labelled(out, "Horizon", "0 to " + hours(s.end));
    labelled(out, "Solver",
             "Taylor order " + std::to_string(s.order) + ", " + plural(static_cast<std::size_t>(s.steps), "step") +
                 ", tolerance " + num(opt.tol, 3));

    const int oi = output_of_target(r);
    const traj::Trajectory& tr = s.trajectory;
    if (oi >= 0 && !tr.empty()) {
        const model::Output& o = m.outputs[static_cast<std::size_t>(oi)];
        const int series = s.output_series(oi);
        std::string head = o.name;
        if (!o.unit_text.empty()) head += " in " + o.unit_text;
        if (!o.about.empty()) head += ": " + o.about;
        labelled(out, "Output", head);
        labelled(out, "At end", with_unit(units::to_unit(tr.value(series, tr.end()), o.unit), o.unit_text) + " at " +
                                    num(tr.end()) + " h");
    }
}

int run_command(const RunOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        if (!(opt.tol >= kMinTol && opt.tol <= kMaxTol))
            throw UsageError("--tol: expected a number from 1e-15 to 1e-3, got " + num(opt.tol, 6));
        const bool has_times = !opt.times.empty();
        const bool has_step = !opt.step.empty();
        if ((has_times || has_step) && opt.csv.empty())
            throw UsageError(std::string(has_times ? "--times" : "--step") +
                             " chooses the CSV sample times: add --csv FILE (or --csv - for standard output)");
        if (has_times && has_step) throw UsageError("--times and --step both choose the CSV samples: give only one");
        double step = 0.0;
        if (has_step) {
            if (const std::string p = duration_problem(opt.step); !p.empty()) throw UsageError("--step: " + p);
            step = parse_duration(opt.step, "--step");
        }
        std::vector<double> times;
        if (has_times) times = parse_times(opt.times);

        check_outputs(opt.json, opt.report, opt.plot, {opt.regimen}, opt.csv);
        regimen::Regimen r = load(opt.regimen, opt.model_dirs, opt.targets);
        check_outputs(opt.json, opt.report, opt.plot, {opt.regimen, r.model.path}, opt.csv);  // the model too
        print_warnings(r, err);
        if (opt.clock && !r.start_clock)
            throw UsageError("--clock needs the clock time at t = 0: add start_clock = \"08:00\" at the top of " +
                             quoted(opt.regimen));
        const double horizon = r.horizon.until;
        if (!opt.csv.empty()) {
            if (has_times) {
                for (double& t : times) {
                    if (t > horizon && regimen::same_instant(t, horizon)) t = horizon;
                    if (t > horizon)
                        throw UsageError("--times: " + num(t) +
                                         " h is after the end of the horizon; expected times from 0 to " +
                                         hours(horizon));
                }
            } else {
                times = report::grid_times(horizon, has_step ? step : r.horizon.step);
            }
        }

        sim::Options so;
        so.tol = opt.tol;
        std::vector<std::pair<double, double>> windows;
        for (const auto& w : opt.auc) windows.push_back(parse_time_window(w, "--auc"));
        const std::vector<report::Candidate> cs{[&] {
            report::Candidate c = evaluate(std::move(r), so, windows);
            c.letter = "A";
            return c;
        }()};
        const report::Candidate& c = cs.front();

        // With the CSV or the JSON on standard output, the summary goes to standard error so they can be piped.
        if (opt.csv == "-" && opt.json == "-") throw UsageError("--csv - and --json - cannot both use standard output");
        std::ostream& summary = opt.csv == "-" || opt.json == "-" ? err : out;
        std::ostringstream written;  // "... written to ..." lines, shown before the closing caution
        std::vector<ExtraFile> files;  // written with the other outputs, all or none
        std::string csv_text;
        if (!opt.csv.empty()) {
            std::ostringstream csv;
            report::write_csv(csv, c.sim, c.regimen.model, times);
            csv_text = csv.str();
            if (opt.csv != "-")
                files.push_back({opt.csv, csv_text, "--csv",
                                 "CSV       " + plural(times.size(), "row") + " written to " + opt.csv});
        }
        write_outputs(cs, opt.json, opt.report, opt.plot, opt.tol, written, out, true, {}, files);
        if (opt.csv == "-") out << csv_text;

        print_run_summary(summary, c.regimen, c.sim, opt);
        summary << '\n';
        report::TextOptions to;
        to.all_intervals = opt.all_intervals;
        if (opt.clock) to.clock = c.regimen.start_clock;
        report::write_exposure_text(summary, c.regimen, c.sim, c.exposure, to);
        if (!written.str().empty()) summary << '\n' << written.str();
        summary << '\n' << wrap_text(report::kCaution, 0, 0, kWidth) << '\n';
        return kExitOk;
    });
}

}  // namespace plateau::cli
