#include "core/diagnostic.hpp"

#include <fstream>
#include <map>
#include <sstream>

namespace plateau {

namespace {
std::string summarize(const std::vector<Diagnostic>& ds) {
    if (ds.empty()) return "invalid input";
    std::string s = ds.front().message;
    if (ds.size() > 1) s += " (and " + std::to_string(ds.size() - 1) + " more)";
    return s;
}
// The source line as it may be shown on a terminal: control bytes and invalid UTF-8 become '?', so a binary
// file cannot garble the terminal. Valid multi-byte characters are kept.
std::string printable(std::string_view line) {
    std::string out;
    for (std::size_t i = 0; i < line.size();) {
        const auto c = static_cast<unsigned char>(line[i]);
        std::size_t len = c < 0x80 ? 1 : (c >> 5) == 0x6 ? 2 : (c >> 4) == 0xE ? 3 : (c >> 3) == 0x1E ? 4 : 0;
        bool ok = len > 0 && i + len <= line.size();
        for (std::size_t k = 1; ok && k < len; ++k) ok = (static_cast<unsigned char>(line[i + k]) & 0xC0) == 0x80;
        if (!ok) {
            out += '?';
            ++i;
            continue;
        }
        if (len == 1 && ((c < 0x20 && c != '\t') || c == 0x7F)) out += '?';
        else out.append(line.substr(i, len));
        i += len;
    }
    return out;
}

}  // namespace

InputError::InputError(std::vector<Diagnostic> diagnostics)
    : std::runtime_error(summarize(diagnostics)), diagnostics_(std::move(diagnostics)) {}

void DiagnosticSink::error(SourcePos pos, std::string message, std::string expected, int length) {
    items_.emplace_back(std::move(pos), std::move(message), std::move(expected), length);
}

void DiagnosticSink::add_notes(std::size_t index, std::vector<Note> notes) {
    if (index >= items_.size()) return;
    for (auto& n : notes) items_[index].notes.push_back(std::move(n));
}

void DiagnosticSink::throw_if_any() const {
    if (!items_.empty()) throw InputError(items_);
}

namespace {

// "path:line:col: <kind>: message", the source line and a caret line under the columns it is about.
void located(std::ostringstream& out, const SourcePos& pos, std::string_view kind, const std::string& message,
             std::string_view source_line, int length) {
    if (!pos.file.empty()) {
        out << pos.file;
        if (pos.line > 0) {
            out << ':' << pos.line;
            if (pos.col > 0) out << ':' << pos.col;
        }
        out << ": ";
    } else if (kind != "error") {
        out << "  ";
    }
    out << kind << ": " << message << '\n';
    if (!source_line.empty() && pos.col > 0) {
        const std::string shown = printable(source_line);
        out << "  " << shown << '\n' << "  ";
        // One column per character (UTF-8 continuation bytes take none); tabs kept so the caret lines up.
        for (std::size_t i = 0; i + 1 < static_cast<std::size_t>(pos.col) && i < shown.size(); ++i) {
            const auto ch = static_cast<unsigned char>(shown[i]);
            if ((ch & 0xC0) == 0x80) continue;
            out << (ch == '\t' ? '\t' : ' ');
        }
        out << '^';
        for (int i = 1; i < length; ++i) out << '~';
        out << '\n';
    }
}

}  // namespace

std::string format_diagnostic(const Diagnostic& d, std::string_view source_line,
                              const std::vector<std::string_view>& note_lines) {
    std::ostringstream out;
    located(out, d.pos, "error", d.message, source_line, d.length);
    if (!d.expected.empty()) out << "  expected: " << d.expected << '\n';
    for (std::size_t i = 0; i < d.notes.size(); ++i)
        located(out, d.notes[i].pos, "note", d.notes[i].message, i < note_lines.size() ? note_lines[i] : "",
                d.notes[i].length);
    return out.str();
}

std::string format_diagnostics(const std::vector<Diagnostic>& ds) {
    std::map<std::string, std::vector<std::string>> cache;
    auto line_of = [&](const SourcePos& pos) -> std::string_view {
        if (pos.file.empty() || pos.line <= 0) return {};
        auto it = cache.find(pos.file);
        if (it == cache.end()) {
            std::vector<std::string> lines;
            std::ifstream in(pos.file, std::ios::binary);
            std::string l;
            // Source lines are for display only; stop early on huge files.
            while (in && lines.size() < 1000000 && std::getline(in, l)) {
                if (!l.empty() && l.back() == '\r') l.pop_back();
                if (l.size() > 200) l.resize(200);
                lines.push_back(l);
            }
            it = cache.emplace(pos.file, std::move(lines)).first;
        }
        if (static_cast<std::size_t>(pos.line) > it->second.size()) return {};
        return it->second[static_cast<std::size_t>(pos.line - 1)];
    };
    std::string out;
    for (const auto& d : ds) {
        // Views into the cache stay valid: std::map never moves its elements.
        std::vector<std::string_view> note_lines;
        for (const auto& n : d.notes) note_lines.push_back(line_of(n.pos));
        out += format_diagnostic(d, line_of(d.pos), note_lines);
    }
    return out;
}

SourcePos offset_pos(const SourcePos& start, std::size_t offset) {
    SourcePos p = start;
    if (p.col > 0) p.col += static_cast<int>(offset);
    return p;
}

}  // namespace plateau
