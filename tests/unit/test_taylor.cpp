// Tests for the Taylor engine: every coefficient recurrence against a series known in closed form, the order
// and step-size rules, and the stepper. Expected coefficients are computed in the test from the closed form
// (binomial series, Cauchy products of known series), independently of the engine's recurrences.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "expr/expr.hpp"
#include "taylor/series.hpp"
#include "taylor/stepper.hpp"
#include "taylor/tape.hpp"

using namespace plateau;

namespace {

using Coeffs = std::vector<double>;

struct Problem {
    std::vector<std::string> states;
    std::vector<std::string> rhs;  // one per state, "" = zero
    std::vector<std::pair<std::string, double>> params;
    std::vector<std::string> outputs;
};

taylor::Tape compile(const Problem& p) {
    taylor::SystemSpec spec;
    spec.states = p.states;
    for (const auto& r : p.rhs) spec.rhs.push_back(r.empty() ? nullptr : expr::parse(r));
    for (const auto& [name, value] : p.params) spec.params.push_back(name);
    for (const auto& o : p.outputs) spec.outputs.push_back(expr::parse(o));
    return taylor::compile(spec);
}

// Every series (states, then outputs) expanded to `order` around (t0, x0) with inputs u.
std::vector<Coeffs> expand(const Problem& p, double t0, const std::vector<double>& x0, int order,
                           const std::vector<double>& u = {}) {
    taylor::Expander ex(compile(p), order);
    std::vector<double> values;
    for (const auto& kv : p.params) values.push_back(kv.second);
    ex.set_params(values);
    std::vector<double> out(static_cast<std::size_t>(ex.n_series() * (order + 1)));
    ex.expand(t0, x0, u, out);
    std::vector<Coeffs> series;
    for (int s = 0; s < ex.n_series(); ++s)
        series.emplace_back(out.begin() + s * (order + 1), out.begin() + (s + 1) * (order + 1));
    return series;
}

// Largest error of got[n] relative to |expected[n]|; where expected[n] is 0 the error is absolute.
double max_rel_error(const Coeffs& got, const Coeffs& expected) {
    REQUIRE(got.size() == expected.size());
    double worst = 0.0;
    for (std::size_t n = 0; n < got.size(); ++n) {
        const double d = std::abs(got[n] - expected[n]);
        const double e = expected[n] != 0.0 ? d / std::abs(expected[n]) : d;
        if (!(e <= worst)) worst = e;  // NaN propagates as a failure
    }
    return worst;
}

// Builds coefficients n = 0..order from a function of n.
template <class F>
Coeffs make(int order, F&& f) {
    Coeffs c(static_cast<std::size_t>(order) + 1);
    for (int n = 0; n <= order; ++n) c[static_cast<std::size_t>(n)] = f(n);
    return c;
}

double factorial(int n) {
    double f = 1.0;
    for (int i = 2; i <= n; ++i) f *= i;
    return f;
}

// Generalised binomial coefficient C(alpha, n).
double binom(double alpha, int n) {
    double c = 1.0;
    for (int i = 1; i <= n; ++i) c *= (alpha - i + 1) / i;
    return c;
}

// Cauchy product: coefficients of the product of two series.
Coeffs cauchy(const Coeffs& a, const Coeffs& b) {
    Coeffs c(a.size(), 0.0);
    for (std::size_t n = 0; n < a.size(); ++n)
        for (std::size_t j = 0; j <= n; ++j) c[n] += a[n - j] * b[j];
    return c;
}

constexpr int kOrder = 20;
constexpr double kTol = 1e-14;

}  // namespace

