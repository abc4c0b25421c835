// The terminal summary of a population run: who, which regimens, PTA per target with its interval, percentiles,
// the PTA curve, the expected attainment, the subjects that failed or had no steady state, and the caution.
#include "report/caution.hpp"
#include "report/format.hpp"
#include "report/population_model.hpp"
#include "report/population_report.hpp"
#include "verdict/attainment.hpp"

namespace plateau::report {

namespace {

std::string spread_text(const model::Variability& v) {
    switch (v.spread) {
    case model::Spread::LogNormal: return v.name + " " + percent(v.cv) + " (log-normal CV)";
    case model::Spread::LogitNormal: return v.name + " " + num(v.omega) + " (logit-normal sd)";
    case model::Spread::Normal: return v.name + " " + v.text + " (normal sd)";
    }
    return v.name;
}

}  // namespace

std::string variability_line(const model::Model& m);

void write_population_text(std::ostream& out, const PopulationRun& p, const std::string& trailer) {
    const auto& rs = *p.regimens;
    const model::Output& o = population_output(p);
    const Node doc = population_model(p);
    const Node& regs = doc.at("regimens");
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
    out << "Seed " << p.seed << "; the same patients under every regimen; tolerance " << tolerance_text(p.tol) << "\n";
    out << "Variability: " << variability_line(rs.front().model) << "\n\n";
    for (std::size_t r = 0; r < rs.size(); ++r)
        out << "  " << regs.items[r].at("letter").value.text << "  " << rs[r].id
            << (rs[r].about.empty() ? "" : " — " + rs[r].about) << "\n";
    auto letter = [&](std::size_t r) { return regs.items[r].at("letter").value.text; };

    const Node& t0 = regs.items.front().at("targets");
    if (!t0.items.empty()) {
        out << "\n" << t0.label << ", with the Wilson score 95 % interval\n";
        for (std::size_t k = 0; k < t0.items.size(); ++k) {
            out << "  " << shown(t0.items[k].at("what")) << "\n";
            for (std::size_t r = 0; r < rs.size(); ++r) {
                const Node& a = regs.items[r].at("targets").items[k];
                out << "    " << letter(r) << "  " << pad_left(shown(a.at("pta")), 8) << "  (" << shown(a.at("ci95/0"))
                    << " – " << shown(a.at("ci95/1")) << ")  " << shown(a.at("attained")) << " of "
                    << shown(regs.items[r].at("subjects/total")) << "\n";
            }
        }
    } else {
        out << "\nNo targets: give --above, --window or --auc24 (or [targets] in the files) for the PTA\n";
    }

    out << "\n" << regs.items.front().at("percentiles").label;
    for (std::size_t r = 0; r < rs.size(); ++r) {
        out << "\n  " << letter(r) << "  " << pad_right("", 36);
        for (double q : population::kPercentiles) out << pad_left(num(q) + " %", 10);
        out << pad_left("n", 8) << "\n";
        for (const Node& f : regs.items[r].at("percentiles").items) {
            if (f.at("n").value.number == 0) continue;
            out << "     " << pad_right(label_with_unit(f.label, f.unit), 36);
            for (std::size_t j = 1; j < f.items.size(); ++j) out << pad_left(shown(f.items[j]), 10);
            out << pad_left(shown(f.at("n")), 8) << "\n";
        }
    }

    const Node& c0 = regs.items.front().at("pta_curve");
    if (!c0.items.empty()) {
        out << "\n" << c0.label << " (" << o.unit_text << ")\n  " << pad_right("threshold", 12);
        for (std::size_t r = 0; r < rs.size(); ++r) out << pad_left(letter(r), 9);
        out << "\n";
        for (std::size_t j = 0; j < c0.items.size(); ++j) {
            out << "  " << pad_right(shown(c0.items[j].at("threshold")), 12);
            for (std::size_t r = 0; r < rs.size(); ++r)
                out << pad_left(shown(regs.items[r].at("pta_curve").items[j].at("pta")), 9);
            out << "\n";
        }
    }
    if (p.thresholds != nullptr) {
        out << "\n" << regs.items.front().at("expected_attainment").label << " " << p.thresholds->path
            << " (cumulative fraction of response)\n ";
        for (std::size_t r = 0; r < rs.size(); ++r)
            out << " " << letter(r) << ": " << shown(regs.items[r].at("expected_attainment")) << (r + 1 < rs.size() ? ";" : "\n");
    }

    out << "\nPatients\n";
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const Node& s = regs.items[r].at("subjects");
        out << "  " << letter(r) << ": " << shown(s.at("ok")) << " " << s.at("ok").label << ", " << shown(s.at("no_steady_state"))
            << " " << s.at("no_steady_state").label << ", " << shown(s.at("failed")) << " " << s.at("failed").label
            << " (counted as not attaining)\n";
    }
    const std::vector<std::size_t> best = verdict::most_attaining(p.summaries);
    if (!best.empty() && rs.size() > 1) {
        std::string who;
        for (std::size_t r : best) who += (who.empty() ? "" : ", ") + letter(r) + " (" + rs[r].id + ")";
        const Node& a = regs.items[best.front()].at("targets/0");
        out << "\nMost patients reach \"" << shown(a.at("what")) << "\" with " << who << ": " << shown(a.at("pta")) << " ("
            << shown(a.at("attained")) << " of " << p.size << ")\n";
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
