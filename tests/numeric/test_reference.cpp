// The engine against general-purpose reference solvers on the same problems: Boost.Odeint's Dormand–Prince 5
// with dense output (integrated piecewise between the dose events here, independently of sim/events), and for
// linear models the exact matrix exponential x(t) = expm(A·t)·x0 from Eigen's MatrixFunctions module.
// The heavy headers live in this one file.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <functional>
#include <vector>

#include <Eigen/Dense>
#include <boost/numeric/odeint.hpp>
#include <unsupported/Eigen/MatrixFunctions>

#include "../support/build_model.hpp"
#include "sim/simulate.hpp"

using namespace plateau;
using test::dose;

namespace {

using State = std::vector<double>;
// Right-hand side of the model without dose input: dx = f(x, t).
using Rhs = std::function<void(const State& x, State& dx, double t)>;

// A dose as the reference sees it: after the route's fraction and lag, into one compartment.
struct RefDose {
    double time;
    int compartment;
    double amount;
    double duration;  // 0: bolus
};

// States at the observation times `obs` (sorted, none on an event time), by dopri5 with dense output between
// consecutive event times; boluses are added and input rates switched at the events.
std::vector<State> odeint_reference(const Rhs& f, std::size_t n, const std::vector<RefDose>& doses,
                                    const std::vector<double>& obs, double t_end) {
    namespace odeint = boost::numeric::odeint;
    std::vector<double> cuts{0.0, t_end};
    for (const auto& d : doses) {
        cuts.push_back(d.time);
        if (d.duration > 0) cuts.push_back(d.time + d.duration);
    }
    std::sort(cuts.begin(), cuts.end());
    cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());

    State x(n, 0.0), u(n, 0.0);
    std::vector<State> out;
    std::size_t next_obs = 0;
    for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
        const double a = cuts[i], b = cuts[i + 1];
        std::fill(u.begin(), u.end(), 0.0);
        for (const auto& d : doses) {
            if (d.duration == 0.0 && d.time == a) x[static_cast<std::size_t>(d.compartment)] += d.amount;
            if (d.duration > 0.0 && d.time <= a && d.time + d.duration >= b)
                u[static_cast<std::size_t>(d.compartment)] += d.amount / d.duration;
        }
        std::vector<double> times{a};
        while (next_obs < obs.size() && obs[next_obs] < b) times.push_back(obs[next_obs++]);
        times.push_back(b);
        auto sys = [&](const State& s, State& ds, double t) {
            f(s, ds, t);
            for (std::size_t c = 0; c < n; ++c) ds[c] += u[c];
        };
        std::vector<State> seen;
        auto stepper = odeint::make_dense_output(1e-12, 1e-12, odeint::runge_kutta_dopri5<State>());
        odeint::integrate_times(stepper, sys, x, times.begin(), times.end(), 1e-3,
                                [&](const State& s, double) { seen.push_back(s); });
        REQUIRE(seen.size() == times.size());
        for (std::size_t k = 1; k + 1 < seen.size(); ++k) out.push_back(seen[k]);
        x = seen.back();
    }
    REQUIRE(out.size() == obs.size());
    return out;
}

// Largest relative error of the engine's series against reference values ref[i][s] at times obs[i]. The step
// rule controls the error of all series together (relative to the largest amount), so each series' error is
// taken relative to max(|reference|, 1e-3 · its own largest value): a compartment that has emptied (the gut
// long after absorption) compares absolutely, at a thousandth of its peak.
struct Worst {
    double err = 0.0;
    int series = -1;
    double t = 0.0;
};

Worst max_rel_error(const sim::Simulation& sim, const std::vector<double>& obs, const std::vector<State>& ref,
                    const std::vector<int>& series) {
    Worst w;
    for (std::size_t s = 0; s < series.size(); ++s) {
        double peak = 0.0;
        for (const auto& r : ref) peak = std::max(peak, std::abs(r[s]));
        for (std::size_t i = 0; i < obs.size(); ++i) {
            const double want = ref[i][s];
            const double got = sim.trajectory.value(series[s], obs[i]);
            const double e = std::abs(got - want) / std::max(std::abs(want), 1e-3 * peak);
            if (e > w.err) w = {e, series[s], obs[i]};
        }
    }
    return w;
}

std::vector<double> grid(double t_end, double step, double offset) {
    std::vector<double> t;
    for (double x = offset; x < t_end; x += step) t.push_back(x);
    return t;
}

// ---- linear: oral with lag, two compartments -----------------------------------------------------------------

const double ka = 1.1, cl = 4.2, v = 30.0, q = 2.5, vp = 45.0, fo = 0.75, tlag = 0.6;

model::Model linear_oral_iv() {
    return test::build_model({{{"ka", ka}, {"cl", cl}, {"v", v}, {"q", q}, {"vp", vp}, {"f", fo}, {"tlag", tlag}},
                              {{"gut", "-ka*gut"},
                               {"central", "ka*gut - cl/v*central - q/v*central + q/vp*periph"},
                               {"periph", "q/v*central - q/vp*periph"}},
                              {{"conc", "central/v"}},
                              {{"oral", "gut", "f", "tlag"}, {"iv", "central"}}});
}

