// [residual]: how far a measured level may lie from the prediction. One table per model, for one output:
//   [residual]
//   output = "conc"            (optional; default: the first output)
//   proportional = "15 %"      (σ grows with the prediction)
//   additive = "0.2 mg/L"      (in the output's dimension)
// either or both (combined: σ² = additive² + (proportional·f)²).
#include "input/load_residual.hpp"

namespace plateau::input::detail {

namespace {

constexpr const char* kForms = "proportional = \"15 %\", additive = \"0.2 mg/L\" (in the output's unit), or both";

}  // namespace

void load_residual(Ctx& c, const Value& root, model::Model& m) {
    const Value* table = get_table(c, root, "residual", false, "the model file",
                                   "[residual] with proportional = \"15 %\" and/or additive = \"0.2 mg/L\"");
    if (table == nullptr) return;
    check_keys(c, *table, {"output", "proportional", "additive"}, "[residual]");
    model::Residual r;
    r.pos = table->pos;
    r.output = m.outputs.empty() ? -1 : 0;
    std::vector<std::string> outputs;
    for (const auto& o : m.outputs) outputs.push_back(o.name);
    if (const Value* o = get_string(c, *table, "output", false, "[residual]", "output = \"<an output of this model>\"")) {
        r.output = m.output_index(o->str);
        if (r.output < 0) {
            c.value_error(*o, "[residual] is for unknown output '" + o->str + "'" + did_you_mean(o->str, outputs),
                          one_of(outputs));
            return;
        }
    }
    if (r.output < 0) return;  // no outputs: already reported
    const model::Output& out = m.outputs[static_cast<std::size_t>(r.output)];
    bool ok = true;
    const Entry* prop = table->find("proportional");
    const Entry* add = table->find("additive");
    if (prop == nullptr && add == nullptr) {
        c.error(table->pos, "[residual] gives neither a proportional nor an additive error", kForms);
        return;
    }
    if (prop != nullptr) {
        if (auto q = quantity(c, prop->value, "proportional", units::kNone, "15 %")) {
            if (!(q->value > 0.0) || q->value > 10.0) {
                c.value_error(prop->value, "the proportional error must be above 0 % and at most 1000 %",
                              "a coefficient of variation like \"15 %\"");
                ok = false;
            } else {
                r.proportional = q->value;
                r.proportional_text = prop->value.str;
            }
        } else {
            ok = false;
        }
    }
    if (add != nullptr) {
        const std::string example = "0.2 " + (out.unit_text.empty() ? std::string("mg/L") : out.unit_text);
        if (auto q = quantity(c, add->value, "additive", out.unit.dim, example)) {
            if (!(q->value > 0.0)) {
                c.value_error(add->value, "the additive error must be above 0",
                              "a standard deviation in the unit of output '" + out.name + "', like \"" + example + "\"");
                ok = false;
            } else {
                r.additive = q->value;
                r.additive_text = add->value.str;
            }
        } else {
            ok = false;
        }
    }
    if (ok) m.residual = r;
}

}  // namespace plateau::input::detail
