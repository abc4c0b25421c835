// Validation of model files: names, units, rate and output expressions, routes.
#include <algorithm>
#include <cmath>
#include <map>

#include "input/load.hpp"
#include "input/loaders.hpp"
#include "input/load_residual.hpp"
#include "ops/table.hpp"

namespace plateau::input {

namespace detail {

namespace {

// `t` and the function names of ops/list.hpp.
const std::vector<std::string> kReserved = [] {
    std::vector<std::string> v{"t"};
    for (auto& name : ops::function_names()) v.push_back(std::move(name));
    return v;
}();

// Names shared by parameters, compartments and outputs.
class Names {
public:
    // Names refused (invalid, reserved, duplicate): later uses of them are not reported again.
    std::vector<std::string> refused;

    bool claim(Ctx& c, const Entry& e, const std::string& kind) {
        if (!accept(c, e, kind)) {
            refused.push_back(e.key);
            return false;
        }
        return true;
    }
    bool is_refused(const std::string& name) const {
        return std::find(refused.begin(), refused.end(), name) != refused.end();
    }

private:
    bool accept(Ctx& c, const Entry& e, const std::string& kind) {
        if (!is_identifier(e.key)) {
            c.error(e.key_pos, "invalid name '" + e.key + "' for a " + kind,
                    "letters, digits and '_', not starting with a digit", static_cast<int>(e.key.size()));
            return false;
        }
        if (std::find(kReserved.begin(), kReserved.end(), e.key) != kReserved.end()) {
            c.error(e.key_pos, "the name '" + e.key + "' is reserved", "a name other than " + join(kReserved),
                    static_cast<int>(e.key.size()));
            return false;
        }
        auto it = used_.find(e.key);
        if (it != used_.end()) {
            c.error(e.key_pos,
                    "duplicate name '" + e.key + "': already used by the " + it->second.first + " on line " +
                        std::to_string(it->second.second),
                    "names unique across parameters, compartments and outputs", static_cast<int>(e.key.size()));
            return false;
        }
        used_.emplace(e.key, std::make_pair(kind, e.key_pos.line));
        return true;
    }

