#include "workload.hpp"

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "input/load.hpp"

namespace plateau::bench {

regimen::Regimen population_workload() {
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / ("plateau-bench-workload-" + std::to_string(::getpid()));
    fs::create_directories(dir);
    const fs::path file = dir / "q8h.toml";
    {
        std::ofstream out(file);
        out << "id = \"bench-q8h\"\nmodel = \"two-compartment-iv\"\nabout = \"fictional: 1 g every 8 h over 30 min, "
               "14 days\"\n\n[[doses]]\nroute = \"iv\"\namount = \"1 g\"\nevery = \"8 h\"\ncount = 42\nover = "
               "\"30 min\"\n\n[targets]\noutput = \"conc\"\nabove = \"4 mg/L\"\nwindow = [\"4 mg/L\", \"40 mg/L\"]\n\n"
               "[horizon]\nuntil = \"14 d\"\nstep = \"1 h\"\n";
    }
    regimen::Regimen r = input::load_regimen(file.string(), {std::string(PLATEAU_SOURCE_DIR) + "/models"});
    fs::remove_all(dir);
    return r;
}

}  // namespace plateau::bench
