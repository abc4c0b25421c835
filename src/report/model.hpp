// The report model: every figure a command shows, made once, as a tree of {key, label, unit, value or absent}
// nodes (a run, a population) or a table of such rows with one cell per regimen (a comparison). The writers
// (text, JSON, HTML, CSV) only render it: JSON keys are the nodes' keys, text and HTML show their labels and
// units and format their values with report/format. Nothing here computes a figure.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace plateau::report {

// How text and HTML show a number (JSON always writes it in full).
enum class Form {
    Number,    // `digits` significant digits (report::num)
    Percent,   // a fraction 0..1 shown as "63.4 %"
    Integer,   // a count
};

// One value: a number (in the unit of its node or row), a text, a yes/no, or absent (JSON null). An absent
// value may say why in text ("never", "none"); a number may carry a tag shown after it ("d2", "(9000)").
struct Value {
    enum class Kind { Absent, Number, Integer, Text, Flag };
    Kind kind = Kind::Absent;
    double number = 0.0;
    std::string text;   // Text; the digits of an Integer; what to show for Absent ("" = "—")
    bool flag = false;
    std::string tag;    // shown after a number in text and HTML, never in JSON

    static Value absent(std::string why = {});
    static Value of(double v);
    static Value count(unsigned long long n);
    static Value words(std::string s);
    static Value yes_no(bool b);
    bool present() const { return kind != Kind::Absent; }
};

// A node of a document. A leaf holds a value; a group holds named children (a JSON object), a list unnamed ones
// (a JSON array).
struct Node {
    enum class Shape { Leaf, Group, List };
    std::string key;     // JSON key ("" for the items of a list)
    std::string label;   // what text and HTML call it ("" where no writer shows it by itself)
    std::string unit;    // the unit its number is in, as shown ("mg/L", "mg·h/L", "h", "% of τ"; "" for none)
    Shape shape = Shape::Leaf;
    Value value;
    Form form = Form::Number;
    int digits = 4;
    bool compact = false;   // JSON on one line (small objects and arrays)
    std::vector<Node> items;

    // Children by key path ("steady_state/peak"); nullptr when absent (a figure that does not apply).
    const Node* find(std::string_view path) const;
    // The same, for a path that must be there (a writer's own mistake otherwise: throws std::logic_error).
    const Node& at(std::string_view path) const;

    // Builders: add a child and return it.
    Node& leaf(std::string k, Value v, std::string label = {}, std::string unit = {}, int digits = 4,
               Form form = Form::Number);
    Node& group(std::string k, std::string label = {});
    Node& list(std::string k, std::string label = {});
    Node& item();   // a group inside a list
};

// A side-by-side table: one row per figure, one cell per column (regimen).
struct Row {
    std::string key, label, unit;
    Form form = Form::Number;
    int digits = 4;
    std::vector<Value> cells;
};

struct Table {
    std::string key, title;
    std::vector<std::string> columns;   // "A", "B", ...
    std::vector<Row> rows;
    const Row* find(std::string_view key) const;
};

// The value as text and HTML show it: the number in its form with its tag, the text, "yes"/"no", or for an
// absent value its reason or "—".
std::string shown(const Value& v, Form form, int digits);
inline std::string shown(const Node& n) { return shown(n.value, n.form, n.digits); }
inline std::string shown(const Row& r, std::size_t i) { return shown(r.cells[i], r.form, r.digits); }

// A label with its unit in parentheses: "Steady-state peak (mg/L)".
std::string label_with_unit(const std::string& label, const std::string& unit);

}  // namespace plateau::report
