// Every model file shipped in models/ run end to end through files: a regimen file is written for it, loaded
// with input::load_regimen and simulated. The result is checked against Boost.Odeint's Dormand–Prince 5 on the
// model's own rate expressions (evaluated with expr::evaluate; the doses are expanded, and the route fractions
// and lags applied, here, independently of sim/events), and, for the linear models, against the mass balance,
// AUC0-inf = F·D/CL and the steady state after many doses.
// The model directory is listed at run time, so a new model file is covered without touching this file.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <set>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include <boost/numeric/odeint.hpp>

#include "../metrics/support.hpp"
#include "expr/expr.hpp"
#include "input/load.hpp"
#include "metrics/exposure.hpp"
#include "sim/simulate.hpp"

using namespace plateau;
using Catch::Matchers::WithinRel;

namespace {

using State = std::vector<double>;

// The shipped model files, sorted by name.
std::vector<std::string> builtin_model_files() {
    std::vector<std::string> files;
    for (const auto& e : std::filesystem::directory_iterator(std::string(PLATEAU_SOURCE_DIR) + "/models"))
        if (e.is_regular_file() && e.path().extension() == ".toml") files.push_back(e.path().string());
    std::sort(files.begin(), files.end());
    return files;
}

// The ids documented in models/README.md; the listing must hold at least these.
const std::vector<std::string> kDocumentedIds{"one-compartment-iv",      "one-compartment-oral",
                                              "two-compartment-iv",      "two-compartment-oral",
                                              "three-compartment-iv",    "one-compartment-mm-iv",
                                              "one-compartment-mm-oral", "one-compartment-linear-mm-iv",
                                              "transit-oral",            "zelmarin",
                                              "korvatide",               "one-compartment-iv-renal",
                                              "zelmarin-renal"};

std::string num(double x) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", x);
    return buf;
}

// One [[doses]] entry as written in the regimen file (amounts in mg, times in h).
struct Entry {
    std::string route;
    double amount = 0.0;
    double at = 0.0;
    double every = 0.0;  // 0: single dose
    long count = 1;
    double over = 0.0;   // 0: bolus
};

struct Override {
    std::string name;
    std::string value;  // with its unit
};

std::string regimen_text(const std::string& id, const std::string& model_path, const std::vector<Override>& ov,
                         const std::vector<Entry>& doses, double until) {
    std::string s = "id = \"" + id + "\"\nmodel = \"" + model_path + "\"\n";
    if (!ov.empty()) {
        s += "[parameters]\n";
        for (const auto& o : ov) s += o.name + " = \"" + o.value + "\"\n";
    }
    for (const auto& d : doses) {
        s += "[[doses]]\nroute = \"" + d.route + "\"\namount = \"" + num(d.amount) + " mg\"\nat = \"" + num(d.at) +
             " h\"\n";
        if (d.count > 1) s += "every = \"" + num(d.every) + " h\"\ncount = " + std::to_string(d.count) + "\n";
        if (d.over > 0.0) s += "over = \"" + num(d.over) + " h\"\n";
    }
    s += "[horizon]\nuntil = \"" + num(until) + " h\"\n";
    return s;
}

// Value of a parameter or compartment name for expr::evaluate.
double lookup(const model::Model& m, const std::vector<double>& params, const State* x, double t,
              std::string_view name) {
    if (name == "t") return t;
    if (x != nullptr)
        for (std::size_t c = 0; c < m.compartments.size(); ++c)
            if (m.compartments[c].name == name) return (*x)[c];
    for (std::size_t p = 0; p < m.parameters.size(); ++p)
        if (m.parameters[p].name == name) return params[p];
    throw std::invalid_argument("unknown name in a model expression: " + std::string(name));
}

double constant(const model::Model& m, const std::vector<double>& params, const expr::Node& e) {
    return expr::evaluate(e, [&](std::string_view n) { return lookup(m, params, nullptr, 0.0, n); });
}

// dx/dt of the model's compartments, from its rate expressions, plus piecewise-constant input rates.
struct ModelRhs {
    const model::Model& m;
    std::vector<double> params;
    State input;  // mg/h into each compartment

