#include "report/population_model.hpp"

#include "report/caution.hpp"
#include "report/figures.hpp"
#include "report/format.hpp"
#include "verdict/verdicts.hpp"

namespace plateau::report {

const model::Output& population_output(const PopulationRun& p) {
    const auto& r = p.regimens->front();
    const int i = r.targets.output.empty() ? 0 : r.model.output_index(r.targets.output);
    return r.model.outputs[static_cast<std::size_t>(std::max(0, i))];
}

namespace {

void interval95(Node& parent, const std::pair<double, double>& ci) {
    Node& l = parent.list("ci95", "95 % interval");
    l.compact = true;
    l.leaf("", Value::of(ci.first), "low", "", 4, Form::Percent);
    l.leaf("", Value::of(ci.second), "high", "", 4, Form::Percent);
}

}  // namespace

Node population_model(const PopulationRun& p) {
    const auto& rs = *p.regimens;
    const model::Output& o = population_output(p);
    auto w = [](const std::string& t) { return Value::words(t); };
    Node d;
    d.shape = Node::Shape::Group;
    {
        Node& pop = d.group("population", "Population");
        pop.compact = true;
        pop.leaf("size", Value::count(p.size), "Patients");
        pop.leaf("seed", Value::count(p.seed), "Seed");
        pop.leaf("model", w(rs.front().model.id), "Model");
        pop.leaf("output", w(o.name), "Output");
        pop.leaf("unit", w(o.unit_text));
        pop.leaf("auc_unit", w(auc_unit(o.unit_text)));
        pop.leaf("tolerance", Value::of(p.tol), "Tolerance");
        pop.leaf("cohort", p.cohort ? w(p.cohort->id) : Value::absent(), "Cohort");
        pop.leaf("cohort_file", p.cohort ? w(p.cohort->path) : Value::absent(), "Cohort file");
    }
    Node& regs = d.list("regimens", "Regimens");
    for (std::size_t r = 0; r < rs.size(); ++r) {
        const auto& s = p.summaries[r];
        Node& one = regs.item();
        one.leaf("letter", w(verdict::letter_for(r)));
        one.leaf("regimen", w(rs[r].id), "Regimen");
        one.leaf("about", w(rs[r].about));
        one.leaf("file", w(rs[r].path), "Regimen file");
        {
            Node& sub = one.group("subjects", "Patients");
            sub.compact = true;
            sub.leaf("total", Value::count(s.total), "patients");
            sub.leaf("ok", Value::count(s.ok), "with a steady state");
            sub.leaf("no_steady_state", Value::count(s.no_steady_state), "without one");
            sub.leaf("failed", Value::count(s.failed), "failed numerically");
        }
        {
            Node& ts = one.list("targets", "Probability of target attainment (PTA)");
            ts.compact = true;
            for (const auto& a : s.targets) {
                Node& t = ts.item();
                t.leaf("kind", w(a.kind));
                t.leaf("what", w(a.what), "Target");
                t.leaf("attained", Value::count(a.attained), "attained");
                t.leaf("assessed", Value::count(a.assessed), "assessed");
                t.leaf("pta", Value::of(a.pta), "PTA", "", 4, Form::Percent);
                interval95(t, a.ci95);
            }
        }
        {
            Node& ps = one.group("percentiles", "Percentiles over patients");
            for (const auto& q : s.spreads) {
                const FigureInfo& f = figure_info(q.key);
                const bool scaled = f.measure == Measure::Concentration || f.measure == Measure::Exposure;
                const std::string unit = unit_text(f.measure, o);
                Node& fig = ps.group(q.key, std::string(f.label));
                fig.unit = unit;
                fig.compact = true;
                fig.leaf("n", Value::count(q.n), "n");
                for (std::size_t j = 0; j < q.values.size(); ++j)
                    fig.leaf("p" + std::to_string(static_cast<int>(population::kPercentiles[j])),
                             Value::of(scaled ? in_output_unit(o, q.values[j]) : q.values[j]),
                             num(population::kPercentiles[j]) + " %", unit);
            }
        }
        {
            Node& cv = one.list("pta_curve", "PTA by threshold");
            cv.compact = true;
            for (const auto& c : s.curve) {
                Node& pt = cv.item();
                pt.leaf("threshold", Value::of(in_output_unit(o, c.threshold)), "threshold", o.unit_text);
                pt.leaf("attained", Value::count(c.attained), "attained");
                pt.leaf("pta", Value::of(c.pta), "PTA", "", 4, Form::Percent);
                interval95(pt, c.ci95);
            }
        }
        one.leaf("expected_attainment", s.expected ? Value::of(*s.expected) : Value::absent(),
                 "Expected attainment over the threshold distribution", "", 4, Form::Percent);
    }
    d.leaf("caution", w(kCaution));
    return d;
}

}  // namespace plateau::report
