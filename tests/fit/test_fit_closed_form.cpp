// The individual fit against closed forms: one compartment, one IV bolus, one level, only the clearance
// varies, proportional error — the MAP solves a scalar equation; the M3 term of a censored level; the
// parameter derivatives through the spreads and a derived parameter.
#include <catch2/catch.hpp>

#include <boost/math/distributions/normal.hpp>
#include <boost/math/tools/roots.hpp>
#include <cmath>

#include "fit/residual.hpp"
#include "fit_support.hpp"

namespace {

using namespace plateau;

}  // namespace

TEST_CASE("fit: one level, one random effect: the MAP is the root of the closed-form derivative", "[fit]") {
    const auto l = fittest::load(fittest::data("one-cpt-bolus.toml"), fittest::data("one-level.csv"));
    const fit::Problem p = fit::make_problem(l.regimen, l.levels, 1e-12);
    const fit::Result r = fit::fit(p);
    REQUIRE(r.converged);

    // Closed form (computed from the closed form): f(η) = D/V·exp(−k(η)·τ), k = CL·e^η/V, τ = 6 h after the
    // dose; σ = 0.2·f; objective(η) = (y/f − 1)²/0.04 + ln(0.04 f²) + η²/ω², ω² = ln(1 + 0.3²).
    const double dose = 500.0, v = 40.0, cl = 5.0, tau = 6.0, y = 5.0, prop = 0.2;
    const double omega2 = std::log1p(0.09);
    auto f = [&](double eta) { return dose / v * std::exp(-cl * std::exp(eta) / v * tau); };
    auto objective = [&](double eta) {
        const double ratio = y / f(eta) - 1.0;
        return ratio * ratio / (prop * prop) + std::log(prop * prop * f(eta) * f(eta)) + eta * eta / omega2;
    };
    auto slope = [&](double eta) {
        const double k = cl * std::exp(eta) / v;
        const double q = y / f(eta);
        return -k * tau * (2.0 - 2.0 * q * (q - 1.0) / (prop * prop)) + 2.0 * eta / omega2;
    };
    std::uintmax_t iterations = 200;
    const auto bracket = boost::math::tools::toms748_solve(slope, -2.0, 2.0, boost::math::tools::eps_tolerance<double>(52),
                                                           iterations);
    const double eta = 0.5 * (bracket.first + bracket.second);
    REQUIRE(r.eta.size() == 1);
    CHECK(r.eta[0] == Approx(eta).margin(1e-8));                       // computed from the closed form
    CHECK(r.objective == Approx(objective(eta)).epsilon(1e-10));        // computed from the closed form
    REQUIRE(r.estimates.size() == 1);
    CHECK(r.estimates[0].value == Approx(cl * std::exp(eta)).epsilon(1e-8));  // computed from the closed form
    CHECK(r.estimates[0].population == Approx(cl).epsilon(1e-14));     // the model's value, no covariates
    CHECK(r.pred[0] == Approx(f(eta)).epsilon(1e-9));                   // computed from the closed form
    // Laplace: with the Gauss–Newton curvature of this objective, var(η) = 1 / (½·[w·(df/dη)² + 2/ω²]),
    // w = 2/σ² + (dσ²/df)²/σ⁴ = (2 + 4·0.04)/(0.04 f²) (computed from the closed form).
    const double fe = f(eta), df = -cl * std::exp(eta) / v * tau * fe;
    const double w = (2.0 + 4.0 * prop * prop) / (prop * prop * fe * fe);
    const double var = 1.0 / (0.5 * (w * df * df + 2.0 / omega2));
    CHECK(r.eta_se[0] == Approx(std::sqrt(var)).epsilon(1e-6));        // computed from the closed form
    CHECK(r.estimates[0].se == Approx(cl * std::exp(eta) * std::sqrt(var)).epsilon(1e-6));  // delta method, closed form
    // Every start agrees on a problem with one minimum.
    CHECK(r.starts.size() == 3);
    CHECK(r.notes.empty());
}

TEST_CASE("fit: the M3 term of a censored level is −2 ln Φ((L − f)/σ), far into the tail", "[fit]") {
    model::Residual res;
    res.additive = 0.3;
    res.proportional = 0.1;
    const fit::Observation o{2.0, 0.5, true};   // below 0.5
    for (double f : {0.2, 0.5, 1.0, 3.0, 8.0, 20.0}) {
        INFO("f = " << f);
        const double s = std::sqrt(0.09 + 0.01 * f * f);
        const double z = (0.5 - f) / s;
        const double phi = 0.5 * std::erfc(-z / std::sqrt(2.0));   // Φ by the complementary error function
        const fit::Term t = fit::term(res, o, f);
        CHECK(t.value == Approx(-2.0 * std::log(phi)).epsilon(1e-12));   // computed from the closed form
        // Its slope against a central difference of the closed form (common practice, no source).
        const double h = 1e-6;
        auto closed = [&](double ff) {
            const double zz = (0.5 - ff) / std::sqrt(0.09 + 0.01 * ff * ff);
            return -2.0 * std::log(0.5 * std::erfc(-zz / std::sqrt(2.0)));
        };
        CHECK(t.slope == Approx((closed(f + h) - closed(f - h)) / (2.0 * h)).epsilon(1e-6));
        CHECK(t.weight > 0.0);
    }
    // Far into the lower tail, where Φ is about 1e-270: the asymptotic series against erfc (computed from the
    // closed form; erfc is still representable there).
    for (double z : {-31.0, -35.0}) {
        const double exact = -2.0 * std::log(0.5 * std::erfc(-z / std::sqrt(2.0)));
        CHECK(fit::minus_two_log_cdf(z) == Approx(exact).epsilon(1e-9));
    }
    // Just above the switch the library CDF is used; the two sides meet (common practice, no source).
    CHECK(fit::minus_two_log_cdf(-30.0 + 1e-9) == Approx(fit::minus_two_log_cdf(-30.0 - 1e-9)).epsilon(1e-8));
}

