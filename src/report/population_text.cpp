// The terminal summary of a population run: who, which regimens, PTA per target with its interval, percentiles,
// the PTA curve, the expected attainment, the subjects that failed or had no steady state, and the caution.
#include <cmath>
#include <cstdio>

#include "report/caution.hpp"
#include "report/compare.hpp"
#include "report/format.hpp"
#include "report/population_report.hpp"

namespace plateau::report {

namespace {

const model::Output& output_of(const regimen::Regimen& r) {
    const int i = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    return r.model.outputs[static_cast<std::size_t>(std::max(0, i))];
}

std::string spread_text(const model::Variability& v) {
    switch (v.spread) {
    case model::Spread::LogNormal: return v.name + " " + percent(v.cv) + " (log-normal CV)";
    case model::Spread::LogitNormal: return v.name + " " + num(v.omega) + " (logit-normal sd)";
    case model::Spread::Normal: return v.name + " " + v.text + " (normal sd)";
    }
    return v.name;
}

// A figure in its display unit.
double shown(const model::Output& o, const std::string& unit, double v) {
    return unit == "conc" || unit == "auc" ? in_output_unit(o, v) : v;
}

std::string unit_label(const model::Output& o, const std::string& unit) {
    if (unit == "conc") return o.unit_text;
    if (unit == "auc") return auc_unit(o.unit_text);
    if (unit == "hours") return "h";
    return "% of τ";
}

}  // namespace

int best_regimen(const PopulationRun& p) {
    int best = -1;
    for (std::size_t r = 0; r < p.summaries.size(); ++r) {
        if (p.summaries[r].targets.empty()) continue;
        if (best < 0 || p.summaries[r].targets.front().pta > p.summaries[static_cast<std::size_t>(best)].targets.front().pta)
            best = static_cast<int>(r);
    }
    return best;
}

std::string variability_line(const model::Model& m);

void write_population_text(std::ostream& out, const PopulationRun& p, const std::string& trailer) {
    const auto& rs = *p.regimens;
    const model::Output& o = output_of(rs.front());
    // The caution wrapped at 100 columns, continuation lines under its text, as the other reports print it.
    std::string caution = std::string("CAUTION: ") + kCaution;
    for (std::size_t line = 0, cut; caution.size() - line > 100 && (cut = caution.rfind(' ', line + 100)) > line;
         line = cut + 10)
        caution.replace(cut, 1, "\n         ");
    out << caution << "\n\n";
    out << "Population of " << p.size << " virtual patients — model '" << rs.front().model.id << "', output '" << o.name
        << "' (" << o.unit_text << ")\n";
    if (p.cohort != nullptr)
        out << "Cohort '" << p.cohort->id << "'" << (p.cohort->about.empty() ? "" : " — " + p.cohort->about) << "\n";
    else
        out << "No cohort: every patient has the regimen's covariates; only the parameters vary\n";
    char tol[32];
    std::snprintf(tol, sizeof tol, "%g", p.tol);
    out << "Seed " << p.seed << "; the same patients under every regimen; tolerance " << tol << "\n";
    out << "Variability: " << variability_line(rs.front().model) << "\n\n";
    for (std::size_t r = 0; r < rs.size(); ++r)
        out << "  " << letter_for(r) << "  " << rs[r].id << (rs[r].about.empty() ? "" : " — " + rs[r].about) << "\n";

    const auto& s0 = p.summaries.front();
    if (!s0.targets.empty()) {
        out << "\nProbability of target attainment (PTA), with the Wilson score 95 % interval\n";
        for (std::size_t k = 0; k < s0.targets.size(); ++k) {
            out << "  " << s0.targets[k].what << "\n";
            for (std::size_t r = 0; r < rs.size(); ++r) {
                const auto& a = p.summaries[r].targets[k];
                out << "    " << letter_for(r) << "  " << pad_left(percent(a.pta), 8) << "  (" << percent(a.ci95.first)
                    << " – " << percent(a.ci95.second) << ")  " << a.attained << " of " << a.total << "\n";
            }
        }
    } else {
        out << "\nNo targets: give --above, --window or --auc24 (or [targets] in the files) for the PTA\n";
    }

    out << "\nPercentiles over patients";
    for (std::size_t r = 0; r < rs.size(); ++r) {
        out << "\n  " << letter_for(r) << "  " << pad_right("", 36);
        for (double q : population::kPercentiles) out << pad_left(num(q) + " %", 10);
        out << pad_left("n", 8) << "\n";
        for (const auto& s : p.summaries[r].spreads) {
            if (s.n == 0) continue;
            out << "     " << pad_right(s.label + " (" + unit_label(o, s.unit) + ")", 36);
            for (double v : s.values) out << pad_left(num(shown(o, s.unit, v)), 10);
            out << pad_left(std::to_string(s.n), 8) << "\n";
        }
    }

    if (!s0.curve.empty()) {
        out << "\nPTA by threshold (" << o.unit_text << ")\n  " << pad_right("threshold", 12);
        for (std::size_t r = 0; r < rs.size(); ++r) out << pad_left(letter_for(r), 9);
        out << "\n";
        for (std::size_t j = 0; j < s0.curve.size(); ++j) {
            out << "  " << pad_right(num(in_output_unit(o, s0.curve[j].threshold)), 12);
            for (std::size_t r = 0; r < rs.size(); ++r) out << pad_left(percent(p.summaries[r].curve[j].pta), 9);
            out << "\n";
        }
    }
    if (p.thresholds != nullptr) {
        out << "\nExpected attainment over the threshold distribution " << p.thresholds->path
            << " (cumulative fraction of response)\n ";
        for (std::size_t r = 0; r < rs.size(); ++r)
            out << " " << letter_for(r) << ": " << (p.summaries[r].expected ? percent(*p.summaries[r].expected) : "—")
                << (r + 1 < rs.size() ? ";" : "\n");
    }

    out << "\nPatients\n";
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const auto& s = p.summaries[r];
        out << "  " << letter_for(r) << ": " << s.ok << " with a steady state, " << s.no_steady_state
            << " without one, " << s.failed << " failed numerically (counted as not attaining)\n";
    }
    const int best = best_regimen(p);
    if (best >= 0 && rs.size() > 1) {
        const std::size_t top = p.summaries[static_cast<std::size_t>(best)].targets.front().attained;
        std::string who;
        for (std::size_t r = 0; r < rs.size(); ++r)
            if (p.summaries[r].targets.front().attained == top) who += (who.empty() ? "" : ", ") + letter_for(r) + " (" + rs[r].id + ")";
        out << "\nMost patients reach \"" << s0.targets.front().what << "\" with " << who << ": "
            << percent(p.summaries[static_cast<std::size_t>(best)].targets.front().pta) << " (" << top << " of " << p.size
            << ")\n";
    }
    out << trailer << "\n" << caution << "\n";
}

std::string variability_line(const model::Model& m) {
    if (m.variability.empty()) return "none in the model";
    std::string s;
    for (const auto& v : m.variability) s += (s.empty() ? "" : ", ") + spread_text(v);
    const std::size_t n = m.variability.size();
    for (std::size_t i = 0; i < n && !m.correlation.empty(); ++i)
        for (std::size_t j = i + 1; j < n; ++j)
            if (m.correlation[i * n + j] != 0.0)
                s += "; correlation " + m.variability[i].name + "–" + m.variability[j].name + " " + num(m.correlation[i * n + j]);
    return s;
}

}  // namespace plateau::report
