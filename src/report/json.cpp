#include "report/json.hpp"

#include <cmath>
#include <string>

#include "report/format.hpp"
#include "report/run_model.hpp"

namespace plateau::report {

namespace {

std::string quote(std::string_view s) {
    std::string o = "\"";
    for (unsigned char c : s) {
        switch (c) {
            case '"': o += "\\\""; break;
            case '\\': o += "\\\\"; break;
            case '\n': o += "\\n"; break;
            case '\t': o += "\\t"; break;
            case '\r': o += "\\r"; break;
            default:
                if (c < 0x20) {
                    const char* hex = "0123456789abcdef";
                    o += "\\u00";
                    o += hex[c >> 4];
                    o += hex[c & 15];
                } else {
                    o += static_cast<char>(c);
                }
        }
    }
    return o + "\"";
}

std::string number(double v) {
    if (!std::isfinite(v)) return "null";
    return general(v, 12);
}

std::string value_json(const Value& v) {
    switch (v.kind) {
        case Value::Kind::Absent: return "null";
        case Value::Kind::Number: return number(v.number);
        case Value::Kind::Integer: return v.text;
        case Value::Kind::Text: return quote(v.text);
        case Value::Kind::Flag: return v.flag ? "true" : "false";
    }
    return "null";
}

// A tiny streaming writer: objects and arrays with commas handled, two-space indentation.
class Writer {
public:
    Writer(std::ostream& out, int indent) : out_(out), depth_(indent) {}
    void key(std::string_view k) {
        comma();
        out_ << quote(k) << ": ";
        pending_value_ = true;
    }
    void raw(const std::string& v) {
        if (!pending_value_) comma();
        out_ << v;
        pending_value_ = false;
    }
    void open(char c) {
        if (!pending_value_) comma();
        out_ << c;
        pending_value_ = false;
        ++depth_;
        first_ = true;
    }
    void close(char c) {
        --depth_;
        out_ << '\n' << std::string(static_cast<std::size_t>(2 * depth_), ' ') << c;
        first_ = false;
    }

private:
    void comma() {
        if (!started_) {  // the very first token starts the line it is on
            started_ = true;
            first_ = false;
            return;
        }
        if (!first_) out_ << ',';
        out_ << '\n' << std::string(static_cast<std::size_t>(2 * depth_), ' ');
        first_ = false;
    }
    std::ostream& out_;
    int depth_;
    bool first_ = true;
    bool pending_value_ = false;
    bool started_ = false;
};

// The value of a node as JSON text on one line.
std::string inline_json(const Node& n) {
    if (n.shape == Node::Shape::Leaf) return value_json(n.value);
    const bool group = n.shape == Node::Shape::Group;
    std::string s(1, group ? '{' : '[');
    for (std::size_t i = 0; i < n.items.size(); ++i) {
        if (i) s += ", ";
        if (group) s += quote(n.items[i].key) + ": ";
        s += inline_json(n.items[i]);
    }
    return s + (group ? '}' : ']');
}

void render(Writer& w, const Node& n) {
    if (n.shape == Node::Shape::Leaf || n.compact) {
        w.raw(inline_json(n));
        return;
    }
    const bool group = n.shape == Node::Shape::Group;
    w.open(group ? '{' : '[');
    for (const auto& c : n.items) {
        if (group) w.key(c.key);
        render(w, c);
    }
    w.close(group ? '}' : ']');
}

}  // namespace

void write_json(std::ostream& out, const Node& document, int indent) {
    Writer w(out, indent);
    render(w, document);
}

void write_exposure_json(std::ostream& out, const regimen::Regimen& r, const sim::Simulation& s,
                         const metrics::Exposure& e, const JsonContext& ctx, int indent) {
    write_json(out, run_model(r, s, e, ctx.tolerance), indent);
}

}  // namespace plateau::report

namespace plateau::report {

std::string json_string(std::string_view s) { return quote(s); }
std::string json_number(double v) { return number(v); }

}  // namespace plateau::report
