// `--plot` of the compare and run commands: each supported format is written and is what its name says;
// anything else is refused up front with a clear message and exit code 1.
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>

#include "report_support.hpp"

using namespace plateau;
using namespace plateau::reporttest;

TEST_CASE("report: --plot writes PNG, SVG and PDF figures", "[report][plot]") {
    if (!gnuplot_configured()) {
        WARN("gnuplot was not found when the build was configured: plots are not checked");
        return;
    }
    GnuplotOverride use_configured(nullptr);
    TempDir dir("plots");
    // File signatures: PNG's 8-byte magic, PDF's header (ISO 32000-1, 7.5.2), an SVG root element
    // (common practice, no source).
    struct Case { const char* ext; std::string magic; };
    for (const Case& c : {Case{".png", "\x89PNG\r\n\x1a\n"}, Case{".pdf", "%PDF-"}, Case{".svg", ""}}) {
        SECTION(c.ext) {
            cli::CompareOptions o = compare_options(demo_regimens());
            o.plot = dir.file(std::string("overlay") + c.ext);
            const Result r = compare(o);
            INFO(r.err);
            REQUIRE(r.code == cli::kExitOk);
            CHECK(r.out.find("Plot      written to " + o.plot + "\n") != std::string::npos);
            REQUIRE(std::filesystem::exists(o.plot));
            const std::string bytes = slurp(o.plot);
            CHECK(bytes.size() > 2000);  // a drawn figure, not an empty page
            if (!c.magic.empty()) {
                CHECK(bytes.compare(0, c.magic.size(), c.magic) == 0);
            } else {
                CHECK(bytes.find("<svg") != std::string::npos);
                CHECK(bytes.find("</svg>") != std::string::npos);
                // Every regimen is in the key (the curve titles are "A: <id>" ...).
                CHECK(bytes.find("A: zelmarin-q8h-30min") != std::string::npos);
                CHECK(bytes.find("D: zelmarin-continuous") != std::string::npos);
                CHECK(bytes.find("threshold 4 mg/L") != std::string::npos);
            }
            // Nothing left behind but the figure.
            std::size_t files = 0;
            for (const auto& e : std::filesystem::directory_iterator(dir.path)) {
                (void)e;
                ++files;
            }
            CHECK(files == 1);
        }
    }
}

TEST_CASE("report: --plot with run writes the figure of that regimen", "[report][plot]") {
    if (!gnuplot_configured()) return;
    GnuplotOverride use_configured(nullptr);
    TempDir dir("plot-run");
    cli::RunOptions o;
    o.regimen = source_path("regimens/zelmarin-q8h-30min.toml");
    o.plot = dir.file("curve.svg");
    const Result r = run(o);
    INFO(r.err);
    REQUIRE(r.code == cli::kExitOk);
    const std::string svg = slurp(o.plot);
    CHECK(svg.find("A: zelmarin-q8h-30min") != std::string::npos);
}

TEST_CASE("report: --plot with an unsupported extension is refused before anything runs", "[report][plot]") {
    TempDir dir("plot-bad");
    for (const char* name : {"overlay.jpg", "overlay.gif", "overlay"}) {
        SECTION(name) {
            cli::CompareOptions o = compare_options(demo_regimens());
            o.plot = dir.file(name);
            o.json = dir.file("c.json");
            o.report = dir.file("r.html");
            const Result r = compare(o);
            CHECK(r.code == cli::kExitBadInput);
            // A known but unsupported extension, or none at all, each named in the message.
            CHECK((r.err.rfind("error: --plot: unsupported format '", 0) == 0 ||
                   r.err.find("has no extension") != std::string::npos));
            CHECK(r.err.find("use a file ending in .png, .svg or .pdf") != std::string::npos);
            CHECK(r.err.find("internal error") == std::string::npos);
            // Refused before any file is written.
            CHECK_FALSE(std::filesystem::exists(o.plot));
            CHECK_FALSE(std::filesystem::exists(o.json));
            CHECK_FALSE(std::filesystem::exists(o.report));
        }
    }
    cli::RunOptions ro;
    ro.regimen = source_path("regimens/zelmarin-q8h-30min.toml");
    ro.plot = dir.file("curve.bmp");
    const Result r = run(ro);
    CHECK(r.code == cli::kExitBadInput);
    CHECK(r.err.find("unsupported format '.bmp'") != std::string::npos);
}
