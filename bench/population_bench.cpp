// plateau_population_bench: virtual patients per second per core and the scaling with threads, for the demo
// population (model zelmarin-renal, three regimens, the zelmarin-adults cohort). Speed is reported as ratios
// within one run; never run as a test.
#include <chrono>
#include <ctime>
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
    // Wall-clock speed-up needs idle cores; the CPU-time rate (process CPU seconds) is what one core does even on a
    // shared machine.
    std::printf("%8s %10s %10s %14s %26s %10s\n", "threads", "wall s", "CPU s", "patients/s", "patient-regimens/CPU-s", "speed-up");
    double base = 0.0;
    for (int threads : {1, 2}) {
        population::Setup s;
        s.cohort = &cohort;
        s.size = n;
        s.seed = 1;
        s.threads = threads;
        const auto a = std::chrono::steady_clock::now();
        const std::clock_t c0 = std::clock();
        const population::Result res = population::run(rs, s);
        const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - a).count();
        const double cpu = static_cast<double>(std::clock() - c0) / CLOCKS_PER_SEC;
        if (threads == 1) base = secs;
        std::printf("%8d %10.3f %10.3f %14.1f %26.1f %10.2f\n", threads, secs, cpu, static_cast<double>(n) / secs,
                    static_cast<double>(n * rs.size()) / cpu, base / secs);
        if (res.subjects.size() != n) return 1;
    }
    return 0;
}
