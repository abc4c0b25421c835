#include "cli/outputs.hpp"

#include <ctime>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli/commands.hpp"
#include "cli/support.hpp"
#include "plot/plot.hpp"
#include "report/caution.hpp"
#include "report/html.hpp"
#include "report/json.hpp"

namespace plateau::cli {

std::string today() {
    const std::time_t now = std::time(nullptr);
    std::tm tm{};
    gmtime_r(&now, &tm);
    char buf[16];
    std::strftime(buf, sizeof buf, "%Y-%m-%d", &tm);
    return buf;
}

namespace {

// Writes `text` to `path` through a temporary file, so a failure leaves no half-written file behind.
void write_file(const std::string& path, const std::string& text, std::string_view what) {
    const std::string tmp = path + ".part";
    {
        std::ofstream f(tmp, std::ios::binary | std::ios::trunc);
        if (!f) throw UsageError(std::string(what) + ": cannot write " + cli::quoted(path));
        f << text;
        f.flush();
        if (!f) throw UsageError(std::string(what) + ": writing " + cli::quoted(path) + " failed");
    }
    std::error_code ec;
    std::filesystem::rename(tmp, path, ec);
    if (ec) throw UsageError(std::string(what) + ": cannot write " + cli::quoted(path) + ": " + ec.message());
}

}  // namespace

void check_outputs(const std::string& json, const std::string& report_path, const std::string& plot_path) {
    if (!plot_path.empty()) {
        const std::string ext = std::filesystem::path(plot_path).extension().string();
        if (ext != ".png" && ext != ".svg" && ext != ".pdf")
            throw UsageError("--plot: unsupported format " + cli::quoted(ext.empty() ? plot_path : ext) +
                             ": use a file ending in .png, .svg or .pdf");
    }
    const std::pair<const std::string*, const char*> files[] = {
        {&json, "--json"}, {&report_path, "--report"}, {&plot_path, "--plot"}};
    for (const auto& [path, what] : files) {
        if (path->empty() || *path == "-") continue;
        const std::filesystem::path dir = std::filesystem::path(*path).parent_path();
        std::error_code ec;
        if (!dir.empty() && !std::filesystem::is_directory(dir, ec))
            throw UsageError(std::string(what) + ": cannot write " + cli::quoted(*path) + ": the folder " +
                             cli::quoted(dir.string()) + " does not exist");
        if (std::filesystem::is_directory(*path, ec))
            throw UsageError(std::string(what) + ": cannot write " + cli::quoted(*path) + ": it is a folder");
    }
}

void write_outputs(const std::vector<report::Candidate>& cs, const std::string& json, const std::string& report_path,
                   const std::string& plot_path, double tol, std::ostream& summary, std::ostream& out, bool single,
                   const std::string& date) {
    check_outputs(json, report_path, plot_path);
    if (!json.empty()) {
        std::ostringstream js;
        report::JsonContext ctx;
        ctx.tolerance = tol;
        if (single) {
            report::write_exposure_json(js, cs.front().regimen, cs.front().sim, cs.front().exposure, ctx);
        } else {
            js << "{\n  \"regimens\": [\n";
            for (std::size_t i = 0; i < cs.size(); ++i) {
                js << "    ";
                report::write_exposure_json(js, cs[i].regimen, cs[i].sim, cs[i].exposure, ctx, 2);
                js << (i + 1 < cs.size() ? ",\n" : "\n");
            }
            js << "  ],\n  \"caution\": \"" << report::kCaution << "\"\n}";
        }
        js << '\n';
        if (json == "-") out << js.str();
        else {
            write_file(json, js.str(), "--json");
            summary << "JSON      written to " << json << '\n';
        }
    }
    if (!report_path.empty()) {
        std::ostringstream html;
        report::HtmlOptions ho;
        ho.tolerance = tol;
        ho.date = date.empty() ? today() : date;
        ho.figures = plot::gnuplot_available();
        report::write_html(html, cs, ho);
        write_file(report_path, html.str(), "--report");
        summary << "Report    written to " << report_path
                << (ho.figures ? "" : " (without figures: gnuplot was not found; apt-get install gnuplot-nox)") << '\n';
    }
    if (!plot_path.empty()) {
        plot::render_file(report::overlay_figure(cs), plot_path);
        summary << "Plot      written to " << plot_path << '\n';
    }
}

}  // namespace plateau::cli
