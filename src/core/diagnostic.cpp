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
    items_.push_back(Diagnostic{std::move(pos), std::move(message), std::move(expected), length});
}

void DiagnosticSink::throw_if_any() const {
    if (!items_.empty()) throw InputError(items_);
}

std::string format_diagnostic(const Diagnostic& d, std::string_view source_line) {
    std::ostringstream out;
    if (!d.pos.file.empty()) {
        out << d.pos.file;
        if (d.pos.line > 0) {
            out << ':' << d.pos.line;
            if (d.pos.col > 0) out << ':' << d.pos.col;
        }
        out << ": ";
    }
    out << "error: " << d.message << '\n';
    if (!source_line.empty() && d.pos.col > 0) {
        const std::string shown = printable(source_line);
        out << "  " << shown << '\n' << "  ";
        // One column per character (UTF-8 continuation bytes take none); tabs kept so the caret lines up.
        for (std::size_t i = 0; i + 1 < static_cast<std::size_t>(d.pos.col) && i < shown.size(); ++i) {
            const auto ch = static_cast<unsigned char>(shown[i]);
            if ((ch & 0xC0) == 0x80) continue;
            out << (ch == '\t' ? '\t' : ' ');
        }
        out << '^';
        for (int i = 1; i < d.length; ++i) out << '~';
        out << '\n';
    }
    if (!d.expected.empty()) out << "  expected: " << d.expected << '\n';
    return out.str();
}

std::string format_diagnostics(const std::vector<Diagnostic>& ds) {
    std::map<std::string, std::vector<std::string>> cache;
    std::string out;
    for (const auto& d : ds) {
        std::string_view line;
        if (!d.pos.file.empty() && d.pos.line > 0) {
            auto it = cache.find(d.pos.file);
            if (it == cache.end()) {
                std::vector<std::string> lines;
                std::ifstream in(d.pos.file, std::ios::binary);
                std::string l;
                // Source lines are for display only; stop early on huge files.
                while (in && lines.size() < 1000000 && std::getline(in, l)) {
                    if (!l.empty() && l.back() == '\r') l.pop_back();
                    if (l.size() > 200) l.resize(200);
                    lines.push_back(l);
                }
                it = cache.emplace(d.pos.file, std::move(lines)).first;
            }
            if (static_cast<std::size_t>(d.pos.line) <= it->second.size())
                line = it->second[static_cast<std::size_t>(d.pos.line - 1)];
        }
        out += format_diagnostic(d, line);
    }
    return out;
}

SourcePos offset_pos(const SourcePos& start, std::size_t offset) {
    SourcePos p = start;
    if (p.col > 0) p.col += static_cast<int>(offset);
    return p;
}

}  // namespace plateau
