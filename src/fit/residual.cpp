#include "fit/residual.hpp"

namespace plateau::fit {

double residual_variance(const model::Residual& r, double f) {
    const double p = r.proportional * f;
    return r.additive * r.additive + p * p;
}

double residual_variance_slope(const model::Residual& r, double f) { return 2.0 * r.proportional * r.proportional * f; }

std::string residual_text(const model::Model& m) {
    if (!m.residual) return "none (add a [residual] table to fit levels)";
    const model::Residual& r = *m.residual;
    std::string s;
    if (r.proportional > 0.0) s += r.proportional_text + " proportional";
    if (r.additive > 0.0) s += (s.empty() ? "" : " + ") + r.additive_text + " additive";
    if (r.output >= 0 && static_cast<std::size_t>(r.output) < m.outputs.size())
        s += ", on output '" + m.outputs[static_cast<std::size_t>(r.output)].name + "'";
    return s;
}

}  // namespace plateau::fit
