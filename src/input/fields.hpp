// Helpers shared by the model and regimen loaders: typed access to TOML values with diagnostics, quantities and
// expressions located in the file. Internal to input/.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/diagnostic.hpp"
#include "expr/expr.hpp"
#include "input/document.hpp"
#include "units/units.hpp"

namespace plateau::input::detail {

struct Ctx {
    Ctx(const Document& d, DiagnosticSink& s) : doc(d), sink(s) {}

    const Document& doc;
    DiagnosticSink& sink;

    void error(const SourcePos& pos, std::string message, std::string expected = {}, int length = 1) {
        sink.error(pos, std::move(message), std::move(expected), length < 1 ? 1 : length);
    }
    // An error inside a string value (TextError offsets are into the decoded string).
    void text_error(const Value& v, const TextError& e);
    // An error about a whole value: inside the quotes for a string, else at the value.
    void value_error(const Value& v, std::string message, std::string expected = {});
    // "missing key '<key>' in <where>", unless the table has an unknown key (most likely the misspelt one,
    // already reported).
    void missing(const Value& table, std::string_view key, std::string_view where, std::string expected);

    std::vector<const Value*> tables_with_unknown_keys;
};

std::string join(const std::vector<std::string>& names);     // "a, b, c"
std::string one_of(const std::vector<std::string>& names);   // "one of: a, b, c" ("none" when empty)
std::string fmt(double x);                                    // shortest readable form, 6 significant digits

bool is_identifier(std::string_view s);

// Throws InputError if the sink has anything: diagnostics in other files first (a regimen's model), then
// those in `path` in the order they appear in it.
void throw_sorted(const DiagnosticSink& sink, const std::string& path);

// Reports each key of `table` that is not in `allowed`: "unknown key 'k' in <where>", expected: the keys.
void check_keys(Ctx& c, const Value& table, const std::vector<std::string>& allowed, std::string_view where);

// "'<key>' must be <want>, not <kind>", at the value.
void wrong_kind(Ctx& c, const Value& v, std::string_view key, std::string_view want, std::string expected);

// The value of key in table if it has the right kind; nullptr when absent ("missing key '<key>' in <where>"
// if required) or of another kind (reported).
const Value* get_string(Ctx& c, const Value& table, std::string_view key, bool required, std::string_view where,
                        std::string expected);
const Value* get_table(Ctx& c, const Value& table, std::string_view key, bool required, std::string_view where,
                       std::string expected);

// A quantity string with the given dimension, converted to canonical units. `allow_number`: a TOML number is
// taken as a dimensionless value. Reports wrong kinds, unit errors and non-finite values; nullopt on error.
std::optional<units::Quantity> quantity(Ctx& c, const Value& v, std::string_view key, std::optional<units::Dim> dim,
                                        std::string example, bool allow_number = false);

// The unit part of a quantity string that parsed: "250 mg" -> "mg", "0.8" -> "".
std::string unit_part(std::string_view quantity_text);

// Identifiers an expression may use.
struct Symbol {
    std::string name;
    units::Dim dim;
    bool constant;   // does not change over time (parameters)
};

struct Scope {
    std::vector<Symbol> symbols;          // allowed
    std::vector<std::string> forbidden;   // known names this expression may not use
    std::string forbidden_reason;         // e.g. "route fractions and lags may use parameters only"
    std::vector<std::string> unknown_dim; // names whose definition had an error: expressions using them are
                                          // skipped silently (the definition's error is the one to fix)
    std::vector<std::string> listed;      // names shown as expected for an unknown one (default: symbols)
};

struct Parsed {
    expr::Ptr e;
    units::Dim dim{};
};

// Parses an expression string and infers its dimension; reports every problem located in the file.
// `quantity_ok`: a quantity such as "30 min" is accepted as a constant. nullopt on error.
std::optional<Parsed> expression(Ctx& c, const Value& v, std::string_view key, const Scope& scope,
                                 bool quantity_ok = false);

// Every variable node of an expression, in source order (iterative: no recursion on deep trees).
std::vector<const expr::Node*> variables(const expr::Node& e);

}  // namespace plateau::input::detail