TEST_CASE("taylor: recurrences of functions of t match their known series", "[taylor]") {
    const double k = 2.5, c = 0.7;
    const Problem p{{}, {}, {{"k", k}, {"c", c}},
                    {"exp(t)", "1/(1+t)", "log(1+t)", "sqrt(1+t)", "(1+t)^1.5", "(1+t)^k", "(1+t)^(-k)", "t^2",
                     "t^3", "t*exp(t)", "exp(t)/(1+t)", "exp(-t)*sqrt(1+t)", "exp(2*t)", "exp(t)-t*t",
                     "(1+t)^(-1)", "sqrt(1+t)/exp(t)", "log(1+t)*(1+t)"}};
    for (double t0 : {0.0, 0.3}) {
        INFO("t0 = " << t0);
        const auto got = expand(p, t0, {}, kOrder);
        const double b = 1.0 + t0;
        // All expected values computed from the closed form.
        const Coeffs e_exp = make(kOrder, [&](int n) { return std::exp(t0) / factorial(n); });
        const Coeffs e_inv = make(kOrder, [&](int n) { return std::pow(-1.0, n) / std::pow(b, n + 1); });
        const Coeffs e_log = make(kOrder, [&](int n) {
            return n == 0 ? std::log(b) : std::pow(-1.0, n + 1) / (n * std::pow(b, n));
        });
        auto e_pow = [&](double alpha) {
            return make(kOrder, [&](int n) { return binom(alpha, n) * std::pow(b, alpha - n); });
        };
        const Coeffs e_sqrt = e_pow(0.5);
        const Coeffs e_t2 = make(kOrder, [&](int n) { return n == 0 ? t0 * t0 : n == 1 ? 2 * t0 : n == 2 ? 1.0 : 0.0; });
        const Coeffs e_t3 = make(kOrder, [&](int n) {
            return n == 0 ? t0 * t0 * t0 : n == 1 ? 3 * t0 * t0 : n == 2 ? 3 * t0 : n == 3 ? 1.0 : 0.0;
        });
        const Coeffs e_t = make(kOrder, [&](int n) { return n == 0 ? t0 : n == 1 ? 1.0 : 0.0; });
        const Coeffs e_expm = make(kOrder, [&](int n) { return std::exp(-t0) * std::pow(-1.0, n) / factorial(n); });
        const Coeffs e_exp2 = make(kOrder, [&](int n) { return std::exp(2 * t0) * std::pow(2.0, n) / factorial(n); });
        Coeffs e_diff = e_exp;
        for (std::size_t n = 0; n < e_diff.size(); ++n) e_diff[n] -= e_t2[n];
        const Coeffs e_loglin = cauchy(e_log, make(kOrder, [&](int n) { return n == 0 ? b : n == 1 ? 1.0 : 0.0; }));

        CHECK(max_rel_error(got[0], e_exp) < kTol);
        CHECK(max_rel_error(got[1], e_inv) < kTol);
        CHECK(max_rel_error(got[2], e_log) < kTol);
        CHECK(max_rel_error(got[3], e_sqrt) < kTol);
        CHECK(max_rel_error(got[4], e_pow(1.5)) < kTol);
        CHECK(max_rel_error(got[5], e_pow(k)) < kTol);
        CHECK(max_rel_error(got[6], e_pow(-k)) < kTol);
        CHECK(max_rel_error(got[7], e_t2) < kTol);
        CHECK(max_rel_error(got[8], e_t3) < kTol);
        CHECK(max_rel_error(got[9], cauchy(e_t, e_exp)) < kTol);
        CHECK(max_rel_error(got[10], cauchy(e_exp, e_inv)) < kTol);
        CHECK(max_rel_error(got[11], cauchy(e_expm, e_sqrt)) < kTol);
        CHECK(max_rel_error(got[12], e_exp2) < kTol);
        CHECK(max_rel_error(got[13], e_diff) < kTol);
        CHECK(max_rel_error(got[14], e_inv) < kTol);
        CHECK(max_rel_error(got[15], cauchy(e_sqrt, e_expm)) < kTol);
        CHECK(max_rel_error(got[16], e_loglin) < kTol);
    }
}

