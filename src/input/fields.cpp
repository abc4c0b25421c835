#include "input/fields.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <memory>

namespace plateau::input::detail {

void Ctx::wants_notes(expr::Ptr e, const Scope& scope, const Want& want) {
    if (sink.empty() || !e) return;
    pending_notes.push_back(PendingNotes{sink.size() - 1, std::move(e), &scope, want.what, want.dim});
}

void Ctx::used_well(const expr::Node& e) {
    for (auto& name : expr::identifiers(e)) well_used.push_back(std::move(name));
}

void add_dimension_notes(Ctx& c) {
    for (const auto& p : c.pending_notes)
        c.sink.add_notes(p.diagnostic, dimension_notes(*p.e, *p.scope, Want{p.want, p.what}, c.well_used));
}

void Ctx::text_error(const Value& v, const TextError& e) {
    error(string_pos(doc, v, e.offset()), e.what(), e.expected(), static_cast<int>(e.length()));
}

void Ctx::value_error(const Value& v, std::string message, std::string expected) {
    if (v.kind == Kind::String)
        error(string_pos(doc, v, 0), std::move(message), std::move(expected), static_cast<int>(v.str.size()));
    else
        error(v.pos, std::move(message), std::move(expected));
}

void Ctx::missing(const Value& table, std::string_view key, std::string_view where, std::string expected) {
    if (std::find(tables_with_unknown_keys.begin(), tables_with_unknown_keys.end(), &table) !=
        tables_with_unknown_keys.end())
        return;
    std::string message = "missing key '";
    message.append(key).append("' in ").append(where);
    error(table.pos, std::move(message), std::move(expected));
}

std::string join(const std::vector<std::string>& names) {
    std::string s;
    for (const auto& n : names) {
        if (!s.empty()) s += ", ";
        s += n;
    }
    return s;
}

std::string one_of(const std::vector<std::string>& names) {
    return names.empty() ? std::string("none (nothing is defined)") : "one of: " + join(names);
}

bool physical_value_ok(Ctx& c, const Value& at, const std::string& name, const std::string& unit, units::Dim dim,
                       double value, const std::string& what) {
    const std::string subject = what.empty() ? "'" + name + "'" : what;
    const std::string got = fmt(value) + " " + units::canonical_unit(dim);
    if (dim == units::kVolume && !(value > 0.0)) {
        c.value_error(at, subject + " must be more than 0 (it is a volume), got " + got, "a volume above 0 L");
        return false;
    }
    if (!dim.dimensionless() && value < 0.0) {
        c.value_error(at, subject + " cannot be negative (got " + got + "): with a unit" +
                              (unit.empty() ? std::string() : " (" + unit + ")") + " it is a physical quantity",
                      "a value of 0 or more");
        return false;
    }
    return true;
}

std::string fmt(double x) {
    if (x == 0.0) return "0";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.6g", x);
    return buf;
}

bool is_identifier(std::string_view s) {
    if (s.empty()) return false;
    auto alpha = [](char ch) { return (ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') || ch == '_'; };
    if (!alpha(s[0])) return false;
    return std::all_of(s.begin() + 1, s.end(), [&](char ch) { return alpha(ch) || (ch >= '0' && ch <= '9'); });
}

void throw_sorted(const DiagnosticSink& sink, const std::string& path) {
    if (sink.empty()) return;
    std::vector<Diagnostic> ds = sink.items();
    std::stable_sort(ds.begin(), ds.end(), [&](const Diagnostic& a, const Diagnostic& b) {
        const bool ha = a.pos.file == path, hb = b.pos.file == path;
        if (ha != hb) return !ha;
        if (!ha) return false;
        return a.pos.line != b.pos.line ? a.pos.line < b.pos.line : a.pos.col < b.pos.col;
    });
    throw InputError(std::move(ds));
}

void hoist_misplaced_keys(Document& doc, DiagnosticSink& sink, const std::vector<std::string>& top_keys) {
    std::vector<Entry> hoisted;
    auto scan = [&](Value& table, const std::string& header) {
        for (auto it = table.entries.begin(); it != table.entries.end();) {
            const bool top = std::find(top_keys.begin(), top_keys.end(), it->key) != top_keys.end();
            const bool taken = doc.root.find(it->key) != nullptr ||
                               std::any_of(hoisted.begin(), hoisted.end(), [&](const Entry& h) { return h.key == it->key; });
            if (!top || taken || it->value.kind != Kind::String) {
                ++it;
                continue;
            }
            sink.error(it->key_pos,
                       "'" + it->key + "' is inside the " + header + " table that starts on line " +
                           std::to_string(table.pos.line) + ": in TOML, every key after a [header] line belongs to "
                           "that table",
                       "the line " + it->key + " = \"...\" at the top of the file, before the first [header]",
                       static_cast<int>(it->key.size()));
            hoisted.push_back(std::move(*it));
            it = table.entries.erase(it);
        }
    };
    for (Entry& e : doc.root.entries) {
        if (e.value.kind == Kind::Table) scan(e.value, "[" + e.key + "]");
        if (e.value.kind == Kind::Array)
            for (Value& item : e.value.items)
                if (item.kind == Kind::Table) scan(item, "[[" + e.key + "]]");
    }
    for (Entry& h : hoisted) doc.root.entries.push_back(std::move(h));
}

void check_keys(Ctx& c, const Value& table, const std::vector<std::string>& allowed, std::string_view where) {
    for (const auto& e : table.entries) {
        if (std::find(allowed.begin(), allowed.end(), e.key) != allowed.end()) continue;
        c.tables_with_unknown_keys.push_back(&table);
        c.error(e.key_pos, "unknown key '" + e.key + "' in " + std::string(where) + did_you_mean(e.key, allowed), one_of(allowed),
                static_cast<int>(e.key.size()));
    }
}

void wrong_kind(Ctx& c, const Value& v, std::string_view key, std::string_view want, std::string expected) {
    std::string message = "'";
    message.append(key).append("' must be ").append(want).append(", not ").append(kind_name(v.kind));
    c.error(v.pos, std::move(message), std::move(expected));
}

namespace {
const Value* get_kind(Ctx& c, const Value& table, std::string_view key, bool required, std::string_view where,
                      std::string expected, Kind kind, std::string_view want) {
    const Entry* e = table.find(key);
    if (e == nullptr) {
        if (required) c.missing(table, key, where, std::move(expected));
        return nullptr;
    }
    if (e->value.kind != kind) {
        wrong_kind(c, e->value, key, want, std::move(expected));
        return nullptr;
    }
    return &e->value;
}
}  // namespace

const Value* get_string(Ctx& c, const Value& table, std::string_view key, bool required, std::string_view where,
                        std::string expected) {
    return get_kind(c, table, key, required, where, std::move(expected), Kind::String, "a string");
}

const Value* get_table(Ctx& c, const Value& table, std::string_view key, bool required, std::string_view where,
                       std::string expected) {
    return get_kind(c, table, key, required, where, std::move(expected), Kind::Table, "a table");
}

namespace {

// Offset in a quantity string of a "per body weight" or "per body surface area" divisor ("/kg" in "3 mg/kg",
// "/m^2" in "100 mg/m^2/h"), or npos.
std::size_t per_body_size(std::string_view text) {
    static constexpr std::string_view kDivisors[] = {"kg", "g", "lb", "m^2", "m2", "m\xC2\xB2", "BSA"};
    for (std::size_t slash = text.find('/'); slash != std::string_view::npos; slash = text.find('/', slash + 1)) {
        std::size_t b = slash + 1;
        while (b < text.size() && (text[b] == ' ' || text[b] == '(')) ++b;
        std::size_t e = b;
        while (e < text.size() && text[e] != '/' && text[e] != '*' && text[e] != ' ' && text[e] != ')') ++e;
        const std::string_view word = text.substr(b, e - b);
        for (const auto d : kDivisors)
            if (word == d) return slash;
    }
    return std::string_view::npos;
}

}  // namespace

std::optional<units::Quantity> quantity(Ctx& c, const Value& v, std::string_view key, std::optional<units::Dim> dim,
                                        std::string example, bool allow_number) {
    // A dose per kilogram or per square metre needs the patient's size, which a regimen does not have yet.
    if (v.kind == Kind::String && dim && (*dim == units::kMass || *dim == units::kAmountRate)) {
        if (const std::size_t at = per_body_size(v.str); at != std::string_view::npos) {
            c.error(string_pos(c.doc, v, at),
                    "'" + v.str + "' is a dose per body weight or surface area, which is not supported yet (it will "
                    "come with patient covariates)",
                    *dim == units::kMass ? "the amount for this patient, like \"" + example + "\""
                                         : "the rate for this patient, like \"" + example + "\"",
                    static_cast<int>(v.str.size() - at));
            return std::nullopt;
        }
    }
    if (v.kind == Kind::String) {
        try {
            return dim ? units::parse_quantity(v.str, *dim) : units::parse_quantity(v.str);
        } catch (const TextError& e) {
            c.text_error(v, e);
            return std::nullopt;
        }
    }
    if (allow_number && v.is_number()) {
        double x = v.as_double();
        if (!std::isfinite(x)) {
            const std::string name(key);
            c.error(v.pos, "'" + name + "' must be a finite number, not " + fmt(x),
                    "a finite number, like " + example);
            return std::nullopt;
        }
        return units::Quantity{x, units::kNone};
    }
    if (allow_number)
        wrong_kind(c, v, key, "a number or a string", "a number, or a string like \"" + example + "\"");
    else
        wrong_kind(c, v, key, "a string", "a string with a unit, like \"" + example + "\"");
    return std::nullopt;
}

std::string unit_part(std::string_view s) {
    std::size_t i = 0;
    auto digit = [&](std::size_t k) { return k < s.size() && s[k] >= '0' && s[k] <= '9'; };
    while (i < s.size() && (s[i] == ' ' || s[i] == '\t')) ++i;
    if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
    while (digit(i)) ++i;
    if (i < s.size() && s[i] == '.') ++i;
    while (digit(i)) ++i;
    if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
        std::size_t j = i + 1;
        if (j < s.size() && (s[j] == '+' || s[j] == '-')) ++j;
        if (digit(j)) {
            i = j;
            while (digit(i)) ++i;
        }
    }
    std::size_t end = s.size();
    while (i < end && (s[i] == ' ' || s[i] == '\t')) ++i;
    while (end > i && (s[end - 1] == ' ' || s[end - 1] == '\t')) --end;
    return std::string(s.substr(i, end - i));
}

std::vector<const expr::Node*> variables(const expr::Node& e) {
    std::vector<const expr::Node*> out;
    std::vector<const expr::Node*> stack{&e};
    while (!stack.empty()) {
        const expr::Node* n = stack.back();
        stack.pop_back();
        if (n->op == expr::Op::Var) out.push_back(n);
        if (n->b) stack.push_back(n->b.get());
        if (n->a) stack.push_back(n->a.get());
    }
    return out;
}

std::optional<Parsed> expression(Ctx& c, const Value& v, std::string_view key, const Scope& scope, bool quantity_ok,
                                 const std::optional<Want>& want) {
    if (v.kind != Kind::String) {
        wrong_kind(c, v, key, "a string", "an expression in a string, like \"cl/v*central\"");
        return std::nullopt;
    }
    expr::Ptr e;
    try {
        e = expr::parse(v.str);
    } catch (const TextError& err) {
        if (quantity_ok) {
            try {
                units::Quantity q = units::parse_quantity(v.str);
                auto n = std::make_shared<expr::Node>();
                n->op = expr::Op::Num;
                n->num = q.value;
                n->end = v.str.size();
                return Parsed{n, q.dim};
            } catch (const TextError&) {
                // Not a quantity either: the expression's error is the useful one.
            }
        }
        c.text_error(v, err);
        return std::nullopt;
    }

    std::vector<std::string> allowed = scope.listed;
    if (allowed.empty())
        for (const auto& s : scope.symbols) allowed.push_back(s.name);
    auto find = [&](std::string_view name) -> const Symbol* {
        for (const auto& s : scope.symbols)
            if (s.name == name) return &s;
        return nullptr;
    };
    bool ok = true;
    std::vector<std::string> reported;
    bool skip = false;
    for (const expr::Node* n : variables(*e)) {
        if (std::find(scope.unknown_dim.begin(), scope.unknown_dim.end(), n->name) != scope.unknown_dim.end()) {
            skip = true;
            continue;
        }
        if (find(n->name) != nullptr) continue;
        ok = false;
        if (std::find(reported.begin(), reported.end(), n->name) != reported.end()) continue;
        reported.push_back(n->name);
        SourcePos pos = string_pos(c.doc, v, n->begin);
        auto len = static_cast<int>(n->end > n->begin ? n->end - n->begin : n->name.size());
        if (std::find(scope.forbidden.begin(), scope.forbidden.end(), n->name) != scope.forbidden.end())
            c.error(pos, "'" + n->name + "' cannot be used here: " + scope.forbidden_reason, one_of(allowed), len);
        else
            c.error(pos, "unknown identifier '" + n->name + "'" + did_you_mean(n->name, allowed), one_of(allowed), len);
    }
    if (!ok || skip) return std::nullopt;

    try {
        units::Dim d = expr::infer_dim(
            *e,
            [&](std::string_view name) -> std::optional<units::Dim> {
                const Symbol* s = find(name);
                if (s == nullptr) return std::nullopt;
                return s->dim;
            },
            [&](std::string_view name) {
                const Symbol* s = find(name);
                return s != nullptr && s->constant;
            });
        return Parsed{e, d};
    } catch (const TextError& err) {
        c.text_error(v, err);
        if (want) c.wants_notes(e, scope, *want);
        return std::nullopt;
    }
}

std::vector<Note> dimension_notes(const expr::Node& e, const Scope& scope, const Want& want,
                                  const std::vector<std::string>& skip) {
    // A wrong dimension is usually one parameter with the wrong unit; the named dimensions are the ones a
    // parameter of a compartment model has. Only one of them can fit when the parameter matters at all.
    static constexpr units::Dim kNamed[] = {units::kNone,   units::kMass,       units::kVolume,
                                            units::kTime,   units::kRate,       units::kConc,
                                            units::kFlow,   units::kAmountRate, units::kExposure};
    std::vector<Note> notes;
    for (const std::string& name : expr::identifiers(e)) {
        const auto sym = std::find_if(scope.symbols.begin(), scope.symbols.end(),
                                      [&](const Symbol& s) { return s.name == name; });
        if (sym == scope.symbols.end() || !sym->constant || sym->pos.line <= 0) continue;
        if (std::find(skip.begin(), skip.end(), name) != skip.end()) continue;
        std::vector<units::Dim> fits;
        for (const units::Dim& d : kNamed) {
            try {
                const units::Dim got = expr::infer_dim(
                    e,
                    [&](std::string_view n) -> std::optional<units::Dim> {
                        if (n == name) return d;
                        for (const auto& s : scope.symbols)
                            if (s.name == n) return s.dim;
                        return std::nullopt;
                    },
                    [&](std::string_view n) {
                        for (const auto& s : scope.symbols)
                            if (s.name == n) return s.constant;
                        return false;
                    });
                if (got == want.dim) fits.push_back(d);
            } catch (const TextError&) {
                // This dimension does not fit.
            }
        }
        if (fits.size() != 1 || fits.front() == sym->dim) continue;
        notes.push_back(Note{sym->pos,
                             "'" + name + "' is " + units::dim_name(sym->dim) + " here; " + want.what + " needs " +
                                 units::dim_name(fits.front()),
                             1});
    }
    return notes;
}

}  // namespace plateau::input::detail
