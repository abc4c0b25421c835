#include "dose/write.hpp"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <sstream>

#include "input/load.hpp"
#include "report/format.hpp"

namespace plateau::dose {

namespace {

namespace fs = std::filesystem;

std::string g12(double v) { return report::general(v, 12); }

// A TOML basic string.
std::string str(const std::string& s) {
    std::string o = "\"";
    for (char c : s) {
        if (c == '"' || c == '\\') o += '\\';
        if (c == '\n') {
            o += "\\n";
            continue;
        }
        o += c;
    }
    return o + "\"";
}

std::string quantity(double v, const std::string& unit) {
    return str(unit.empty() ? g12(v) : g12(v) + " " + unit);
}

}  // namespace

std::string model_reference(const regimen::Regimen& r) {
    std::error_code ec;
    for (const auto& dir : input::default_model_dirs()) {
        const fs::path p = fs::path(dir) / (r.model.id + ".toml");
        if (!fs::exists(p, ec)) continue;
        if (fs::equivalent(p, r.model.path, ec)) return r.model.id;
        break;  // the first file of that id wins, and it is another one
    }
    return fs::absolute(r.model.path, ec).lexically_normal().string();
}

std::string regimen_text(const regimen::Regimen& r, const std::string& header) {
    std::ostringstream out;
    std::istringstream h(header);
    for (std::string line; std::getline(h, line);) out << "# " << line << "\n";
    out << "id = " << str(r.id) << "\n";
    if (!r.about.empty()) out << "about = " << str(r.about) << "\n";
    out << "model = " << str(model_reference(r)) << "\n";
    if (!r.overrides.empty()) {
        out << "\n[parameters]\n";
        for (const auto& o : r.overrides) {
            const auto& p = r.model.parameters[static_cast<std::size_t>(o.index)];
            out << o.name << " = " << quantity(units::to_unit(o.value, p.unit), p.unit_text) << "\n";
        }
    }
    if (!r.patient.empty()) {
        out << "\n[patient]\n";
        for (const auto& pv : r.patient) {
            out << pv.name << " = ";
            if (pv.index >= 0) {
                const auto& p = r.model.parameters[static_cast<std::size_t>(pv.index)];
                out << quantity(units::to_unit(pv.value, p.unit), p.unit_text);
            } else if (pv.name == regimen::kHeightName) {
                out << quantity(pv.value, "cm");
            } else {
                out << quantity(pv.value * 1e-6, "kg");  // a body weight, held in mg
            }
            out << "\n";
        }
    }
    // Amounts are written in mg as resolved for the patient (a per-kg amount becomes the patient's dose).
    for (const auto& d : r.doses) {
        out << "\n[[doses]]\nroute = " << str(d.route) << "\namount = " << quantity(d.amount, "mg")
            << "\nat = " << quantity(d.at, "h") << "\n";
        if (d.count > 1) out << "every = " << quantity(d.every, "h") << "\ncount = " << d.count << "\n";
        if (d.over > 0.0) out << "over = " << quantity(d.over, "h") << "\n";
    }
    const regimen::Targets& t = r.targets;
    if (!t.output.empty() || t.above || t.window || t.auc24) {
        const int oi = t.output.empty() ? 0 : r.model.output_index(t.output);
        const model::Output& o = r.model.outputs[static_cast<std::size_t>(oi)];
        auto conc = [&](double v) { return quantity(report::in_output_unit(o, v), o.unit_text); };
        auto auc = [&](double v) { return quantity(report::in_output_unit(o, v), o.unit_text + "*h"); };
        out << "\n[targets]\noutput = " << str(o.name) << "\n";
        if (t.above) out << "above = " << conc(*t.above) << "\n";
        if (t.above_for) out << "above_for = " << quantity(*t.above_for * 100.0, "%") << "\n";
        if (t.window) out << "window = [" << conc(t.window->first) << ", " << conc(t.window->second) << "]\n";
        if (t.auc24) out << "auc24 = [" << auc(t.auc24->first) << ", " << auc(t.auc24->second) << "]\n";
    }
    // The grid step in whole minutes when it is one (a 10-minute step is 0.1666... h).
    const double minutes = r.horizon.step * 60.0;
    const bool whole = std::abs(minutes - std::round(minutes)) < 1e-9 * minutes;
    out << "\n[horizon]\nuntil = " << quantity(r.horizon.until, "h")
        << "\nstep = " << (whole ? quantity(std::round(minutes), "min") : quantity(r.horizon.step, "h")) << "\n";
    return out.str();
}

}  // namespace plateau::dose
