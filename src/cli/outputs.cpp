#include "cli/outputs.hpp"

#include <atomic>
#include <cctype>
#include <cerrno>
#include <cstring>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include "cli/commands.hpp"
#include "cli/support.hpp"
#include "plot/plot.hpp"
#include "report/html.hpp"
#include "report/compare_model.hpp"
#include "report/json.hpp"
#include "report/run_model.hpp"

namespace plateau::cli {

namespace fs = std::filesystem;

namespace {

std::string lower_extension(const std::string& path) {
    std::string ext = fs::path(path).extension().string();
    for (char& ch : ext) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
    return ext;
}

// What an existing path is, in words, when it is not a regular file ("" if it is one or does not exist).
std::string not_regular(const std::string& path) {
    struct stat st{};
    if (::stat(path.c_str(), &st) != 0) {
        struct stat link{};
        if (::lstat(path.c_str(), &link) == 0) return "a link to a missing file";
        return "";
    }
    if (S_ISREG(st.st_mode)) return "";
    if (S_ISDIR(st.st_mode)) return "a folder";
    if (S_ISFIFO(st.st_mode)) return "a named pipe";
    if (S_ISCHR(st.st_mode) || S_ISBLK(st.st_mode)) return "a device";
    if (S_ISSOCK(st.st_mode)) return "a socket";
    return "not a regular file";
}

// True if both name one existing file (same device and inode, links followed), or, when either does not exist
// yet, if their absolute, normalised paths are equal.
bool same_file(const std::string& a, const std::string& b) {
    struct stat sa{}, sb{};
    const bool ea = ::stat(a.c_str(), &sa) == 0, eb = ::stat(b.c_str(), &sb) == 0;
    if (ea && eb) return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
    std::error_code e1, e2;
    const fs::path ca = fs::weakly_canonical(a, e1), cb = fs::weakly_canonical(b, e2);
    return !e1 && !e2 && ca == cb;
}

// Bytes a finished file of this format starts and ends with: a file gnuplot left half-written fails this.
bool complete_figure(const std::string& path, const std::string& ext) {
    std::ifstream f(path, std::ios::binary);
    const std::string data((std::istreambuf_iterator<char>(f)), std::istreambuf_iterator<char>());
    auto starts = [&](std::string_view s) { return data.compare(0, s.size(), s) == 0; };
    auto ends_with_within = [&](std::string_view s, std::size_t tail) {
        const std::size_t from = data.size() > tail ? data.size() - tail : 0;
        return data.find(s, from) != std::string::npos;
    };
    if (ext == ".png") return starts("\x89PNG\r\n\x1a\n") && ends_with_within(std::string_view("IEND\xAE\x42\x60\x82", 8), 8);
    if (ext == ".pdf") return starts("%PDF-") && ends_with_within("%%EOF", 32);
    if (ext == ".svg") {
        const std::size_t first = data.find_first_not_of(" \t\r\n");
        return first != std::string::npos && (data.compare(first, 5, "<?xml") == 0 || data.compare(first, 4, "<svg") == 0) &&
               ends_with_within("</svg>", 64);
    }
    return false;
}

// One command's output files, all or nothing: each is written to a fresh temporary file created exclusively
// (O_EXCL: never an existing file or a planted link) in its target's folder, so the final rename stays on one
// file system; commit() renames them all once every one is written and checked. Whatever is not committed is
// removed when this goes out of scope.
class Staging {
public:
    Staging() = default;
    Staging(const Staging&) = delete;
    Staging& operator=(const Staging&) = delete;
    ~Staging() {
        for (const Item& it : items_)
            if (!it.temp.empty()) ::unlink(it.temp.c_str());
    }

