// A regimen as a regimen file: the text `run`, `compare` and `dose` read back to the same regimen. Used to write
// the recommended candidate of a dose search.
#pragma once

#include <string>

#include "regimen/regimen.hpp"

namespace plateau::dose {

// How the written file names its model: the id when the built-in models (or PLATEAU_MODELS) find this very
// file by its id, else the model file's absolute path.
std::string model_reference(const regimen::Regimen& r);

// The whole file. Values are written with 12 significant digits in the units of the model (parameters) and of
// the output (targets); doses in mg, times in h. `header` is written first as comment lines.
std::string regimen_text(const regimen::Regimen& r, const std::string& header);

}  // namespace plateau::dose
