// Loading model and regimen files. The only module that includes toml++. Everything is validated before it is
// returned: a returned Model or Regimen is complete and consistent, or an InputError lists every problem.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "model/model.hpp"
#include "regimen/regimen.hpp"

namespace plateau::input {

// Largest input file accepted (bytes); bigger files are refused before parsing.
inline constexpr long long kMaxFileBytes = 4LL * 1024 * 1024;

// Loads and validates a model file. Throws InputError.
model::Model load_model(const std::string& path);

// Loads and validates a regimen file and the model it names. `model_ref` is looked up, in order: as a path
// relative to the regimen file's directory (if it ends in .toml or contains '/'; such a path is then also
// tried relative to each of `model_dirs`), else as an id in each of `model_dirs` (file <dir>/<id>.toml).
// Throws InputError.
regimen::Regimen load_regimen(const std::string& path, const std::vector<std::string>& model_dirs);

// The project's built-in model directory, then the directories in PLATEAU_MODELS (colon-separated); callers
// put those given with --models in front (cli::model_dirs), so a folder named on the command line wins.
std::vector<std::string> default_model_dirs();

// What kind of file this is, from its top-level keys: "model" (has [compartments]), "regimen" (has [[doses]]
// or `model`), "cohort" (has [covariates] or [resample] and no [compartments]), "thresholds" (a threshold
// distribution: has `thresholds`), or "" if it cannot be told. Throws InputError when the file cannot be read or
// parsed.
std::string file_kind(const std::string& path);

// Every model file found in the directories (first occurrence of an id wins), loaded; regimen files there are
// skipped; files that fail to load are reported in `problems` (formatted diagnostics) rather than thrown, and
// files hidden by an earlier model of the same id go to `hidden` as {id, path}.
std::vector<model::Model> list_models(const std::vector<std::string>& model_dirs, std::string* problems = nullptr,
                                      std::vector<std::pair<std::string, std::string>>* hidden = nullptr);

// Refuses (InputError at the id) a model file whose id is not its file name without .toml: a model is found by
// that name, so such a file could never be used by its id.
void check_model_file_name(const std::string& path, const model::Model& m);

}  // namespace plateau::input
