// The HTML report of `plateau compare`: balanced tags, self-contained, caution, the comparison table, one
// figure per expected plot, and what happens without gnuplot.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cctype>
#include <string>
#include <vector>

#include "report/caution.hpp"
#include "report/compare_model.hpp"
#include "report_support.hpp"

using namespace plateau;
using namespace plateau::reporttest;

namespace {

std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

bool is_void(const std::string& tag) {
    static const std::vector<std::string> kVoid{"area", "base", "br",   "col",   "embed",  "hr",    "img",
                                                "input", "link", "meta", "param", "source", "track", "wbr"};
    return std::find(kVoid.begin(), kVoid.end(), tag) != kVoid.end();
}

// Checks that every element is closed in order. HTML void elements need no end tag; inside <svg> (XML) every
// element must be closed or self-closed ("<path .../>"). Comments, the doctype and the text of <style> are
// skipped. Returns "" when balanced, else what went wrong first.
std::string tag_problem(const std::string& html) {
    std::vector<std::string> stack;
    std::size_t i = 0;
    while ((i = html.find('<', i)) != std::string::npos) {
        if (html.compare(i, 4, "<!--") == 0) {
            const std::size_t end = html.find("-->", i);
            if (end == std::string::npos) return "unterminated comment";
            i = end + 3;
            continue;
        }
        if (html.compare(i, 2, "<!") == 0 || html.compare(i, 2, "<?") == 0) {
            i = html.find('>', i);
            if (i == std::string::npos) return "unterminated declaration";
            continue;
        }
        // The end of the tag, skipping '>' inside quoted attribute values.
        std::size_t j = i + 1;
        char quote = 0;
        for (; j < html.size(); ++j) {
            const char c = html[j];
            if (quote) {
                if (c == quote) quote = 0;
            } else if (c == '"' || c == '\'') {
                quote = c;
            } else if (c == '>') {
                break;
            }
        }
        if (j >= html.size()) return "unterminated tag at byte " + std::to_string(i);
        const std::string body = html.substr(i + 1, j - i - 1);
        const bool closing = !body.empty() && body[0] == '/';
        const bool self_closed = !body.empty() && body.back() == '/';
        std::size_t n = closing ? 1 : 0;
        std::string name;
        while (n < body.size() && (std::isalnum(static_cast<unsigned char>(body[n])) || body[n] == ':' || body[n] == '-'))
            name += body[n++];
        if (name.empty()) return "a '<' that starts no tag at byte " + std::to_string(i) + " (unescaped text?)";
        const bool in_svg = std::find(stack.begin(), stack.end(), "svg") != stack.end();
        const std::string key = in_svg ? name : lower(name);
        if (closing) {
            if (stack.empty()) return "</" + name + "> with nothing open, at byte " + std::to_string(i);
            if (stack.back() != key)
                return "</" + name + "> closes <" + stack.back() + ">, at byte " + std::to_string(i);
            stack.pop_back();
        } else if (self_closed) {
            if (!in_svg && !is_void(key)) return "<" + name + "/> self-closed outside SVG, at byte " + std::to_string(i);
        } else if (!(is_void(key) && !in_svg)) {
            stack.push_back(key);
        }
        i = j + 1;
        if (!closing && (key == "style" || key == "script") && !self_closed) {
            const std::size_t end = lower(html).find("</" + key, i);
            if (end == std::string::npos) return "<" + key + "> never closed";
            i = end;
        }
    }
    if (!stack.empty()) return "<" + stack.back() + "> never closed (" + std::to_string(stack.size()) + " open)";
    return {};
}

// The text of a comparison row as html.cpp writes it.
std::string row_html(const report::Row& r) {
    std::string s = "<tr><td>" + html_escape(r.label) + "</td><td class=\"t\">" + html_escape(r.unit) + "</td>";
    for (std::size_t i = 0; i < r.cells.size(); ++i) s += "<td>" + html_escape(report::shown(r, i)) + "</td>";
    return s + "</tr>";
}

}  // namespace

