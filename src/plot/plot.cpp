// Drives gnuplot through gnuplot-iostream (the only file that includes it). A figure becomes one gnuplot
// script with inline data; gnuplot runs with its stderr in a temporary file, because it reports errors only
// there and still exits normally with an empty output file.
#include "plot/plot.hpp"

#include "core/escape.hpp"
#include "report/caution.hpp"

#include <gnuplot-iostream.h>

#include <fcntl.h>
#include <pthread.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <atomic>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <utility>

namespace plateau::plot {

namespace {

namespace fs = std::filesystem;

constexpr const char* kNotFound =
    "gnuplot was not found: install gnuplot-nox (apt-get install gnuplot-nox) to draw plots";
constexpr const char* kExitMarker = "plateau: gnuplot exit status ";

// Okabe & Ito colour-blind-safe palette (yellow left out: too pale on white), and dash patterns so that the
// curves stay apart in greyscale print.
constexpr std::array<const char*, 7> kColours = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                                 "#E69F00", "#56B4E9", "#000000"};
constexpr std::array<const char*, 7> kDashes = {"solid",      "(9,4)",      "(2,3)",       "(10,4,2,4)",
                                                "(18,6)",     "(4,3,1,3,1,3)", "(12,3,3,3,3,3)"};
constexpr const char* kBandColour = "#009E73";
constexpr const char* kThresholdColour = "#666666";

const char* colour(std::size_t i) { return kColours[i % kColours.size()]; }
const char* dash(std::size_t i) { return kDashes[i % kDashes.size()]; }

// ---- small helpers ------------------------------------------------------------------------------------------

std::string shell_quote(const std::string& s) {
    std::string out = "'";
    for (char c : s) {
        if (c == '\'') out += "'\\''";
        else out += c;
    }
    return out + "'";
}

// A gnuplot single-quoted string: '' stands for a quote, nothing else is special; line breaks would end the
// command, so control characters become spaces.
std::string gp_quote(const std::string& s) {
    std::string out = "'";
    for (char c : s) {
        if (c == '\'') out += "''";
        else if (static_cast<unsigned char>(c) < 0x20) out += ' ';
        else out += c;
    }
    return out + "'";
}

std::string num(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.10g", v);
    return buf;
}

std::string lower(std::string s) {
    for (char& c : s)
        if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
    return s;
}

std::string read_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

std::string trim(std::string s) {
    const auto first = s.find_first_not_of(" \t\r\n");
    if (first == std::string::npos) return {};
    const auto last = s.find_last_not_of(" \t\r\n");
    return s.substr(first, last - first + 1);
}

// A file created exclusively (mode 0666 less the umask) and removed when this goes out of scope unless
// released.
class TempFile {
public:
    TempFile(const fs::path& dir, const std::string& stem) {
        static std::atomic<unsigned> counter{0};
        for (int attempt = 0; attempt < 100; ++attempt) {
            const std::string name = ".plateau-" + std::to_string(::getpid()) + "-" +
                                     std::to_string(counter.fetch_add(1)) + "-" + stem;
            const std::string p = (dir / name).string();
            const int fd = ::open(p.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
            if (fd >= 0) {
                ::close(fd);
                path_ = p;
                return;
            }
            if (errno != EEXIST)
                throw PlotError("cannot write a plot in '" + dir.string() + "': " + std::strerror(errno));
        }
        throw PlotError("cannot create a temporary file in '" + dir.string() + "'");
    }
    ~TempFile() {
        if (!path_.empty()) ::unlink(path_.c_str());
    }
    TempFile(const TempFile&) = delete;
    TempFile& operator=(const TempFile&) = delete;
    const std::string& path() const { return path_; }
    void release() { path_.clear(); }

private:
    std::string path_;
};

// SIGPIPE blocked for this thread while writing to gnuplot (it may die early); a pending one is consumed.
class SigpipeGuard {
public:
    SigpipeGuard() {
        sigemptyset(&pipe_);
        sigaddset(&pipe_, SIGPIPE);
        sigpending(&before_);
        pthread_sigmask(SIG_BLOCK, &pipe_, &old_);
    }
    ~SigpipeGuard() {
        if (!sigismember(&before_, SIGPIPE)) {
            sigset_t pending;
            sigpending(&pending);
            if (sigismember(&pending, SIGPIPE)) {
                const timespec zero{0, 0};
                sigtimedwait(&pipe_, nullptr, &zero);
            }
        }
        pthread_sigmask(SIG_SETMASK, &old_, nullptr);
    }
    SigpipeGuard(const SigpipeGuard&) = delete;
    SigpipeGuard& operator=(const SigpipeGuard&) = delete;

private:
    sigset_t pipe_{}, old_{}, before_{};
};

// ---- the script ---------------------------------------------------------------------------------------------

enum class Format { png, svg_file, svg_inline, pdf };

struct Range { double lo, hi; };

Range x_range(const Figure& f) {
    if (!(f.x_min == 0.0 && f.x_max == 0.0)) {
        if (!std::isfinite(f.x_min) || !std::isfinite(f.x_max) || !(f.x_max > f.x_min))
            throw PlotError("plot time range [" + num(f.x_min) + ", " + num(f.x_max) +
                            "] is empty: the end must be after the start");
        return {f.x_min, f.x_max};
    }
    double lo = INFINITY, hi = -INFINITY;
    for (const Curve& c : f.curves)
        for (std::size_t i = 0; i < c.t.size(); ++i)
            if (std::isfinite(c.t[i]) && std::isfinite(c.y[i])) {
                lo = std::min(lo, c.t[i]);
                hi = std::max(hi, c.t[i]);
            }
    if (!(hi > lo)) return {lo - 1.0, lo + 1.0};
    return {lo, hi};
}

// 1, 2 or 5 times a power of ten, near `raw`.
double nice_step(double raw) {
    if (!(raw > 0.0) || !std::isfinite(raw)) return 1.0;
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    const double r = raw / mag;
    return (r < 1.5 ? 1.0 : r < 3.0 ? 2.0 : r < 7.0 ? 5.0 : 10.0) * mag;
}

// The data's y extent (with the threshold and band), zero included, padded at the top.
Range y_range(const Figure& f, Range x) {
    double lo = 0.0, hi = -INFINITY;
    for (const Curve& c : f.curves)
        for (std::size_t i = 0; i < c.t.size(); ++i)
            if (std::isfinite(c.t[i]) && std::isfinite(c.y[i]) && c.t[i] >= x.lo && c.t[i] <= x.hi) {
                lo = std::min(lo, c.y[i]);
                hi = std::max(hi, c.y[i]);
            }
    if (f.threshold) {
        lo = std::min(lo, *f.threshold);
        hi = std::max(hi, *f.threshold);
    }
    if (f.band) {
        lo = std::min(lo, f.band->first);
        hi = std::max(hi, f.band->second);
    }
    if (!(hi > lo)) hi = lo + 1.0;
    const double pad = 0.06 * (hi - lo);
    return {lo < 0.0 ? lo - pad : lo, hi + pad};
}

void check(const Figure& f) {
    if (f.width < 100 || f.width > 10000 || f.height < 100 || f.height > 10000)
        throw PlotError("plot size " + std::to_string(f.width) + "x" + std::to_string(f.height) +
                        " is out of range: width and height must be between 100 and 10000 pixels");
    std::size_t points = 0;
    for (const Curve& c : f.curves) {
        if (c.t.size() != c.y.size())
            throw PlotError("curve '" + c.label + "' has " + std::to_string(c.t.size()) + " times but " +
                            std::to_string(c.y.size()) + " values");
        for (std::size_t i = 0; i < c.t.size(); ++i)
            if (std::isfinite(c.t[i]) && std::isfinite(c.y[i])) ++points;
    }
    if (points == 0) throw PlotError("nothing to plot: no curve has a data point");
    x_range(f);  // an explicit time range must not be empty
    if (f.threshold && !std::isfinite(*f.threshold))
        throw PlotError("plot threshold is not a finite number");
    if (f.band && !(std::isfinite(f.band->first) && std::isfinite(f.band->second) &&
                    f.band->second > f.band->first))
        throw PlotError("plot band [" + num(f.band->first) + ", " + num(f.band->second) +
                        "] is empty: the upper bound must be above the lower bound");
}

std::string terminal(const Figure& f, Format fmt) {
    const std::string size = std::to_string(f.width) + "," + std::to_string(f.height);
    switch (fmt) {
    case Format::png:
        return "set terminal pngcairo size " + size +
               " font 'sans,11' background rgb 'white' noenhanced linewidth 1\n";
    case Format::svg_file:
        return "set terminal svg size " + size + " fixed font 'sans,11' background rgb 'white' noenhanced\n";
    case Format::svg_inline:
        return "set terminal svg size " + size + " dynamic font 'sans,11' background rgb 'white' noenhanced\n";
    case Format::pdf:
        // 96 px to the inch; fonts scaled the same way (11 px ≈ 8.25 pt).
        return "set terminal pdfcairo size " + num(f.width / 96.0) + "in," + num(f.height / 96.0) +
               "in font 'sans,8.25' background rgb 'white' noenhanced linewidth 1.5\n";
    }
    return {};
}

using Columns = std::pair<std::vector<double>, std::vector<double>>;

// The commands up to and including the plot command, and the inline data blocks it reads in order.
std::string build_script(const Figure& f, Format fmt, const std::string& output, std::vector<Columns>& data) {
    const Range xr = x_range(f);
    const Range yr = y_range(f, xr);
    // Dose ticks get a lane of their own below the data (one row per curve, so that simultaneous doses stay
    // visible); the y tics then start at the data's lower end so that the lane carries no numbers.
    std::size_t rows = 0;
    for (std::size_t i = 0; i < f.dose_marks.size(); ++i)
        for (double t : f.dose_marks[i])
            if (std::isfinite(t) && t >= xr.lo && t <= xr.hi) rows = i + 1;
    constexpr double kRow = 0.04;  // graph fraction per row
    const double lane = rows ? 0.01 + kRow * static_cast<double>(rows) : 0.0;
    const double y_lo = yr.lo - lane * (yr.hi - yr.lo) / (1.0 - lane);

    std::ostringstream s;
    s << "set encoding utf8\n" << terminal(f, fmt) << "set output " << gp_quote(output) << "\n";
    if (!f.title.empty()) s << "set title " << gp_quote(f.title) << " font ',13'\n";
    if (!f.xlabel.empty()) s << "set xlabel " << gp_quote(f.xlabel) << "\n";
    // A plot file travels alone, so it carries the caution itself (a figure inlined in a report has the
    // report's): small, in its own line below the x label.
    if (fmt != Format::svg_inline)
        s << "set bmargin 5\nset label 99 " << gp_quote(report::kCaution)
          << " at screen 0.01, screen 0.02 left font ',8' textcolor rgb '#606060'\n";
    if (!f.ylabel.empty()) s << "set ylabel " << gp_quote(f.ylabel) << "\n";
    s << "set border 3 lc rgb '#404040'\n"
         "set tics nomirror out scale 0.6\n"
         "set xtics textcolor rgb '#202020'\nset ytics textcolor rgb '#202020'\n"
         "set grid xtics ytics back lt 1 lc rgb '#DADADA' lw 1 dt solid\n"
         "set key outside right top vertical Left reverse samplen 3.5 spacing 1.3 width 1\n"
         "set style fill transparent solid 0.15 noborder\n"
         "set xrange [" << num(xr.lo) << ":" << num(xr.hi) << "]\n"
         "set yrange [" << num(y_lo) << ":" << num(yr.hi) << "]\n";
    if (rows) {
        const double step = nice_step((yr.hi - yr.lo) / 8.0);
        s << "set ytics " << num(std::ceil(yr.lo / step - 1e-9) * step) << ", " << num(step) << "\n"
          << "set xzeroaxis lt 1 lw 1 lc rgb '#A0A0A0'\n";
    }
    if (f.band)
        s << "set object 1 rectangle from graph 0, first " << num(f.band->first) << " to graph 1, first "
          << num(f.band->second) << " behind fillcolor rgb '" << kBandColour
          << "' fillstyle transparent solid 0.15 noborder\n";
    std::vector<std::string> items;
    for (std::size_t i = 0; i < f.curves.size(); ++i) {
        const Curve& c = f.curves[i];
        const std::string style = "lw 2 lc rgb '" + std::string(colour(i)) + "' dt " + dash(i);
        const std::string title = c.label.empty() ? "notitle" : "title " + gp_quote(c.label);
        Columns col;
        for (std::size_t k = 0; k < c.t.size(); ++k)
            if (std::isfinite(c.t[k]) && std::isfinite(c.y[k])) {
                col.first.push_back(c.t[k]);
                col.second.push_back(c.y[k]);
            }
        if (col.first.empty()) {
            if (!c.label.empty()) items.push_back("keyentry with lines " + style + " " + title);
            continue;
        }
        if (c.points)
            items.push_back("'-' using 1:2 with points pt 7 ps 1.3 lc rgb '" + std::string(colour(i)) + "' " + title);
        else
            items.push_back("'-' using 1:2 with lines " + style + " " + title);
        data.push_back(std::move(col));
    }
    // Dose ticks: one data block per curve drawn as short vertical vectors (one `set arrow` per tick costs
    // gnuplot quadratic time: 100 000 doses took 40 s).
    const double y_span = yr.hi - y_lo;
    for (std::size_t i = 0; i < f.dose_marks.size(); ++i) {
        const double g0 = lane - kRow * static_cast<double>(i + 1);  // first curve on top
        Columns col;
        for (double t : f.dose_marks[i])
            if (std::isfinite(t) && t >= xr.lo && t <= xr.hi) {
                col.first.push_back(t);
                col.second.push_back(y_lo + g0 * y_span);
            }
        if (col.first.empty()) continue;
        items.push_back("'-' using 1:2:(0):(" + num(0.028 * y_span) + ") with vectors nohead lw 2 lc rgb '" +
                        std::string(colour(i)) + "' notitle");
        data.push_back(std::move(col));
    }
    if (f.threshold) {
        const std::string label = f.threshold_label.empty() ? "threshold " + num(*f.threshold) : f.threshold_label;
        items.push_back(num(*f.threshold) + " with lines lw 1.5 lc rgb '" + kThresholdColour +
                        "' dt (7,4) title " + gp_quote(label));
    }
    if (f.band) {
        // Like the threshold line, the shaded band always has its key entry: a shade nobody explains is noise.
        const std::string label = f.band_label.empty()
                                      ? "window " + num(f.band->first) + "\xE2\x80\x93" + num(f.band->second)
                                      : f.band_label;
        items.push_back(std::string("keyentry with boxes fillcolor rgb '") + kBandColour +
                        "' fillstyle transparent solid 0.15 noborder title " + gp_quote(label));
    }

    s << "set samples 2\nplot ";
    for (std::size_t i = 0; i < items.size(); ++i) s << (i ? ", \\\n     " : "") << items[i];
    s << "\n";
    return s.str();
}

// ---- running gnuplot ----------------------------------------------------------------------------------------

std::string require_gnuplot() {
    if (!gnuplot_available()) throw PlotError(kNotFound);
    return gnuplot_program();
}

std::string gnuplot_complaint(std::string err) {
    const auto at = err.find(kExitMarker);
    if (at != std::string::npos) err.erase(at);
    err = trim(err);
    // Keep the tail: the last error is the one that matters.
    constexpr std::size_t kMax = 2000;
    if (err.size() > kMax) err = "..." + err.substr(err.size() - kMax);
    return err;
}

// Draws `f` into `output` (which must exist, empty); throws when gnuplot fails or leaves it empty.
void draw(const Figure& f, Format fmt, const std::string& output, const std::string& shown_name) {
    const std::string program = require_gnuplot();
    std::vector<Columns> data;
    const std::string commands = build_script(f, fmt, output, data);

    TempFile err(fs::temp_directory_path(), "gnuplot-stderr.txt");
    const std::string cmd = shell_quote(program) + " 2>" + shell_quote(err.path()) + " || echo \"" +
                            kExitMarker + "$?\" >>" + shell_quote(err.path());
    {
        SigpipeGuard guard;
        try {
            Gnuplot gp(cmd);
            gp << commands;
            for (const Columns& d : data) gp.send1d(d);
            gp << "unset output\nexit\n";
            gp.flush();
        } catch (const std::exception&) {
            // popen failed or the pipe broke: what gnuplot said is in its stderr file, read below
        }
    }  // the Gnuplot destructor waits for gnuplot to finish

    const std::string complaint = read_file(err.path());
    std::error_code ec;
    const auto size = fs::file_size(output, ec);
    const bool failed = complaint.find(kExitMarker) != std::string::npos || ec || size == 0;
    if (!failed) return;
    const std::string said = gnuplot_complaint(complaint);
    throw PlotError("gnuplot could not draw " + shown_name +
                    (said.empty() ? std::string(": it wrote nothing and gave no reason") : ":\n" + said));
}

// ---- SVG for inlining ---------------------------------------------------------------------------------------

void replace_all(std::string& s, const std::string& from, const std::string& to) {
    for (std::size_t at = s.find(from); at != std::string::npos; at = s.find(from, at + to.size()))
        s.replace(at, from.size(), to);
}

// Like replace_all, only where `from` follows white space (so "id=" does not match inside "gid=").
void replace_attr(std::string& s, const std::string& from, const std::string& to) {
    for (std::size_t at = s.find(from); at != std::string::npos; at = s.find(from, at + 1)) {
        if (at == 0 || !std::isspace(static_cast<unsigned char>(s[at - 1]))) continue;
        s.replace(at, from.size(), to);
        at += to.size() - 1;
    }
}

// Removes xmlns and xmlns:* attributes from the tag that starts at `tag`.
void strip_namespaces(std::string& s, std::size_t tag) {
    const std::size_t end = s.find('>', tag);
    if (end == std::string::npos) return;
    std::string head = s.substr(tag, end - tag);
    for (std::size_t at = head.find("xmlns"); at != std::string::npos; at = head.find("xmlns", at)) {
        std::size_t eq = head.find('=', at);
        if (eq == std::string::npos) break;
        std::size_t q = head.find_first_of("\"'", eq);
        if (q == std::string::npos) break;
        std::size_t close = head.find(head[q], q + 1);
        if (close == std::string::npos) break;
        std::size_t from = at;
        while (from > 0 && std::isspace(static_cast<unsigned char>(head[from - 1]))) --from;
        head.erase(from, close + 1 - from);
        at = from;
    }
    s.replace(tag, end - tag, head);
}

std::string id_prefix(const std::string& text) {
    std::uint64_t h = 1469598103934665603ull;  // FNV-1a
    for (unsigned char c : text) {
        h ^= c;
        h *= 1099511628211ull;
    }
    char buf[16];
    std::snprintf(buf, sizeof buf, "p%08x-", static_cast<unsigned>(h >> 32));
    return buf;
}

std::string inline_svg(std::string svg, const std::string& title) {
    const std::size_t start = svg.find("<svg");
    if (start == std::string::npos) throw PlotError("gnuplot wrote no SVG element");
    svg.erase(0, start);  // XML prolog, DOCTYPE, comments
    strip_namespaces(svg, 0);
    replace_all(svg, "xlink:href=", "href=");
    // gnuplot names each plotted item "gnuplot_plot_N"; in a page that name would show as a tooltip.
    for (std::size_t at = svg.find("<title>gnuplot_plot_"); at != std::string::npos; at = svg.find("<title>gnuplot_plot_", at)) {
        const std::size_t end = svg.find("</title>", at);
        if (end == std::string::npos) break;
        svg.erase(at, end + 8 - at);
    }
    replace_all(svg, "<title>Gnuplot</title>", title.empty() ? "" : "<title>" + xml_escape(title) + "</title>");
    const std::string p = id_prefix(svg);
    replace_attr(svg, "id='", "id='" + p);
    replace_attr(svg, "id=\"", "id=\"" + p);
    replace_attr(svg, "href='#", "href='#" + p);
    replace_attr(svg, "href=\"#", "href=\"#" + p);
    replace_all(svg, "url(#", "url(#" + p);
    return trim(svg) + "\n";
}

}  // namespace

// ---- public -------------------------------------------------------------------------------------------------

std::string gnuplot_program() {
    if (const char* env = std::getenv("PLATEAU_GNUPLOT_PATH"); env && *env) return env;
    const std::string configured = PLATEAU_GNUPLOT;
    if (configured.empty() || configured.ends_with("NOTFOUND")) return {};
    return configured;
}

bool gnuplot_available() {
    const std::string program = gnuplot_program();
    if (program.empty()) return false;
    if (program.find('/') != std::string::npos && ::access(program.c_str(), X_OK) != 0) return false;
    const int rc = std::system((shell_quote(program) + " --version >/dev/null 2>&1 </dev/null").c_str());
    return rc != -1 && WIFEXITED(rc) && WEXITSTATUS(rc) == 0;
}

void render_file(const Figure& f, const std::string& path) {
    const fs::path p(path);
    const std::string ext = p.extension().string();
    Format fmt;
    const std::string e = lower(ext);
    if (e == ".png") fmt = Format::png;
    else if (e == ".svg") fmt = Format::svg_file;
    else if (e == ".pdf") fmt = Format::pdf;
    else if (ext.empty())
        throw PlotError("plot file name '" + path + "' has no extension: use .png, .svg or .pdf");
    else
        throw PlotError("unsupported plot format '" + ext + "': use .png, .svg or .pdf");
    check(f);
    require_gnuplot();

    fs::path dir = p.parent_path();
    if (dir.empty()) dir = ".";
    std::error_code ec;
    if (!fs::is_directory(dir, ec))
        throw PlotError("cannot write plot '" + path + "': directory '" + dir.string() + "' does not exist");
    TempFile out(dir, p.filename().string());
    draw(f, fmt, out.path(), "'" + path + "'");
    if (std::rename(out.path().c_str(), path.c_str()) != 0)
        throw PlotError("cannot write plot '" + path + "': " + std::strerror(errno));
    out.release();
}

std::string render_svg(const Figure& f) {
    check(f);
    require_gnuplot();
    TempFile out(fs::temp_directory_path(), "figure.svg");
    draw(f, Format::svg_inline, out.path(), "the SVG figure");
    return inline_svg(read_file(out.path()), f.title);
}

}  // namespace plateau::plot
