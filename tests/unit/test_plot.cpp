#include <catch2/catch.hpp>

#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "plot/plot.hpp"
#include "plot/sample.hpp"
#include "report/caution.hpp"
#include "trajectory/trajectory.hpp"

namespace fs = std::filesystem;
using namespace plateau;
using plot::Curve;
using plot::Figure;
using plot::PlotError;

namespace {

// A fresh directory for one test case, removed afterwards.
struct TempDir {
    fs::path path;
    explicit TempDir(const std::string& name) {
        path = fs::temp_directory_path() / ("plateau-test-plot-" + std::to_string(::getpid()) + "-" + name);
        fs::remove_all(path);
        fs::create_directories(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
    std::string file(const std::string& name) const { return (path / name).string(); }
};

// Sets PLATEAU_GNUPLOT_PATH for the scope of a test and restores what was there.
struct GnuplotOverride {
    bool had = false;
    std::string old;
    explicit GnuplotOverride(const std::string& program) {
        if (const char* v = std::getenv("PLATEAU_GNUPLOT_PATH")) {
            had = true;
            old = v;
        }
        ::setenv("PLATEAU_GNUPLOT_PATH", program.c_str(), 1);
    }
    ~GnuplotOverride() {
        if (had) ::setenv("PLATEAU_GNUPLOT_PATH", old.c_str(), 1);
        else ::unsetenv("PLATEAU_GNUPLOT_PATH");
    }
};

std::string slurp(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

// Rendering needs gnuplot. When the build found one, it must work; a build without gnuplot skips these checks.
bool need_gnuplot() {
    const std::string configured = PLATEAU_GNUPLOT;
    if (configured.empty() || configured.find("NOTFOUND") != std::string::npos) {
        WARN("gnuplot was not found when the build was configured: rendering not checked");
        return false;
    }
    REQUIRE(plot::gnuplot_available());
    return true;
}

// Two one-compartment bolus curves (concentration 10·exp(-0.2 t) after each dose, fictional drug), a target
// line, a window and dose ticks: every element a figure can have.
Figure demo_figure() {
    Figure f;
    f.title = "Zelvamycin: two regimens & a <target>";
    f.ylabel = "concentration (mg/L)";
    const double doses_a[] = {0, 12, 24, 36};
    const double doses_b[] = {0, 24};
    for (int r = 0; r < 2; ++r) {
        Curve c;
        c.label = r == 0 ? "500 mg every 12 h" : "1000 mg every 24 h";
        const double amount = r == 0 ? 10.0 : 20.0;
        for (int i = 0; i <= 480; ++i) {
            const double t = 0.1 * i;
            double y = 0;
            for (double d : (r == 0 ? std::vector<double>(doses_a, doses_a + 4) : std::vector<double>(doses_b, doses_b + 2)))
                if (t >= d) y += amount * std::exp(-0.2 * (t - d));
            c.t.push_back(t);
            c.y.push_back(y);
        }
        f.curves.push_back(c);
    }
    f.threshold = 4.0;
    f.threshold_label = "target 4 mg/L";
    f.band = std::pair{2.0, 12.0};
    f.band_label = "window 2-12 mg/L";
    f.dose_marks = {{0, 12, 24, 36}, {0, 24}};
    return f;
}

int leftover_temp_files(const fs::path& dir) {
    const std::string mark = ".plateau-" + std::to_string(::getpid()) + "-";
    int n = 0;
    for (const auto& e : fs::directory_iterator(dir))
        if (e.path().filename().string().rfind(mark, 0) == 0) ++n;
    return n;
}

std::string message_of(const Figure& f, const std::string& path) {
    try {
        plot::render_file(f, path);
    } catch (const PlotError& e) {
        return e.what();
    }
    FAIL("no PlotError for '" << path << "'");
    return {};
}

}  // namespace

TEST_CASE("plot: png, svg and pdf files are written and non-empty", "[plot]") {
    if (!need_gnuplot()) return;
    TempDir dir("formats");
    const Figure f = demo_figure();

    plot::render_file(f, dir.file("fig.png"));
    const std::string png = slurp(dir.file("fig.png"));
    REQUIRE(png.size() > 1000);
    CHECK(png.substr(0, 4) == "\x89PNG");  // PNG signature (common practice, no source)
    // IHDR width and height, big-endian at bytes 16..23 (PNG format, common practice, no source).
    auto be32 = [&](std::size_t at) {
        unsigned v = 0;
        for (std::size_t k = 0; k < 4; ++k) v = (v << 8) | static_cast<unsigned char>(png[at + k]);
        return v;
    };
    CHECK(be32(16) == 900u);
    CHECK(be32(20) == 420u);

    plot::render_file(f, dir.file("fig.pdf"));
    const std::string pdf = slurp(dir.file("fig.pdf"));
    REQUIRE(pdf.size() > 1000);
    CHECK(pdf.substr(0, 4) == "%PDF");  // PDF header (common practice, no source)
    // 900 x 420 px at 96 px to the inch, 72 pt to the inch: 675 x 315 pt (computed from the closed form).
    CHECK(pdf.find("/MediaBox [ 0 0 675 315 ]") != std::string::npos);

    plot::render_file(f, dir.file("fig.svg"));
    const std::string svg = slurp(dir.file("fig.svg"));
    CHECK(svg.find("<svg") != std::string::npos);
    // A standalone file keeps its namespace declarations, and references nothing else.
    CHECK(svg.find("xmlns=\"http://www.w3.org/2000/svg\"") != std::string::npos);
    std::string rest = svg;
    for (const std::string ns : {"\"http://www.w3.org/2000/svg\"", "\"http://www.w3.org/1999/xlink\""})
        for (auto at = rest.find(ns); at != std::string::npos; at = rest.find(ns)) rest.erase(at, ns.size());
    CHECK(rest.find("http://") == std::string::npos);
    CHECK(rest.find("https://") == std::string::npos);
    CHECK(svg.find("500 mg every 12 h") != std::string::npos);
    CHECK(svg.find("target 4 mg/L") != std::string::npos);
    // A plot file travels alone: it carries the caution itself (common practice, no source).
    CHECK(svg.find(report::kCaution) != std::string::npos);

    // The extension is read without regard to case.
    plot::render_file(f, dir.file("upper.PNG"));
    CHECK(slurp(dir.file("upper.PNG")).substr(0, 4) == "\x89PNG");

    CHECK(leftover_temp_files(dir.path) == 0);
    CHECK(leftover_temp_files(fs::temp_directory_path()) == 0);
}

TEST_CASE("plot: render_svg gives inline SVG without external references", "[plot]") {
    if (!need_gnuplot()) return;
    const std::string svg = plot::render_svg(demo_figure());
    CHECK(svg.rfind("<svg", 0) == 0);  // starts with the element: no prolog, no DOCTYPE
    CHECK(svg.find("<?xml") == std::string::npos);
    CHECK(svg.find("DOCTYPE") == std::string::npos);
    CHECK(svg.find("http://") == std::string::npos);
    CHECK(svg.find("https://") == std::string::npos);
    CHECK(svg.find("xmlns") == std::string::npos);
    CHECK(svg.find("<script") == std::string::npos);
    CHECK(svg.find("onload") == std::string::npos);
    CHECK(svg.find("xlink:") == std::string::npos);
    CHECK(svg.find("</svg>") != std::string::npos);
    // Labels come through, with markup characters escaped.
    CHECK(svg.find("1000 mg every 24 h") != std::string::npos);
    CHECK(svg.find("window 2-12 mg/L") != std::string::npos);
    CHECK(svg.find("two regimens &amp; a &lt;target&gt;") != std::string::npos);
    CHECK(svg.find("Research simulation only") == std::string::npos);  // the report around it carries the caution
    CHECK(svg.find("<target>") == std::string::npos);
    // Ids are prefixed so that two figures can share a page, and every internal reference still resolves.
    CHECK(svg.find("id=\"gnuplot_canvas\"") == std::string::npos);
    const auto canvas = svg.find("-gnuplot_canvas\"");
    REQUIRE(canvas != std::string::npos);
    for (auto at = svg.find("href='#"); at != std::string::npos; at = svg.find("href='#", at + 1)) {
        const auto end = svg.find('\'', at + 7);
        const std::string id = svg.substr(at + 7, end - at - 7);
        CHECK(svg.find("id='" + id + "'") != std::string::npos);
    }
    // The same figure gives the same text.
    CHECK(plot::render_svg(demo_figure()) == svg);
}

TEST_CASE("plot: an unsupported extension is refused before anything runs", "[plot]") {
    TempDir dir("extension");
    const Figure f = demo_figure();
    CHECK(message_of(f, dir.file("fig.jpg")) == "unsupported plot format '.jpg': use .png, .svg or .pdf");
    CHECK(message_of(f, dir.file("fig.eps")) == "unsupported plot format '.eps': use .png, .svg or .pdf");
    CHECK(message_of(f, dir.file("fig")) ==
          "plot file name '" + dir.file("fig") + "' has no extension: use .png, .svg or .pdf");
    CHECK(fs::is_empty(dir.path));
}

TEST_CASE("plot: missing gnuplot gives a clear error", "[plot]") {
    TempDir dir("missing");
    GnuplotOverride missing("/nonexistent/gnuplot");
    CHECK(plot::gnuplot_program() == "/nonexistent/gnuplot");
    CHECK_FALSE(plot::gnuplot_available());
    const std::string expected =
        "gnuplot was not found: install gnuplot-nox (apt-get install gnuplot-nox) to draw plots";
    CHECK(message_of(demo_figure(), dir.file("fig.png")) == expected);
    try {
        plot::render_svg(demo_figure());
        FAIL("no PlotError from render_svg");
    } catch (const PlotError& e) {
        CHECK(std::string(e.what()) == expected);
    }
    CHECK(fs::is_empty(dir.path));
}

TEST_CASE("plot: a gnuplot that writes nothing is reported with its stderr", "[plot]") {
    TempDir dir("silent");
    // A stand-in program: answers --version, then swallows the script, complains and exits 0 without output,
    // as gnuplot does on some errors.
    const std::string fake = dir.file("fake-gnuplot");
    {
        std::ofstream out(fake);
        out << "#!/bin/sh\nif [ \"$1\" = --version ]; then echo 'gnuplot 0.0'; exit 0; fi\n"
               "cat >/dev/null\necho 'line 3: something went wrong' >&2\nexit 0\n";
    }
    fs::permissions(fake, fs::perms::owner_all);
    GnuplotOverride over(fake);
    REQUIRE(plot::gnuplot_available());

    // An existing file is left as it was.
    const std::string target = dir.file("fig.png");
    { std::ofstream(target) << "old"; }
    const std::string msg = message_of(demo_figure(), target);
    CHECK(msg.rfind("gnuplot could not draw '" + target + "'", 0) == 0);
    CHECK(msg.find("line 3: something went wrong") != std::string::npos);
    CHECK(slurp(target) == "old");
    CHECK(leftover_temp_files(dir.path) == 0);
    CHECK(leftover_temp_files(fs::temp_directory_path()) == 0);
}

TEST_CASE("plot: a gnuplot that fails is reported even when it leaves output", "[plot]") {
    TempDir dir("failing");
    const std::string fake = dir.file("fake-gnuplot");
    {
        std::ofstream out(fake);
        out << "#!/bin/sh\nif [ \"$1\" = --version ]; then exit 0; fi\n"
               "cat >/dev/null\necho 'broken terminal' >&2\nexit 3\n";
    }
    fs::permissions(fake, fs::perms::owner_all);
    GnuplotOverride over(fake);
    const std::string msg = message_of(demo_figure(), dir.file("fig.svg"));
    CHECK(msg.find("broken terminal") != std::string::npos);
    CHECK(msg.find("plateau:") == std::string::npos);  // the internal exit marker is not shown
    CHECK_FALSE(fs::exists(dir.file("fig.svg")));
}

TEST_CASE("plot: figures that cannot be drawn are refused", "[plot]") {
    TempDir dir("bad");
    Figure f = demo_figure();
    f.curves[1].y.pop_back();
    CHECK(message_of(f, dir.file("a.png")) == "curve '1000 mg every 24 h' has 481 times but 480 values");

    Figure empty;
    empty.curves.push_back(Curve{"nothing", {}, {}});
    CHECK(message_of(empty, dir.file("a.png")) == "nothing to plot: no curve has a data point");

    Figure range = demo_figure();
    range.x_min = 10;
    range.x_max = 5;
    CHECK(message_of(range, dir.file("a.png")) ==
          "plot time range [10, 5] is empty: the end must be after the start");
    CHECK(fs::is_empty(dir.path));
}

TEST_CASE("plot: sample keeps both sides of a dose jump", "[plot]") {
    // Hand-built trajectory, one series of degree 1: y = 4 - t on [0, 2), then a bolus of +5 and
    // y = 7 - (t - 2) on [2, 4]. Expected values computed from the closed form.
    traj::Trajectory tr(1, 1);
    const std::vector<double> first{4.0, -1.0}, second{7.0, -1.0};
    tr.append(0.0, 2.0, first);
    tr.append(2.0, 2.0, second);

    SECTION("jump on a grid point: left limit then value after, grid point not repeated") {
        const Curve c = plot::sample(tr, 0, 0.0, 4.0, 5, 1.0, {2.0}, "central");
        CHECK(c.label == "central");
        CHECK(c.t == std::vector<double>{0, 1, 2, 2, 3, 4});
        CHECK(c.y == std::vector<double>{4, 3, 2, 7, 6, 5});
    }
    SECTION("jump between grid points, doses outside the interval ignored, unit factor applied") {
        const Curve c = plot::sample(tr, 0, 0.0, 4.0, 3, 2.0, {-1.0, 2.0, 9.0}, "x");
        CHECK(c.t == std::vector<double>{0, 2, 2, 4});
        CHECK(c.y == std::vector<double>{2, 1, 3.5, 2.5});  // halved by the factor 2
        const Curve d = plot::sample(tr, 0, 0.5, 3.5, 2, 1.0, {2.0}, "x");
        CHECK(d.t == std::vector<double>{0.5, 2, 2, 3.5});
        CHECK(d.y == std::vector<double>{3.5, 2, 7, 5.5});
    }
    SECTION("an interval reaching past the trajectory is clipped to it") {
        const Curve c = plot::sample(tr, 0, -2.0, 6.0, 3, 1.0, {}, "x");
        CHECK(c.t == std::vector<double>{0, 2, 4});
        CHECK(c.y == std::vector<double>{4, 7, 5});
    }
    SECTION("bad arguments") {
        CHECK_THROWS_AS(plot::sample(tr, 0, 0.0, 4.0, 1, 1.0, {}, "x"), std::invalid_argument);
        CHECK_THROWS_AS(plot::sample(tr, 0, 4.0, 4.0, 5, 1.0, {}, "x"), std::invalid_argument);
        CHECK_THROWS_AS(plot::sample(tr, 1, 0.0, 4.0, 5, 1.0, {}, "x"), std::invalid_argument);
        CHECK_THROWS_AS(plot::sample(tr, 0, 0.0, 4.0, 5, 0.0, {}, "x"), std::invalid_argument);
        CHECK(plot::sample(traj::Trajectory{}, 0, 0.0, 4.0, 5, 1.0, {}, "x").t.empty());
    }
}

TEST_CASE("plot: labels with quotes and markup characters are drawn as written", "[plot]") {
    if (!need_gnuplot()) return;
    Figure f;
    f.title = "it's \"Zelvamycin\" \\ x_1^2 @ {b} ~ µg/L";
    f.curves.push_back(Curve{"O'Neil's_1", {0, 1}, {1, 2}});
    f.curves.push_back(Curve{"", {0, 1}, {2, 1}});  // no label: drawn, no key entry
    const std::string svg = plot::render_svg(f);
    CHECK(svg.find("<text>O'Neil's_1</text>") != std::string::npos);
    CHECK(svg.find("<text>it's \"Zelvamycin\" \\ x_1^2 @ {b} ~ µg/L</text>") != std::string::npos);
    CHECK(svg.find("-gnuplot_plot_2\"") != std::string::npos);  // the unlabelled curve is drawn
}

TEST_CASE("plot: the window band has a key entry even when the caller gives it no label", "[plot]") {
    if (!need_gnuplot()) return;
    Figure f = demo_figure();
    f.band_label.clear();
    const std::string svg = plot::render_svg(f);
    // The default entry names the band's ends, as the threshold line's default names its level.
    CHECK(svg.find("window 2\xE2\x80\x93" "12") != std::string::npos);
    f.band_label = "window 2-12 mg/L";
    CHECK(plot::render_svg(f).find("window 2-12 mg/L") != std::string::npos);
}