void linear_rhs(const State& x, State& dx, double) {
    dx[0] = -ka * x[0];
    dx[1] = ka * x[0] - (cl + q) / v * x[1] + q / vp * x[2];
    dx[2] = q / v * x[1] - q / vp * x[2];
}

// ---- Michaelis–Menten elimination with oral and IV input -----------------------------------------------------

const double mka = 0.9, vmax = 490.0 / 24.0, km = 4.0, mv = 49.0, mf = 0.9, mlag = 0.5;

model::Model mm_oral_iv() {
    return test::build_model({{{"ka", mka}, {"vmax", vmax}, {"km", km}, {"v", mv}, {"f", mf}, {"tlag", mlag}},
                              {{"gut", "-ka*gut"}, {"central", "ka*gut - vmax*(central/v)/(km + central/v)"}},
                              {{"conc", "central/v"}},
                              {{"oral", "gut", "f", "tlag"}, {"iv", "central"}}});
}

void mm_rhs(const State& x, State& dx, double) {
    const double c = x[1] / mv;
    dx[0] = -mka * x[0];
    dx[1] = mka * x[0] - vmax * c / (km + c);
}

}  // namespace

TEST_CASE("engine: linear model with boluses, an infusion and lagged oral doses against dopri5", "[numeric]") {
    const model::Model m = linear_oral_iv();
    const int oral = m.route_index("oral"), iv = m.route_index("iv");
    const double T = 60.0;
    const std::vector<sim::Dose> doses{dose(iv, 500, 0.0), dose(iv, 250, 12.0), dose(iv, 300, 24.0, 2.0),
                                       dose(oral, 400, 30.0), dose(iv, 600, 34.0, 8.0), dose(oral, 400, 36.0)};
    const auto s = sim::simulate(m, m.default_values(), doses, T);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    // The same schedule with the route's fraction and lag applied by hand.
    const std::vector<RefDose> ref_doses{{0.0, 1, 500, 0}, {12.0, 1, 250, 0}, {24.0, 1, 300, 2.0},
                                         {30.0 + tlag, 0, fo * 400, 0}, {34.0, 1, 600, 8.0},
                                         {36.0 + tlag, 0, fo * 400, 0}};
    const std::vector<double> obs = grid(T, 0.173, 0.011);
    std::vector<State> ref = odeint_reference(linear_rhs, 3, ref_doses, obs, T);
    for (auto& r : ref) r.push_back(r[1] / v);  // the concentration output
    const Worst w = max_rel_error(s, obs, ref, {0, 1, 2, s.output_series(0)});
    INFO("max relative difference to dopri5: " << w.err << " (series " << w.series << ", t = " << w.t << " h)");
    CHECK(w.err < 1e-8);  // common practice, no source: two accurate solvers agree to well below their tolerances
    // Right after the oral doses the gut holds F·D (common practice, no source).
    CHECK(s.trajectory.value(0, 30.0 + tlag) - s.trajectory.left_limit(0, 30.0 + tlag) == Approx(fo * 400).epsilon(1e-12));
    CHECK(s.trajectory.left_limit(0, 30.0 + tlag) == Approx(0.0).margin(1e-9));
}

TEST_CASE("engine: Michaelis-Menten model with oral, bolus and infusion doses against dopri5", "[numeric]") {
    const model::Model m = mm_oral_iv();
    const int oral = m.route_index("oral"), iv = m.route_index("iv");
    const double T = 72.0;
    const std::vector<sim::Dose> doses{dose(iv, 600, 0.0), dose(iv, 400, 10.0, 4.0), dose(oral, 300, 20.0),
                                       dose(iv, 300, 30.0), dose(oral, 300, 31.0)};
    const auto s = sim::simulate(m, m.default_values(), doses, T);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    const std::vector<RefDose> ref_doses{{0.0, 1, 600, 0}, {10.0, 1, 400, 4.0}, {20.0 + mlag, 0, mf * 300, 0},
                                         {30.0, 1, 300, 0}, {31.0 + mlag, 0, mf * 300, 0}};
    const std::vector<double> obs = grid(T, 0.191, 0.013);
    std::vector<State> ref = odeint_reference(mm_rhs, 2, ref_doses, obs, T);
    for (auto& r : ref) r.push_back(r[1] / mv);
    const Worst w = max_rel_error(s, obs, ref, {0, 1, s.output_series(0)});
    INFO("max relative difference to dopri5: " << w.err << " (series " << w.series << ", t = " << w.t << " h)");
    CHECK(w.err < 1e-8);  // common practice, no source
}

