// Helpers for the dose-search tests: regimen files in a temporary folder and the search run through the same
// single-regimen pipeline as the command.
#pragma once

#include <cstdio>
#include <string>
#include <vector>

#include "cli/commands.hpp"
#include "cli/evaluate.hpp"
#include "dose/search.hpp"

namespace plateau::dosetest {

// Full precision for values written into files.
inline std::string g17(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

struct Searched {
    dose::Template tmpl;
    std::vector<dose::Goal> goals;
    std::vector<dose::Found> found;
};

inline dose::Measure pipeline() {
    return [](regimen::Regimen r) { return cli::evaluate(std::move(r), sim::Options{}, {}); };
}

// Loads `path` with the command line's targets and searches the shapes.
inline Searched search(const std::string& path, const cli::TargetOverrides& targets,
                       const std::vector<dose::Shape>& shapes, double round_step = 0.0, bool loading = false,
                       const std::vector<std::string>& model_dirs = {}) {
    Searched s{dose::make_template(cli::load(path, model_dirs, targets)), {}, {}};
    const auto& r = s.tmpl.regimen;
    const int oi = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    s.goals = dose::goals_of(r.targets, r.model.outputs[static_cast<std::size_t>(oi)]);
    dose::Request q;
    q.shapes = shapes;
    q.round_step = round_step;
    q.loading = loading;
    s.found = dose::search(s.tmpl, s.goals, q, pipeline());
    return s;
}

// The template with its maintenance series at `amount`, measured.
inline report::Candidate measure_at(const Searched& s, const dose::Shape& shape, double amount) {
    return pipeline()(dose::variant(s.tmpl, shape, amount));
}

inline bool all_met(const report::Candidate& c) {
    const auto& r = c.regimen;
    const int oi = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    for (const auto& v : verdict::verdicts(r.targets, r.model.outputs[static_cast<std::size_t>(oi)], c.exposure))
        if (v.met != true) return false;
    return true;
}

}  // namespace plateau::dosetest
