// Validation of cohort files ([covariates] with distributions, [correlation], or [resample] from a CSV table)
// and of threshold-distribution files.
#include "input/load_cohort.hpp"

#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "input/loaders.hpp"
#include "model/model.hpp"

namespace plateau::input {

namespace detail {
namespace {

// A covariate value: a quantity string, or a height ("178 cm"). Sets the covariate's unit on first use and
// checks that later values agree with it.
std::optional<double> cov_value(Ctx& c, const Value& v, const std::string& key, population::CovariateDist& d,
                                std::optional<units::Dim>& dim) {
    if (v.kind != Kind::String && !v.is_number()) {
        wrong_kind(c, v, key, "a string", "a value with its unit, like \"70 kg\"");
        return std::nullopt;
    }
    if (d.name == regimen::kHeightName) {
        if (v.kind != Kind::String) {
            wrong_kind(c, v, key, "a string", "a height like \"170 cm\"");
            return std::nullopt;
        }
        try {
            d.unit_text = "cm";
            return parse_height(v.str);
        } catch (const TextError& e) {
            c.text_error(v, e);
            return std::nullopt;
        }
    }
    auto q = quantity(c, v, key, dim, "70 kg", true);
    if (!q) return std::nullopt;
    if (!dim) {
        dim = q->dim;
        if (v.kind == Kind::String) {
            d.unit_text = unit_part(v.str);
            try {
                d.unit_factor = units::parse_unit(d.unit_text).factor;
            } catch (const TextError&) {
            }
        }
    }
    return q->value;
}

void load_distribution(Ctx& c, const Entry& e, population::Cohort& out) {
    population::CovariateDist d;
    d.name = e.key;
    d.pos = e.key_pos;
    const std::string where = "covariate '" + e.key + "'";
    const std::string forms = "{ dist = \"normal\", mean = \"80 mL/min\", sd = \"25 mL/min\", range = [\"20 mL/min\", "
                              "\"150 mL/min\"] } (also \"log-normal\" with median and cv, \"uniform\" with range)";
    if (!is_identifier(e.key)) {
        c.error(e.key_pos, "invalid covariate name '" + e.key + "'", "letters, digits and '_'", static_cast<int>(e.key.size()));
        return;
    }
    if (e.value.kind != Kind::Table) {
        wrong_kind(c, e.value, e.key, "a table", forms);
        return;
    }
    const Value* dist = get_string(c, e.value, "dist", true, where, "dist = \"normal\", \"log-normal\" or \"uniform\"");
    if (dist == nullptr) return;
    std::vector<std::string> keys;
    if (dist->str == "normal") {
        d.dist = population::Dist::Normal;
        keys = {"dist", "mean", "sd", "range"};
    } else if (dist->str == "log-normal") {
        d.dist = population::Dist::LogNormal;
        keys = {"dist", "median", "cv", "range"};
    } else if (dist->str == "uniform") {
        d.dist = population::Dist::Uniform;
        keys = {"dist", "range"};
    } else {
        c.value_error(*dist, "unknown distribution '" + dist->str + "'", "one of: normal, log-normal, uniform");
        return;
    }
    check_keys(c, e.value, keys, where);
    bool ok = true;
    std::optional<units::Dim> dim;
    // The range first: it sets the unit for the rest.
    const Entry* range = e.value.find("range");
    if (range == nullptr) {
        c.missing(e.value, "range", where, "range = [low, high], the values a subject may have");
        ok = false;
    } else if (range->value.kind != Kind::Array || range->value.items.size() != 2) {
        c.value_error(range->value, "'range' must be an array of two values", "range = [\"40 kg\", \"150 kg\"]");
        ok = false;
    } else {
        auto lo = cov_value(c, range->value.items[0], "range", d, dim);
        auto hi = cov_value(c, range->value.items[1], "range", d, dim);
        if (!lo || !hi) ok = false;
        else if (!(*lo < *hi)) {
            c.value_error(range->value, "the low end of 'range' is not below its high end", "range = [low, high] with low < high");
            ok = false;
        } else {
            d.low = *lo;
            d.high = *hi;
        }
    }
    auto need = [&](const char* key, const std::string& example) -> const Value* {
        const Entry* x = e.value.find(key);
        if (x == nullptr) c.missing(e.value, key, where, std::string(key) + " = " + example);
        return x ? &x->value : nullptr;
    };
    if (d.dist == population::Dist::Normal) {
        const Value* mean = need("mean", "\"80 mL/min\"");
        const Value* sd = need("sd", "\"25 mL/min\"");
        const std::optional<double> m = mean ? cov_value(c, *mean, "mean", d, dim) : std::nullopt;
        const std::optional<double> so = sd ? cov_value(c, *sd, "sd", d, dim) : std::nullopt;
        const double s = so.value_or(-1.0);
        if (!m || !so) ok = false;
        else if (!(s > 0.0)) {
            c.value_error(*sd, "'sd' must be above 0", "a standard deviation above 0");
            ok = false;
        } else {
            d.mean = *m;
            d.sd = s;
        }
    } else if (d.dist == population::Dist::LogNormal) {
        const Value* median = need("median", "\"75 kg\"");
        const Value* cv = need("cv", "\"20 %\"");
        const std::optional<double> mo = median ? cov_value(c, *median, "median", d, dim) : std::nullopt;
        const double m = mo.value_or(-1.0);
        auto q = cv ? quantity(c, *cv, "cv", units::kNone, "20 %") : std::nullopt;
        if (!mo || !q) ok = false;
        else if (!(m > 0.0)) {
            c.value_error(*median, "'median' must be above 0 for a log-normal distribution", "a median above 0");
            ok = false;
        } else if (!(q->value > 0.0)) {
            c.value_error(*cv, "'cv' must be above 0 %", "a coefficient of variation like \"20 %\"");
            ok = false;
        } else {
            d.mean = m;
            d.sd = std::sqrt(std::log1p(q->value * q->value));   // σ² = ln(1 + CV²)
        }
    }
    if (ok && d.dist != population::Dist::Uniform && !(d.mean >= d.low && d.mean <= d.high)) {
        c.error(e.key_pos, "the " + std::string(d.dist == population::Dist::Normal ? "mean" : "median") + " of '" +
                               e.key + "' is outside its range", "a range around the centre of the distribution",
                static_cast<int>(e.key.size()));
        ok = false;
    }
    for (const auto& other : out.covariates)
        if (other.name == e.key) {
            c.error(e.key_pos, "covariate '" + e.key + "' is given twice", "each covariate once", static_cast<int>(e.key.size()));
            ok = false;
        }
    if (ok) out.covariates.push_back(d);
}

void load_correlation(Ctx& c, const Value& corr, population::Cohort& out) {
    const std::size_t n = out.covariates.size();
    std::vector<std::string> names = out.names();
    auto index_of = [&](const std::string& s) {
        for (std::size_t i = 0; i < n; ++i)
            if (names[i] == s) return static_cast<int>(i);
        return -1;
    };
    out.correlation.assign(n * n, 0.0);
    for (std::size_t i = 0; i < n; ++i) out.correlation[i * n + i] = 1.0;
    for (const Entry& e : corr.entries) {
        const int i = index_of(e.key);
        if (i < 0) {
            c.error(e.key_pos, "correlation of unknown covariate '" + e.key + "'", one_of(names), static_cast<int>(e.key.size()));
            continue;
        }
        if (e.value.kind != Kind::Table) {
            wrong_kind(c, e.value, e.key, "a table", e.key + " = { ht = 0.5 }");
            continue;
        }
        for (const Entry& f : e.value.entries) {
            const int j = index_of(f.key);
            if (j < 0 || j == i) {
                c.error(f.key_pos, j == i ? "a correlation of '" + f.key + "' with itself" : "correlation with unknown covariate '" + f.key + "'",
                        "another covariate: " + one_of(names), static_cast<int>(f.key.size()));
                continue;
            }
            if (!f.value.is_number() || !(std::abs(f.value.as_double()) < 1.0)) {
                c.value_error(f.value, "the correlation of '" + e.key + "' and '" + f.key + "' must be a number between -1 and 1",
                              "a number strictly between -1 and 1, like 0.5");
                continue;
            }
            const auto a = static_cast<std::size_t>(i), b = static_cast<std::size_t>(j);
            out.correlation[a * n + b] = out.correlation[b * n + a] = f.value.as_double();
        }
    }
    if (c.sink.empty() && model::cholesky(out.correlation, n).empty())
        c.error(corr.pos, "these correlations are impossible together (the matrix is not positive definite)",
                "smaller correlations, consistent with each other");
}

void load_resample(Ctx& c, const Value& t, population::Cohort& out) {
    check_keys(c, t, {"file", "units"}, "[resample]");
    const Value* file = get_string(c, t, "file", true, "[resample]", "file = \"covariates.csv\" (relative to this file)");
    const Value* units_t = get_table(c, t, "units", true, "[resample]", "units = { wt = \"kg\", crcl = \"mL/min\" }");
    if (file == nullptr || units_t == nullptr) return;
    const std::filesystem::path p = std::filesystem::path(c.doc.path).parent_path() / file->str;
    out.table_path = p.string();
    std::ifstream in(p);
    if (!in) {
        c.value_error(*file, "cannot read the covariate table '" + p.string() + "'", "a CSV file with a header line of covariate names");
        return;
    }
    std::string line;
    std::getline(in, line);
    std::vector<std::string> header;
    {
        std::stringstream ss(line);
        std::string cell;
        while (std::getline(ss, cell, ',')) {
            while (!cell.empty() && (cell.back() == '\r' || cell.back() == ' ')) cell.pop_back();
            while (!cell.empty() && cell.front() == ' ') cell.erase(cell.begin());
            header.push_back(cell);
        }
    }
    std::vector<double> factor;
    for (const auto& h : header) {
        const Entry* u = nullptr;
        for (const Entry& e : units_t->entries)
            if (e.key == h) u = &e;
        if (u == nullptr || u->value.kind != Kind::String) {
            c.value_error(*units_t, "no unit for the column '" + h + "' of " + p.string(), h + " = \"<unit>\" in units");
            return;
        }
        double f = 1.0;
        if (h == regimen::kHeightName) {
            if (u->value.str != "cm" && u->value.str != "m") {
                c.value_error(u->value, "the height's unit must be cm or m", "\"cm\"");
                return;
            }
            f = u->value.str == "m" ? 100.0 : 1.0;
        } else {
            try {
                f = units::parse_unit(u->value.str).factor;
            } catch (const TextError& err) {
                c.text_error(u->value, err);
                return;
            }
        }
        factor.push_back(f);
        out.column_factors.push_back(f);
        out.columns.push_back(h);
        out.column_units.push_back(u->value.str);
    }
    int row = 1;
    while (std::getline(in, line)) {
        ++row;
        if (line.empty() || line == "\r") continue;
        std::stringstream ss(line);
        std::string cell;
        std::vector<double> values;
        while (std::getline(ss, cell, ',')) {
            char* end = nullptr;
            const double v = std::strtod(cell.c_str(), &end);
            while (end != nullptr && (*end == ' ' || *end == '\r')) ++end;
            if (end == cell.c_str() || (end != nullptr && *end != '\0') || !std::isfinite(v)) {
                c.value_error(*file, p.string() + ":" + std::to_string(row) + ": '" + cell + "' is not a number",
                              "plain numbers in the units given in [resample] units");
                return;
            }
            values.push_back(v * factor[values.size() < factor.size() ? values.size() : 0]);
        }
        if (values.size() != header.size()) {
            c.value_error(*file, p.string() + ":" + std::to_string(row) + ": " + std::to_string(values.size()) +
                                     " values, but the header names " + std::to_string(header.size()) + " columns",
                          "one value per column");
            return;
        }
        out.rows.push_back(std::move(values));
        if (out.rows.size() > 1000000) {
            c.value_error(*file, "the covariate table has more than 1 000 000 rows", "a smaller table");
            return;
        }
    }
    if (out.rows.empty()) c.value_error(*file, "the covariate table '" + p.string() + "' has no rows", "at least one row of values");
}

}  // namespace
}  // namespace detail

population::Cohort load_cohort(const std::string& path) {
    using namespace detail;
    Document doc = read_document(path);
    DiagnosticSink sink;
    Ctx c{doc, sink};
    population::Cohort out;
    out.path = path;
    const Value& root = doc.root;
    check_keys(c, root, {"id", "about", "covariates", "correlation", "resample"}, "a cohort file");
    if (const Value* id = get_string(c, root, "id", true, "the cohort file", "id = \"<cohort name>\"")) out.id = id->str;
    if (const Value* a = get_string(c, root, "about", false, "the cohort file", "a description in a string")) out.about = a->str;
    const Value* cov = get_table(c, root, "covariates", false, "the cohort file", "[covariates] with one distribution per covariate");
    const Value* res = get_table(c, root, "resample", false, "the cohort file", "[resample] with file and units");
    if ((cov == nullptr) == (res == nullptr))
        c.error(root.pos, cov ? "a cohort has either [covariates] or [resample], not both" : "no [covariates] and no [resample] in the cohort file",
                "[covariates] (distributions) or [resample] (rows of a CSV table)");
    if (cov != nullptr)
        for (const Entry& e : cov->entries) load_distribution(c, e, out);
    if (res != nullptr) load_resample(c, *res, out);
    if (const Value* corr = get_table(c, root, "correlation", false, "the cohort file", "[correlation] with lines like wt = { ht = 0.5 }")) {
        if (res != nullptr) c.error(corr->pos, "[correlation] does not apply to resampled rows", "remove [correlation]: rows keep their own");
        else if (c.sink.empty()) load_correlation(c, *corr, out);
    }
    throw_sorted(sink, path);
    return out;
}

population::ThresholdDist load_thresholds(const std::string& path) {
    using namespace detail;
    Document doc = read_document(path);
    DiagnosticSink sink;
    Ctx c{doc, sink};
    population::ThresholdDist out;
    out.path = path;
    const Value& root = doc.root;
    check_keys(c, root, {"about", "thresholds", "counts"}, "a threshold distribution file");
    if (const Value* a = get_string(c, root, "about", false, "the file", "a description in a string")) out.about = a->str;
    const Entry* t = root.find("thresholds");
    const Entry* n = root.find("counts");
    if (t == nullptr) c.missing(root, "thresholds", "the file", "thresholds = [\"0.5 mg/L\", \"1 mg/L\", ...]");
    if (n == nullptr) c.missing(root, "counts", "the file", "counts = [12, 30, ...], one per threshold");
    if (t != nullptr && n != nullptr) {
        if (t->value.kind != Kind::Array || n->value.kind != Kind::Array || t->value.items.size() != n->value.items.size() ||
            t->value.items.empty()) {
            c.value_error(n->value, "'thresholds' and 'counts' must be arrays of the same, non-zero length", "one count per threshold");
        } else {
            std::optional<units::Dim> dim;
            for (std::size_t k = 0; k < t->value.items.size(); ++k) {
                auto q = quantity(c, t->value.items[k], "thresholds", dim, "1 mg/L");
                if (q && !(q->value > 0.0)) {
                    c.value_error(t->value.items[k], "a threshold must be above 0", "a threshold like \"1 mg/L\"");
                    q.reset();
                }
                if (q && !dim) dim = out.dim = q->dim;
                const Value& w = n->value.items[k];
                if (!w.is_number() || !(w.as_double() >= 0.0)) {
                    c.value_error(w, "a count must be a number of 0 or more", "a count or a fraction, like 12");
                    continue;
                }
                if (q) {
                    out.thresholds.push_back(q->value);
                    out.weights.push_back(w.as_double());
                }
            }
        }
    }
    throw_sorted(sink, path);
    return out;
}

}  // namespace plateau::input
