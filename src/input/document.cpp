// The only translation unit that includes toml++: reading a file, the text checks, parsing, and the conversion
// of toml++'s tree into input::Value with byte-accurate positions.
#include "input/document.hpp"

#include <toml++/toml.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>

#include "input/load.hpp"

namespace plateau::input {

namespace {

bool has_bom(const std::string& text) { return text.size() >= 3 && text.compare(0, 3, "\xEF\xBB\xBF") == 0; }

std::vector<std::size_t> find_line_starts(const std::string& text) {
    std::vector<std::size_t> starts{0};
    for (std::size_t i = 0; i < text.size(); ++i)
        if (text[i] == '\n') starts.push_back(i + 1);
    return starts;
}

SourcePos pos_of_index(const Document& doc, std::size_t index) {
    auto it = std::upper_bound(doc.line_starts.begin(), doc.line_starts.end(), index);
    auto line = static_cast<std::size_t>(it - doc.line_starts.begin());  // >= 1
    return SourcePos{doc.path, static_cast<int>(line), static_cast<int>(index - doc.line_starts[line - 1] + 1)};
}

// toml++ counts columns in code points; convert to a 1-based byte column on that line.
int byte_col(const Document& doc, long line, long cp_col) {
    if (line < 1 || static_cast<std::size_t>(line) > doc.line_starts.size() || cp_col < 1)
        return static_cast<int>(cp_col);
    const std::string& t = doc.text;
    std::size_t start = doc.line_starts[static_cast<std::size_t>(line - 1)];
    std::size_t i = start;
    if (line == 1 && has_bom(t)) i += 3;
    for (long c = 1; c < cp_col && i < t.size() && t[i] != '\n'; ++c) {
        ++i;
        while (i < t.size() && (static_cast<unsigned char>(t[i]) & 0xC0) == 0x80) ++i;
    }
    return static_cast<int>(i - start + 1);
}

SourcePos convert_pos(const Document& doc, const toml::source_position& p) {
    if (!p) return SourcePos{doc.path, 1, 1};
    auto line = static_cast<long>(p.line);
    return SourcePos{doc.path, static_cast<int>(line), byte_col(doc, line, static_cast<long>(p.column))};
}

InputError single(SourcePos pos, std::string message, std::string expected = {}) {
    return InputError({Diagnostic{std::move(pos), std::move(message), std::move(expected), 1}});
}

// Index of the first byte that is not valid UTF-8, or npos.
std::size_t invalid_utf8(const std::string& s) {
    std::size_t i = 0;
    const std::size_t n = s.size();
    while (i < n) {
        auto c = static_cast<unsigned char>(s[i]);
        if (c < 0x80) { ++i; continue; }
        std::size_t len = 0;
        unsigned cp = 0;
        if (c >= 0xC2 && c <= 0xDF) { len = 2; cp = c & 0x1Fu; }
        else if (c >= 0xE0 && c <= 0xEF) { len = 3; cp = c & 0x0Fu; }
        else if (c >= 0xF0 && c <= 0xF4) { len = 4; cp = c & 0x07u; }
        else return i;
        if (i + len > n) return i;
        for (std::size_t k = 1; k < len; ++k) {
            auto cc = static_cast<unsigned char>(s[i + k]);
            if ((cc & 0xC0) != 0x80) return i;
            cp = (cp << 6) | (cc & 0x3Fu);
        }
        if ((len == 3 && cp < 0x800) || (len == 4 && (cp < 0x10000 || cp > 0x10FFFF)) ||
            (cp >= 0xD800 && cp <= 0xDFFF))
            return i;
        i += len;
    }
    return std::string::npos;
}

Value convert(const Document& doc, const toml::node& n) {
    Value v;
    v.pos = convert_pos(doc, n.source().begin);
    switch (n.type()) {
        case toml::node_type::table: {
            v.kind = Kind::Table;
            for (auto&& [k, child] : *n.as_table())
                v.entries.push_back(Entry{std::string(k.str()), convert_pos(doc, k.source().begin), convert(doc, child)});
            std::stable_sort(v.entries.begin(), v.entries.end(), [](const Entry& a, const Entry& b) {
                return a.key_pos.line != b.key_pos.line ? a.key_pos.line < b.key_pos.line : a.key_pos.col < b.key_pos.col;
            });
            break;
        }
        case toml::node_type::array:
            v.kind = Kind::Array;
            for (auto&& child : *n.as_array()) v.items.push_back(convert(doc, child));
            break;
        case toml::node_type::string:
            v.kind = Kind::String;
            v.str = n.as_string()->get();
            break;
        case toml::node_type::integer:
            v.kind = Kind::Integer;
            v.integer = n.as_integer()->get();
            break;
        case toml::node_type::floating_point:
            v.kind = Kind::Float;
            v.number = n.as_floating_point()->get();
            break;
        case toml::node_type::boolean:
            v.kind = Kind::Boolean;
            v.boolean = n.as_boolean()->get();
            break;
        default:
            v.kind = Kind::DateTime;
            break;
    }
    return v;
}

int hex_value(char c) {
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    return -1;
}

std::size_t utf8_length(unsigned long cp) { return cp < 0x80 ? 1 : cp < 0x800 ? 2 : cp < 0x10000 ? 3 : 4; }

}  // namespace

const Entry* Value::find(std::string_view key) const {
    for (const auto& e : entries)
        if (e.key == key) return &e;
    return nullptr;
}

std::string kind_name(Kind k) {
    switch (k) {
        case Kind::Table: return "a table";
        case Kind::Array: return "an array";
        case Kind::String: return "a string";
        case Kind::Integer: return "an integer";
        case Kind::Float: return "a float";
        case Kind::Boolean: return "a boolean";
        case Kind::DateTime: return "a date or time";
    }
    return "a value";
}

Document parse_document(std::string text, const std::string& path) {
    Document doc;
    doc.path = path;
    doc.text = std::move(text);
    doc.line_starts = find_line_starts(doc.text);
    doc.root.pos = SourcePos{path, 1, 1};

    if (auto nul = doc.text.find('\0'); nul != std::string::npos)
        throw single(pos_of_index(doc, nul), "not a text file: it contains a NUL byte",
                     "a TOML text file in UTF-8");
    if (auto bad = invalid_utf8(doc.text); bad != std::string::npos)
        throw single(pos_of_index(doc, bad), "not a text file: invalid UTF-8 byte sequence",
                     "a TOML text file in UTF-8");

    try {
        toml::table table = toml::parse(std::string_view(doc.text), std::string_view(path));
        doc.root = convert(doc, table);
        doc.root.pos = SourcePos{path, 1, 1};
    } catch (const toml::parse_error& e) {
        std::string what(e.description());
        if (!what.empty() && what[0] >= 'A' && what[0] <= 'Z') what[0] = static_cast<char>(what[0] - 'A' + 'a');
        throw single(convert_pos(doc, e.source().begin), "invalid TOML: " + what);
    }
    return doc;
}

Document read_document(const std::string& path) {
    namespace fs = std::filesystem;
    const SourcePos file_pos{path, 0, 0};
    std::error_code ec;
    auto status = fs::status(path, ec);
    if (ec || !fs::exists(status)) throw single(file_pos, "cannot read file: it does not exist");
    if (fs::is_directory(status)) throw single(file_pos, "cannot read file: it is a directory");

    auto too_large = [&](const std::string& size) {
        return single(file_pos, "file too large: " + size + " (input files are at most 4 MiB)",
                      "a model or regimen file of at most " + std::to_string(kMaxFileBytes) + " bytes");
    };
    if (fs::is_regular_file(status)) {
        auto size = fs::file_size(path, ec);
        if (!ec && size > static_cast<std::uintmax_t>(kMaxFileBytes))
            throw too_large(std::to_string(size) + " bytes");
    }

    std::ifstream in(path, std::ios::binary);
    if (!in) throw single(file_pos, std::string("cannot read file: ") + std::strerror(errno));
    // Read in 64 KiB chunks up to one byte more than allowed (devices and pipes have no size to ask for): a
    // model file is a few KiB, and zero-filling a 4 MiB buffer per file cost more than the rest of start-up.
    std::string text;
    char chunk[64 * 1024];
    while (in && static_cast<long long>(text.size()) <= kMaxFileBytes) {
        in.read(chunk, static_cast<std::streamsize>(sizeof chunk));
        text.append(chunk, static_cast<std::size_t>(in.gcount()));
    }
    if (in.bad()) throw single(file_pos, "cannot read file: read error");
    if (static_cast<long long>(text.size()) > kMaxFileBytes) throw too_large("more than 4 MiB");
    return parse_document(std::move(text), path);
}

SourcePos string_pos(const Document& doc, const Value& v, std::size_t offset) {
    if (v.kind != Kind::String || v.pos.line < 1 || static_cast<std::size_t>(v.pos.line) > doc.line_starts.size())
        return v.pos;
    const std::string& t = doc.text;
    std::size_t i = doc.line_starts[static_cast<std::size_t>(v.pos.line - 1)] + static_cast<std::size_t>(v.pos.col - 1);
    if (i >= t.size() || (t[i] != '"' && t[i] != '\'')) return v.pos;
    const bool literal = t[i] == '\'';
    const bool multi = t.compare(i, 3, literal ? "'''" : "\"\"\"") == 0;
    i += multi ? 3 : 1;
    if (multi) {
        if (i < t.size() && t[i] == '\n') ++i;
        else if (i + 1 < t.size() && t[i] == '\r' && t[i + 1] == '\n') i += 2;
    }
    std::size_t produced = 0;
    while (i < t.size() && produced < offset) {
        std::size_t raw = 1, out = 1;
        const char c = t[i];
        if (!literal && c == '\\' && i + 1 < t.size()) {
            const char e = t[i + 1];
            if (e == 'u' || e == 'U' || e == 'x') {
                std::size_t digits = e == 'u' ? 4 : e == 'U' ? 8 : 2;
                unsigned long cp = 0;
                for (std::size_t k = 0; k < digits && i + 2 + k < t.size(); ++k) {
                    int h = hex_value(t[i + 2 + k]);
                    if (h < 0) break;
                    cp = cp * 16 + static_cast<unsigned long>(h);
                }
                raw = 2 + digits;
                out = utf8_length(cp);
            } else if (multi && (e == ' ' || e == '\t' || e == '\n' || e == '\r')) {
                // Line-ending backslash: it and all whitespace after it vanish.
                std::size_t j = i + 1;
                while (j < t.size() && (t[j] == ' ' || t[j] == '\t' || t[j] == '\n' || t[j] == '\r')) ++j;
                raw = j - i;
                out = 0;
            } else {
                raw = 2;
            }
        } else if (multi && c == '\r' && i + 1 < t.size() && t[i + 1] == '\n') {
            raw = 2;
        }
        if (produced + out > offset) break;  // offset falls inside an escape: point at the escape
        produced += out;
        i += raw;
    }
    return pos_of_index(doc, i);
}

}  // namespace plateau::input