TEST_CASE("fit: an uncensored level's term and the residual variance", "[fit]") {
    model::Residual res;
    res.additive = 0.2;
    res.proportional = 0.15;
    CHECK(fit::residual_variance(res, 10.0) == Approx(0.04 + 2.25).epsilon(1e-15));   // computed from the closed form
    const fit::Observation o{1.0, 12.0, false};
    const fit::Term t = fit::term(res, o, 10.0);
    CHECK(t.value == Approx(4.0 / 2.29 + std::log(2.29)).epsilon(1e-14));   // computed from the closed form
    auto value = [&](double f) { return fit::term(res, o, f).value; };
    CHECK(t.slope == Approx((value(10.0 + 1e-6) - value(10.0 - 1e-6)) / 2e-6).epsilon(1e-7));  // central difference
}

TEST_CASE("fit: parameter derivatives in η through each spread and a derived parameter", "[fit]") {
    // zelmarin-renal: cl and v1 are derived from covariates and vary log-normally; fu varies logit-normally.
    const regimen::Regimen r = input::load_regimen(std::string(PLATEAU_SOURCE_DIR) + "/regimens/zelmarin-p017-given.toml",
                                                     input::default_model_dirs());
    const model::Model& m = r.model;
    const std::vector<double> base = r.parameter_values();
    const std::vector<double> eta{0.2, -0.3, 0.4};
    const std::vector<double> jac = fit::parameter_jacobian(m, base, eta);
    const std::size_t n = eta.size();
    auto values = [&](std::vector<double> e) {
        std::vector<double> v = base;
        model::individualize(m, v, e);
        return v;
    };
    const std::vector<double> at = values(eta);
    // cl = typical·e^η: ∂cl/∂η_cl = cl (computed from the closed form).
    const auto cl = static_cast<std::size_t>(m.parameter_index("cl"));
    const auto fu = static_cast<std::size_t>(m.parameter_index("fu"));
    CHECK(jac[cl * n + 0] == Approx(at[cl]).epsilon(1e-14));
    CHECK(jac[cl * n + 1] == 0.0);
    // fu = logistic(logit(fu0) + η): ∂fu/∂η = fu(1 − fu) (computed from the closed form).
    CHECK(jac[fu * n + 2] == Approx(at[fu] * (1.0 - at[fu])).epsilon(1e-14));
    // Every entry against central differences of model::individualize (common practice, no source).
    for (std::size_t k = 0; k < n; ++k) {
        std::vector<double> up = eta, down = eta;
        up[k] += 1e-6;
        down[k] -= 1e-6;
        const auto a = values(up), b = values(down);
        for (std::size_t i = 0; i < base.size(); ++i)
            CHECK(jac[i * n + k] == Approx((a[i] - b[i]) / 2e-6).epsilon(1e-7).margin(1e-12));
    }
}

TEST_CASE("fit: a derived parameter of a varied one, itself varied, differentiates by the chain rule", "[fit]") {
    // k = cl/v·exp(η_k) with cl = cl0·exp(η_cl): ∂k/∂η_cl = k, ∂k/∂η_k = k (computed from the closed form).
    const std::string dir = std::string(PLATEAU_TEST_DIR) + "/fit/data/";
    const model::Model m = input::load_model(dir + "derived-varied.toml");
    std::vector<double> base = m.default_values();
    const std::vector<double> eta{0.3, -0.2, 0.1};
    const std::vector<double> jac = fit::parameter_jacobian(m, base, eta);
    std::vector<double> at = base;
    model::individualize(m, at, eta);
    const auto k = static_cast<std::size_t>(m.parameter_index("k"));
    const auto h = static_cast<std::size_t>(m.parameter_index("half"));
    CHECK(jac[k * 3 + 0] == Approx(at[k]).epsilon(1e-14));
    CHECK(jac[k * 3 + 1] == Approx(at[k]).epsilon(1e-14));
    CHECK(jac[k * 3 + 2] == 0.0);
    // half = ln 2 / k + shift (shift normal): ∂half/∂η_cl = −ln2/k, ∂half/∂η_shift = 1 (computed from the closed form).
    CHECK(jac[h * 3 + 0] == Approx(-std::log(2.0) / at[k]).epsilon(1e-13));
    CHECK(jac[h * 3 + 2] == Approx(1.0).epsilon(1e-15));
}