TEST_CASE("taylor: constant-slot variants (+k, -k, k-x, *k, /k) and constant subexpressions", "[taylor]") {
    const double k = 2.5, c = 0.7;
    const Problem p{{}, {}, {{"k", k}, {"c", c}},
                    {"exp(t)*k", "k*exp(t)", "exp(t)*2", "exp(t)/k", "exp(t)/4", "exp(t)+k", "k+exp(t)",
                     "exp(t)-k", "k-exp(t)", "3-exp(t)", "-exp(t)", "k/(1+t)", "exp(c)*exp(t)", "log(k)*exp(t)",
                     "sqrt(k)*exp(t)", "k^1.5*exp(t)", "(k*c - k/c + (k - c))*exp(t)", "(-k)*exp(t)",
                     "exp(t)*k^c"}};
    for (double t0 : {0.0, 0.3}) {
        INFO("t0 = " << t0);
        const auto got = expand(p, t0, {}, kOrder);
        // Expected: a constant times, or plus, the series of exp(t) (computed from the closed form).
        auto scaled = [&](double m, double add) {
            return make(kOrder, [&](int n) { return m * std::exp(t0) / factorial(n) + (n == 0 ? add : 0.0); });
        };
        const Coeffs e_inv = make(kOrder, [&](int n) { return k * std::pow(-1.0, n) / std::pow(1 + t0, n + 1); });
        CHECK(max_rel_error(got[0], scaled(k, 0)) < kTol);
        CHECK(max_rel_error(got[1], scaled(k, 0)) < kTol);
        CHECK(max_rel_error(got[2], scaled(2, 0)) < kTol);
        CHECK(max_rel_error(got[3], scaled(1 / k, 0)) < kTol);
        CHECK(max_rel_error(got[4], scaled(0.25, 0)) < kTol);
        CHECK(max_rel_error(got[5], scaled(1, k)) < kTol);
        CHECK(max_rel_error(got[6], scaled(1, k)) < kTol);
        CHECK(max_rel_error(got[7], scaled(1, -k)) < kTol);
        CHECK(max_rel_error(got[8], scaled(-1, k)) < kTol);
        CHECK(max_rel_error(got[9], scaled(-1, 3)) < kTol);
        CHECK(max_rel_error(got[10], scaled(-1, 0)) < kTol);
        CHECK(max_rel_error(got[11], e_inv) < kTol);
        CHECK(max_rel_error(got[12], scaled(std::exp(c), 0)) < kTol);
        CHECK(max_rel_error(got[13], scaled(std::log(k), 0)) < kTol);
        CHECK(max_rel_error(got[14], scaled(std::sqrt(k), 0)) < kTol);
        CHECK(max_rel_error(got[15], scaled(std::pow(k, 1.5), 0)) < kTol);
        CHECK(max_rel_error(got[16], scaled(k * c - k / c + (k - c), 0)) < kTol);
        CHECK(max_rel_error(got[17], scaled(-k, 0)) < kTol);
        CHECK(max_rel_error(got[18], scaled(std::pow(k, c), 0)) < kTol);
    }
}

