#include "cli/commands.hpp"
#include "cli/evaluate.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>

#include "cli/support.hpp"
#include "core/diagnostic.hpp"
#include "core/suggest.hpp"
#include "fit/residual.hpp"
#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "report/caution.hpp"
#include "report/csv.hpp"
#include "units/units.hpp"

namespace plateau::cli {

// ---------------------------------------------------------------------------------------------- check

int check_command(const CheckOptions& opt, std::ostream& out, std::ostream& err) {
    if (opt.files.empty()) {
        err << "error: no files given; expected one or more model, regimen, cohort or threshold files\n";
        return kExitBadInput;
    }
    const std::vector<std::string> dirs = model_dirs(opt.model_dirs);
    std::size_t failed = 0;
    for (const auto& f : opt.files) {
        const int code = guarded(err, [&]() -> int {
            const std::string kind = input::file_kind(f);
            if (kind == "model") {
                const model::Model m = input::load_model(f);
                input::check_model_file_name(f, m);
                out << f << ": ok (model " << quoted(m.id) << ", " << plural(m.parameters.size(), "parameter") << ", "
                    << plural(m.compartments.size(), "compartment") << ", " << plural(m.outputs.size(), "output")
                    << ", " << plural(m.routes.size(), "route")
                    << (m.residual ? ", residual error " + fit::residual_text(m) : std::string()) << ")\n";
                return kExitOk;
            }
            if (kind == "regimen") {
                const regimen::Regimen r = input::load_regimen(f, dirs);
                print_warnings(r, err);
                long n = 0;
                for (const auto& d : r.doses) n += d.doses();
                out << f << ": ok (regimen " << quoted(r.id) << ", " << plural(static_cast<std::size_t>(n), "dose")
                    << ", model " << quoted(r.model.id) << ")\n";
                return kExitOk;
            }
            if (kind == "cohort") {
                const population::Cohort c = input::load_cohort(f);
                out << f << ": ok (cohort " << quoted(c.id) << ", "
                    << (c.rows.empty() ? plural(c.covariates.size(), "covariate")
                                       : plural(c.rows.size(), "row") + " of " + plural(c.columns.size(), "covariate"))
                    << ")\n";
                return kExitOk;
            }
            if (kind == "thresholds") {
                const population::ThresholdDist t = input::load_thresholds(f);
                out << f << ": ok (threshold distribution, " << plural(t.thresholds.size(), "threshold") << ")\n";
                return kExitOk;
            }
            err << f << ": error: cannot tell what kind of file this is\n"
                << "  expected: a model file has a [compartments] table; a regimen file has [[doses]] and model = "
                   "\"...\"; a cohort file has [covariates] or resample; a threshold distribution has thresholds\n";
            return kExitBadInput;
        });
        if (code != kExitOk) ++failed;
    }
    if (failed > 0 && opt.files.size() > 1)
        err << failed << " of " << plural(opt.files.size(), "file") << " failed the check\n";
    return failed > 0 ? kExitBadInput : kExitOk;
}

// ---------------------------------------------------------------------------------------------- models

namespace {

std::vector<std::string> route_names(const model::Model& m) {
    std::vector<std::string> v;
    for (const auto& r : m.routes) v.push_back(r.name);
    return v;
}

void print_model(std::ostream& out, const model::Model& m) {
    out << wrap_text(m.id + ": " + m.summary, 0, 2, kWidth) << '\n';
    if (!m.path.empty()) out << "file: " << m.path << '\n';

    std::vector<std::vector<std::string>> rows;
    for (const auto kind : {model::ParamKind::Fixed, model::ParamKind::Covariate, model::ParamKind::Derived}) {
        rows.clear();
        for (const auto& p : m.parameters) {
            if (p.kind != kind) continue;
            std::vector<std::string> row{p.name, with_unit(units::to_unit(p.value, p.unit), p.unit_text, kParameterDigits)};
            if (kind == model::ParamKind::Derived) row.push_back("= " + p.expr_text);
            row.push_back(p.about);
            rows.push_back(row);
        }
        if (kind == model::ParamKind::Fixed) out << "\nparameters\n" << format_table(rows, 2);
        else if (!rows.empty())
            out << (kind == model::ParamKind::Covariate ? "\ncovariates (typical values)\n"
                                                        : "\nderived parameters (typical values; once per subject)\n")
                << format_table(rows, 2);
    }
    rows.clear();
    for (std::size_t i = 0; i < m.variability.size(); ++i) {
        const auto& v = m.variability[i];
        const char* kind = v.spread == model::Spread::LogNormal ? "log-normal, CV" :
                           v.spread == model::Spread::LogitNormal ? "logit-normal, sd on the logit scale" : "normal, sd";
        std::string corr;
        for (std::size_t j = 0; j < m.variability.size() && !m.correlation.empty(); ++j)
            if (j != i && m.correlation[i * m.variability.size() + j] != 0.0)
                corr += (corr.empty() ? "correlation " : ", ") + m.variability[j].name + " " +
                        num(m.correlation[i * m.variability.size() + j], 4);
        rows.push_back({v.name, v.text, std::string(kind) + ", ω = " + num(v.omega, 4) + (corr.empty() ? "" : "; " + corr)});
    }
    if (!rows.empty()) out << "\nbetween-subject variability\n" << format_table(rows, 2);
    if (m.residual) out << "\nresidual error of measured levels\n  " << fit::residual_text(m) << "\n";

    rows.clear();
    for (const auto& c : m.compartments) rows.push_back({c.name, c.unit_text});
    out << "\ncompartments\n" << format_table(rows, 2);

    rows.clear();
    for (std::size_t i = 0; i < m.rates.size() && i < m.compartments.size(); ++i)
        rows.push_back({"d" + m.compartments[i].name + "/dt", "=", m.rates[i].expr ? m.rates[i].text : "0"});
    out << "\nrates\n" << format_table(rows, 2);

    rows.clear();
    for (const auto& o : m.outputs)
        rows.push_back({o.name, o.unit_text.empty() ? "-" : o.unit_text, o.text, o.about});
    out << "\noutputs\n" << format_table(rows, 2);

    rows.clear();
    for (const auto& r : m.routes) {
        const std::string into = r.into >= 0 && static_cast<std::size_t>(r.into) < m.compartments.size()
                                     ? m.compartments[static_cast<std::size_t>(r.into)].name
                                     : "?";
        rows.push_back({r.name, "into " + into,
                        "fraction " + (r.fraction_text.empty() ? std::string("1") : r.fraction_text),
                        "lag " + (r.lag_text.empty() ? std::string("none") : r.lag_text)});
    }
    out << "\nroutes\n" << format_table(rows, 2);
}

}  // namespace

int models_command(const ModelsOptions& opt, std::ostream& out, std::ostream& err) {
    return guarded(err, [&]() -> int {
        // A path to a model file is described directly, whatever folder it is in.
        const bool path_like = opt.id.find('/') != std::string::npos ||
                               (opt.id.size() > 5 && opt.id.compare(opt.id.size() - 5, 5, ".toml") == 0);
        if (path_like) {
            if (input::file_kind(opt.id) == "regimen")
                throw UsageError(quoted(opt.id) + " is a regimen file; expected a model id or a model file "
                                 "('plateau run' and 'plateau check' take regimen files)");
            print_model(out, input::load_model(opt.id));
            return kExitOk;
        }
        const std::vector<std::string> dirs = model_dirs(opt.model_dirs);
        std::string problems;
        std::vector<std::pair<std::string, std::string>> hidden;
        const std::vector<model::Model> models = input::list_models(dirs, &problems, &hidden);
        if (!opt.id.empty()) {
            for (const auto& m : models)
                if (m.id == opt.id) {
                    print_model(out, m);
                    return kExitOk;
                }
            std::vector<std::string> ids;
            for (const auto& m : models) ids.push_back(m.id);
            err << "error: no model " << quoted(opt.id) << did_you_mean(opt.id, ids) << " in " << join(dirs) << '\n'
                << wrap_text("available: " + (ids.empty() ? std::string("none") : join(ids)), 2, 4, kWidth)
                       .insert(0, "  ")
                << '\n';
            if (!problems.empty()) err << "some model files could not be loaded:\n" << problems;
            return kExitBadInput;
        }
        std::vector<std::vector<std::string>> rows{{"id", "compartments", "routes", "summary"}};
        for (const auto& m : models)
            rows.push_back({m.id, std::to_string(m.compartments.size()), join(route_names(m)), m.summary});
        out << format_table(rows, 0);
        if (models.empty()) out << "(no models found in " << join(dirs) << ")\n";
        for (const auto& [id, path] : hidden)
            for (const auto& m : models)
                if (m.id == id)
                    out << wrap_text("note: '" + id + "' is " + m.path + "; " + path + " has the same id and is not used",
                                     0, 2, kWidth)
                        << '\n';
        if (!problems.empty()) {
            err << "some model files could not be loaded:\n" << problems;
            return kExitBadInput;
        }
        return kExitOk;
    });
}

}  // namespace plateau::cli