    void operator()(const State& x, State& dx, double t) const {
        const expr::ValueLookup look = [&](std::string_view n) { return lookup(m, params, &x, t, n); };
        for (std::size_t c = 0; c < m.rates.size(); ++c)
            dx[c] = (m.rates[c].expr ? expr::evaluate(*m.rates[c].expr, look) : 0.0) + input[c];
    }
    std::vector<double> outputs(const State& x, double t) const {
        const expr::ValueLookup look = [&](std::string_view n) { return lookup(m, params, &x, t, n); };
        std::vector<double> y;
        for (const auto& o : m.outputs) y.push_back(expr::evaluate(*o.expr, look));
        return y;
    }
};

// A dose as it reaches a compartment: after the route's lag and fraction.
struct Given {
    double start = 0.0;
    int compartment = 0;
    double amount = 0.0;
    double duration = 0.0;  // 0: bolus
};

std::vector<Given> expand(const model::Model& m, const std::vector<double>& params, const std::vector<Entry>& doses) {
    std::vector<Given> out;
    for (const auto& d : doses) {
        const int r = m.route_index(d.route);
        REQUIRE(r >= 0);
        const auto& route = m.routes[static_cast<std::size_t>(r)];
        const double f = route.fraction ? constant(m, params, *route.fraction) : 1.0;
        const double lag = route.lag ? constant(m, params, *route.lag) : 0.0;
        for (long k = 0; k < d.count; ++k)
            out.push_back({d.at + static_cast<double>(k) * d.every + lag, route.into, f * d.amount, d.over});
    }
    return out;
}

// The mixed schedule every model is run through: IV boluses, single and repeated infusions (one overlapping
// the series), and, on every other route, repeated doses, a dose whose lagged time meets the infusion start at
// 6 h (with a 0.75-h lag) and a zero-order input over 1 h. IV doses go to the "iv" route, else the first one.
std::vector<Entry> mixed_schedule(const model::Model& m) {
    const int iv = std::max(0, m.route_index("iv"));
    const std::string ivr = m.routes[static_cast<std::size_t>(iv)].name;
    std::vector<Entry> d{{ivr, 400, 0.0, 0.0, 1, 0.0},  {ivr, 300, 6.0, 0.0, 1, 2.0},   {ivr, 150, 30.0, 0.0, 1, 0.0},
                         {ivr, 200, 24.0, 12.0, 4, 1.5}, {ivr, 240, 40.0, 0.0, 1, 20.0}};
    for (std::size_t r = 0; r < m.routes.size(); ++r) {
        if (static_cast<int>(r) == iv) continue;
        const std::string& name = m.routes[r].name;
        d.push_back({name, 500, 10.0, 8.0, 5, 0.0});
        d.push_back({name, 350, 5.25, 0.0, 1, 0.0});
        d.push_back({name, 250, 52.0, 0.0, 1, 1.0});
    }
    return d;
}

// A lag given by a parameter is set to 0.75 h in the regimen file.
std::vector<Override> lag_overrides(const model::Model& m) {
    std::vector<Override> ov;
    for (const auto& r : m.routes)
        if (r.lag && m.parameter_index(r.lag_text) >= 0) ov.push_back({r.lag_text, "0.75 h"});
    return ov;
}

std::string stem(const std::string& path) { return std::filesystem::path(path).stem().string(); }

// States at the times `obs` (sorted, within [0, t_end]) by dopri5 with dense output, integrated piece by piece
// between the dose events: boluses are added and input rates switched at the cuts. At an event time the state
// is the one just after the event (as the engine's right-continuous value).
std::vector<State> odeint_states(ModelRhs& f, const std::vector<Given>& given, const std::vector<double>& obs,
                                 double t_end) {
    namespace odeint = boost::numeric::odeint;
    const std::size_t n = f.m.compartments.size();
    std::vector<double> cuts{0.0, t_end};
    for (const auto& g : given) {
        cuts.push_back(g.start);
        if (g.duration > 0.0) cuts.push_back(g.start + g.duration);
    }
    std::sort(cuts.begin(), cuts.end());
    cuts.erase(std::unique(cuts.begin(), cuts.end(), [](double a, double b) { return b - a <= 1e-12; }), cuts.end());

    auto sys = [&f](const State& s, State& ds, double t) { f(s, ds, t); };
    State x(n, 0.0);
    std::vector<State> out;
    std::size_t next = 0;
    for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
        const double a = cuts[i], b = cuts[i + 1];
        std::fill(f.input.begin(), f.input.end(), 0.0);
        for (const auto& g : given) {
            const auto c = static_cast<std::size_t>(g.compartment);
            if (g.duration == 0.0 && std::abs(g.start - a) <= 1e-9) x[c] += g.amount;
            if (g.duration > 0.0 && g.start <= a + 1e-9 && g.start + g.duration >= b - 1e-9)
                f.input[c] += g.amount / g.duration;
        }
        while (next < obs.size() && obs[next] <= a) out.push_back(x), ++next;  // at the cut: after its jumps
        std::vector<double> times{a};
        while (next < obs.size() && obs[next] < b) times.push_back(obs[next++]);
        times.push_back(b);
        std::vector<State> seen;
        auto stepper = odeint::make_dense_output(1e-12, 1e-12, odeint::runge_kutta_dopri5<State>());
        odeint::integrate_times(stepper, sys, x, times.begin(), times.end(), 1e-3,
                                [&](const State& s, double) { seen.push_back(s); });
        REQUIRE(seen.size() == times.size());
        for (std::size_t k = 1; k + 1 < seen.size(); ++k) out.push_back(seen[k]);
        x = seen.back();
    }
    while (next < obs.size()) out.push_back(x), ++next;  // at t_end
    return out;
}