    std::map<std::string, std::pair<std::string, int>> used_;
};

std::vector<std::string> names_of(const auto& items) {
    std::vector<std::string> out;
    for (const auto& i : items) out.push_back(i.name);
    return out;
}

void load_parameters(Ctx& c, const Value& root, Names& names, model::Model& m, std::vector<std::string>& broken,
                     std::vector<std::string>& declared, model::ParamKind kind = model::ParamKind::Fixed) {
    const bool cov = kind == model::ParamKind::Covariate;
    const Value* table = get_table(c, root, cov ? "covariates" : "parameters", false, "the model file",
                                   cov ? "[covariates] with lines like wt = { value = \"70 kg\", about = \"body weight\" }"
                                       : "[parameters] with lines like ka = { value = \"1.2 1/h\" }");
    if (table == nullptr) return;
    for (const Entry& e : table->entries) {
        const bool named = names.claim(c, e, cov ? "covariate" : "parameter");
        const std::string where = (cov ? "covariate '" : "parameter '") + e.key + "'";
        model::Parameter p;
        p.name = e.key;
        p.kind = kind;
        const Value* val = nullptr;
        if (e.value.kind == Kind::Table) {
            check_keys(c, e.value, {"value", "about"}, where);
            if (const Entry* v = e.value.find("value")) val = &v->value;
            else
                c.missing(e.value, "value", where, "value = \"<number> <unit>\", like \"1.2 1/h\"");
            if (const Value* a = get_string(c, e.value, "about", false, where, "a description in a string"))
                p.about = a->str;
        } else if (e.value.kind == Kind::String || e.value.is_number()) {
            val = &e.value;
        } else {
            wrong_kind(c, e.value, e.key, "a table, a string or a number",
                       e.key + " = { value = \"1.2 1/h\", about = \"...\" }");
        }
        bool ok = false;
        if (val != nullptr) {
            p.pos = val->kind == Kind::String ? string_pos(c.doc, *val, 0) : val->pos;
            const std::string key = val == &e.value ? e.key : "value";
            if (auto q = quantity(c, *val, key, std::nullopt, "1.2 1/h", true)) {
                p.value = q->value;
                p.dim = q->dim;
                ok = true;
                if (val->kind == Kind::String) {
                    p.unit_text = unit_part(val->str);
                    try {
                        p.unit = units::parse_unit(p.unit_text);
                    } catch (const TextError&) {
                        p.unit = units::Unit{1.0, p.dim};  // the quantity parsed, so this cannot really happen
                    }
                }
                if (!physical_value_ok(c, *val, e.key, p.unit_text, p.dim, p.value)) ok = false;
            }
        }
        if (!named) continue;
        declared.push_back(e.key);
        if (ok) m.parameters.push_back(std::move(p));
        else broken.push_back(e.key);
    }
}

void load_compartments(Ctx& c, const Value& root, Names& names, model::Model& m, std::vector<SourcePos>& key_pos) {
    const Value* table = get_table(c, root, "compartments", true, "the model file",
                                   "[compartments] with lines like central = \"mg\"");
    if (table == nullptr) return;
    if (table->entries.empty())
        c.error(table->pos, "no compartments in [compartments]", "at least one line like central = \"mg\"");
    for (const Entry& e : table->entries) {
        const bool named = names.claim(c, e, "compartment");
        model::Compartment comp;
        comp.name = e.key;
        comp.unit = units::Unit{1.0, units::kMass};
        comp.pos = e.key_pos;
        if (e.value.kind != Kind::String) {
            wrong_kind(c, e.value, e.key, "a string", "an amount unit, like \"mg\"");
        } else {
            try {
                units::Unit u = units::parse_unit(e.value.str);
                if (u.dim != units::kMass)
                    c.value_error(e.value,
                                  "compartment '" + e.key + "' must hold an amount, but '" + e.value.str + "' is " +
                                      units::dim_name(u.dim),
                                  "a mass unit, like \"mg\"");
                else {
                    comp.unit = u;
                    comp.unit_text = e.value.str;
                }
            } catch (const TextError& err) {
                c.text_error(e.value, err);
            }
        }
        if (!named) continue;
        m.compartments.push_back(std::move(comp));
        key_pos.push_back(e.key_pos);
    }
}

Scope full_scope(const model::Model& m, const std::vector<std::string>& broken,
                 const std::vector<std::string>& declared) {
    Scope s;
    for (const auto& p : m.parameters) s.symbols.push_back(Symbol{p.name, p.dim, true, p.pos});
    for (const auto& comp : m.compartments) s.symbols.push_back(Symbol{comp.name, units::kMass, false, {}});
    s.symbols.push_back(Symbol{"t", units::kTime, false, {}});
    s.unknown_dim = broken;
    s.listed = declared;
    for (const auto& comp : m.compartments) s.listed.push_back(comp.name);
    s.listed.push_back("t");
    return s;
}

Scope parameter_scope(const model::Model& m, const std::vector<std::string>& broken,
                      const std::vector<std::string>& declared) {
    Scope s;
    for (const auto& p : m.parameters) s.symbols.push_back(Symbol{p.name, p.dim, true, p.pos});
    for (const auto& comp : m.compartments) s.forbidden.push_back(comp.name);
    s.forbidden.push_back("t");
    s.forbidden_reason = "route fractions and lags may use parameters only";
    s.unknown_dim = broken;
    s.listed = declared;
    return s;
}

void load_rates(Ctx& c, const Value& root, const Scope& scope, const Names& names, model::Model& m,
                const std::vector<SourcePos>& key_pos) {
    m.rates.assign(m.compartments.size(), model::Rate{});
    const Value* table = get_table(c, root, "rates", !m.compartments.empty(), "the model file",
                                   "[rates] with one line per compartment, like central = \"-cl/v*central\"");
    if (table == nullptr) return;
    std::vector<bool> given(m.compartments.size(), false);
    for (const Entry& e : table->entries) {
        int idx = m.compartment_index(e.key);
        if (idx < 0 && names.is_refused(e.key)) continue;
        if (idx < 0) {
            c.error(e.key_pos, "rate for unknown compartment '" + e.key + "'" + did_you_mean(e.key, names_of(m.compartments)),
                    one_of(names_of(m.compartments)),
                    static_cast<int>(e.key.size()));
            continue;
        }
        auto i = static_cast<std::size_t>(idx);
        given[i] = true;
        model::Rate& r = m.rates[i];
        if (e.value.kind == Kind::String) {
            r.text = e.value.str;
            r.pos = string_pos(c.doc, e.value, 0);
        }
        const Want want{units::kAmountRate, "this rate"};
        auto parsed = expression(c, e.value, e.key, scope, false, want);
        if (!parsed) continue;
        auto zero = expr::fold_number(*parsed->e);
        if (!(zero && *zero == 0.0) && parsed->dim != units::kAmountRate) {
            c.value_error(e.value,
                          "the rate of compartment '" + e.key + "' is " + units::dim_name(parsed->dim) +
                              ", not an amount per time",
                          "an amount per time (mg/h), like \"-cl/v*central\"");
            c.wants_notes(parsed->e, scope, want);
            continue;
        }
        c.used_well(*parsed->e);
        r.expr = parsed->e;
    }
    for (std::size_t i = 0; i < m.compartments.size(); ++i) {
        if (given[i]) continue;
        const std::string& name = m.compartments[i].name;
        c.error(key_pos[i], "no rate for compartment '" + name + "'",
                "a line in [rates]: " + name + " = \"<expression>\" (\"0\" if it does not change)",
                static_cast<int>(name.size()));
    }
}

void load_outputs(Ctx& c, const Value& root, Names& names, const Scope& scope, model::Model& m) {
    const Value* table = get_table(c, root, "outputs", true, "the model file",
                                   "[outputs] with lines like conc = { expr = \"central/v\", unit = \"mg/L\" }");
    if (table == nullptr) return;
    if (table->entries.empty())
        c.error(table->pos, "no outputs in [outputs]", "at least one line like conc = { expr = \"central/v\", unit = \"mg/L\" }");
    for (const Entry& e : table->entries) {
        const bool named = names.claim(c, e, "output");
        const std::string where = "output '" + e.key + "'";
        if (e.value.kind != Kind::Table) {
            wrong_kind(c, e.value, e.key, "a table", e.key + " = { expr = \"central/v\", unit = \"mg/L\" }");
            continue;
        }
        check_keys(c, e.value, {"expr", "unit", "about"}, where);
        model::Output o;
        o.name = e.key;
        const Value* unit = get_string(c, e.value, "unit", true, where, "unit = \"mg/L\"");
        bool unit_ok = false;
        if (unit != nullptr) {
            try {
                o.unit = units::parse_unit(unit->str);
                o.unit_text = unit->str;
                unit_ok = true;
            } catch (const TextError& err) {
                c.text_error(*unit, err);
            }
        }
        if (const Value* a = get_string(c, e.value, "about", false, where, "a description in a string")) o.about = a->str;
        const Entry* ex = e.value.find("expr");
        if (ex == nullptr) {
            c.missing(e.value, "expr", where, "expr = \"<expression>\", like \"central/v\"");
        } else {
            if (ex->value.kind == Kind::String) {
                o.text = ex->value.str;
                o.pos = string_pos(c.doc, ex->value, 0);
            }
            std::optional<Want> want;
            if (unit_ok) want = Want{o.unit.dim, "output '" + e.key + "' (" + o.unit_text + ")"};
            auto parsed = expression(c, ex->value, "expr", scope, false, want);
            if (parsed && unit_ok && parsed->dim != o.unit.dim) {
                c.value_error(ex->value,
                              "output '" + e.key + "' is " + units::dim_name(parsed->dim) + ", but its unit '" + o.unit_text +
                                  "' is " + units::dim_name(o.unit.dim),
                              "an expression that is " + units::dim_name(o.unit.dim) + ", or a unit that matches it");
                c.wants_notes(parsed->e, scope, *want);
            } else if (parsed) {
                if (unit_ok) c.used_well(*parsed->e);
                o.expr = parsed->e;
            }
        }
        if (named) m.outputs.push_back(std::move(o));
    }
}

// Checks a route constant with the model's default values.
void check_constant(Ctx& c, const model::Model& m, const Value& v, const std::string& route, bool lag,
                    const expr::Node& e) {
    double x = 0.0;
    try {
        x = model::evaluate_constant(m, e, m.default_values());
    } catch (const std::exception&) {
        x = std::nan("");
    }
    RouteConstantProblem p{-1, lag, x};
    bool bad = !std::isfinite(x) || x < 0.0 || (!lag && x > 1.0);
    if (bad) c.value_error(v, route_constant_message(route, p) + " with the default parameter values", route_constant_expected(p));
}

void load_routes(Ctx& c, const Value& root, const Scope& scope, const Names& names, model::Model& m) {
    const Value* table = get_table(c, root, "routes", false, "the model file",
                                   "[routes] with lines like iv = { into = \"central\" }");
    if (table == nullptr) return;
    std::vector<std::string> compartments = names_of(m.compartments);
    for (const Entry& e : table->entries) {
        const std::string where = "route '" + e.key + "'";
        if (e.value.kind != Kind::Table) {
            wrong_kind(c, e.value, e.key, "a table", e.key + " = { into = \"central\" }");
            continue;
        }
        check_keys(c, e.value, {"into", "fraction", "lag"}, where);
        model::Route r;
        r.name = e.key;
        r.pos = e.key_pos;
        if (const Value* into = get_string(c, e.value, "into", true, where, "into = \"<compartment>\"")) {
            r.into = m.compartment_index(into->str);
            if (r.into < 0 && !names.is_refused(into->str))
                c.value_error(*into, "route '" + e.key + "' goes into unknown compartment '" + into->str + "'" +
                                         did_you_mean(into->str, compartments),
                              one_of(compartments));
        }
        if (const Entry* f = e.value.find("fraction")) {
            auto parsed = expression(c, f->value, "fraction", scope, true);
            if (parsed && !parsed->dim.dimensionless())
                c.value_error(f->value, "the fraction of route '" + e.key + "' must be dimensionless, but it is " +
                                            units::dim_name(parsed->dim),
                              "a dimensionless expression over parameters, like \"f\"");
            else if (parsed) {
                r.fraction_text = f->value.str;
                r.fraction = parsed->e;
                check_constant(c, m, f->value, e.key, false, *r.fraction);
            }
        }
        if (const Entry* l = e.value.find("lag")) {
            auto parsed = expression(c, l->value, "lag", scope, true);
            if (parsed && parsed->dim != units::kTime)
                c.value_error(l->value, "the lag of route '" + e.key + "' must be a time, but it is " + units::dim_name(parsed->dim),
                              "a time: a parameter like \"tlag\" or a duration like \"30 min\"");
            else if (parsed) {
                r.lag_text = l->value.str;
                r.lag = parsed->e;
                check_constant(c, m, l->value, e.key, true, *r.lag);
            }
        }
        m.routes.push_back(std::move(r));
    }
}

// ------------------------------------------------------------------ covariates, derived parameters, variability

// [derived]: name = { expr = "...", unit = "L/h", about = "..." }, over parameters, covariates and derived
// parameters above it. Each is checked against its unit and computed once with the typical values.
void load_derived(Ctx& c, const Value& root, Names& names, model::Model& m, std::vector<std::string>& broken,
                  std::vector<std::string>& declared) {
    const Value* table = get_table(c, root, "derived", false, "the model file",
                                   "[derived] with lines like cl = { expr = \"cl_pop*(wt/wt_ref)^0.75\", unit = \"L/h\" }");
    if (table == nullptr) return;
    for (const Entry& e : table->entries) {
        const bool named = names.claim(c, e, "derived parameter");
        const std::string where = "derived parameter '" + e.key + "'";
        if (e.value.kind != Kind::Table) {
            wrong_kind(c, e.value, e.key, "a table", e.key + " = { expr = \"cl_pop*(wt/wt_ref)^0.75\", unit = \"L/h\" }");
            if (named) broken.push_back(e.key);
            continue;
        }
        check_keys(c, e.value, {"expr", "unit", "about"}, where);
        model::Parameter p;
        p.name = e.key;
        p.kind = model::ParamKind::Derived;
        bool ok = true;
        if (const Value* a = get_string(c, e.value, "about", false, where, "a description in a string")) p.about = a->str;
        const Value* unit = get_string(c, e.value, "unit", false, where, "unit = \"L/h\" (leave it out if dimensionless)");
        if (unit != nullptr) {
            try {
                p.unit = units::parse_unit(unit->str);
                p.unit_text = unit->str;
                p.dim = p.unit.dim;
            } catch (const TextError& err) {
                c.text_error(*unit, err);
                ok = false;
            }
        }
        Scope s;
        for (const auto& q : m.parameters) s.symbols.push_back(Symbol{q.name, q.dim, true, q.pos});
        for (const auto& comp : m.compartments) s.forbidden.push_back(comp.name);
        s.forbidden.push_back("t");
        s.forbidden_reason = "derived parameters are computed once per subject from parameters and covariates";
        s.unknown_dim = broken;
        s.listed = declared;
        const Entry* ex = e.value.find("expr");
        if (ex == nullptr) {
            c.missing(e.value, "expr", where, "expr = \"<expression over parameters and covariates>\"");
            ok = false;
        } else {
            if (ex->value.kind == Kind::String) {
                p.expr_text = ex->value.str;
                p.pos = string_pos(c.doc, ex->value, 0);
            }
            auto parsed = expression(c, ex->value, "expr", s, true);
            if (!parsed) {
                ok = false;
            } else if (ok && parsed->dim != p.dim) {
                c.value_error(ex->value,
                              where + " is " + units::dim_name(parsed->dim) + ", but its unit '" + p.unit_text + "' is " +
                                  units::dim_name(p.dim),
                              "an expression that is " + units::dim_name(p.dim) + ", or a unit that matches it");
                ok = false;
            } else if (ok) {
                p.expr = parsed->e;
                double x = std::nan("");
                try {
                    x = model::evaluate_constant(m, *p.expr, m.default_values());
                } catch (const std::exception&) {
                }
                if (!std::isfinite(x)) {
                    c.value_error(ex->value, where + " is " + fmt(x) + " with the typical values", "a finite value");
                    ok = false;
                } else if (!physical_value_ok(c, ex->value, e.key, p.unit_text, p.dim, x,
                                              where + " with the typical values")) {
                    ok = false;
                }
                p.value = x;
            }
        }
        if (!named) continue;
        declared.push_back(e.key);
        if (ok) m.parameters.push_back(std::move(p));
        else broken.push_back(e.key);
    }
}

// One [variability] entry: "30 %" (log-normal CV), { cv = "30 %" }, { logit_sd = 0.5 } or { sd = "0.2 h" }.
void load_spread(Ctx& c, const Entry& e, const model::Parameter& p, model::Variability& v, bool& ok) {
    const std::string where = "variability of '" + e.key + "'";
    const std::string forms = "\"30 %\" (log-normal CV), { cv = \"30 %\" }, { logit_sd = 0.5 } or { sd = \"1 " +
                              (p.unit_text.empty() ? std::string("") : p.unit_text) + "\" }";
    const Value* val = &e.value;
    std::string key = "cv";
    if (e.value.kind == Kind::Table) {
        check_keys(c, e.value, {"cv", "logit_sd", "sd"}, where);
        if (e.value.entries.size() != 1) {
            c.error(e.value.pos, where + " needs exactly one of cv, logit_sd, sd", forms);
            ok = false;
            return;
        }
        key = e.value.entries.front().key;
        val = &e.value.entries.front().value;
    } else if (e.value.kind != Kind::String) {
        wrong_kind(c, e.value, e.key, "a string or a table", forms);
        ok = false;
        return;
    }
    v.pos = val->kind == Kind::String ? string_pos(c.doc, *val, 0) : val->pos;
    v.text = val->kind == Kind::String ? val->str : fmt(val->as_double());
    if (key == "cv") {
        auto q = quantity(c, *val, e.key, units::kNone, "30 %");
        if (!q) { ok = false; return; }
        if (!(q->value > 0.0) || q->value > 10.0) {
            c.value_error(*val, where + ": the coefficient of variation must be above 0 % and at most 1000 %",
                          "a CV like \"30 %\"");
            ok = false;
            return;
        }
        if (!(p.value > 0.0)) {
            c.value_error(*val, where + ": a log-normal spread needs a typical value above 0, but '" + e.key + "' is " +
                                    fmt(p.value), "{ sd = ... } for a normal additive spread");
            ok = false;
            return;
        }
        v.spread = model::Spread::LogNormal;
        v.cv = q->value;
        v.omega = std::sqrt(std::log1p(q->value * q->value));   // ω² = ln(1 + CV²)
    } else if (key == "logit_sd") {
        auto q = quantity(c, *val, "logit_sd", units::kNone, "0.5", true);
        if (!q) { ok = false; return; }
        if (!(q->value > 0.0)) {
            c.value_error(*val, where + ": logit_sd must be above 0", "a standard deviation on the logit scale, like 0.5");
            ok = false;
            return;
        }
        if (!p.dim.dimensionless() || !(p.value > 0.0 && p.value < 1.0)) {
            c.value_error(*val, where + ": a logit-normal spread is for fractions, but '" + e.key + "' is " +
                                    fmt(p.value) + (p.unit_text.empty() ? "" : " (canonical " + units::canonical_unit(p.dim) + ")"),
                          "a dimensionless parameter strictly between 0 and 1");
            ok = false;
            return;
        }
        v.spread = model::Spread::LogitNormal;
        v.omega = q->value;
    } else {
        auto q = quantity(c, *val, "sd", p.dim, "1 " + p.unit_text, p.dim.dimensionless());
        if (!q) { ok = false; return; }
        if (!(q->value > 0.0)) {
            c.value_error(*val, where + ": sd must be above 0", "a standard deviation in the parameter's unit");
            ok = false;
            return;
        }
        v.spread = model::Spread::Normal;
        v.omega = q->value;
    }
}

// [variability] and [correlation] (cl = { v = 0.4 }: the correlation of the random effects of cl and v).
void load_variability(Ctx& c, const Value& root, model::Model& m, const std::vector<std::string>& broken) {
    const Value* table = get_table(c, root, "variability", false, "the model file",
                                   "[variability] with lines like cl = \"30 %\"");
    std::vector<std::string> varied;
    for (const auto& p : m.parameters)
        if (p.kind != model::ParamKind::Covariate) varied.push_back(p.name);
    bool ok = true;
    if (table != nullptr)
        for (const Entry& e : table->entries) {
            const int idx = m.parameter_index(e.key);
            if (idx < 0) {
                if (std::find(broken.begin(), broken.end(), e.key) == broken.end())
                    c.error(e.key_pos, "variability for unknown parameter '" + e.key + "'", one_of(varied),
                            static_cast<int>(e.key.size()));
                ok = false;
                continue;
            }
            const model::Parameter& p = m.parameters[static_cast<std::size_t>(idx)];
            if (p.kind == model::ParamKind::Covariate) {
                c.error(e.key_pos, "'" + e.key + "' is a covariate: its spread belongs in a cohort file",
                        "a parameter or derived parameter: " + one_of(varied), static_cast<int>(e.key.size()));
                ok = false;
                continue;
            }
            model::Variability v;
            v.name = e.key;
            v.index = idx;
            load_spread(c, e, p, v, ok);
            m.variability.push_back(v);
        }
    const Value* corr = get_table(c, root, "correlation", false, "the model file",
                                  "[correlation] with lines like cl = { v = 0.4 }");
    if (corr == nullptr || !ok) return;
    const std::size_t n = m.variability.size();
    std::vector<std::string> names;
    for (const auto& v : m.variability) names.push_back(v.name);
    auto index_of = [&](const std::string& name) {
        for (std::size_t i = 0; i < n; ++i)
            if (names[i] == name) return static_cast<int>(i);
        return -1;
    };
    m.correlation.assign(n * n, 0.0);
    for (std::size_t i = 0; i < n; ++i) m.correlation[i * n + i] = 1.0;
    std::vector<bool> set(n * n, false);
    for (const Entry& e : corr->entries) {
        const int i = index_of(e.key);
        if (i < 0) {
            c.error(e.key_pos, "correlation of '" + e.key + "', which has no [variability] entry", one_of(names),
                    static_cast<int>(e.key.size()));
            continue;
        }
        if (e.value.kind != Kind::Table) {
            wrong_kind(c, e.value, e.key, "a table", e.key + " = { v = 0.4 }");
            continue;
        }
        for (const Entry& f : e.value.entries) {
            const int j = index_of(f.key);
            const std::string pair = "'" + e.key + "' and '" + f.key + "'";
            if (j < 0 || j == i) {
                c.error(f.key_pos, j == i ? "a correlation of '" + f.key + "' with itself" :
                                            "correlation with '" + f.key + "', which has no [variability] entry",
                        "another parameter with variability: " + one_of(names), static_cast<int>(f.key.size()));
                continue;
            }
            const auto a = static_cast<std::size_t>(i), b = static_cast<std::size_t>(j);
            if (set[a * n + b]) {
                c.error(f.key_pos, "the correlation of " + pair + " is given twice", "each pair once",
                        static_cast<int>(f.key.size()));
                continue;
            }
            if (!f.value.is_number() || !(std::abs(f.value.as_double()) < 1.0)) {
                c.value_error(f.value, "the correlation of " + pair + " must be a number between -1 and 1",
                              "a number strictly between -1 and 1, like 0.4");
                continue;
            }
            set[a * n + b] = set[b * n + a] = true;
            m.correlation[a * n + b] = m.correlation[b * n + a] = f.value.as_double();
        }
    }
    if (!c.sink.empty()) return;
    if (model::cholesky(m.correlation, n).empty())
        c.error(corr->pos, "these correlations are impossible together (the matrix is not positive definite)",
                "smaller correlations, consistent with each other");
}

}  // namespace

std::vector<RouteConstantProblem> route_constant_problems(const model::Model& m, const std::vector<double>& values) {
    std::vector<RouteConstantProblem> out;
    auto eval = [&](const expr::Node& e) {
        try {
            return model::evaluate_constant(m, e, values);
        } catch (const std::exception&) {
            return std::nan("");
        }
    };
    for (std::size_t i = 0; i < m.routes.size(); ++i) {
        const auto& r = m.routes[i];
        if (r.fraction) {
            double f = eval(*r.fraction);
            if (!std::isfinite(f) || f < 0.0 || f > 1.0) out.push_back({static_cast<int>(i), false, f});
        }
        if (r.lag) {
            double l = eval(*r.lag);
            if (!std::isfinite(l) || l < 0.0) out.push_back({static_cast<int>(i), true, l});
        }
    }
    return out;
}

std::string route_constant_message(const std::string& name, const RouteConstantProblem& p) {
    if (p.lag) return "the lag of route '" + name + "' is " + fmt(p.value) + " h";
    return "the fraction of route '" + name + "' is " + fmt(p.value);
}

std::string route_constant_expected(const RouteConstantProblem& p) {
    return p.lag ? "a lag of 0 h or more" : "a fraction from 0 to 1";
}

model::Model build_model(Ctx& c) {
    model::Model m;
    m.path = c.doc.path;
    const Value& root = c.doc.root;
    if (root.entries.empty()) {
        c.error(root.pos, "empty file: no model in it",
                "a model file with id, [parameters], [compartments], [rates], [outputs] and [routes]");
        return m;
    }
    check_keys(c, root, {"id", "summary", "parameters", "covariates", "derived", "compartments", "rates", "outputs", "routes",
                         "variability", "correlation", "residual"},
               "a model file");
    if (const Value* id = get_string(c, root, "id", true, "the model file", "id = \"<model name>\"")) {
        if (id->str.empty()) c.value_error(*id, "the model id is empty", "a name, like \"one-compartment-iv\"");
        m.id = id->str;
    }
    if (const Value* s = get_string(c, root, "summary", false, "the model file", "a one-line description in a string"))
        m.summary = s->str;

    Names names;
    std::vector<std::string> broken;   // parameters whose value is wrong: their dimension is unknown
    std::vector<std::string> declared;  // every parameter name accepted, in file order
    std::vector<SourcePos> compartment_keys;
    load_parameters(c, root, names, m, broken, declared);
    load_parameters(c, root, names, m, broken, declared, model::ParamKind::Covariate);
    load_compartments(c, root, names, m, compartment_keys);
    broken.insert(broken.end(), names.refused.begin(), names.refused.end());
    load_derived(c, root, names, m, broken, declared);
    const Scope scope = full_scope(m, broken, declared);
    load_rates(c, root, scope, names, m, compartment_keys);
    load_outputs(c, root, names, scope, m);
    load_routes(c, root, parameter_scope(m, broken, declared), names, m);
    load_variability(c, root, m, broken);
    load_residual(c, root, m);
    add_dimension_notes(c);
    return m;
}

}  // namespace detail

model::Model load_model(const std::string& path) {
    Document doc = read_document(path);
    DiagnosticSink sink;
    detail::hoist_misplaced_keys(doc, sink, {"id", "summary"});
    detail::Ctx c{doc, sink};
    model::Model m = detail::build_model(c);
    detail::throw_sorted(sink, path);
    return m;
}

}  // namespace plateau::input
