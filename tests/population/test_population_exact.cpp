// Population statistics against exact answers: PTA of a steady-state trough when only clearance varies,
// percentiles of the steady-state AUC24, the random effects against Ω, correlated covariates.
#include <catch2/catch.hpp>

#include <boost/math/distributions/normal.hpp>
#include <algorithm>
#include <cmath>

#include "../support/cl_varies.hpp"
#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "population/draw.hpp"
#include "population/reduce.hpp"
#include "population/run.hpp"
#include "verdict/verdicts.hpp"
#include "../support/temp_dir.hpp"

using namespace plateau;

namespace {

const char* const kModel = test::kClVariesModel;
const char* const kRegimen = test::kClVariesRegimen;

constexpr double kDose = 500.0, kTau = 12.0, kV = 40.0, kClTyp = 5.0, kT = 3.5;

// Steady-state trough of a one-compartment bolus every τ (computed from the closed form):
// (D/V)·e^{−kτ}/(1 − e^{−kτ}), k = CL/V.
double ss_trough(double cl) {
    const double e = std::exp(-cl / kV * kTau);
    return kDose / kV * e / (1.0 - e);
}

// CL* with ss_trough(CL*) = T, by bisection (the trough falls monotonically with CL).
double cl_star() {
    double lo = 0.01, hi = 100.0;
    for (int i = 0; i < 200; ++i) {
        const double mid = 0.5 * (lo + hi);
        (ss_trough(mid) >= kT ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
}

population::RegimenSummary summary_of(const regimen::Regimen& r, const population::Result& res, std::size_t k) {
    std::vector<std::pair<std::string, std::string>> kinds;
    for (const auto& v : verdict::verdicts(r.targets, r.model.outputs[0], metrics::Exposure{})) kinds.emplace_back(v.kind, v.what);
    return population::summarize(res.figures[k], res.bands[k], population::Setup{}.band_points, kinds, {}, nullptr);
}

}  // namespace

TEST_CASE("population: PTA of the steady-state trough with log-normal clearance is exact", "[population]") {
    test::TempDir dir("pta-exact");
    dir.write("model.toml", kModel);
    const regimen::Regimen r = input::load_regimen(dir.write("q12h.toml", kRegimen), {});
    const double omega = std::sqrt(std::log1p(0.3 * 0.3));   // ω² = ln(1 + CV²)
    // PTA = P(CL ≤ CL*) = Φ((ln CL* − ln CL_typ)/ω), computed from the closed form.
    const boost::math::normal_distribution<double> unit;
    const double exact = boost::math::cdf(unit, (std::log(cl_star()) - std::log(kClTyp)) / omega);
    REQUIRE(exact > 0.2);
    REQUIRE(exact < 0.8);
    for (std::size_t n : {std::size_t{300}, std::size_t{1500}}) {
        population::Setup s;
        s.size = n;
        s.seed = 20261202 + n;
        s.threads = 2;
        const population::Result res = population::run({r}, s);
        const auto sum = summary_of(r, res, 0);
        REQUIRE(sum.targets.size() == 1);
        REQUIRE(sum.ok == n);
        const double pta = sum.targets[0].pta;
        const double se = std::sqrt(exact * (1.0 - exact) / static_cast<double>(n));
        INFO("n = " << n << ", PTA " << pta << ", exact " << exact);
        CHECK(std::abs(pta - exact) < 4.0 * se);              // 4 Monte Carlo standard errors
        CHECK(sum.targets[0].ci95.first <= exact);            // the Wilson 95 % interval covers it
        CHECK(sum.targets[0].ci95.second >= exact);
        // Each subject's trough against the closed form with its own clearance (computed from the closed form).
        for (std::size_t i = 0; i < 20; ++i) {
            const double cl = res.subjects[i].parameters[0][0];
            CHECK(cl == Approx(kClTyp * std::exp(res.subjects[i].eta[0])).epsilon(1e-14));
            CHECK(res.figures[0][i].ss_trough == Approx(ss_trough(cl)).epsilon(1e-8));
        }
    }
}

TEST_CASE("population: percentiles of the steady-state AUC24 against exact log-normal quantiles", "[population]") {
    test::TempDir dir("auc-quantiles");
    dir.write("model.toml", kModel);
    const regimen::Regimen r = input::load_regimen(dir.write("q12h.toml", kRegimen), {});
    const std::size_t n = 2000;
    population::Setup s;
    s.size = n;
    s.seed = 7;
    s.threads = 2;
    const population::Result res = population::run({r}, s);
    std::vector<double> auc;
    for (const auto& f : res.figures[0]) auc.push_back(f.ss_auc24);
    std::sort(auc.begin(), auc.end());
    const double omega = std::sqrt(std::log1p(0.3 * 0.3));
    const boost::math::normal_distribution<double> unit;
    const double daily = kDose * 24.0 / kTau;
    for (double p : {0.05, 0.25, 0.5, 0.75, 0.95}) {
        // AUC24 = daily dose / CL = (daily/CL_typ)·e^{−η} is log-normal, and −η ~ N(0, ω²): its p-quantile is
        // (daily/CL_typ)·exp(ω z_p) (computed from the closed form).
        const double q = daily / kClTyp * std::exp(omega * boost::math::quantile(unit, p));
        // Distribution-free interval for a quantile from order statistics: ranks n·p ∓ 3.29·√(n p (1−p)) hold the
        // true quantile with probability 0.999 (normal approximation to the binomial; Conover, Practical
        // Nonparametric Statistics, 3rd ed., §3.2).
        const double half = 3.29 * std::sqrt(static_cast<double>(n) * p * (1.0 - p));
        const auto lo = static_cast<std::size_t>(std::max(0.0, std::floor(static_cast<double>(n) * p - half)));
        const auto hi = static_cast<std::size_t>(std::min(static_cast<double>(n - 1), std::ceil(static_cast<double>(n) * p + half)));
        INFO("p = " << p << ": exact " << q << ", order statistics " << auc[lo] << " .. " << auc[hi]);
        CHECK(auc[lo] <= q);
        CHECK(auc[hi] >= q);
    }
    // The summary's median is the sample median (linear interpolation between order statistics).
    const auto sum = summary_of(r, res, 0);
    const auto& qs = sum.spreads[4];
    REQUIRE(qs.key == "ss_auc24");
    CHECK(qs.values[2] == Approx(0.5 * (auc[999] + auc[1000])).epsilon(1e-12));   // common practice, no source
}

TEST_CASE("population: random effects have mean 0 and covariance Ω", "[population]") {
    const model::Model m = input::load_model(std::string(PLATEAU_SOURCE_DIR) + "/models/zelmarin-renal.toml");
    REQUIRE(m.variability.size() == 3);
    const std::vector<double> omega = model::omega_matrix(m);
    const std::size_t k = 3, n = 20000;
    const std::vector<double> chol = model::cholesky(omega, k);
    REQUIRE(!chol.empty());
    std::vector<double> mean(k, 0.0), cov(k * k, 0.0);
    std::vector<std::vector<double>> all;
    for (std::size_t i = 0; i < n; ++i) all.push_back(population::random_effects(99, i, chol, k));
    for (const auto& e : all)
        for (std::size_t a = 0; a < k; ++a) mean[a] += e[a] / static_cast<double>(n);
    for (const auto& e : all)
        for (std::size_t a = 0; a < k; ++a)
            for (std::size_t b = 0; b < k; ++b) cov[a * k + b] += (e[a] - mean[a]) * (e[b] - mean[b]) / static_cast<double>(n - 1);
    // ω² = ln(1 + CV²) for the 30 % CV of cl (computed from the closed form).
    CHECK(omega[0] == Approx(std::log1p(0.09)).epsilon(1e-14));
    for (std::size_t a = 0; a < k; ++a) {
        // The sample mean within 4 standard errors √(Ω_aa/n) (common practice, no source).
        CHECK(std::abs(mean[a]) < 4.0 * std::sqrt(omega[a * k + a] / static_cast<double>(n)));
        for (std::size_t b = 0; b < k; ++b) {
            // Var of a sample covariance of normal variables: (Ω_aa Ω_bb + Ω_ab²)/n (from memory).
            const double se = std::sqrt((omega[a * k + a] * omega[b * k + b] + omega[a * k + b] * omega[a * k + b]) /
                                        static_cast<double>(n));
            INFO("Ω[" << a << "," << b << "] = " << omega[a * k + b] << ", sample " << cov[a * k + b]);
            CHECK(std::abs(cov[a * k + b] - omega[a * k + b]) < 4.0 * se);
        }
    }
    // Subject i's effects depend only on (seed, i).
    CHECK(population::random_effects(99, 12345, chol, k) == all[12345]);
    CHECK(population::random_effects(98, 12345, chol, k) != all[12345]);
}

TEST_CASE("population: correlated covariates have the stated correlation", "[population]") {
    test::TempDir dir("cohort-corr");
    const std::string path = dir.write("c.toml", R"(id = "wide"
[covariates]
wt = { dist = "log-normal", median = "75 kg", cv = "20 %", range = ["1 kg", "600 kg"] }
ht = { dist = "normal", mean = "172 cm", sd = "9 cm", range = ["100 cm", "250 cm"] }
[correlation]
wt = { ht = 0.6 }
)");
    const population::Cohort c = input::load_cohort(path);
    REQUIRE(c.covariates.size() == 2);
    CHECK(c.covariates[0].mean == Approx(75e6));    // kg in canonical mg (computed by hand)
    CHECK(c.covariates[1].mean == Approx(172.0));
    const std::vector<double> chol = model::cholesky(c.correlation, 2);
    const std::size_t n = 5000;
    double sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const auto v = population::draw_covariates(c, chol, 3, i);
        const double x = std::log(v[0]), y = v[1];   // on the normal scale
        sx += x; sy += y; sxx += x * x; syy += y * y; sxy += x * y;
    }
    const double nn = static_cast<double>(n);
    const double r = (sxy - sx * sy / nn) / std::sqrt((sxx - sx * sx / nn) * (syy - sy * sy / nn));
    // SE of a sample correlation ≈ (1 − ρ²)/√n (from memory): 4 SE ≈ 0.036 here.
    CHECK(std::abs(r - 0.6) < 4.0 * (1.0 - 0.36) / std::sqrt(nn));
    // The log-normal median and the normal mean (computed from the closed form, 4 SE).
    CHECK(std::abs(sx / nn - std::log(75e6)) < 4.0 * std::sqrt(std::log1p(0.04) / nn));
    CHECK(std::abs(sy / nn - 172.0) < 4.0 * 9.0 / std::sqrt(nn));
}