TEST_CASE("taylor: state recurrences reproduce solutions known in closed form", "[taylor]") {
    // y' = y^2 -> y0/(1 - y0 s);  z' = exp(-z) -> log(e^z0 + s);  w' = -k w -> w0 e^{-ks};
    // v' = 2 -> v0 + 2s;  q' = 1/q -> sqrt(q0^2 + 2s);  p' = t -> p0 + t0 s + s^2/2 (all from the closed form).
    const double k = 0.8, a = 2.5;
    const Problem p{{"y", "z", "w", "v", "q", "p"},
                    {"y^2", "exp(-z)", "-k*w", "2", "1/q", "t"},
                    {{"k", k}, {"a", a}},
                    {"exp(v)", "y^a", "w*y", "z/y"}};
    const double y0 = 0.5, z0 = 0.2, w0 = 3.0, v0 = 0.1, q0 = 1.5, p0 = -0.4;
    for (double t0 : {0.0, 0.3}) {
        INFO("t0 = " << t0);
        const auto got = expand(p, t0, {y0, z0, w0, v0, q0, p0}, kOrder);
        const Coeffs e_y = make(kOrder, [&](int n) { return std::pow(y0, n + 1); });
        const Coeffs e_z = make(kOrder, [&](int n) {
            return n == 0 ? z0 : std::pow(-1.0, n + 1) / (n * std::exp(n * z0));
        });
        const Coeffs e_w = make(kOrder, [&](int n) { return w0 * std::pow(-k, n) / factorial(n); });
        const Coeffs e_v = make(kOrder, [&](int n) { return n == 0 ? v0 : n == 1 ? 2.0 : 0.0; });
        const Coeffs e_q = make(kOrder, [&](int n) { return binom(0.5, n) * std::pow(q0 * q0, 0.5 - n) * std::pow(2.0, n); });
        const Coeffs e_p = make(kOrder, [&](int n) { return n == 0 ? p0 : n == 1 ? t0 : n == 2 ? 0.5 : 0.0; });
        const Coeffs e_expv = make(kOrder, [&](int n) { return std::exp(v0) * std::pow(2.0, n) / factorial(n); });
        const Coeffs e_ya = make(kOrder, [&](int n) { return std::pow(y0, a) * binom(-a, n) * std::pow(-y0, n); });
        Coeffs e_zy(e_z.size());  // z/y = z·(1 - y0 s)/y0
        for (std::size_t n = 0; n < e_z.size(); ++n) e_zy[n] = (e_z[n] - (n > 0 ? y0 * e_z[n - 1] : 0.0)) / y0;
        CHECK(max_rel_error(got[0], e_y) < kTol);
        CHECK(max_rel_error(got[1], e_z) < kTol);
        CHECK(max_rel_error(got[2], e_w) < kTol);
        CHECK(max_rel_error(got[3], e_v) < kTol);
        CHECK(max_rel_error(got[4], e_q) < kTol);
        CHECK(max_rel_error(got[5], e_p) < kTol);
        CHECK(max_rel_error(got[6], e_expv) < kTol);
        CHECK(max_rel_error(got[7], e_ya) < kTol);
        CHECK(max_rel_error(got[8], cauchy(e_w, e_y)) < kTol);
        CHECK(max_rel_error(got[9], e_zy) < 1e-13);  // the closed form itself subtracts neighbouring terms
    }
}

TEST_CASE("taylor: a constant input adds to the state's derivative", "[taylor]") {
    // w' = -k w + u  ->  w(s) = u/k + (w0 - u/k) e^{-ks} (computed from the closed form).
    const double k = 0.3, u = 12.0, w0 = 5.0;
    const Problem p{{"w", "g"}, {"-k*w", ""}, {{"k", k}}, {"w/2"}};
    const auto got = expand(p, 1.0, {w0, 7.0}, kOrder, {u, 0.0});
    const Coeffs e_w = make(kOrder, [&](int n) {
        return n == 0 ? w0 : (w0 - u / k) * std::pow(-k, n) / factorial(n);
    });
    CHECK(max_rel_error(got[0], e_w) < kTol);
    const Coeffs e_g = make(kOrder, [](int n) { return n == 0 ? 7.0 : 0.0; });  // no rate, no input: constant
    CHECK(max_rel_error(got[1], e_g) == 0.0);
    Coeffs half = e_w;
    for (double& x : half) x /= 2;
    CHECK(max_rel_error(got[2], half) < kTol);
}

TEST_CASE("taylor: integer powers of a state that starts at zero stay finite", "[taylor]") {
    // x' = 1 from x0 = 0: x = s, so x^2 = s^2 and x^3 = s^3 exactly (computed from the closed form). A general
    // power recurrence would divide by x[0] = 0.
    const Problem p{{"x"}, {"1"}, {}, {"x^2", "x^3", "x^2*x + 1"}};
    const auto got = expand(p, 0.0, {0.0}, 6);
    CHECK(got[1] == Coeffs{0, 0, 1, 0, 0, 0, 0});
    CHECK(got[2] == Coeffs{0, 0, 0, 1, 0, 0, 0});
    CHECK(got[3] == Coeffs{1, 0, 0, 1, 0, 0, 0});
}

TEST_CASE("taylor: outputs_at evaluates the outputs at order zero", "[taylor]") {
    const Problem p{{"x"}, {"-k*x"}, {{"k", 0.5}}, {"x/k + t", "exp(x)*t"}};
    taylor::Expander ex(compile(p), 8);
    const std::vector<double> params{0.5};
    ex.set_params(params);
    const std::vector<double> x{2.0};
    std::vector<double> out(2);
    ex.outputs_at(3.0, x, out);
    CHECK(out[0] == Approx(2.0 / 0.5 + 3.0).epsilon(1e-15));           // computed from the closed form
    CHECK(out[1] == Approx(std::exp(2.0) * 3.0).epsilon(1e-15));       // computed from the closed form
}