TEST_CASE("report: the tag checker itself finds unbalanced markup", "[report][html]") {
    CHECK(tag_problem("<html><body><p>a<br>b</p></body></html>").empty());
    CHECK(tag_problem("<svg><path d='M0 0'/><g><text>x</text></g></svg>").empty());
    CHECK(tag_problem("<style>a > b { }</style><p title='a>b'>x</p>").empty());
    CHECK_FALSE(tag_problem("<table><tr><td>x</td></table>").empty());
    CHECK_FALSE(tag_problem("<section><p>x</section>").empty());
    CHECK_FALSE(tag_problem("<svg><path d='M0 0'></svg>").empty());
    CHECK_FALSE(tag_problem("<p>1 < 2</p>").empty());
    CHECK_FALSE(tag_problem("<div/>").empty());
}

TEST_CASE("report: the HTML comparison report is balanced, self-contained and complete", "[report][html]") {
    if (!gnuplot_configured()) {
        WARN("gnuplot was not found when the build was configured: the report with figures is not checked");
        return;
    }
    GnuplotOverride use_configured(nullptr);
    TempDir dir("html");
    const auto regimens = demo_regimens();
    cli::CompareOptions o = compare_options(regimens);
    o.report = dir.file("report.html");
    const Result r = compare(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.out.find("Report    written to " + o.report + "\n") != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(o.report + ".part"));
    const std::string html = slurp(o.report);
    REQUIRE(html.size() > 1000);

    // Well-formed enough for a browser and a printer.
    CHECK(html.rfind("<!DOCTYPE html>", 0) == 0);
    INFO(tag_problem(html));
    CHECK(tag_problem(html).empty());
    for (const char* tag : {"html", "head", "body", "table", "tr", "section", "figure", "svg"})
        CHECK(count_of(html, std::string("<") + tag + ">") + count_of(html, std::string("<") + tag + " ") +
                  count_of(html, std::string("<") + tag + "\n") ==
              count_of(html, std::string("</") + tag + ">"));

    // Self-contained: it must open the same way offline, on a ward PC or in an archive (common practice, no
    // source).
    CHECK(html.find("http://") == std::string::npos);
    CHECK(html.find("https://") == std::string::npos);
    CHECK(html.find("<script") == std::string::npos);
    CHECK(html.find("<link") == std::string::npos);
    CHECK(html.find("<img") == std::string::npos);
    CHECK(html.find("<iframe") == std::string::npos);
    CHECK(html.find("@import") == std::string::npos);
    CHECK(html.find("url(http") == std::string::npos);
    CHECK(html.find("xlink:href") == std::string::npos);
    CHECK(html.find("<meta charset=\"utf-8\">") != std::string::npos);

    // The caution at the top, before the title, and again at the end.
    const std::string caution = html_escape(report::kCaution);
    CHECK(count_of(html, caution) == 2);
    CHECK(html.find(caution) < html.find("<h1>"));
    CHECK(html.rfind(caution) > html.rfind("</section>"));

    // The comparison table, row by row, with the same cells as the terminal table.
    const auto cs = candidates(regimens);
    const auto rows = report::comparison_table(cs).rows;
    REQUIRE_FALSE(rows.empty());
    CHECK(html.find("<th>Figure</th><th>Unit</th><th>A</th><th>B</th><th>C</th><th>D</th>") != std::string::npos);
    for (const auto& row : rows) {
        INFO(row_html(row));
        CHECK(html.find(row_html(row)) != std::string::npos);
    }
    // Every regimen is named, with its description.
    for (const auto& c : cs) {
        CHECK(html.find("<td class=\"t\">" + html_escape(c.regimen.id) + "</td><td class=\"t\">" +
                        html_escape(c.regimen.about) + "</td>") != std::string::npos);
        CHECK(html.find("<section class=\"regimen\"><h2>" + c.letter + ": " + html_escape(c.regimen.id) + "</h2>") !=
              std::string::npos);
    }

    // Figures: the overlay of all regimens and one per regimen, each one inline SVG inside a <figure>.
    const std::size_t expected = 1 + regimens.size();
    CHECK(count_of(html, "<svg") == expected);
    CHECK(count_of(html, "</svg>") == expected);
    CHECK(count_of(html, "<figure>") == expected);
    CHECK(count_of(html, "<figcaption>") == expected);
    CHECK(html.find("figure not drawn") == std::string::npos);
    CHECK(html.find("<title>All regimens</title>") != std::string::npos);
    for (const auto& c : cs)
        CHECK(html.find("<title>" + c.letter + ": first interval and steady-state interval</title>") !=
              std::string::npos);
    // Each figure's ids are its own, so that figures on one page do not steal each other's markers.
    std::vector<std::string> canvases;
    for (std::size_t at = html.find("-gnuplot_canvas\""); at != std::string::npos;
         at = html.find("-gnuplot_canvas\"", at + 1)) {
        const std::size_t q = html.rfind('"', at);
        canvases.push_back(html.substr(q + 1, at - q - 1));
    }
    CHECK(canvases.size() == expected);
    std::sort(canvases.begin(), canvases.end());
    CHECK(std::adjacent_find(canvases.begin(), canvases.end()) == canvases.end());
}

