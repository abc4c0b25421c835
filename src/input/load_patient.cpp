// Validation of a regimen's [patient] table and the per-kg / per-m² dose amounts that depend on it.
#include <cmath>

#include <algorithm>
#include <cctype>
#include "input/loaders.hpp"

namespace plateau::input::detail {

double parse_height(std::string_view text) {
    // Heights are the one length plateau reads: kept in cm, outside the mg/L/h system of the engine.
    std::size_t i = 0;
    while (i < text.size() && (std::isdigit(static_cast<unsigned char>(text[i])) || text[i] == '.')) ++i;
    std::string_view unit = text.substr(i);
    while (!unit.empty() && unit.front() == ' ') unit.remove_prefix(1);
    double factor = 0.0;
    if (unit == "cm") factor = 1.0;
    else if (unit == "m") factor = 100.0;
    if (i == 0 || factor == 0.0)
        throw TextError("expected a height like '178 cm' or '1.78 m', got '" + std::string(text) + "'", i);
    double v = 0.0;
    try {
        v = std::stod(std::string(text.substr(0, i)));
    } catch (const std::exception&) {
        throw TextError("expected a number before the unit, got '" + std::string(text) + "'", 0);
    }
    return v * factor;
}

void load_patient(Ctx& c, const Value& table, const model::Model& m, regimen::Regimen& r) {
    std::vector<std::string> names;
    for (const auto& p : m.parameters)
        if (p.kind == model::ParamKind::Covariate) names.push_back(p.name);
    std::vector<std::string> allowed = names;
    for (const char* body : {regimen::kWeightName, regimen::kHeightName})
        if (std::find(allowed.begin(), allowed.end(), body) == allowed.end()) allowed.push_back(body);
    for (const Entry& e : table.entries) {
        regimen::PatientValue pv;
        pv.name = e.key;
        pv.index = m.parameter_index(e.key);
        pv.pos = e.value.kind == Kind::String ? string_pos(c.doc, e.value, 0) : e.value.pos;
        if (pv.index >= 0 && m.parameters[static_cast<std::size_t>(pv.index)].kind != model::ParamKind::Covariate) {
            c.error(e.key_pos, "'" + e.key + "' is a parameter of model '" + m.id + "', not a covariate",
                    "a covariate (" + one_of(names) + "), or set parameters in [parameters]", static_cast<int>(e.key.size()));
            continue;
        }
        if (e.key == regimen::kHeightName && pv.index < 0) {
            if (e.value.kind != Kind::String) {
                wrong_kind(c, e.value, e.key, "a string", "a height like \"178 cm\"");
                continue;
            }
            try {
                pv.value = parse_height(e.value.str);
            } catch (const TextError& err) {
                c.text_error(e.value, err);
                continue;
            }
            if (!(pv.value >= 30.0 && pv.value <= 272.0)) {
                c.value_error(e.value, "the height " + fmt(pv.value) + " cm is outside 30 to 272 cm", "a human height in cm or m");
                continue;
            }
            r.patient.push_back(pv);
            continue;
        }
        if (pv.index < 0 && e.key != regimen::kWeightName) {
            c.error(e.key_pos, "unknown covariate '" + e.key + "' for model '" + m.id + "'", one_of(allowed),
                    static_cast<int>(e.key.size()));
            continue;
        }
        const units::Dim dim = pv.index >= 0 ? m.parameters[static_cast<std::size_t>(pv.index)].dim : units::kMass;
        std::string example = "70 kg";
        if (pv.index >= 0) {
            const auto& p = m.parameters[static_cast<std::size_t>(pv.index)];
            example = fmt(units::to_unit(p.value, p.unit)) + (p.unit_text.empty() ? "" : " " + p.unit_text);
        }
        auto q = quantity(c, e.value, e.key, dim, example, dim.dimensionless());
        if (!q) continue;
        if (e.key == regimen::kWeightName && !(q->value >= 0.2e6 && q->value <= 650e6)) {
            c.value_error(e.value, "the weight '" + e.value.str + "' is outside 0.2 to 650 kg", "a body weight like \"70 kg\"");
            continue;
        }
        pv.value = q->value;
        r.patient.push_back(pv);
    }
}

void resolve_per_size(Ctx& c, regimen::Regimen& r) {
    const regimen::BodySize b = r.body_size();
    for (auto& d : r.doses) {
        if (d.per_size == regimen::Per::None) continue;
        if (!(b.weight_kg > 0.0)) {
            c.error(d.pos, "an amount per " + std::string(d.per_size == regimen::Per::Kg ? "kg" : "m2") +
                               " needs the patient's weight",
                    "[patient] wt = \"70 kg\" (or a model with a covariate wt)");
            continue;
        }
        if (d.per_size == regimen::Per::M2 && !(b.height_cm > 0.0)) {
            c.error(d.pos, "an amount per m2 needs the patient's height for the body-surface area (Mosteller)",
                    "[patient] ht = \"170 cm\"");
            continue;
        }
        d.amount = regimen::resolved_amount(d, b);
    }
}

}  // namespace plateau::input::detail