TEST_CASE("taylor: compile shares subexpressions and rejects what it cannot expand", "[taylor]") {
    const Problem p{{"x"}, {"-exp(t)*x"}, {{"k", 1.0}}, {"exp(t) + 1", "exp(t)*k", "x*exp(t)"}};
    const taylor::Tape tape = compile(p);
    const auto n_exp = std::count_if(tape.code.begin(), tape.code.end(),
                                     [](const taylor::Instr& in) { return in.op == taylor::OpCode::Exp; });
    CHECK(n_exp == 1);
    CHECK(tape.rhs_slot.size() == 1);
    CHECK(tape.output_slot.size() == 3);

    CHECK_THROWS_AS(compile(Problem{{"x"}, {"-q*x"}, {}, {}}), std::invalid_argument);       // unknown name
    CHECK_THROWS_AS(compile(Problem{{"x"}, {"x^x"}, {}, {}}), std::invalid_argument);        // exponent varies
    CHECK_THROWS_AS(compile(Problem{{"x"}, {"x^t"}, {}, {}}), std::invalid_argument);        // exponent varies
    taylor::Expander ex(compile(Problem{{"x"}, {"-k*x"}, {{"k", 1.0}}, {}}), 4);
    const std::vector<double> two{1.0, 2.0};
    CHECK_THROWS_AS(ex.set_params(two), std::invalid_argument);
    CHECK_THROWS_AS(taylor::Expander(tape, 0), std::invalid_argument);
}

TEST_CASE("taylor: only the parameters in use are read, however many are declared", "[taylor]") {
    // Forty parameters, only the last one used: the tape holds a handful of slots, so reading a parameter's slot by its
    // parameter index would run past the coefficient table (caught when run under AddressSanitizer). Values
    // computed from the closed form.
    Problem p{{"x"}, {"-p39*x"}, {}, {"x*p39"}};
    for (int i = 0; i < 40; ++i) p.params.emplace_back("p" + std::to_string(i), 0.01 * (i + 1));
    const auto got = expand(p, 0.0, {2.0}, 10);
    const double k = 0.4;
    const Coeffs e_x = make(10, [&](int n) { return 2.0 * std::pow(-k, n) / factorial(n); });  // from the closed form
    CHECK(max_rel_error(got[0], e_x) < kTol);
    Coeffs e_out = e_x;
    for (double& v : e_out) v *= k;
    CHECK(max_rel_error(got[1], e_out) < kTol);
}

TEST_CASE("taylor: order_for_tolerance follows p = ceil(-ln(eps)/2 + 1)", "[taylor]") {
    // Values computed from the formula: -ln(1e-10)/2 + 1 = 12.51, -ln(1e-6)/2 + 1 = 7.91, -ln(1e-12)/2 + 1 = 14.82,
    // -ln(1e-14)/2 + 1 = 17.12, -ln(1e-3)/2 + 1 = 4.45, -ln(0.1)/2 + 1 = 2.15.
    CHECK(taylor::order_for_tolerance(1e-10) == 13);
    CHECK(taylor::order_for_tolerance(1e-6) == 8);
    CHECK(taylor::order_for_tolerance(1e-12) == 15);
    CHECK(taylor::order_for_tolerance(1e-14) == 18);
    CHECK(taylor::order_for_tolerance(1e-3) == 5);
    CHECK(taylor::order_for_tolerance(0.1) == 3);
    CHECK(taylor::order_for_tolerance(0.5) == 2);  // 1.35 -> 2, also the floor
    for (int e = 1; e <= 15; ++e) {
        const double tol = std::pow(10.0, -e);
        CHECK(taylor::order_for_tolerance(tol) == static_cast<int>(std::ceil(-0.5 * std::log(tol) + 1.0)));
    }
}

