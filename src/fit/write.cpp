#include "fit/write.hpp"

#include <cmath>
#include <stdexcept>

#include "dose/write.hpp"

namespace plateau::fit {

namespace {

// Every expression of the model except derived parameter `skip`'s own.
bool used_elsewhere(const model::Model& m, const std::string& name, std::size_t skip) {
    auto uses = [&](const expr::Ptr& e) {
        if (!e) return false;
        for (const auto& id : expr::identifiers(*e))
            if (id == name) return true;
        return false;
    };
    for (const auto& r : m.rates)
        if (uses(r.expr)) return true;
    for (const auto& o : m.outputs)
        if (uses(o.expr)) return true;
    for (const auto& r : m.routes)
        if (uses(r.fraction) || uses(r.lag)) return true;
    for (std::size_t i = 0; i < m.parameters.size(); ++i)
        if (i != skip && uses(m.parameters[i].expr)) return true;
    return false;
}

void set_override(regimen::Regimen& r, int index, double value) {
    for (auto& o : r.overrides)
        if (o.index == index) {
            o.value = value;
            return;
        }
    regimen::Override o;
    o.name = r.model.parameters[static_cast<std::size_t>(index)].name;
    o.index = index;
    o.value = value;
    r.overrides.push_back(o);
}

bool close(double a, double b) { return std::abs(a - b) <= 1e-9 * std::max(std::abs(a), std::abs(b)) + 1e-300; }

}  // namespace

regimen::Regimen individualised(const regimen::Regimen& r, const Result& res) {
    for (const auto& d : r.doses)
        if (!d.deviations.empty() || d.offsets.size() > 1)
            throw std::runtime_error("the regimen has clock-time patterns or missed, late or doubled doses, which the "
                                     "regimen writer cannot write yet");
    const model::Model& m = r.model;
    regimen::Regimen w = r;
    w.subject_values.clear();
    // Varied fixed parameters first: derived parameters are computed from them.
    for (const auto& v : m.variability)
        if (m.parameters[static_cast<std::size_t>(v.index)].kind == model::ParamKind::Fixed)
            set_override(w, v.index, res.values[static_cast<std::size_t>(v.index)]);
    for (const auto& v : m.variability) {
        const auto i = static_cast<std::size_t>(v.index);
        const model::Parameter& p = m.parameters[i];
        if (p.kind != model::ParamKind::Derived) continue;
        const double target = res.values[i];
        int handle = -1;
        for (const auto& id : expr::identifiers(*p.expr)) {
            const int j = m.parameter_index(id);
            if (j < 0 || m.parameters[static_cast<std::size_t>(j)].kind != model::ParamKind::Fixed) continue;
            bool varied = false;
            for (const auto& u : m.variability) varied = varied || u.index == j;
            if (varied || used_elsewhere(m, id, i)) continue;
            handle = j;
            break;
        }
        if (handle < 0)
            throw std::runtime_error("the derived parameter '" + p.name + "' has no fixed parameter of its own to carry "
                                     "its estimate");
        // Newton's method on derived(x) = target in the handle x, slopes by central differences.
        double x = w.parameter_values()[static_cast<std::size_t>(handle)];
        auto value_at = [&](double xv) {
            set_override(w, handle, xv);
            return w.parameter_values()[i];
        };
        for (int it = 0; it < 60; ++it) {
            const double fx = value_at(x) - target;
            if (close(fx + target, target)) break;
            const double h = 1e-6 * std::max(std::abs(x), 1e-12);
            const double slope = (value_at(x + h) - value_at(x - h)) / (2.0 * h);
            if (!(std::abs(slope) > 0.0) || !std::isfinite(slope)) break;
            x -= fx / slope;
        }
        set_override(w, handle, x);
    }
    const std::vector<double> got = w.parameter_values();
    for (const Estimate& e : res.estimates)
        if (!close(got[static_cast<std::size_t>(e.index)], e.value))
            throw std::runtime_error("the estimate of '" + m.parameters[static_cast<std::size_t>(e.index)].name +
                                     "' cannot be written as a parameter override");
    w.id = r.id + "-individual";
    w.about = "the fitted individual parameters" + (r.about.empty() ? std::string() : ": " + r.about);
    return w;
}

std::string individualised_text(const regimen::Regimen& written, const std::string& from, const std::string& levels) {
    return dose::regimen_text(written, "Written by plateau fit from " + from + " and the levels in " + levels +
                                           ": the individual estimates as parameter overrides.\n"
                                           "Research simulation only, not clinical advice.");
}

}  // namespace plateau::fit
