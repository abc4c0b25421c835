#include "cli/evaluate.hpp"

#include "cli/commands.hpp"
#include "cli/nonfinite.hpp"
#include "cli/support.hpp"
#include "input/load.hpp"
#include "regimen/time.hpp"
#include "sim/steady_state.hpp"
#include "units/units.hpp"

namespace plateau::cli {

namespace {

// Splits "a..b"; throws UsageError when there is no "..".
std::pair<std::string_view, std::string_view> split_range(std::string_view text, std::string_view what,
                                                          std::string_view example) {
    const auto dots = text.find("..");
    if (dots == std::string_view::npos)
        throw UsageError(std::string(what) + ": expected LOW..HIGH, like " + std::string(example) + ", got " +
                         quoted(text));
    return {trim(text.substr(0, dots)), trim(text.substr(dots + 2))};
}

double quantity_of(std::string_view text, units::Dim dim, std::string_view what, const std::string& unit_hint,
                   bool plain_means_unit, double unit_factor) {
    units::Quantity q;
    try {
        q = units::parse_quantity(text);
    } catch (const TextError& e) {
        throw UsageError(std::string(what) + ": " + e.what());
    }
    if (q.dim.dimensionless() && !dim.dimensionless() && plain_means_unit) return q.value * unit_factor;
    if (q.dim != dim)
        throw UsageError(std::string(what) + ": expected " + units::dim_name(dim) + " like " + unit_hint + ", got " +
                         quoted(text));
    return q.value;
}

}  // namespace

std::pair<double, double> parse_time_window(std::string_view text, std::string_view what) {
    auto [a, b] = split_range(text, what, "0h..24h");
    const double lo = parse_duration(a.empty() ? "x" : a, what);
    const double hi = parse_duration(b.empty() ? "x" : b, what);
    if (lo < 0.0 || !(hi > lo))
        throw UsageError(std::string(what) + ": expected a window from a start to a later end, got " + quoted(text));
    return {lo, hi};
}

void apply_targets(regimen::Regimen& r, const TargetOverrides& t) {
    if (!t.output.empty()) {
        if (r.model.output_index(t.output) < 0) {
            std::vector<std::string> names;
            for (const auto& o : r.model.outputs) names.push_back(o.name);
            throw UsageError("--output: model " + quoted(r.model.id) + " has no output " + quoted(t.output) +
                             "; expected one of: " + join(names));
        }
        if (t.output != r.targets.output) {
            // Thresholds in the file belong to the file's output; they do not carry over to another one.
            r.targets = regimen::Targets{};
        }
        r.targets.output = t.output;
    }
    const int oi = output_of_target(r);
    if (oi < 0) return;
    const model::Output& o = r.model.outputs[static_cast<std::size_t>(oi)];
    const units::Dim dim = o.unit.dim;
    const std::string hint = "4" + o.unit_text;
    if (!t.above.empty()) {
        const double v = quantity_of(t.above, dim, "--above", hint, true, o.unit.factor);
        if (!(v > 0.0)) throw UsageError("--above: expected a threshold above 0, got " + quoted(t.above));
        r.targets.above = v;
    }
    if (!t.window.empty()) {
        auto [a, b] = split_range(t.window, "--window", "10mg/L..20mg/L");
        const double lo = quantity_of(a, dim, "--window", hint, true, o.unit.factor);
        const double hi = quantity_of(b, dim, "--window", hint, true, o.unit.factor);
        if (lo < 0.0 || hi < lo)
            throw UsageError("--window: expected 0 <= low <= high, got " + quoted(t.window));
        r.targets.window = std::make_pair(lo, hi);
    }
    if (!t.above_for.empty()) {
        const double f = quantity_of(t.above_for, units::kNone, "--above-for", "50%", false, 1.0);
        if (!(f > 0.0 && f <= 1.0))
            throw UsageError("--above-for: expected a share above 0 % and at most 100 %, written like 60% or 0.6, got " +
                             quoted(t.above_for));
        if (!r.targets.above) throw UsageError("--above-for needs a threshold: add --above or set 'above' in [targets]");
        r.targets.above_for = f;
    }
    if (!t.auc24.empty()) {
        auto [a, b] = split_range(t.auc24, "--auc24", "400..600");
        const units::Dim ad = dim * units::kTime;
        const std::string ah = "400" + o.unit_text + "*h";
        const double lo = quantity_of(a, ad, "--auc24", ah, true, o.unit.factor);
        const double hi = quantity_of(b, ad, "--auc24", ah, true, o.unit.factor);
        if (lo < 0.0 || hi < lo) throw UsageError("--auc24: expected 0 <= low <= high, got " + quoted(t.auc24));
        r.targets.auc24 = std::make_pair(lo, hi);
    }
}

regimen::Regimen load(const std::string& path, const std::vector<std::string>& dirs, const TargetOverrides& targets) {
    if (input::file_kind(path) == "model")
        throw UsageError(quoted(path) + " is a model file; expected a regimen file (one with [[doses]] and "
                         "model = \"...\"); 'plateau models' and 'plateau check' take model files");
    regimen::Regimen r = input::load_regimen(path, model_dirs(dirs));
    apply_targets(r, targets);
    return r;
}

void print_warnings(const regimen::Regimen& r, std::ostream& err) {
    for (const auto& w : r.warnings)
        err << w.pos.file << ':' << w.pos.line << ':' << w.pos.col << ": warning: " << w.message << '\n';
}

report::Candidate evaluate(regimen::Regimen r, const sim::Options& opt,
                           const std::vector<std::pair<double, double>>& auc_windows) {
    report::Candidate c;
    c.regimen = std::move(r);
    const std::string& path = c.regimen.path;
    for (const auto& [a, b] : auc_windows)
        if (regimen::before(c.regimen.horizon.until, b))
            throw UsageError("--auc: the window " + num(a) + " h .. " + num(b) + " h of " + quoted(path) +
                             " ends after the horizon (" + hours(c.regimen.horizon.until) + ")");
    c.schedule = sim::make_schedule(c.regimen);
    c.sim = sim::simulate(c.regimen.model, c.regimen.parameter_values(), c.schedule.doses, c.schedule.end, opt);
    if (c.sim.outcome != taylor::Outcome::Ok) {
        std::string msg = "numerical failure at t = " + num(c.sim.failed_at) + " h (" +
                          taylor::outcome_name(c.sim.outcome) + ") after " +
                          plural(static_cast<std::size_t>(c.sim.steps), "step") + " in " + quoted(path) +
                          "; nothing was written\n  ";
        if (c.sim.outcome == taylor::Outcome::StepLimit && !c.sim.stiff_state.empty())
            msg += "the model is stiff here: compartment '" + c.sim.stiff_state + "' turns over at " +
                   num(c.sim.stiff_rate) + " 1/h, and the steps (" + num(c.sim.stiff_step) + " h) are held by the "
                   "stability of the explicit Taylor method, not by accuracy, so a looser --tol does not help; "
                   "the horizon needs more than " + std::to_string(c.sim.budget) + " steps. Shorten the horizon, "
                   "or check whether so fast a rate is needed";
        else if (c.sim.outcome == taylor::Outcome::StepLimit)
            msg += "the horizon needs more than " + std::to_string(c.sim.budget) + " steps (the budget: " +
                   std::to_string(opt.max_steps) + " steps, 1 GiB of step polynomials): try a looser --tol or a "
                   "shorter horizon";
        else if (c.sim.outcome == taylor::Outcome::NegativeAmount && c.sim.failed_state >= 0) {
            const auto& m = c.regimen.model;
            const auto idx = static_cast<std::size_t>(c.sim.failed_state);
            const std::string& name = m.compartments[idx].name;
            const auto& rate = m.rates[idx];
            msg += "compartment '" + name + "' fell below zero, which no amount can: its rate '" + rate.text +
                   "' (" + rate.pos.file + ":" + std::to_string(rate.pos.line) + ":" + std::to_string(rate.pos.col) +
                   ") takes mass out of it while it is empty. Make the loss vanish with the amount (a factor of '" +
                   name + "' or of a concentration of it), and check the parameter units and signs";
        } else if (c.sim.outcome == taylor::Outcome::MassBalance && c.sim.failed_state >= 0) {
            const auto& m = c.regimen.model;
            const sim::MassBalanceFailure& b = c.sim.mass;
            const auto idx = static_cast<std::size_t>(b.compartment);
            const auto& rate = m.rates[idx];
            msg += "the mass balance does not hold: compartment '" + m.compartments[idx].name + "' holds " +
                   num(b.held) + " mg, but its doses and the integral of its rate '" + rate.text + "' (" +
                   rate.pos.file + ":" + std::to_string(rate.pos.line) + ":" + std::to_string(rate.pos.col) +
                   ") give " + num(b.expected) + " mg (off by " + num(b.held - b.expected) + " mg; the tolerance "
                   "allows " + num(b.allowed) + " mg). Whole body: " + num(b.delivered) + " mg delivered, " +
                   num(b.in_body) + " mg in the body, " + num(b.eliminated) + " mg eliminated. The run lost or "
                   "created mass, so no figure is reported";
        } else
            msg += explain_nonfinite(c.regimen, c.sim);
        throw NumericalError(msg);
    }
    metrics::Request req = metrics::request_from(c.regimen, opt);
    req.auc_windows = auc_windows;
    auto steady = sim::steady_state(c.regimen.model, c.regimen.parameter_values(), c.schedule, c.sim, opt);
    c.exposure = metrics::compute(c.schedule, c.sim, std::move(steady), req);
    return c;
}

}  // namespace plateau::cli
