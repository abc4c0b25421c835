#include "support.hpp"

#include <filesystem>
#include <fstream>
#include <unistd.h>

#include "cli/evaluate.hpp"
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
    sim::Options opt;
    opt.tol = tol;
    report::Candidate c = cli::evaluate(regimen_from_text(name, text), opt, {});
    return Run{std::move(c.regimen), std::move(c.schedule), std::move(c.sim), std::move(c.exposure)};
}

}  // namespace plateau::testing
