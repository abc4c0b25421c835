// Finding model files: the model a regimen names, the model directories, listing them.
#include "input/load.hpp"

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <set>

#include "input/loaders.hpp"

namespace plateau::input {

namespace fs = std::filesystem;

namespace {

bool ends_with(const std::string& s, const std::string& tail) {
    return s.size() >= tail.size() && s.compare(s.size() - tail.size(), tail.size(), tail) == 0;
}

bool is_file(const fs::path& p) {
    std::error_code ec;
    return fs::is_regular_file(p, ec);
}

// *.toml files of a directory, sorted by name; none if it does not exist.
std::vector<fs::path> toml_files(const std::string& dir) {
    std::vector<fs::path> out;
    std::error_code ec;
    if (!fs::is_directory(dir, ec)) return out;
    for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec))
        if (it->path().extension() == ".toml" && is_file(it->path())) out.push_back(it->path());
    std::sort(out.begin(), out.end());
    return out;
}

// Ids of the model files in the directories (file names without .toml), leaving out regimen files kept there.
std::vector<std::string> model_ids(const std::vector<std::string>& model_dirs) {
    std::set<std::string> ids;
    for (const auto& d : model_dirs)
        for (const auto& f : toml_files(d)) {
            try {
                if (file_kind(f.string()) == "regimen") continue;
            } catch (const InputError&) {
                // A file that does not parse may still be a model meant to be there.
            }
            ids.insert(f.stem().string());
        }
    return {ids.begin(), ids.end()};
}

}  // namespace

namespace detail {

bool resolve_model(Ctx& c, const Value& ref, const std::vector<std::string>& model_dirs, model::Model& out) {
    const std::string& name = ref.str;
    if (name.empty()) {
        c.value_error(ref, "the model name is empty", "a model id, or a path to a .toml file relative to this regimen");
        return false;
    }
    const bool path_like = ends_with(name, ".toml") || name.find('/') != std::string::npos;
    // Only model files are read: a path is refused unless it (and what a link points to) ends in .toml, so a
    // regimen cannot make plateau read, and echo in a message, any other file (model = "/proc/self/environ").
    if (path_like && !ends_with(name, ".toml")) {
        c.value_error(ref, "the model path '" + name + "' does not name a .toml file",
                      "a model id, or a path to a .toml file relative to this regimen");
        return false;
    }
    std::vector<fs::path> candidates;
    if (path_like) {
        fs::path p(name);
        if (p.is_absolute()) {
            candidates.push_back(p);
        } else {
            candidates.push_back((fs::path(c.doc.path).parent_path() / p).lexically_normal());
            for (const auto& d : model_dirs) candidates.push_back((fs::path(d) / p).lexically_normal());
        }
    } else {
        for (const auto& d : model_dirs) candidates.push_back(fs::path(d) / (name + ".toml"));
    }
    for (const auto& cand : candidates) {
        if (!is_file(cand)) continue;
        std::error_code ec;
        if (fs::canonical(cand, ec).extension() != ".toml" || ec) {
            c.value_error(ref, "the model file '" + name + "' (" + cand.string() + ") links to a file that is not a .toml file",
                          "a model file ending in .toml");
            return false;
        }
        try {
            out = load_model(cand.string());
            return true;
        } catch (const InputError& e) {
            // The model's own errors are shown with its source lines only if the file is a model at all;
            // otherwise one line here says what it is, and nothing of its content is echoed.
            std::string kind, parse_problem;
            try {
                kind = file_kind(cand.string());
            } catch (const InputError& bad) {
                const Diagnostic& d = bad.diagnostics().front();
                parse_problem = d.message + " at line " + std::to_string(d.pos.line) + ", column " + std::to_string(d.pos.col);
            }
            if (kind != "model") {
                c.value_error(ref, "'" + name + "' (" + cand.string() + ") is not a model file: " +
                                       (parse_problem.empty() ? std::string("it has no [compartments]") : parse_problem),
                              "a model file with [parameters], [compartments], [rates], [outputs] and [routes]");
                return false;
            }
            for (const auto& d : e.diagnostics()) c.sink.add(d);
            c.value_error(ref, "the model '" + name + "' (" + cand.string() + ") has errors", "a model file without errors");
            return false;
        }
    }
    if (path_like) {
        std::vector<std::string> looked;
        for (const auto& cand : candidates) looked.push_back(cand.string());
        c.value_error(ref, "cannot find the model file '" + name + "'", "a model file at " + join(looked));
        return false;
    }
    const std::vector<std::string> ids = model_ids(model_dirs);
    const std::string paths = "a path to a .toml file relative to this regimen";
    c.value_error(ref, "unknown model '" + name + "'" + did_you_mean(name, ids),
                  ids.empty() ? "a model id, or " + paths : one_of(ids) + "; or " + paths);
    return false;
}

}  // namespace detail

std::vector<std::string> default_model_dirs() {
    // The built-in models first, then PLATEAU_MODELS; the command line's --models come before both (a folder
    // named for this one run is what the user means).
    std::vector<std::string> dirs{std::string(PLATEAU_SOURCE_DIR) + "/models"};
    if (const char* env = std::getenv("PLATEAU_MODELS")) {
        std::string s(env);
        std::size_t start = 0;
        while (start <= s.size()) {
            std::size_t colon = s.find(':', start);
            if (colon == std::string::npos) colon = s.size();
            if (colon > start) dirs.push_back(s.substr(start, colon - start));
            start = colon + 1;
        }
    }
    return dirs;
}

std::string file_kind(const std::string& path) {
    Document doc = read_document(path);
    if (doc.root.find("compartments") != nullptr) return "model";
    if (doc.root.find("doses") != nullptr || doc.root.find("model") != nullptr) return "regimen";
    if (doc.root.find("covariates") != nullptr || doc.root.find("resample") != nullptr) return "cohort";
    if (doc.root.find("thresholds") != nullptr) return "thresholds";
    return "";
}

void check_model_file_name(const std::string& path, const model::Model& m) {
    const std::string stem = fs::path(path).stem().string();
    if (m.id == stem) return;
    const Document doc = read_document(path);
    const Entry* id = doc.root.find("id");
    const SourcePos pos = id != nullptr ? string_pos(doc, id->value, 0) : doc.root.pos;
    throw InputError({Diagnostic(pos,
                                 "the model id '" + m.id + "' differs from the file name '" +
                                     fs::path(path).filename().string() + "'; a model is found by its file name",
                                 "id = \"" + stem + "\", or the file renamed to " + m.id + ".toml",
                                 std::max(1, static_cast<int>(m.id.size())))});
}

std::vector<model::Model> list_models(const std::vector<std::string>& model_dirs, std::string* problems,
                                      std::vector<std::pair<std::string, std::string>>* hidden) {
    std::vector<model::Model> out;
    std::set<std::string> seen;
    for (const auto& d : model_dirs) {
        for (const auto& f : toml_files(d)) {
            try {
                // A regimen kept beside its models is not a broken model.
                if (file_kind(f.string()) == "regimen") continue;
                model::Model m = load_model(f.string());
                if (seen.insert(m.id).second) out.push_back(std::move(m));
                else if (hidden != nullptr) hidden->emplace_back(m.id, f.string());
            } catch (const InputError& e) {
                if (problems != nullptr) *problems += format_diagnostics(e.diagnostics());
            }
        }
    }
    return out;
}

}  // namespace plateau::input
