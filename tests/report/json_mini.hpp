// A test-only JSON reader: a small recursive-descent parser into a tree of values, and lookup by key path
// ("regimens/0/steady_state/peak"). Enough for the JSON plateau writes; throws std::runtime_error on anything
// malformed, naming the byte offset.
#pragma once

#include <cstdio>
#include <cstdlib>
#include <map>
#include <memory>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace plateau::jsonmini {

struct Member;

struct Value {
    enum class Kind { null, boolean, number, string, array, object };
    Kind kind = Kind::null;
    bool b = false;
    double n = 0.0;
    std::string s;
    std::vector<Value> items;                        // array
    std::vector<Member> keys;  // object, in file order (a vector of an incomplete type: allowed since C++17)

    bool is_null() const { return kind == Kind::null; }

    // The member `k` of an object, or nullptr.
    const Value* member(std::string_view k) const;
};

// Not std::pair<std::string, Value>: a pair needs Value complete where it is named, which clang refuses inside
// Value itself.
struct Member {
    std::string name;
    Value value;
};

inline const Value* Value::member(std::string_view k) const {
    if (kind != Kind::object) return nullptr;
    for (const auto& [name, v] : keys)
        if (name == k) return &v;
    return nullptr;
}

class Parser {
public:
    explicit Parser(std::string_view text) : t_(text) {}

    Value document() {
        Value v = value();
        space();
        if (i_ != t_.size()) fail("text after the JSON value");
        return v;
    }

private:
    [[noreturn]] void fail(const std::string& what) const {
        throw std::runtime_error("json: " + what + " at byte " + std::to_string(i_));
    }
    void space() {
        while (i_ < t_.size() && (t_[i_] == ' ' || t_[i_] == '\n' || t_[i_] == '\r' || t_[i_] == '\t')) ++i_;
    }
    bool eat(char c) {
        space();
        if (i_ < t_.size() && t_[i_] == c) {
            ++i_;
            return true;
        }
        return false;
    }
    void expect(char c) {
        if (!eat(c)) fail(std::string("expected '") + c + "'");
    }
    bool word(std::string_view w) {
        if (t_.substr(i_, w.size()) == w) {
            i_ += w.size();
            return true;
        }
        return false;
    }
    std::string string_body() {
        expect('"');
        std::string out;
        while (true) {
            if (i_ >= t_.size()) fail("unterminated string");
            const char c = t_[i_++];
            if (c == '"') return out;
            if (static_cast<unsigned char>(c) < 0x20) fail("control character in a string");
            if (c != '\\') {
                out += c;
                continue;
            }
            if (i_ >= t_.size()) fail("unterminated escape");
            const char e = t_[i_++];
            switch (e) {
                case '"': out += '"'; break;
                case '\\': out += '\\'; break;
                case '/': out += '/'; break;
                case 'b': out += '\b'; break;
                case 'f': out += '\f'; break;
                case 'n': out += '\n'; break;
                case 'r': out += '\r'; break;
                case 't': out += '\t'; break;
                case 'u': {
                    if (i_ + 4 > t_.size()) fail("short \\u escape");
                    const unsigned long cp = std::strtoul(std::string(t_.substr(i_, 4)).c_str(), nullptr, 16);
                    i_ += 4;
                    if (cp >= 0x80) fail("\\u escape beyond ASCII (not needed here)");
                    out += static_cast<char>(cp);
                    break;
                }
                default: fail("unknown escape");
            }
        }
    }
    Value value() {
        space();
        if (i_ >= t_.size()) fail("expected a value");
        Value v;
        const char c = t_[i_];
        if (c == '{') {
            ++i_;
            v.kind = Value::Kind::object;
            if (eat('}')) return v;
            do {
                space();
                std::string k = string_body();
                expect(':');
                v.keys.push_back(Member{std::move(k), value()});
            } while (eat(','));
            expect('}');
        } else if (c == '[') {
            ++i_;
            v.kind = Value::Kind::array;
            if (eat(']')) return v;
            do v.items.push_back(value());
            while (eat(','));
            expect(']');
        } else if (c == '"') {
            v.kind = Value::Kind::string;
            v.s = string_body();
        } else if (word("true")) {
            v.kind = Value::Kind::boolean;
            v.b = true;
        } else if (word("false")) {
            v.kind = Value::Kind::boolean;
        } else if (word("null")) {
            v.kind = Value::Kind::null;
        } else {
            const std::string rest(t_.substr(i_, 40));
            char* end = nullptr;
            v.n = std::strtod(rest.c_str(), &end);
            if (end == rest.c_str()) fail("expected a value");
            v.kind = Value::Kind::number;
            i_ += static_cast<std::size_t>(end - rest.c_str());
        }
        return v;
    }

    std::string_view t_;
    std::size_t i_ = 0;
};

inline Value parse(std::string_view text) { return Parser(text).document(); }

// The value at a '/'-separated path of object keys and array indices; throws when a step is missing.
inline const Value& at(const Value& root, std::string_view path) {
    const Value* v = &root;
    std::size_t start = 0;
    while (start <= path.size()) {
        const std::size_t slash = path.find('/', start);
        const std::string_view step =
            path.substr(start, slash == std::string_view::npos ? std::string_view::npos : slash - start);
        if (v->kind == Value::Kind::array) {
            const std::size_t k = static_cast<std::size_t>(std::strtoul(std::string(step).c_str(), nullptr, 10));
            if (k >= v->items.size()) throw std::runtime_error("json: no item " + std::string(step) + " in " + std::string(path));
            v = &v->items[k];
        } else {
            const Value* m = v->member(step);
            if (!m) throw std::runtime_error("json: no key '" + std::string(step) + "' in " + std::string(path));
            v = m;
        }
        if (slash == std::string_view::npos) break;
        start = slash + 1;
    }
    return *v;
}

// The number at `path`; throws when it is not a number.
inline double number(const Value& root, std::string_view path) {
    const Value& v = at(root, path);
    if (v.kind != Value::Kind::number) throw std::runtime_error("json: " + std::string(path) + " is not a number");
    return v.n;
}

// Every number leaf under `v` as path -> value (paths as accepted by at()), for whole-document comparisons.
inline void leaves(const Value& v, const std::string& prefix, std::map<std::string, std::string>& out) {
    switch (v.kind) {
        case Value::Kind::null: out[prefix] = "null"; break;
        case Value::Kind::boolean: out[prefix] = v.b ? "true" : "false"; break;
        case Value::Kind::number: {
            char buf[40];
            std::snprintf(buf, sizeof buf, "%.17g", v.n);
            out[prefix] = buf;
            break;
        }
        case Value::Kind::string: out[prefix] = "\"" + v.s + "\""; break;
        case Value::Kind::array:
            out[prefix] = "[" + std::to_string(v.items.size()) + "]";
            for (std::size_t i = 0; i < v.items.size(); ++i)
                leaves(v.items[i], prefix.empty() ? std::to_string(i) : prefix + "/" + std::to_string(i), out);
            break;
        case Value::Kind::object:
            out[prefix] = "{" + std::to_string(v.keys.size()) + "}";
            for (const auto& [k, m] : v.keys) leaves(m, prefix.empty() ? k : prefix + "/" + k, out);
            break;
    }
}

}  // namespace plateau::jsonmini
