// plateau_sensitivity_bench: what the derivatives of an output cost. For three models (two compartments with
// infusions, oral with lag and F, Michaelis–Menten), the CPU time of a plain run at the sensitivity tolerance, of
// forward sensitivities (sim::output_sensitivities) and of central differences (sim::output_sensitivities_fd),
// and the largest difference between the two derivatives. Ratios within one process; never run as a test.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <string>
#include <vector>

#include "input/load.hpp"
#include "sim/sensitivity.hpp"

using namespace plateau;

namespace {

template <class F>
double cpu_us(int reps, F&& f) {
    const std::clock_t c0 = std::clock();
    for (int i = 0; i < reps; ++i) f();
    return 1e6 * static_cast<double>(std::clock() - c0) / CLOCKS_PER_SEC / reps;
}

struct Case {
    const char* model;
    std::vector<std::pair<const char*, double>> set;
    std::vector<const char*> wrt;
    std::vector<sim::Dose> doses;
    double t_end;
};

}  // namespace

int main(int argc, char** argv) {
    const int reps = argc > 1 ? std::max(1, std::atoi(argv[1])) : 20;
    const std::string src = PLATEAU_SOURCE_DIR;
    const std::vector<Case> cases{
        {"two-compartment-iv", {}, {"cl", "v1", "q", "v2"},
         {{0.0, 0, 1000.0, 1.0, 0}, {12.0, 0, 1000.0, 1.0, 0}, {24.0, 0, 1000.0, 0.5, 0}, {30.0, 0, 300.0, 0.0, 1}}, 48.0},
        {"one-compartment-oral", {{"tlag", 0.5}, {"f", 0.7}}, {"ka", "f", "tlag", "cl", "v"},
         {{0.0, 0, 500.0, 0.0, 0}, {8.0, 0, 500.0, 0.0, 0}, {16.0, 0, 500.0, 2.0, 1}, {20.0, 1, 200.0, 0.0, 2}}, 40.0},
        {"one-compartment-mm-oral", {}, {"ka", "f", "vmax", "km", "v"},
         {{0.0, 0, 400.0, 0.0, 0}, {12.0, 0, 400.0, 0.0, 0}, {18.0, 1, 250.0, 0.5, 1}}, 48.0},
    };
    std::printf("sensitivity benchmark: CPU time per call (us), %d repetitions, tolerance 1e-13\n", reps);
    std::printf("%-26s %4s %10s %10s %10s %9s %9s %12s\n", "model", "np", "plain", "forward", "differences", "fwd/plain",
                "fd/fwd", "max |diff|");
    for (const Case& c : cases) {
        const model::Model m = input::load_model(src + "/models/" + c.model + ".toml");
        std::vector<double> p = m.default_values();
        for (const auto& [name, v] : c.set) p[static_cast<std::size_t>(m.parameter_index(name))] = v;
        std::vector<int> wrt;
        for (const char* n : c.wrt) wrt.push_back(m.parameter_index(n));
        std::vector<double> times;
        for (double t = 0.2; t <= c.t_end; t += 0.7) times.push_back(t);
        sim::Options opt;
        opt.tol = 1e-13;
        double sink = 0.0;
        const double plain = cpu_us(reps, [&] {
            const sim::Simulation s = sim::simulate(m, p, c.doses, c.t_end, opt);
            for (double t : times) sink += s.trajectory.value(s.output_series(0), t);
        });
        sim::OutputSensitivity fwd, fd;
        const double forward = cpu_us(reps, [&] { fwd = sim::output_sensitivities(m, p, c.doses, 0, times, wrt, c.t_end, opt); });
        const double diff = cpu_us(reps, [&] { fd = sim::output_sensitivities_fd(m, p, c.doses, 0, times, wrt, c.t_end, opt); });
        double worst = 0.0;
        for (std::size_t k = 0; k < times.size(); ++k)
            for (std::size_t j = 0; j < wrt.size(); ++j) worst = std::max(worst, std::abs(fwd.d[k][j] - fd.d[k][j]));
        std::printf("%-26s %4zu %10.1f %10.1f %10.1f %9.2f %9.2f %12.2e\n", c.model, wrt.size(), plain, forward, diff,
                    forward / plain, diff / forward, worst);
        if (!std::isfinite(sink)) return 1;
    }
    return 0;
}