// Amount delivered by time t: boluses at or before t, infusions pro rata.
double delivered(const std::vector<Given>& given, double t) {
    double sum = 0.0;
    for (const auto& g : given) {
        if (g.duration == 0.0) {
            if (g.start <= t) sum += g.amount;
        } else {
            sum += g.amount * std::clamp((t - g.start) / g.duration, 0.0, 1.0);
        }
    }
    return sum;
}

bool is_linear(const model::Model& m) { return m.parameter_index("vmax") < 0; }  // saturable models have vmax

// One way of giving a dose in the identity checks: a bolus on each route, and a 1-h infusion on the IV route.
struct Variant {
    std::string route;
    double over = 0.0;
};

std::vector<Variant> variants(const model::Model& m) {
    std::vector<Variant> v;
    for (const auto& r : m.routes) {
        v.push_back({r.name, 0.0});
        if (r.name == "iv") v.push_back({r.name, 1.0});
    }
    return v;
}

double route_fraction(const model::Model& m, const std::vector<double>& params, const std::string& route) {
    const auto& r = m.routes[static_cast<std::size_t>(m.route_index(route))];
    return r.fraction ? constant(m, params, *r.fraction) : 1.0;
}

}  // namespace

TEST_CASE("models: every model file is listed and loads", "[models]") {
    std::set<std::string> ids;
    for (const auto& path : builtin_model_files()) {
        INFO("model file " << path);
        const model::Model m = input::load_model(path);
        CHECK(m.id == stem(path));
        CHECK(m.output_index("conc") >= 0);
        CHECK(m.output_index("free") >= 0);
        ids.insert(m.id);
    }
    for (const auto& id : kDocumentedIds) {
        INFO("documented model " << id);
        CHECK(ids.count(id) == 1);
    }
}

TEST_CASE("models: every model file against dopri5 through a mixed regimen file", "[models]") {
    const double T = 72.0;
    std::vector<double> obs;
    for (int i = 0; i <= 144; ++i) obs.push_back(0.5 * i);
    int covered = 0;
    for (const auto& path : builtin_model_files()) {
        const model::Model file_model = input::load_model(path);
        const std::vector<Entry> doses = mixed_schedule(file_model);
        const std::string id = "builtin-mixed-" + file_model.id;
        const regimen::Regimen reg = testing::regimen_from_text(
            id + ".toml", regimen_text(id, path, lag_overrides(file_model), doses, T));
        const model::Model& m = reg.model;
        const std::vector<double> params = reg.parameter_values();
        const sim::Simulation s = sim::simulate(reg);
        INFO("model " << m.id);
        REQUIRE(s.outcome == taylor::Outcome::Ok);
        // The lag set in the file reached the model, in hours (common practice, no source).
        for (const auto& o : lag_overrides(m))
            CHECK(params[static_cast<std::size_t>(m.parameter_index(o.name))] == 0.75);

        ModelRhs rhs{m, params, State(m.compartments.size(), 0.0)};
        const std::vector<State> ref = odeint_states(rhs, expand(m, params, doses), obs, T);
        // Reference series: compartments, then outputs evaluated from the reference state.
        std::vector<std::vector<double>> want(obs.size());
        for (std::size_t i = 0; i < obs.size(); ++i) {
            want[i] = ref[i];
            for (double y : rhs.outputs(ref[i], obs[i])) want[i].push_back(y);
        }
        const int n_series = static_cast<int>(m.compartments.size() + m.outputs.size());
        REQUIRE(s.trajectory.n_series() == n_series);
        double worst = 0.0;
        std::string worst_at;
        for (int k = 0; k < n_series; ++k) {
            const auto ks = static_cast<std::size_t>(k);
            double peak = 0.0;
            for (const auto& w : want) peak = std::max(peak, std::abs(w[ks]));
            REQUIRE(peak > 0.0);
            for (std::size_t i = 0; i < obs.size(); ++i) {
                const double e = std::abs(s.trajectory.value(k, obs[i]) - want[i][ks]) / peak;
                if (e > worst) {
                    worst = e;
                    worst_at = s.series[ks] + " at " + num(obs[i]) + " h";
                }
            }
        }
        INFO("largest difference to dopri5, relative to the series' largest value: " << worst << " (" << worst_at
                                                                                      << ")");
        CHECK(worst < 1e-8);  // Odeint at 1e-12, common practice, no source
        ++covered;
    }
    CHECK(covered >= static_cast<int>(kDocumentedIds.size()));
}