TEST_CASE("taylor: jorba_zou_step on hand-computed coefficients", "[taylor]") {
    // Two series, order 3, series-major. N = max(1, 2, 0.5) = 2.
    // ‖x[2]‖ = max(0.5, 0.1) = 0.5 -> ρ2 = (2/0.5)^(1/2) = 2;  ‖x[3]‖ = max(2/27, 0.02) -> ρ3 = (27)^(1/3) = 3.
    // h = min(2, 3)·e^-2·e^(-0.7/2) = 2·e^-2.35 (computed by hand).
    const std::vector<double> a{2.0, 1.0, 0.5, 2.0 / 27.0, 0.5, -3.0, -0.1, 0.02};
    CHECK(taylor::jorba_zou_step(a, 2, 3) == Approx(2.0 * std::exp(-2.35)).epsilon(1e-15));

    // The last coefficient dominates: ‖x[3]‖ = 16 -> ρ3 = (2/16)^(1/3) = 0.5; ρ2 = 2 -> h = 0.5·e^-2.35.
    const std::vector<double> b{2.0, 1.0, 0.5, 2.0 / 27.0, 0.5, -3.0, -0.1, -16.0};
    CHECK(taylor::jorba_zou_step(b, 2, 3) == Approx(0.5 * std::exp(-2.35)).epsilon(1e-15));

    // All values below 1: the control stays relative, N = 0.1. One series, order 4: x = [0.1, 0, 0.04, 0, 0.0081]
    // ρ3 = inf (zero coefficient), ρ4 = (0.1/0.0081)^(1/4) -> h = e^-2·e^(-0.7/3)·ρ4 (computed by hand).
    const std::vector<double> c{0.1, 0.0, 0.04, 0.0, 0.0081};
    CHECK(taylor::jorba_zou_step(c, 1, 4) ==
          Approx(std::exp(-2.0 - 0.7 / 3.0) * std::pow(0.1 / 0.0081, 0.25)).epsilon(1e-14));
    // Everything zero: N = 1, and with zero last coefficients the step is unbounded.
    const std::vector<double> z{0.0, 0.0, 0.0, 0.0, 0.0};
    CHECK(taylor::jorba_zou_step(z, 1, 4) == std::numeric_limits<double>::infinity());

    // Both last coefficients vanish: the series is a polynomial of lower degree, any step is exact.
    const std::vector<double> d{5.0, 1.0, 0.0, 0.0};
    CHECK(taylor::jorba_zou_step(d, 1, 3) == std::numeric_limits<double>::infinity());
}

TEST_CASE("taylor: the stepper clips to h_max and flags non-finite series", "[taylor]") {
    const Problem p{{"x"}, {"-k*x"}, {{"k", 0.5}}, {"x"}};
    const std::vector<double> params{0.5};
    taylor::Stepper st(compile(p), params, 1e-10);
    CHECK(st.order() == 13);
    std::vector<double> coeffs;
    const std::vector<double> x0{1.0}, none;
    // Free step: the Jorba-Zou step of the series of e^{-0.5 s}; ‖x[j]‖ = 0.5^j/j! (computed from the closed form).
    const auto r = st.step(0.0, x0, none, 100.0, coeffs);
    const double rho12 = std::pow(factorial(12) / std::pow(0.5, 12), 1.0 / 12);
    const double rho13 = std::pow(factorial(13) / std::pow(0.5, 13), 1.0 / 13);
    CHECK(r.outcome == taylor::Outcome::Ok);
    CHECK_FALSE(r.clipped);
    CHECK(r.h == Approx(std::min(rho12, rho13) * std::exp(-2.0 - 0.7 / 12)).epsilon(1e-13));
    const auto r2 = st.step(0.0, x0, none, 0.25, coeffs);
    CHECK(r2.clipped);
    CHECK(r2.h == 0.25);

    const Problem bad{{"x"}, {"log(x)"}, {}, {}};
    taylor::Stepper st2(compile(bad), std::vector<double>{}, 1e-10);
    const std::vector<double> zero{0.0};
    CHECK(st2.step(0.0, zero, none, 1.0, coeffs).outcome == taylor::Outcome::NonFinite);
}
