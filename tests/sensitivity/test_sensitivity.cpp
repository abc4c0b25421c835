// Forward sensitivities (sim/sensitivity.hpp): against the closed form of a one-compartment IV bolus, and against
// central finite differences of the Taylor engine at many times for a two-compartment model with infusions, an
// oral model with a lag time and a bioavailability (bolus and zero-order input), and a Michaelis–Menten model.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>
#include <vector>

#include "input/load.hpp"
#include "sim/sensitivity.hpp"

using namespace plateau;

namespace {

model::Model builtin(const std::string& id) {
    return input::load_model(std::string(PLATEAU_SOURCE_DIR) + "/models/" + id + ".toml");
}

std::vector<int> indices(const model::Model& m, const std::vector<std::string>& names) {
    std::vector<int> out;
    for (const auto& n : names) out.push_back(m.parameter_index(n));
    return out;
}

void set(const model::Model& m, std::vector<double>& p, const std::string& name, double v) {
    p[static_cast<std::size_t>(m.parameter_index(name))] = v;
}

// Forward sensitivities against central differences at every time: per parameter, the difference is at most
// 1e-7 of that parameter's largest derivative over the times (central differences at a relative step of 1e-5
// with runs at tolerance 1e-13 are good to ~1e-8 of it).
void compare_with_differences(const model::Model& m, const std::vector<double>& p, const std::vector<sim::Dose>& doses,
                              const std::vector<std::string>& wrt_names, const std::vector<double>& times, double t_end) {
    const std::vector<int> wrt = indices(m, wrt_names);
    const auto fwd = sim::output_sensitivities(m, p, doses, 0, times, wrt, t_end);
    const auto fd = sim::output_sensitivities_fd(m, p, doses, 0, times, wrt, t_end);
    REQUIRE(fwd.outcome == taylor::Outcome::Ok);
    REQUIRE(fd.outcome == taylor::Outcome::Ok);
    for (std::size_t k = 0; k < times.size(); ++k)
        CHECK(fwd.value[k] == Approx(fd.value[k]).epsilon(1e-12).margin(1e-15));  // the same run's values
    for (std::size_t j = 0; j < wrt.size(); ++j) {
        double big = 0.0;
        for (std::size_t k = 0; k < times.size(); ++k) big = std::max(big, std::abs(fd.d[k][j]));
        REQUIRE(big > 0.0);
        for (std::size_t k = 0; k < times.size(); ++k) {
            INFO("d/d " << wrt_names[j] << " at t = " << times[k] << ": forward " << fwd.d[k][j] << ", differences "
                        << fd.d[k][j]);
            CHECK(std::abs(fwd.d[k][j] - fd.d[k][j]) <= 1e-7 * big);  // computed by central differences
        }
    }
}

std::vector<double> grid(double from, double step, double to) {
    std::vector<double> t;
    for (double x = from; x <= to; x += step) t.push_back(x);
    return t;
}

}  // namespace

TEST_CASE("sensitivity: one compartment, IV bolus, against the closed-form derivatives", "[sensitivity]") {
    // C = D/V·e^{−CL/V·t}: ∂C/∂CL = −(t/V)·C, ∂C/∂V = C·(CL·t/V − 1)/V (computed from the closed form), with a
    // second dose at 12 h (superposition; at 12 h the value just after the dose).
    const model::Model m = builtin("one-compartment-iv");
    std::vector<double> p = m.default_values();
    const double cl = 5.0, v = 40.0, dose = 500.0;
    set(m, p, "cl", cl);
    set(m, p, "v", v);
    const std::vector<sim::Dose> doses{{0.0, 0, dose, 0.0, 0}, {12.0, 0, dose, 0.0, 1}};
    const std::vector<double> times{0.0, 0.5, 1.0, 3.0, 7.5, 11.99, 12.0, 12.5, 18.0, 24.0, 36.0};
    const auto r = sim::output_sensitivities(m, p, doses, 0, times, indices(m, {"cl", "v"}), 36.0);
    REQUIRE(r.outcome == taylor::Outcome::Ok);
    for (std::size_t k = 0; k < times.size(); ++k) {
        double c = 0.0, dcl = 0.0, dv = 0.0;
        for (double td : {0.0, 12.0}) {
            if (times[k] < td) continue;
            const double tau = times[k] - td;
            const double ci = dose / v * std::exp(-cl / v * tau);
            c += ci;
            dcl += -tau / v * ci;
            dv += ci * (cl * tau / v - 1.0) / v;
        }
        INFO("t = " << times[k]);
        CHECK(r.value[k] == Approx(c).epsilon(1e-11));    // computed from the closed form
        CHECK(r.d[k][0] == Approx(dcl).epsilon(1e-10).margin(1e-14));  // computed from the closed form
        CHECK(r.d[k][1] == Approx(dv).epsilon(1e-10).margin(1e-14));   // computed from the closed form
    }
}

