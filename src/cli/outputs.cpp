#include "cli/outputs.hpp"

#include <cctype>
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

void check_outputs(const std::string& json, const std::string& report_path, const std::string& plot_path,
                   const std::vector<std::string>& inputs, const std::string& csv) {
    if (!plot_path.empty()) {
        std::string ext = std::filesystem::path(plot_path).extension().string();
        for (char& ch : ext) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
        if (ext.empty())
            throw UsageError("--plot: " + cli::quoted(plot_path) + " has no extension: use a file ending in .png, .svg or .pdf");
        if (ext != ".png" && ext != ".svg" && ext != ".pdf")
            throw UsageError("--plot: unsupported format " + cli::quoted(ext) + ": use a file ending in .png, .svg or .pdf");
        if (!plot::gnuplot_available())
            throw UsageError("--plot: gnuplot was not found: install gnuplot-nox (apt-get install gnuplot-nox) to draw plots");
    }
    const std::pair<const std::string*, const char*> files[] = {
        {&json, "--json"}, {&report_path, "--report"}, {&plot_path, "--plot"}, {&csv, "--csv"}};
    auto same = [](const std::string& a, const std::string& b) {
        std::error_code e1, e2;
        return std::filesystem::weakly_canonical(a, e1) == std::filesystem::weakly_canonical(b, e2) && !e1 && !e2;
    };
    for (std::size_t i = 0; i < std::size(files); ++i) {
        const auto& [path, what] = files[i];
        if (path->empty() || *path == "-") continue;
        for (const auto& in : inputs)
            if (same(*path, in))
                throw UsageError(std::string(what) + ": " + cli::quoted(*path) + " is an input file; it would be overwritten");
        for (std::size_t j = 0; j < i; ++j)
            if (!files[j].first->empty() && *files[j].first != "-" && same(*path, *files[j].first))
                throw UsageError(std::string(what) + " and " + files[j].second + " name the same file " + cli::quoted(*path));
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
