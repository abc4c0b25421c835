// Mass balance of a linear model through a mixed schedule: what the doses have delivered by time t (after the
// route's fraction and lag) equals what is in the compartments plus what clearance has removed,
// CL·∫0^t C dt, at every time (common practice, no source).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <vector>

#include "../support/build_model.hpp"
#include "sim/simulate.hpp"

using namespace plateau;
using test::dose;

namespace {

const double ka = 0.8, cl = 3.6, v = 25.0, q = 4.0, vp = 60.0, fo = 0.65, tlag = 0.75;

model::Model two_compartment_oral_iv() {
    return test::build_model({{{"ka", ka}, {"cl", cl}, {"v", v}, {"q", q}, {"vp", vp}, {"f", fo}, {"tlag", tlag}},
                              {{"gut", "-ka*gut"},
                               {"central", "ka*gut - cl/v*central - q/v*central + q/vp*periph"},
                               {"periph", "q/v*central - q/vp*periph"}},
                              {{"conc", "central/v"}},
                              {{"oral", "gut", "f", "tlag"}, {"iv", "central"}}});
}

struct Given {
    double start;     // after the lag
    double amount;    // after the fraction
    double duration;  // 0: bolus
};

// Amount delivered by time t (boluses at or before t count; infusions pro rata).
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

}  // namespace

TEST_CASE("engine: mass balance of a linear model through boluses, infusions and lagged oral doses", "[numeric]") {
    const model::Model m = two_compartment_oral_iv();
    const int oral = m.route_index("oral"), iv = m.route_index("iv");
    std::vector<sim::Dose> doses{dose(iv, 300, 0.0), dose(iv, 480, 6.0, 1.5), dose(oral, 500, 8.0)};
    for (int k = 0; k < 6; ++k) doses.push_back(dose(oral, 250, 12.0 + 8.0 * k));  // q8h from 12 h
    doses.push_back(dose(iv, 200, 30.0, 24.0));                                     // a long infusion overlapping
    doses.push_back(dose(iv, 150, 40.0));
    std::vector<Given> given{{0.0, 300, 0.0}, {6.0, 480, 1.5}, {8.0 + tlag, fo * 500, 0.0}};
    for (int k = 0; k < 6; ++k) given.push_back({12.0 + 8.0 * k + tlag, fo * 250, 0.0});
    given.push_back({30.0, 200, 24.0});
    given.push_back({40.0, 150, 0.0});

    const double T = 96.0;
    const auto s = sim::simulate(m, m.default_values(), doses, T);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    const auto& tr = s.trajectory;
    const int conc = s.output_series(0);

    double worst = 0.0;
    std::vector<double> times;
    for (double t = 0.013; t < T; t += 0.137) times.push_back(t);
    for (double t : tr.boundaries(0.0, T)) times.push_back(t);  // every step boundary, dose times included
    for (double t : times) {
        const double body = tr.value(0, t) + tr.value(1, t) + tr.value(2, t);
        const double eliminated = cl * tr.integral(conc, 0.0, t);
        const double in = delivered(given, t);
        worst = std::max(worst, std::abs(body + eliminated - in) / in);
    }
    INFO("max relative mass-balance defect: " << worst);
    CHECK(worst < 1e-9);  // common practice, no source

    // Just before and just after a lagged oral dose: the jump is F·D, in the gut only (common practice, no source).
    const double t_oral = 8.0 + tlag;
    CHECK(tr.value(0, t_oral) - tr.left_limit(0, t_oral) == Approx(fo * 500).epsilon(1e-12));
    CHECK(tr.value(1, t_oral) == Approx(tr.left_limit(1, t_oral)).epsilon(1e-14));
}

TEST_CASE("engine: AUC0-inf equals F·D/CL for a linear model", "[numeric]") {
    // Oral doses with lag plus an IV bolus and an infusion into a two-compartment model; the horizon is long
    // enough (~40 terminal half-lives) that the tail is negligible (common practice, no source).
    const model::Model m = two_compartment_oral_iv();
    const int oral = m.route_index("oral"), iv = m.route_index("iv");
    const std::vector<sim::Dose> doses{dose(oral, 500, 0.0), dose(iv, 100, 5.0), dose(iv, 240, 10.0, 4.0)};
    const auto s = sim::simulate(m, m.default_values(), doses, 2500.0);
    REQUIRE(s.outcome == taylor::Outcome::Ok);
    const double auc = s.trajectory.integral(s.output_series(0), 0.0, 2500.0);
    CHECK(auc == Approx((fo * 500 + 100 + 240) / cl).epsilon(1e-9));  // common practice, no source
}
