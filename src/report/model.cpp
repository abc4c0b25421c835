#include "report/model.hpp"

#include <stdexcept>

#include "report/format.hpp"

namespace plateau::report {

Value Value::absent(std::string why) {
    Value v;
    v.text = std::move(why);
    return v;
}

Value Value::of(double x) {
    Value v;
    v.kind = Kind::Number;
    v.number = x;
    return v;
}

Value Value::count(unsigned long long n) {
    Value v;
    v.kind = Kind::Integer;
    v.number = static_cast<double>(n);
    v.text = std::to_string(n);
    return v;
}

Value Value::words(std::string s) {
    Value v;
    v.kind = Kind::Text;
    v.text = std::move(s);
    return v;
}

Value Value::yes_no(bool b) {
    Value v;
    v.kind = Kind::Flag;
    v.flag = b;
    return v;
}

const Node* Node::find(std::string_view path) const {
    const Node* n = this;
    while (!path.empty()) {
        const auto slash = path.find('/');
        const std::string_view head = path.substr(0, slash);
        path = slash == std::string_view::npos ? std::string_view{} : path.substr(slash + 1);
        const Node* next = nullptr;
        if (n->shape == Shape::List) {
            std::size_t i = 0;
            for (char c : head) {
                if (c < '0' || c > '9') return nullptr;
                i = i * 10 + static_cast<std::size_t>(c - '0');
            }
            if (i < n->items.size()) next = &n->items[i];
        } else {
            for (const auto& c : n->items)
                if (c.key == head) {
                    next = &c;
                    break;
                }
        }
        if (next == nullptr) return nullptr;
        n = next;
    }
    return n;
}

const Node& Node::at(std::string_view path) const {
    if (const Node* n = find(path)) return *n;
    throw std::logic_error("report model: no figure '" + std::string(path) + "' under '" + key + "'");
}

Node& Node::leaf(std::string k, Value v, std::string l, std::string u, int d, Form f) {
    Node n;
    n.key = std::move(k);
    n.label = std::move(l);
    n.unit = std::move(u);
    n.value = std::move(v);
    n.digits = d;
    n.form = f;
    items.push_back(std::move(n));
    return items.back();
}

Node& Node::group(std::string k, std::string l) {
    Node n;
    n.key = std::move(k);
    n.label = std::move(l);
    n.shape = Shape::Group;
    items.push_back(std::move(n));
    return items.back();
}

Node& Node::list(std::string k, std::string l) {
    Node& n = group(std::move(k), std::move(l));
    n.shape = Shape::List;
    return n;
}

Node& Node::item() { return group({}); }

const Row* Table::find(std::string_view k) const {
    for (const auto& r : rows)
        if (r.key == k) return &r;
    return nullptr;
}

std::string shown(const Value& v, Form form, int digits) {
    switch (v.kind) {
        case Value::Kind::Absent: return v.text.empty() ? "—" : v.text;
        case Value::Kind::Text: return v.text;
        case Value::Kind::Flag: return v.flag ? "yes" : "no";
        case Value::Kind::Integer: return v.text + (v.tag.empty() ? "" : " " + v.tag);
        case Value::Kind::Number: break;
    }
    const std::string s = form == Form::Percent ? percent(v.number) : num(v.number, digits);
    return v.tag.empty() ? s : s + " " + v.tag;
}

std::string label_with_unit(const std::string& label, const std::string& unit) {
    return unit.empty() ? label : label + " (" + unit + ")";
}

}  // namespace plateau::report
