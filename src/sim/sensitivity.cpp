// Stand-in: central finite differences of the Taylor engine (relative step 1e-5 at tolerance 1e-13). To be
// replaced by forward sensitivities integrated with the states.
#include "sim/sensitivity.hpp"

#include <algorithm>
#include <cmath>

namespace plateau::sim {

namespace {

std::vector<double> values_at(const model::Model& m, std::span<const double> params, const std::vector<Dose>& doses,
                              int output, std::span<const double> times, double t_end, const Options& opt,
                              taylor::Outcome& outcome) {
    const Simulation s = simulate(m, params, doses, t_end, opt);
    if (s.outcome != taylor::Outcome::Ok) outcome = s.outcome;
    std::vector<double> v;
    v.reserve(times.size());
    for (double t : times) v.push_back(s.trajectory.value(s.output_series(output), t));
    return v;
}

}  // namespace

OutputSensitivity output_sensitivities(const model::Model& m, std::span<const double> params,
                                       const std::vector<Dose>& doses, int output, std::span<const double> times,
                                       std::span<const int> wrt, double t_end, const Options& opt) {
    Options tight = opt;
    tight.tol = std::min(opt.tol, 1e-13);
    OutputSensitivity r;
    r.value = values_at(m, params, doses, output, times, t_end, tight, r.outcome);
    r.d.assign(times.size(), std::vector<double>(wrt.size(), 0.0));
    std::vector<double> p(params.begin(), params.end());
    for (std::size_t j = 0; j < wrt.size(); ++j) {
        const auto i = static_cast<std::size_t>(wrt[j]);
        const double h = 1e-5 * std::max(std::abs(params[i]), 1e-8);
        p[i] = params[i] + h;
        const auto up = values_at(m, p, doses, output, times, t_end, tight, r.outcome);
        p[i] = params[i] - h;
        const auto down = values_at(m, p, doses, output, times, t_end, tight, r.outcome);
        p[i] = params[i];
        for (std::size_t k = 0; k < times.size(); ++k) r.d[k][j] = (up[k] - down[k]) / (2.0 * h);
    }
    return r;
}

}  // namespace plateau::sim
