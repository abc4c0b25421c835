// Errors, source positions and compiler-style diagnostics. A leaf module: depends on nothing in the project.
#pragma once

#include <cstddef>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace plateau {

// A place in an input file; line and column are 1-based, 0 means "unknown".
struct SourcePos {
    std::string file;
    int line = 0;
    int col = 0;
};

// A remark attached to a diagnostic at another place, e.g. the parameter whose unit makes a rate wrong.
struct Note {
    SourcePos pos;         // may be unknown (line 0): the note is then shown without a location
    std::string message;
    int length = 1;        // columns to underline
};

// One problem found in the input, with what was expected instead.
struct Diagnostic {
    Diagnostic() = default;
    Diagnostic(SourcePos p, std::string m, std::string e = {}, int len = 1)
        : pos(std::move(p)), message(std::move(m)), expected(std::move(e)), length(len) {}

    SourcePos pos;
    std::string message;   // what is wrong, e.g. "unknown identifier 'kel'"
    std::string expected;  // what would be right, e.g. "one of: ka, cl, v" (may be empty)
    int length = 1;        // columns to underline
    std::vector<Note> notes;  // shown after it, each with its own location and source line
};

// An error located inside a piece of text (a quantity string, an expression). Offsets are 0-based byte offsets
// into that text; the caller that knows where the text sits in a file turns it into a Diagnostic.
class TextError : public std::runtime_error {
public:
    TextError(std::string message, std::size_t offset, std::size_t length = 1, std::string expected = {})
        : std::runtime_error(message), offset_(offset), length_(length), expected_(std::move(expected)) {}
    std::size_t offset() const { return offset_; }
    std::size_t length() const { return length_; }
    const std::string& expected() const { return expected_; }

private:
    std::size_t offset_;
    std::size_t length_;
    std::string expected_;
};

// Bad input: carries every diagnostic found; nothing may run once one is thrown.
class InputError : public std::runtime_error {
public:
    explicit InputError(std::vector<Diagnostic> diagnostics);
    const std::vector<Diagnostic>& diagnostics() const { return diagnostics_; }

private:
    std::vector<Diagnostic> diagnostics_;
};

// A numerical failure (non-finite state, step budget exhausted); maps to exit code 2.
class NumericalError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Collects diagnostics while validating; throws them all at once.
class DiagnosticSink {
public:
    void add(Diagnostic d) { items_.push_back(std::move(d)); }
    void error(SourcePos pos, std::string message, std::string expected = {}, int length = 1);
    // Attaches notes to the diagnostic number `index` (in the order added; nothing happens past the end).
    void add_notes(std::size_t index, std::vector<Note> notes);
    bool empty() const { return items_.empty(); }
    std::size_t size() const { return items_.size(); }
    const std::vector<Diagnostic>& items() const { return items_; }
    // Throws InputError if anything was collected.
    void throw_if_any() const;

private:
    std::vector<Diagnostic> items_;
};

// "path:line:col: error: message", then the source line, a caret line, and "  expected: ..." if known; then each
// note as "path:line:col: note: message" (with its source line when `note_lines` has it).
// `source_line` is the text of line pos.line (without newline); empty means "do not show it".
std::string format_diagnostic(const Diagnostic& d, std::string_view source_line = {},
                              const std::vector<std::string_view>& note_lines = {});

// Formats every diagnostic, reading source lines from the files they name (files that cannot be read are
// shown without their source line).
std::string format_diagnostics(const std::vector<Diagnostic>& ds);

// Position of a byte offset inside a string that starts at `start` in a file, on the same line (quantity and
// expression strings are single-line TOML strings; +1 for the opening quote is the caller's business).
SourcePos offset_pos(const SourcePos& start, std::size_t offset);

}  // namespace plateau