    // A new, empty temporary file beside `target`; returns its path.
    std::string create(const std::string& target, std::string_view what, std::string line) {
        static std::atomic<unsigned> counter{0};
        fs::path dir = fs::path(target).parent_path();
        if (dir.empty()) dir = ".";
        // The target's name comes last so the extension (which chooses the plot format) is kept.
        for (int attempt = 0; attempt < 100; ++attempt) {
            const std::string name = ".plateau-" + std::to_string(::getpid()) + "-" + std::to_string(counter++) + "-" +
                                     fs::path(target).filename().string();
            const std::string p = (dir / name).string();
            const int fd = ::open(p.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC | O_NOFOLLOW, 0666);
            if (fd >= 0) {
                ::close(fd);
                items_.push_back({target, p, std::string(what), std::move(line)});
                return items_.back().temp;
            }
            if (errno != EEXIST) fail(target, what, std::strerror(errno));
        }
        fail(target, what, "no free temporary name in its folder");
    }

    // Writes `text` to a new temporary file for `target`; a short write (a full disk) is an error.
    void add_text(const std::string& target, const std::string& text, std::string_view what, std::string line) {
        const std::string temp = create(target, what, std::move(line));
        const int fd = ::open(temp.c_str(), O_WRONLY | O_TRUNC | O_CLOEXEC | O_NOFOLLOW);
        if (fd < 0) fail(target, what, std::strerror(errno));
        std::size_t done = 0;
        while (done < text.size()) {
            const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
            if (n < 0 && errno == EINTR) continue;
            if (n <= 0) {
                const int e = n < 0 ? errno : ENOSPC;
                ::close(fd);
                fail(target, what, std::strerror(e));
            }
            done += static_cast<std::size_t>(n);
        }
        if (::close(fd) != 0) fail(target, what, std::strerror(errno));
    }

    // Renames every temporary file onto its target, then reports each one.
    void commit(std::ostream& summary) {
        // Checked once more just before: a target that became a folder, a pipe or a device meanwhile is refused
        // while nothing has been replaced yet.
        for (const Item& it : items_)
            if (const std::string what = not_regular(it.target); !what.empty())
                fail(it.target, it.what, "it is " + what + "; give a regular file name, or '-' for standard output");
        for (Item& it : items_) {
            if (std::rename(it.temp.c_str(), it.target.c_str()) != 0) fail(it.target, it.what, std::strerror(errno));
            it.temp.clear();
        }
        for (const Item& it : items_)
            if (!it.line.empty()) summary << it.line << '\n';
    }

private:
    struct Item {
        std::string target, temp, what, line;
    };

    [[noreturn]] static void fail(const std::string& target, std::string_view what, const std::string& why) {
        throw UsageError(std::string(what) + ": cannot write " + cli::quoted(target) + ": " + why);
    }

