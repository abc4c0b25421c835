// Spreading a population over the processes of an MPI job (the build with -DPLATEAU_MPI=ON). Subject i is
// run on process i mod K (a static interleave: costly subjects cluster by covariates, not by index, so every
// process gets a like mix) and draws from the stream keyed on (seed, i) wherever it runs, so the answer does not
// depend on K. Without MPI (distribute_local.cpp) there is one process and these functions do nothing.
// Only this header is seen by the rest of the code; the MPI calls live in distribute_mpi.cpp alone.
#pragma once

#include <cstddef>
#include <functional>
#include <vector>

#include "population/run.hpp"

namespace plateau::population {

struct Place {
    int rank = 0;    // this process
    int ranks = 1;   // processes in the job
};

// Starts and stops the process group (once, around main). Without MPI: nothing.
void start_processes(int* argc, char*** argv);
void stop_processes();
Place place();

// The whole population on every process of the job: each runs its share with `setup.threads` threads, and the
// per-subject results are gathered, in subject order, on process 0 (the other processes get their share only).
// An exception on any process is rethrown on every process (the same message where it is the same error).
Result run_shared(const std::vector<regimen::Regimen>& regimens, const Setup& setup);

// Per-subject rows of `width` doubles on every process of the job (the dose search's individual doses): each
// process calls `work(first, stride, rows)`, which fills the rows of subjects first, first + stride, ... of
// `rows` (n × width, subject-major); process 0 then holds every subject's row, bit for bit as one process computes
// it, the others their own share. An exception on any process is rethrown on every process, as in run_shared.
using RowWork = std::function<void(std::size_t first, std::size_t stride, std::vector<double>& rows)>;
std::vector<double> rows_shared(std::size_t n, std::size_t width, const RowWork& work);

// The exit code every process returns: the worst of all processes' codes.
int agree_exit_code(int code);

}  // namespace plateau::population
