// A parsed TOML file as plain data, with the file position of every key and value. This header does not
// include toml++: document.cpp is the one place that does, and turns its tree into this one.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "core/diagnostic.hpp"

namespace plateau::input {

enum class Kind { Table, Array, String, Integer, Float, Boolean, DateTime };

struct Entry;

// One TOML value. Positions are 1-based lines and 1-based byte columns (not code points), so they line up
// with offsets inside strings and with the caret that format_diagnostic draws.
struct Value {
    Kind kind = Kind::Table;
    SourcePos pos;                 // first character of the value: the quote, '{', '[', a digit, or the header
    std::string str;               // Kind::String: the decoded text
    long long integer = 0;         // Kind::Integer
    double number = 0.0;           // Kind::Float
    bool boolean = false;          // Kind::Boolean
    std::vector<Value> items;      // Kind::Array
    std::vector<Entry> entries;    // Kind::Table, in file order

    const Entry* find(std::string_view key) const;
    bool is_number() const { return kind == Kind::Integer || kind == Kind::Float; }
    double as_double() const { return kind == Kind::Integer ? static_cast<double>(integer) : number; }
};

struct Entry {
    std::string key;
    SourcePos key_pos;
    Value value;
};

struct Document {
    std::string path;
    std::string text;                       // the whole file
    std::vector<std::size_t> line_starts;   // byte offset of each line's first character
    Value root;
};

// Reads and parses a file. Refuses, with one diagnostic, a file that cannot be read, one larger than
// kMaxFileBytes (load.hpp), one with a NUL byte or invalid UTF-8 ("not a text file"), and TOML syntax errors
// (at the position the parser reports). Throws InputError.
Document read_document(const std::string& path);

// Parses text already in memory (as if read from `path`); the same checks as read_document except the size.
Document parse_document(std::string text, const std::string& path);

// Position in the file of byte `offset` of a string value's decoded text (escapes and multi-line strings
// are followed back to the raw text). For a value that is not a string, its own position.
SourcePos string_pos(const Document& doc, const Value& v, std::size_t offset);

// "a string", "an integer", "a float", "a boolean", "a date or time", "an array", "a table".
std::string kind_name(Kind k);

}  // namespace plateau::input
