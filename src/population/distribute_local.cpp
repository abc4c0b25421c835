// One process, no MPI: the population runs here in full (see distribute.hpp).
#include "population/distribute.hpp"

namespace plateau::population {

void start_processes(int*, char***) {}
void stop_processes() {}
Place place() { return {}; }
Result run_shared(const std::vector<regimen::Regimen>& regimens, const Setup& setup) { return run(regimens, setup); }
std::vector<double> rows_shared(std::size_t n, std::size_t width, const RowWork& work) {
    std::vector<double> rows(n * width);
    work(0, 1, rows);
    return rows;
}
int agree_exit_code(int code) { return code; }

}  // namespace plateau::population
