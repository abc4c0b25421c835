#include "support.hpp"

#include <filesystem>
#include <fstream>
#include <unistd.h>

#include "input/load.hpp"

namespace plateau::testing {

std::string write_temp(const std::string& name, const std::string& text) {
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / ("plateau-tests-" + std::to_string(::getpid()));
    fs::create_directories(dir);
    const fs::path p = dir / name;
    std::ofstream(p, std::ios::binary) << text;
    return p.string();
}

regimen::Regimen regimen_from_text(const std::string& name, const std::string& text) {
    return input::load_regimen(write_temp(name, text), input::default_model_dirs());
}

Run run_text(const std::string& name, const std::string& text, double tol) {
    Run r{regimen_from_text(name, text), {}, {}};
    sim::Options opt;
    opt.tol = tol;
    r.sim = sim::simulate(r.regimen, opt);
    r.exposure = metrics::compute(r.regimen, r.sim, metrics::request_from(r.regimen, opt));
    return r;
}

}  // namespace plateau::testing