namespace {

// x(t) for a linear system x' = A x + u (u piecewise constant) through boluses, by the matrix exponential of
// the augmented matrix [[A, u], [0, 0]] over each piece between events (computed from the closed form).
struct LinearEvent {
    double time;
    Eigen::VectorXd bolus;
    Eigen::VectorXd rate_change;
};

std::vector<Eigen::VectorXd> expm_reference(const Eigen::MatrixXd& A, const std::vector<LinearEvent>& events,
                                            const std::vector<double>& obs) {
    const Eigen::Index n = A.rows();
    Eigen::VectorXd x = Eigen::VectorXd::Zero(n), u = Eigen::VectorXd::Zero(n);
    double t = 0.0;
    std::size_t next = 0;
    auto advance = [&](double dt) {
        Eigen::MatrixXd M = Eigen::MatrixXd::Zero(n + 1, n + 1);
        M.topLeftCorner(n, n) = A * dt;
        M.topRightCorner(n, 1) = u * dt;
        Eigen::VectorXd y(n + 1);
        y << x, 1.0;
        return Eigen::VectorXd((M.exp() * y).head(n));
    };
    std::vector<Eigen::VectorXd> out;
    for (double to : obs) {
        while (next < events.size() && events[next].time <= to) {
            x = advance(events[next].time - t);
            t = events[next].time;
            x += events[next].bolus;
            u += events[next].rate_change;
            ++next;
        }
        out.push_back(advance(to - t));  // from the last event, not from the last observation
    }
    return out;
}

double max_rel_error(const sim::Simulation& s, const std::vector<double>& obs, const std::vector<Eigen::VectorXd>& ref) {
    double worst = 0.0;
    for (std::size_t i = 0; i < obs.size(); ++i)
        for (Eigen::Index c = 0; c < ref[i].size(); ++c) {
            const double want = ref[i](c);
            const double got = s.trajectory.value(static_cast<int>(c), obs[i]);
            worst = std::max(worst, std::abs(got - want) / std::abs(want));
        }
    return worst;
}

}  // namespace

TEST_CASE("engine: two-compartment bolus against the matrix exponential", "[numeric]") {
    const double k10 = 0.192, k12 = 1.86, k21 = 1.68;  // Bourne, ch. 19.2
    const model::Model m = test::build_model(
        {{{"k10", k10}, {"k12", k12}, {"k21", k21}, {"v1", 35.295}},
         {{"central", "-(k10 + k12)*central + k21*periph"}, {"periph", "k12*central - k21*periph"}},
         {{"conc", "central/v1"}},
         {{"iv", "central"}}});
    const double T = 72.0;
    const auto s = sim::simulate(m, m.default_values(), {dose(0, 500.0, 0.0), dose(0, 250.0, 30.0)}, T);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    Eigen::MatrixXd A(2, 2);
    A << -(k10 + k12), k21, k12, -k21;
    Eigen::VectorXd b0(2), b1(2), none = Eigen::VectorXd::Zero(2);
    b0 << 500.0, 0.0;
    b1 << 250.0, 0.0;
    const std::vector<double> obs = grid(T, 0.29, 0.05);
    const auto ref = expm_reference(A, {{0.0, b0, none}, {30.0, b1, none}}, obs);
    const double err = max_rel_error(s, obs, ref);
    INFO("max relative error against expm: " << err);
    CHECK(err < 1e-10);  // computed from the closed form
}

TEST_CASE("engine: three-compartment boluses and infusion against the matrix exponential", "[numeric]") {
    const double k10 = 0.3, k12 = 0.9, k21 = 0.6, k13 = 0.2, k31 = 0.05;
    const model::Model m = test::build_model(
        {{{"k10", k10}, {"k12", k12}, {"k21", k21}, {"k13", k13}, {"k31", k31}, {"v", 12.0}},
         {{"central", "-(k10 + k12 + k13)*central + k21*shallow + k31*deep"},
          {"shallow", "k12*central - k21*shallow"},
          {"deep", "k13*central - k31*deep"}},
         {{"conc", "central/v"}},
         {{"iv", "central"}}});
    const double T = 96.0;
    const auto s = sim::simulate(m, m.default_values(),
                                 {dose(0, 400.0, 0.0), dose(0, 200.0, 6.0), dose(0, 300.0, 12.0, 3.0)}, T);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    Eigen::MatrixXd A(3, 3);
    A << -(k10 + k12 + k13), k21, k31, k12, -k21, 0.0, k13, 0.0, -k31;
    const Eigen::VectorXd none = Eigen::VectorXd::Zero(3);
    Eigen::VectorXd b0 = none, b1 = none, r_on = none, r_off = none;
    b0(0) = 400.0;
    b1(0) = 200.0;
    r_on(0) = 100.0;
    r_off(0) = -100.0;
    const std::vector<double> obs = grid(T, 0.31, 0.07);
    const auto ref = expm_reference(A, {{0.0, b0, none}, {6.0, b1, none}, {12.0, none, r_on}, {15.0, none, r_off}}, obs);
    const double err = max_rel_error(s, obs, ref);
    INFO("max relative error against expm: " << err);
    CHECK(err < 1e-10);  // computed from the closed form
}
