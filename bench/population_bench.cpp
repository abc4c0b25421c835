// plateau_population_bench: virtual patients per second per core and the scaling with threads, for the demo
// population (model zelmarin-renal, three regimens, the zelmarin-adults cohort). Speed is reported as ratios
// within one run; never run as a test.
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <thread>

#include "input/load.hpp"
#include "input/load_cohort.hpp"
#include "population/run.hpp"
#include "sim/simulate.hpp"

using namespace plateau;

int main(int argc, char** argv) {
    const std::size_t n = argc > 1 ? static_cast<std::size_t>(std::atol(argv[1])) : 400;
    const std::string src = PLATEAU_SOURCE_DIR;
    const std::vector<std::string> dirs{src + "/models"};
    std::vector<regimen::Regimen> rs;
    for (const char* f : {"zelmarin-pop-q8h-30min", "zelmarin-pop-q8h-4h", "zelmarin-pop-continuous"})
        rs.push_back(input::load_regimen(src + "/regimens/" + f + ".toml", dirs));
    const population::Cohort cohort = input::load_cohort(src + "/cohorts/zelmarin-adults.toml");

    // What building the tape costs, against one subject-regimen below.
    const auto t0 = std::chrono::steady_clock::now();
    const int reps = 2000;
    std::size_t slots = 0;
    for (int i = 0; i < reps; ++i) slots += sim::model_tape(rs.front().model).code.size();
    const double tape_us = std::chrono::duration<double, std::micro>(std::chrono::steady_clock::now() - t0).count() / reps;

    std::printf("population benchmark: %zu virtual patients x %zu regimens, model %s, %u hardware threads\n", n, rs.size(),
                rs.front().model.id.c_str(), std::thread::hardware_concurrency());
    std::printf("tape build: %.1f us (%zu slots)\n\n", tape_us, slots / reps);
    std::printf("%8s %12s %18s %22s %10s\n", "threads", "seconds", "patients/s", "patient-regimens/s/core", "speed-up");
    double base = 0.0;
    for (int threads : {1, 2}) {
        population::Setup s;
        s.cohort = &cohort;
        s.size = n;
        s.seed = 1;
        s.threads = threads;
        const auto a = std::chrono::steady_clock::now();
        const population::Result res = population::run(rs, s);
        const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - a).count();
        if (threads == 1) base = secs;
        std::printf("%8d %12.3f %18.1f %22.1f %10.2f\n", threads, secs, static_cast<double>(n) / secs,
                    static_cast<double>(n * rs.size()) / secs / threads, base / secs);
        if (res.subjects.size() != n) return 1;
    }
    return 0;
}