TEST_CASE("report: the HTML report of a single run has one overlay and one regimen figure", "[report][html]") {
    if (!gnuplot_configured()) {
        WARN("gnuplot was not found when the build was configured: not checked");
        return;
    }
    GnuplotOverride use_configured(nullptr);
    TempDir dir("html-run");
    cli::RunOptions o;
    o.regimen = source_path("regimens/zelmarin-q8h-30min.toml");
    o.report = dir.file("run.html");
    const Result r = run(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    const std::string html = slurp(o.report);
    CHECK(tag_problem(html).empty());
    CHECK(count_of(html, "<svg") == 2);
    CHECK(count_of(html, html_escape(report::kCaution)) == 2);
    CHECK(html.find("<title>plateau report: zelmarin-q8h-30min</title>") != std::string::npos);
    // The regimen's own figures table, with the steady-state block: Css,avg = fu·(3 g/day)/24 h/CL = 12.5 mg/L
    // (computed from the closed form).
    CHECK(count_of(html, "<h3>Figures</h3>") == 1);
    CHECK(html.find("<tr><td>Steady state: average</td><td class=\"t\">12.5 mg/L</td></tr>") != std::string::npos);
    CHECK(html.find("<h2>Key figures</h2>") != std::string::npos);
}

TEST_CASE("report: without gnuplot the HTML report is still written, with a note for each figure", "[report][html]") {
    GnuplotOverride missing("/nonexistent/gnuplot");
    TempDir dir("html-nognuplot");
    const auto regimens = demo_regimens();
    cli::CompareOptions o = compare_options(regimens);
    o.report = dir.file("report.html");
    const Result r = compare(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    CHECK(r.err.empty());
    CHECK(r.out.find("Report    written to " + o.report + " (without figures: gnuplot was not found") !=
          std::string::npos);
    const std::string html = slurp(o.report);
    CHECK(tag_problem(html).empty());
    CHECK(count_of(html, "<svg") == 0);
    CHECK(count_of(html, "(figure not drawn: gnuplot is not available)") == 1 + regimens.size());
    CHECK(count_of(html, "<figure>") == 1 + regimens.size());
    CHECK(count_of(html, html_escape(report::kCaution)) == 2);
    // The numbers do not depend on gnuplot.
    for (const auto& row : report::comparison_table(candidates(regimens)).rows) CHECK(html.find(row_html(row)) != std::string::npos);
}

// gnuplot missing or failing is a request that cannot be met, like a bad option: a plain "error: ..." and
// exit code 1, not an internal error.
TEST_CASE("report: --plot without gnuplot fails clearly with exit code 1", "[report][plot]") {
    GnuplotOverride missing("/nonexistent/gnuplot");
    TempDir dir("plot-nognuplot");
    cli::CompareOptions o = compare_options({source_path("regimens/zelmarin-q8h-4h.toml")});
    o.plot = dir.file("overlay.png");
    const Result r = compare(o);
    CHECK(r.err.find("gnuplot was not found") != std::string::npos);
    CHECK(r.err.find("gnuplot-nox") != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(o.plot));
    CHECK(r.err.rfind("error: ", 0) == 0);
    CHECK(r.code == cli::kExitBadInput);
}

TEST_CASE("report: --plot into a missing directory fails clearly with exit code 1", "[report][plot]") {
    if (!gnuplot_configured()) return;
    GnuplotOverride use_configured(nullptr);
    TempDir dir("plot-nodir");
    cli::CompareOptions o = compare_options({source_path("regimens/zelmarin-q8h-4h.toml")});
    o.plot = dir.file("no/such/dir/overlay.png");
    const Result r = compare(o);
    CHECK(r.err.find("does not exist") != std::string::npos);
    CHECK(r.err.rfind("error: ", 0) == 0);
    CHECK(r.code == cli::kExitBadInput);
}