TEST_CASE("sensitivity: two compartments, infusions and a bolus, against central differences", "[sensitivity]") {
    const model::Model m = builtin("two-compartment-iv");
    const std::vector<double> p = m.default_values();
    const std::vector<sim::Dose> doses{
        {0.0, 0, 1000.0, 1.0, 0}, {12.0, 0, 1000.0, 1.0, 0}, {24.0, 0, 1000.0, 0.5, 0}, {30.0, 0, 300.0, 0.0, 1}};
    // Times on and off the doses and the infusion ends (right-continuous values, smooth in every parameter).
    std::vector<double> times = grid(0.0, 0.75, 48.0);
    for (double t : {1.0, 12.0, 13.0, 24.0, 24.5, 30.0}) times.push_back(t);
    std::sort(times.begin(), times.end());
    compare_with_differences(m, p, doses, {"cl", "v1", "q", "v2"}, times, 48.0);
}

TEST_CASE("sensitivity: oral doses with a lag time and a bioavailability, against central differences",
          "[sensitivity]") {
    const model::Model m = builtin("one-compartment-oral");
    std::vector<double> p = m.default_values();
    set(m, p, "tlag", 0.5);
    set(m, p, "f", 0.7);
    // Oral boluses every 8 h, one zero-order oral input over 2 h (an infusion that the lag moves) and an IV dose.
    const std::vector<sim::Dose> doses{{0.0, 0, 500.0, 0.0, 0},
                                       {8.0, 0, 500.0, 0.0, 0},
                                       {16.0, 0, 500.0, 2.0, 1},
                                       {20.0, 1, 200.0, 0.0, 2}};
    // Times off the moved dose times and the moved input's end (0.5, 8.5, 16.5, 18.5 h): there the value is not
    // differentiable in the lag (the sensitivity jumps), and central differences straddle the two sides.
    compare_with_differences(m, p, doses, {"ka", "f", "tlag", "cl", "v"}, grid(0.2, 0.7, 40.0), 40.0);
}

TEST_CASE("sensitivity: Michaelis–Menten elimination, against central differences", "[sensitivity]") {
    const model::Model m = builtin("one-compartment-mm-oral");
    std::vector<double> p = m.default_values();
    const std::vector<sim::Dose> doses{{0.0, 0, 400.0, 0.0, 0}, {12.0, 0, 400.0, 0.0, 0}, {18.0, 1, 250.0, 0.5, 1}};
    std::vector<double> times = grid(0.0, 0.6, 48.0);
    compare_with_differences(m, p, doses, {"ka", "f", "vmax", "km", "v"}, times, 48.0);
}

TEST_CASE("sensitivity: a lag time in a nonlinear model is refused, naming the parameter", "[sensitivity]") {
    const model::Model m = builtin("one-compartment-mm-oral");
    std::vector<double> p = m.default_values();
    set(m, p, "tlag", 0.5);
    const std::vector<sim::Dose> doses{{0.0, 0, 400.0, 0.0, 0}};
    const std::vector<double> times{1.0, 2.0};
    try {
        sim::output_sensitivities(m, p, doses, 0, times, indices(m, {"vmax", "tlag"}), 4.0);
        FAIL("no error");
    } catch (const std::invalid_argument& e) {
        // common practice, no source: the message names the parameter, the route and why
        CHECK(std::string(e.what()) ==
              "derivatives with respect to parameter 'tlag' are not available: the lag of route 'oral' depends on it "
              "and the rates of model 'one-compartment-mm-oral' are not linear in the compartments (the jump a moved "
              "dose causes then depends on the state)");
    }
    // Without the lag among the parameters the same run is fine (the lag does not depend on vmax).
    const auto r = sim::output_sensitivities(m, p, doses, 0, times, indices(m, {"vmax"}), 4.0);
    CHECK(r.outcome == taylor::Outcome::Ok);
    CHECK(r.d[1][0] < 0.0);  // common practice, no source: faster elimination lowers the level
    CHECK_THROWS_AS(sim::output_sensitivities(m, p, doses, 5, times, indices(m, {"vmax"}), 4.0), std::invalid_argument);
}
