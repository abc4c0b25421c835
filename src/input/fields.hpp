// Helpers shared by the model and regimen loaders: typed access to TOML values with diagnostics, quantities and
// expressions located in the file. Internal to input/.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/diagnostic.hpp"
#include "core/suggest.hpp"
#include "expr/expr.hpp"
#include "input/document.hpp"
#include "units/units.hpp"

namespace plateau::input::detail {

struct Scope;
struct Want;

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

    // Expressions whose dimension was wrong, waiting for their notes (add_dimension_notes), and the parameters
    // used by expressions whose dimension was right: those are not the likely culprit.
    struct PendingNotes {
        std::size_t diagnostic;
        expr::Ptr e;
        const Scope* scope;
        std::string what;
        units::Dim want;
    };
    std::vector<PendingNotes> pending_notes;
    std::vector<std::string> well_used;
    // Marks the diagnostic added last as waiting for dimension notes on `e`.
    void wants_notes(expr::Ptr e, const Scope& scope, const Want& want);
    // Notes that an expression's dimension came out right: every parameter in it fits where it is used.
    void used_well(const expr::Node& e);
};

std::string join(const std::vector<std::string>& names);     // "a, b, c"
std::string one_of(const std::vector<std::string>& names);   // "one of: a, b, c" ("none" when empty)
std::string fmt(double x);                                    // shortest readable form, 6 significant digits

// A parameter with a unit is a physical quantity — a clearance, a rate constant, a volume, a concentration — so
// it cannot be negative, and a volume cannot be zero (amounts are divided by it). A dimensionless parameter (an
// exponent, a fraction with checks of its own) may take any sign. Reports an error at `at` and returns false
// when `value` breaks that rule; `name` is the parameter's name, `unit` its unit as written.
bool physical_value_ok(Ctx& c, const Value& at, const std::string& name, const std::string& unit, units::Dim dim,
                       double value, const std::string& what = "");

bool is_identifier(std::string_view s);

// Throws InputError if the sink has anything: diagnostics in other files first (a regimen's model), then
// those in `path` in the order they appear in it.
void throw_sorted(const DiagnosticSink& sink, const std::string& path);

// Keys of the top of the file (`top_keys`, e.g. model, id) written below a [table] header, where TOML puts them
// into that table: each is reported once, saying so, and moved to the top so that later checks do not add
// "missing key" or "unknown key" errors for the same line. Call before building a Ctx on the document.
void hoist_misplaced_keys(Document& doc, DiagnosticSink& sink, const std::vector<std::string>& top_keys);

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
    SourcePos pos;   // where a parameter's value is written (line 0 for compartments and t)
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

// What an expression must be, for the notes on a wrong dimension: its dimension and how to name the expression
// in a note ("this rate", "output 'conc'").
struct Want {
    units::Dim dim;
    std::string what;
};

// Parses an expression string and infers its dimension; reports every problem located in the file.
// `quantity_ok`: a quantity such as "30 min" is accepted as a constant. When `want` is given and the dimensions
// do not work out, the error gets the notes of dimension_notes. nullopt on error.
std::optional<Parsed> expression(Ctx& c, const Value& v, std::string_view key, const Scope& scope,
                                 bool quantity_ok = false, const std::optional<Want>& want = std::nullopt);

// For an expression whose dimensions do not work out: solves for each parameter in it, the others fixed, the
// dimension that would make it `want.dim`, and gives a note at that parameter's value when the answer is one
// of the named dimensions (a clearance, a volume, ...) and differs from its own: "'cl' is an amount (mass)
// here; this rate needs a clearance (volume/time)". Parameters in `skip` get no note.
std::vector<Note> dimension_notes(const expr::Node& e, const Scope& scope, const Want& want,
                                  const std::vector<std::string>& skip = {});

// Attaches the notes of every pending expression once all expressions are read: a parameter that some other
// expression uses with the right dimension is not blamed ("-ka" is wrong, not ka's unit, when "ka*gut" is right).
void add_dimension_notes(Ctx& c);

// Every variable node of an expression, in source order (iterative: no recursion on deep trees).
std::vector<const expr::Node*> variables(const expr::Node& e);

}  // namespace plateau::input::detail