TEST_CASE("models: mass balance of every linear model file through a mixed regimen file", "[models]") {
    // Amount entered (route fraction x dose, infusions pro rata) = amount in the compartments + CL x integral of
    // the central concentration (common practice, no source).
    const double T = 96.0;
    std::set<std::string> linear;
    for (const auto& path : builtin_model_files()) {
        const model::Model file_model = input::load_model(path);
        if (!is_linear(file_model)) continue;
        const std::vector<Entry> doses = mixed_schedule(file_model);
        const std::string id = "builtin-balance-" + file_model.id;
        const regimen::Regimen reg = testing::regimen_from_text(
            id + ".toml", regimen_text(id, path, lag_overrides(file_model), doses, T));
        const model::Model& m = reg.model;
        const std::vector<double> params = reg.parameter_values();
        INFO("model " << m.id);
        // The central compartment and its volume, from the conc output (amount / volume).
        const int conc = m.output_index("conc");
        REQUIRE(conc >= 0);
        int central = -1, volume = -1;
        for (const auto& name : expr::identifiers(*m.outputs[static_cast<std::size_t>(conc)].expr)) {
            if (m.compartment_index(name) >= 0) central = m.compartment_index(name);
            if (m.parameter_index(name) >= 0) volume = m.parameter_index(name);
        }
        REQUIRE(central >= 0);
        REQUIRE(volume >= 0);
        const int cl = m.parameter_index("cl");
        REQUIRE(cl >= 0);
        const double clearance = params[static_cast<std::size_t>(cl)];
        const double v = params[static_cast<std::size_t>(volume)];

        const sim::Simulation s = sim::simulate(reg);
        REQUIRE(s.outcome == taylor::Outcome::Ok);
        const auto& tr = s.trajectory;
        const std::vector<Given> given = expand(m, params, doses);
        std::vector<double> times;
        for (double t = 0.013; t < T; t += 0.137) times.push_back(t);
        for (double t : tr.boundaries(0.0, T)) times.push_back(t);  // every step end, dose times included
        times.push_back(T);
        double worst = 0.0;
        for (double t : times) {
            double body = 0.0;
            for (std::size_t c = 0; c < m.compartments.size(); ++c) body += tr.value(static_cast<int>(c), t);
            const double eliminated = clearance * tr.integral(central, 0.0, t) / v;
            const double in = delivered(given, t);
            worst = std::max(worst, std::abs(body + eliminated - in) / in);
        }
        INFO("largest relative mass-balance defect: " << worst);
        CHECK(worst < 1e-9);  // common practice, no source
        linear.insert(m.id);
    }
    for (const char* id : {"one-compartment-iv", "one-compartment-oral", "two-compartment-iv", "two-compartment-oral",
                           "three-compartment-iv", "transit-oral", "zelmarin"}) {
        INFO("linear model " << id);
        CHECK(linear.count(id) == 1);
    }
}

