// Internal to input/: the [residual] table of a model file (the error model of measured levels).
#pragma once

#include "input/fields.hpp"
#include "model/model.hpp"

namespace plateau::input::detail {

// Reads [residual] (when present) into m.residual; its outputs must be loaded. Problems go to c.sink.
void load_residual(Ctx& c, const Value& root, model::Model& m);

}  // namespace plateau::input::detail
