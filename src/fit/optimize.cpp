// Levenberg–Marquardt on the full objective (fit.hpp), from several starts, and the Laplace approximation at
// the optimum.
//
// Step: (H + λ·diag(H)) δ = −g with g the exact gradient and H the Gauss–Newton Hessian (expected information
// of each level's term, plus 2Ω⁻¹): H is positive definite, so δ descends for every λ ≥ 0. A step that lowers
// the objective is taken and λ shrinks tenfold; otherwise λ grows tenfold and the step is tried again.
// Near the optimum (decrement gᵀH⁻¹g below 1e-10) the objective changes by less than its rounding, so the
// Gauss–Newton step (λ = 0) is taken without that test. Stop (converged) when the decrement falls below 1e-22
// or a step moves no η by more than 1e-12; give up after 200 iterations or when λ passes 1e16.
#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <sstream>

#include "fit/fit.hpp"
#include "fit/residual.hpp"
#include "population/draw.hpp"
#include "population/reduce.hpp"

namespace plateau::fit {

namespace {

constexpr int kMaxIterations = 200;
constexpr double kDecrement = 1e-22;
constexpr double kNear = 1e-10;
constexpr double kStep = 1e-12;

Eigen::MatrixXd matrix(const std::vector<double>& a, std::size_t n) {
    Eigen::MatrixXd m(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
    for (std::size_t i = 0; i < n; ++i)
        for (std::size_t j = 0; j < n; ++j) m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = a[i * n + j];
    return m;
}

Eigen::VectorXd vec(const std::vector<double>& a) {
    return Eigen::Map<const Eigen::VectorXd>(a.data(), static_cast<Eigen::Index>(a.size()));
}

Start descend(const Problem& p, std::vector<double> eta) {
    const std::size_t n = eta.size();
    Start s;
    s.from = eta;
    Evaluation ev = evaluate(p, eta, true);
    if (!ev.ok) {
        s.eta = eta;
        s.objective = INFINITY;
        return s;
    }
    double lambda = 1e-3;
    for (int it = 0; it < kMaxIterations; ++it) {
        s.iterations = it + 1;
        const Eigen::MatrixXd h = matrix(ev.hessian, n);
        const Eigen::VectorXd g = vec(ev.gradient);
        const Eigen::LDLT<Eigen::MatrixXd> full(h);
        const double decrement = full.info() == Eigen::Success ? g.dot(full.solve(g)) : INFINITY;
        if (decrement < kDecrement) {
            s.converged = true;
            break;
        }
        if (decrement < kNear) {
            const Eigen::VectorXd delta = full.solve(-g);
            for (std::size_t k = 0; k < n; ++k) eta[k] += delta(static_cast<Eigen::Index>(k));
            ev = evaluate(p, eta, true);
            if (!ev.ok) break;
            if (delta.cwiseAbs().maxCoeff() < kStep) {
                s.converged = true;
                break;
            }
            continue;
        }
        bool accepted = false;
        while (lambda <= 1e16) {
            Eigen::MatrixXd a = h;
            for (Eigen::Index i = 0; i < a.rows(); ++i) a(i, i) *= 1.0 + lambda;
            const Eigen::VectorXd delta = a.ldlt().solve(-g);
            std::vector<double> trial(n);
            for (std::size_t k = 0; k < n; ++k) trial[k] = eta[k] + delta(static_cast<Eigen::Index>(k));
            Evaluation next = evaluate(p, trial, false);
            if (next.ok && next.objective < ev.objective) {
                eta = trial;
                lambda = std::max(lambda / 10.0, 1e-12);
                accepted = true;
                if (delta.cwiseAbs().maxCoeff() < kStep) s.converged = true;
                break;
            }
            lambda *= 10.0;
        }
        if (!accepted) {
            // No step lowers the objective any more: at the optimum to rounding, when the decrement is small.
            s.converged = decrement < 1e-8;
            break;
        }
        ev = evaluate(p, eta, true);
        if (!ev.ok) break;
        if (s.converged) break;
    }
    s.eta = eta;
    s.objective = ev.ok ? ev.objective : INFINITY;
    return s;
}

std::string eta_text(const std::vector<double>& eta) {
    std::ostringstream o;
    o.precision(4);
    for (std::size_t k = 0; k < eta.size(); ++k) o << (k ? ", " : "") << eta[k];
    return "(" + o.str() + ")";
}

}  // namespace

Result fit(const Problem& p) {
    const model::Model& m = *p.model;
    const std::size_t n = m.variability.size();
    const std::vector<double> omega = model::omega_matrix(m);
    std::vector<std::vector<double>> starts{std::vector<double>(n, 0.0)};
    for (std::size_t k = 0; k < n; ++k)
        for (double sign : {-1.0, 1.0}) {
            std::vector<double> e(n, 0.0);
            e[k] = sign * 1.5 * std::sqrt(omega[k * n + k]);
            starts.push_back(e);
        }
    Result r;
    for (const auto& from : starts) r.starts.push_back(descend(p, from));
    if (!std::isfinite(r.starts.front().objective))
        throw NumericalError("the model cannot be simulated with the population values of this patient");
    std::size_t best = 0;
    for (std::size_t i = 1; i < r.starts.size(); ++i)
        if (r.starts[i].objective < r.starts[best].objective) best = i;
    const Start& b = r.starts[best];
    r.eta = b.eta;
    r.objective = b.objective;
    r.iterations = b.iterations;
    r.converged = b.converged;
    // Starts that ended elsewhere: another local minimum (higher objective), or the same objective at other η
    // (a flat or ridge-like posterior).
    for (std::size_t i = 0; i < r.starts.size(); ++i) {
        const Start& s = r.starts[i];
        if (i == best || !std::isfinite(s.objective)) continue;
        double far = 0.0;
        for (std::size_t k = 0; k < n; ++k) far = std::max(far, std::abs(s.eta[k] - b.eta[k]));
        if (s.objective > b.objective + 1e-6 * std::max(1.0, std::abs(b.objective)) && far > 1e-4)
            r.notes.push_back("the start η = " + eta_text(s.from) + " ended in another minimum, η = " + eta_text(s.eta) +
                              ", objective " + std::to_string(s.objective) + " against " + std::to_string(b.objective));
        else if (far > 1e-3)
            r.notes.push_back("the start η = " + eta_text(s.from) + " ended at η = " + eta_text(s.eta) +
                              " with the same objective: the levels barely tell these apart");
    }
    if (!b.converged)
        r.notes.push_back("the best start did not meet the stopping rule in " + std::to_string(b.iterations) +
                          " iterations");

    const Evaluation ev = evaluate(p, r.eta, true);
    if (!ev.ok) throw NumericalError("the model cannot be simulated at the fitted random effects");
    r.pred = ev.f;
    for (std::size_t i = 0; i < p.obs.size(); ++i) r.sd.push_back(std::sqrt(residual_variance(p.residual, ev.f[i])));
    // Laplace: the posterior of η ≈ N(η̂, (H/2)⁻¹), H the Hessian of −2 log posterior.
    const Eigen::MatrixXd cov = (0.5 * matrix(ev.hessian, n)).inverse();
    r.covariance.assign(n * n, 0.0);
    r.eta_se.assign(n, 0.0);
    for (std::size_t i = 0; i < n; ++i) {
        for (std::size_t j = 0; j < n; ++j)
            r.covariance[i * n + j] = cov(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j));
        r.eta_se[i] = std::sqrt(std::max(0.0, r.covariance[i * n + i]));
    }
    r.values = individual_values(p, r.eta);
    const std::vector<double> typical = individual_values(p, std::vector<double>(n, 0.0));
    const std::vector<double> pj = parameter_jacobian(m, p.base, r.eta);
    for (std::size_t i = 0; i < r.values.size(); ++i) {
        Eigen::VectorXd row(static_cast<Eigen::Index>(n));
        bool moved = false;
        for (std::size_t k = 0; k < n; ++k) {
            row(static_cast<Eigen::Index>(k)) = pj[i * n + k];
            moved = moved || pj[i * n + k] != 0.0;
        }
        if (!moved) continue;
        r.estimates.push_back({static_cast<int>(i), r.values[i], typical[i], std::sqrt(std::max(0.0, row.dot(cov * row)))});
    }
    return r;
}

Band band(const Problem& p, const Result& r, const std::vector<double>& times, int draws, std::uint64_t seed) {
    const std::size_t n = r.eta.size();
    Band b;
    b.times = times;
    b.draws = draws;
    auto curve = [&](const std::vector<double>& eta, std::vector<double>& out) {
        const sim::Simulation s = sim::simulate(*p.model, individual_values(p, eta), p.doses, p.t_end, p.options);
        if (s.outcome != taylor::Outcome::Ok) return false;
        out.clear();
        for (double t : times) out.push_back(s.trajectory.value(s.output_series(p.output), t));
        return true;
    };
    if (!curve(r.eta, b.fitted)) throw NumericalError("the fitted curve cannot be simulated");
    if (!curve(std::vector<double>(n, 0.0), b.population)) b.population.assign(times.size(), NAN);
    const std::vector<double> chol = model::cholesky(r.covariance, n);
    std::vector<std::vector<double>> at(times.size());
    std::vector<double> y;
    for (int d = 0; d < draws && !chol.empty(); ++d) {
        std::vector<double> eta = population::random_effects(seed, static_cast<std::uint64_t>(d), chol, n);
        for (std::size_t k = 0; k < n; ++k) eta[k] += r.eta[k];
        if (!curve(eta, y)) {
            ++b.failed;
            continue;
        }
        for (std::size_t i = 0; i < times.size(); ++i) at[i].push_back(y[i]);
    }
    for (auto& v : at) {
        std::sort(v.begin(), v.end());
        b.low.push_back(v.empty() ? NAN : population::percentile(v, 5.0));
        b.high.push_back(v.empty() ? NAN : population::percentile(v, 95.0));
    }
    return b;
}

}  // namespace plateau::fit