    std::vector<Item> items_;
};

}  // namespace

std::string today() {
    const std::time_t now = std::time(nullptr);
    std::tm tm{};
    gmtime_r(&now, &tm);
    char buf[16];
    std::strftime(buf, sizeof buf, "%Y-%m-%d", &tm);
    return buf;
}

void write_all(const std::vector<ExtraFile>& texts, const FigureFile& figure, std::ostream& summary) {
    Staging staging;
    for (const auto& f : texts) staging.add_text(f.path, f.text, f.what, f.line);
    if (!figure.path.empty()) {
        const std::string temp = staging.create(figure.path, "--plot", figure.line);
        figure.draw(temp);
        if (!complete_figure(temp, lower_extension(figure.path)))
            throw plot::PlotError("gnuplot did not write a complete " + lower_extension(figure.path).substr(1) +
                                  " file for " + cli::quoted(figure.path) + " (is the disk full?)");
    }
    staging.commit(summary);
}

void write_file(const std::string& path, const std::string& text, std::string_view what) {
    Staging s;
    s.add_text(path, text, what, "");
    std::ostringstream none;
    s.commit(none);
}

void check_outputs(const std::string& json, const std::string& report_path, const std::string& plot_path,
                   const std::vector<std::string>& inputs, const std::string& csv) {
    if (!plot_path.empty()) {
        const std::string ext = lower_extension(plot_path);
        if (ext.empty())
            throw UsageError("--plot: " + cli::quoted(plot_path) + " has no extension: use a file ending in .png, .svg or .pdf");
        if (ext != ".png" && ext != ".svg" && ext != ".pdf")
            throw UsageError("--plot: unsupported format " + cli::quoted(ext) + ": use a file ending in .png, .svg or .pdf");
        if (!plot::gnuplot_available())
            throw UsageError("--plot: gnuplot was not found: install gnuplot-nox (apt-get install gnuplot-nox) to draw plots");
    }
    const std::pair<const std::string*, const char*> files[] = {
        {&json, "--json"}, {&report_path, "--report"}, {&plot_path, "--plot"}, {&csv, "--csv"}};
    for (std::size_t i = 0; i < std::size(files); ++i) {
        const auto& [path, what] = files[i];
        if (path->empty() || *path == "-") continue;
        for (const auto& in : inputs)
            if (same_file(*path, in))
                throw UsageError(std::string(what) + ": " + cli::quoted(*path) + " is an input file; it would be overwritten");
        for (std::size_t j = 0; j < i; ++j)
            if (!files[j].first->empty() && *files[j].first != "-" && same_file(*path, *files[j].first))
                throw UsageError(std::string(what) + " and " + files[j].second + " name the same file " + cli::quoted(*path));
        const fs::path dir = fs::path(*path).parent_path();
        std::error_code ec;
        if (!dir.empty() && !fs::is_directory(dir, ec))
            throw UsageError(std::string(what) + ": cannot write " + cli::quoted(*path) + ": the folder " +
                             cli::quoted(dir.string()) + " does not exist");
        if (const std::string kind = not_regular(*path); !kind.empty())
            throw UsageError(std::string(what) + ": cannot write " + cli::quoted(*path) + ": it is " + kind +
                             "; give a regular file name, or '-' for standard output");
    }
    if (!report_path.empty()) {
        const std::string ext = lower_extension(report_path);
        if (ext != ".html" && ext != ".htm")
            throw UsageError("--report: " + cli::quoted(report_path) + " is not an .html file: use a file ending in .html or .htm");
    }
}

void write_outputs(const std::vector<report::Candidate>& cs, const std::string& json, const std::string& report_path,
                   const std::string& plot_path, double tol, std::ostream& summary, std::ostream& out, bool single,
                   const std::string& date, const std::vector<ExtraFile>& extra) {
    Staging staging;
    for (const ExtraFile& f : extra) staging.add_text(f.path, f.text, f.what, f.line);
    std::string json_text;
    if (!json.empty()) {
        std::ostringstream js;
        report::write_json(js, single ? report::run_model(cs.front().regimen, cs.front().sim, cs.front().exposure, tol)
                                      : report::compare_model(cs, tol));
        js << '\n';
        json_text = js.str();
        if (json != "-") staging.add_text(json, json_text, "--json", "JSON      written to " + json);
    }
    if (!report_path.empty()) {
        std::ostringstream html;
        report::HtmlOptions ho;
        ho.tolerance = tol;
        ho.date = date.empty() ? today() : date;
        ho.figures = plot::gnuplot_available();
        report::write_html(html, cs, ho);
        staging.add_text(report_path, html.str(), "--report",
                         "Report    written to " + report_path +
                             (ho.figures ? "" : " (without figures: gnuplot was not found; apt-get install gnuplot-nox)"));
    }
    if (!plot_path.empty()) {
        // gnuplot draws into its own temporary file and renames it onto ours; what it left is checked before
        // anything is said to be written.
        const std::string temp = staging.create(plot_path, "--plot", "Plot      written to " + plot_path);
        plot::render_file(report::overlay_figure(cs), temp);
        if (!complete_figure(temp, lower_extension(plot_path)))
            throw plot::PlotError("gnuplot did not write a complete " + lower_extension(plot_path).substr(1) + " file for " +
                                  cli::quoted(plot_path) + " (is the disk full?)");
    }
    staging.commit(summary);
    if (json == "-") out << json_text;
}

}  // namespace plateau::cli