TEST_CASE("models: AUC identities and the direct steady state of every linear model file", "[models]") {
    // For a linear model (common practice, no source): AUC0-inf of one dose = F·D/CL; at steady state the AUC
    // over one dosing interval equals the single-dose AUC0-inf; and the periodic state solved directly has the
    // peak and trough the actual regimen reaches after many doses.
    const double dose = 100.0, tau = 12.0, single_end = 2000.0;
    const long count = 200;
    int checked = 0;
    for (const auto& path : builtin_model_files()) {
        const model::Model file_model = input::load_model(path);
        if (!is_linear(file_model)) continue;
        for (const Variant& var : variants(file_model)) {
            const std::string tag = file_model.id + "-" + var.route + (var.over > 0.0 ? "-inf" : "");
            INFO("model " << file_model.id << ", route " << var.route << (var.over > 0.0 ? ", 1-h infusion" : ""));
            const std::vector<Override> ov = lag_overrides(file_model);

            // (a) One dose, long horizon.
            const std::string id1 = "builtin-single-" + tag;
            const regimen::Regimen one = testing::regimen_from_text(
                id1 + ".toml", regimen_text(id1, path, ov, {{var.route, dose, 0.0, 0.0, 1, var.over}}, single_end));
            const model::Model& m = one.model;
            const std::vector<double> params = one.parameter_values();
            const int cl = m.parameter_index("cl");
            REQUIRE(cl >= 0);
            const double expected = route_fraction(m, params, var.route) * dose / params[static_cast<std::size_t>(cl)];
            const sim::Simulation s1 = sim::simulate(one);
            REQUIRE(s1.outcome == taylor::Outcome::Ok);
            const int conc = s1.output_series(m.output_index("conc"));
            const double auc = s1.trajectory.integral(conc, 0.0, single_end);
            // The horizon covers the tail: the terminal slope from 48 h to 72 h, extrapolated from 72 h to the
            // horizon's end, leaves less than 1e-12 of the AUC beyond it (common practice, no source).
            const double c48 = s1.trajectory.value(conc, 48.0), c72 = s1.trajectory.value(conc, 72.0);
            const double lambda_z = std::log(c48 / c72) / 24.0;
            REQUIRE(lambda_z > 0.0);
            const double tail = c72 * std::exp(-lambda_z * (single_end - 72.0)) / lambda_z;
            INFO("terminal half-life " << std::log(2.0) / lambda_z << " h, tail beyond the horizon " << tail / auc);
            CHECK(tail < 1e-12 * auc);
            INFO("single-dose AUC relative error " << std::abs(auc - expected) / expected);
            CHECK_THAT(auc, WithinRel(expected, 1e-9));  // F·D/CL, common practice, no source

            // (b), (c) The same dose every tau, 200 times; the horizon ends with the last interval.
            const std::string id2 = "builtin-repeated-" + tag;
            const double end = tau * static_cast<double>(count);
            const regimen::Regimen rep = testing::regimen_from_text(
                id2 + ".toml", regimen_text(id2, path, ov, {{var.route, dose, 0.0, tau, count, var.over}}, end));
            const sim::Simulation s2 = sim::simulate(rep);
            REQUIRE(s2.outcome == taylor::Outcome::Ok);
            metrics::Request req;
            req.output = m.output_index("conc");
            const metrics::Exposure e = metrics::compute(rep, s2, req);
            REQUIRE(e.steady);
            REQUIRE(e.steady->found);
            REQUIRE(e.intervals.size() == static_cast<std::size_t>(count));
            const metrics::Interval& last = e.intervals.back();
            INFO("steady AUC_tau vs F·D/CL " << std::abs(e.steady->auc - expected) / expected << "; peak vs dose 200 "
                                             << std::abs(e.steady->peak.value - last.peak.value) / last.peak.value
                                             << "; trough vs dose 200 "
                                             << std::abs(e.steady->trough - last.trough) / last.trough);
            // Each of these: common practice, no source.
            CHECK_THAT(e.steady->auc, WithinRel(expected, 1e-9));             // AUC_tau at steady state = F·D/CL
            CHECK_THAT(e.steady->auc, WithinRel(auc, 1e-9));                  // ... = the single-dose AUC0-inf
            CHECK_THAT(e.steady->peak.value, WithinRel(last.peak.value, 1e-8));  // direct solve = dose 200
            CHECK_THAT(e.steady->trough, WithinRel(last.trough, 1e-8));          // direct solve = dose 200
            ++checked;
        }
    }
    CHECK(checked >= 17);  // seven linear models: a bolus per route (10) and an IV infusion (7)
}
