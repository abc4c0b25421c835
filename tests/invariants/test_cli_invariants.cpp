// An end-to-end invariant fuzzer: random regimens of the built-in models, and random mutations of regimen and
// model files, run through the real executable (under `timeout`, fixed seed, a fixed number of cases). Whatever
// the input, the program ends by itself with exit code 0, 1 or 2 (no signal, no hang, no internal error). When it
// succeeds: every number it writes is finite, no compartment amount is negative, mass balances on the linear
// models (amount in the body + clearance x AUC = amount delivered so far), and the value at a bolus time is the
// one just after the dose (the documented convention). Tolerances: "common practice, no source".
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "../cli/cli_support.hpp"
#include "../report/json_mini.hpp"
#include "../support/temp_dir.hpp"

namespace {

namespace fs = std::filesystem;
using plateau::test::TempDir;

constexpr std::uint64_t kSeed = 20261202;
constexpr int kGeneratedCases = 60;
constexpr int kMutatedCases = 60;
constexpr int kTimeoutSeconds = 120;  // far above any case here; only a hang reaches it

// Portable draws from the raw 64-bit engine output (the std distributions differ between libraries).
struct Rng {
    std::mt19937_64 g{kSeed};
    double u() { return static_cast<double>(g() >> 11) * 0x1p-53; }
    double uniform(double lo, double hi) { return lo + (hi - lo) * u(); }
    double log_uniform(double lo, double hi) { return lo * std::pow(hi / lo, u()); }
    int pick(int n) { return static_cast<int>(g() % static_cast<std::uint64_t>(n)); }
    bool coin(double p) { return u() < p; }
};

std::string num(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

std::string slurp(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    return std::string((std::istreambuf_iterator<char>(f)), std::istreambuf_iterator<char>());
}

struct Outcome {
    int code = -1;  // exit code; 124 or 128+signal from timeout(1) when it hung or died
    std::string out, err;
};

// Runs the executable in `dir` with `args` under timeout(1).
Outcome run(const TempDir& dir, const std::string& args) {
    const std::string out = dir.file("stdout"), err = dir.file("stderr");
    const std::string cmd = "cd '" + dir.path.string() + "' && timeout -s KILL " + std::to_string(kTimeoutSeconds) +
                            " '" + PLATEAU_BINARY + "' " + args + " >'" + out + "' 2>'" + err + "'";
    const int status = std::system(cmd.c_str());
    Outcome o;
    o.code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + (WIFSIGNALED(status) ? WTERMSIG(status) : 0);
    o.out = slurp(out);
    o.err = slurp(err);
    return o;
}

// Every number in the JSON document is finite (the writer prints null for an absent figure).
bool all_finite(const plateau::jsonmini::Value& v) {
    using K = plateau::jsonmini::Value::Kind;
    if (v.kind == K::number) return std::isfinite(v.n);
    for (const auto& i : v.items)
        if (!all_finite(i)) return false;
    for (const auto& m : v.keys)
        if (!all_finite(m.value)) return false;
    return true;
}

// ---- generated regimens ----

struct Dose {
    bool oral = false;
    double amount = 0, at = 0, every = 0, over = 0;  // over 0: bolus
    int count = 1;
    bool as_rate = false;
};

struct Case {
    std::string model;
    std::vector<std::pair<std::string, std::string>> overrides;  // name -> quantity text
    std::vector<Dose> doses;
    double cl = 0, f = 1, tlag = 0;  // for the mass balance
    std::vector<std::string> amounts;  // CSV amount columns whose sum is the amount in the body
    bool linear = false;
    double until = 0;
};

Case generate(Rng& rng) {
    Case c;
    switch (rng.pick(4)) {
        case 0:
            c.model = "one-compartment-iv";
            c.cl = 5 * rng.log_uniform(0.05, 20);
            c.overrides = {{"cl", num(c.cl) + " L/h"}, {"v", num(40 * rng.log_uniform(0.1, 10)) + " L"}};
            c.amounts = {"central_mg"};
            c.linear = true;
            break;
        case 1:
            c.model = "two-compartment-iv";
            c.cl = 5 * rng.log_uniform(0.05, 20);
            c.overrides = {{"cl", num(c.cl) + " L/h"},
                           {"v1", num(15 * rng.log_uniform(0.1, 10)) + " L"},
                           {"q", num(8 * rng.log_uniform(0.05, 20)) + " L/h"},
                           {"v2", num(30 * rng.log_uniform(0.1, 10)) + " L"}};
            c.amounts = {"central_mg", "peripheral_mg"};
            c.linear = true;
            break;
        case 2:
            c.model = "one-compartment-oral";
            c.cl = 5 * rng.log_uniform(0.05, 20);
            c.f = rng.uniform(0.05, 1.0);
            c.tlag = rng.coin(0.5) ? 0.0 : rng.uniform(0.0, 3.0);
            c.overrides = {{"cl", num(c.cl) + " L/h"},
                           {"v", num(40 * rng.log_uniform(0.1, 10)) + " L"},
                           {"ka", num(1.2 * rng.log_uniform(0.05, 20)) + " 1/h"},
                           {"f", num(c.f)},
                           {"tlag", num(c.tlag) + " h"}};
            c.amounts = {"gut_mg", "central_mg"};
            c.linear = true;
            break;
        default:
            // Saturable elimination, from near zero order (km 1e-12 mg/L: the amount reaches zero inside a step,
            // which the engine lands on) to nearly linear.
            c.model = "one-compartment-mm-iv";
            c.overrides = {{"vmax", num(20 * rng.log_uniform(0.05, 20)) + " mg/h"},
                           {"km", num(rng.log_uniform(1e-12, 100)) + " mg/L"},
                           {"v", num(40 * rng.log_uniform(0.1, 10)) + " L"}};
            c.amounts = {"central_mg"};
            break;
    }
    const int entries = 1 + rng.pick(3);
    const double intervals[] = {4, 6, 8, 12, 24};
    double last_end = 0;
    for (int i = 0; i < entries; ++i) {
        Dose d;
        d.oral = c.model == "one-compartment-oral" && rng.coin(0.6);
        d.amount = rng.log_uniform(0.1, 1e4);
        d.at = std::round(rng.uniform(0, 48) * 4) / 4;
        d.count = 1 + rng.pick(8);
        d.every = d.count > 1 ? intervals[rng.pick(5)] : 0;
        const double kind = rng.u();
        if (kind > 0.5) {
            d.over = rng.log_uniform(0.05, 10);
            d.as_rate = kind > 0.8;
        }
        c.doses.push_back(d);
        last_end = std::max(last_end, d.at + (d.count - 1) * d.every + d.over + (d.oral ? c.tlag : 0.0));
    }
    c.until = std::ceil(last_end + rng.uniform(1, 72));
    return c;
}

std::string regimen_text(const Case& c) {
    std::ostringstream s;
    s << "id = \"invariant-case\"\nmodel = \"" << c.model << "\"\n\n[parameters]\n";
    for (const auto& [k, v] : c.overrides) s << k << " = \"" << v << "\"\n";
    for (const Dose& d : c.doses) {
        s << "\n[[doses]]\nroute = \"" << (d.oral ? "oral" : "iv") << "\"\namount = \"" << num(d.amount)
          << " mg\"\nat = \"" << num(d.at) << " h\"\n";
        if (d.count > 1) s << "every = \"" << num(d.every) << " h\"\ncount = " << d.count << "\n";
        if (d.over > 0) {
            if (d.as_rate) s << "rate = \"" << num(d.amount / d.over) << " mg/h\"\n";
            else s << "over = \"" << num(d.over) << " h\"\n";
        }
    }
    s << "\n[targets]\noutput = \"conc\"\n\n[horizon]\nuntil = \"" << num(c.until) << " h\"\n";
    return s.str();
}

// Amount that has entered the body by time T (an oral dose enters f of its amount, tlag later).
double delivered(const Case& c, double T) {
    double total = 0;
    for (const Dose& d : c.doses)
        for (int k = 0; k < d.count; ++k) {
            const double start = d.at + k * d.every + (d.oral ? c.tlag : 0.0);
            const double share = d.over > 0 ? std::clamp((T - start) / d.over, 0.0, 1.0) : (start <= T ? 1.0 : 0.0);
            total += (d.oral ? c.f : 1.0) * d.amount * share;
        }
    return total;
}

struct Table {
    std::vector<std::string> head;
    std::vector<std::vector<double>> rows;
    int column(const std::string& name) const {
        const auto it = std::find(head.begin(), head.end(), name);
        return it == head.end() ? -1 : static_cast<int>(it - head.begin());
    }
};

// Parses the CSV; false if a cell is not a finite number.
bool read_csv(const std::string& text, Table& t) {
    const auto rows = plateau::clitest::parse_csv(text);
    if (rows.empty()) return false;
    t.head = rows.front();
    for (std::size_t i = 1; i < rows.size(); ++i) {
        std::vector<double> r;
        for (const auto& cell : rows[i]) {
            char* end = nullptr;
            const double v = std::strtod(cell.c_str(), &end);
            if (end == cell.c_str() || *end != '\0' || !std::isfinite(v)) return false;
            r.push_back(v);
        }
        t.rows.push_back(r);
    }
    return true;
}

// ---- mutations ----

std::string mutate(Rng& rng, std::string text) {
    static const char* const tokens[] = {"1e308",    "5e-324", "-1",      "0",        "1e-300", "99999999999",
                                         "nan",      "inf",    "\"",      "[",        "]]",     "(((",
                                         "^1000",    "\n[[doses]]\n", "count = 1000\n", "\xCE\xBC", "=",
                                         "until = \"3650 d\"\n", "tlag = \"1e300 h\"\n", "km = \"1e-11 mg/L\"\n"};
    const int steps = 1 + rng.pick(3);
    for (int s = 0; s < steps && !text.empty(); ++s) {
        const std::size_t at = static_cast<std::size_t>(rng.pick(static_cast<int>(text.size())));
        switch (rng.pick(5)) {
            case 0: text.erase(at, 1 + static_cast<std::size_t>(rng.pick(8))); break;
            case 1: text.insert(at, tokens[rng.pick(static_cast<int>(std::size(tokens)))]); break;
            case 2: {  // replace the number that starts at or after `at`
                const std::size_t b = text.find_first_of("0123456789", at);
                if (b == std::string::npos) break;
                const std::size_t e = text.find_first_not_of("0123456789.e-", b);
                text.replace(b, (e == std::string::npos ? text.size() : e) - b, tokens[rng.pick(8)]);
                break;
            }
            case 3: {  // duplicate a line
                const std::size_t b = text.rfind('\n', at), e = text.find('\n', at);
                const std::size_t from = b == std::string::npos ? 0 : b + 1;
                const std::string line = text.substr(from, (e == std::string::npos ? text.size() : e) - from);
                text.insert(from, line + "\n");
                break;
            }
            default: text.resize(at); break;
        }
    }
    return text;
}

}  // namespace

TEST_CASE("invariants: random regimens through the executable keep exit codes, finiteness, signs and mass",
          "[invariants]") {
    Rng rng;
    TempDir dir("invariants");
    int ran = 0;
    for (int i = 0; i < kGeneratedCases; ++i) {
        const Case c = generate(rng);
        const std::string text = regimen_text(c);
        dir.write("r.toml", text);
        // CSV times: the start, the end, every bolus time and just before it, and a grid.
        std::vector<double> times{0.0, c.until};
        for (int k = 1; k < 40; ++k) times.push_back(c.until * k / 40.0);
        for (const Dose& d : c.doses)
            for (int k = 0; k < d.count && d.over == 0 && !d.oral; ++k) {
                const double t = d.at + k * d.every;
                times.push_back(t);
                if (t > 1e-6) times.push_back(t - 1e-6);
            }
        std::sort(times.begin(), times.end());
        times.erase(std::unique(times.begin(), times.end()), times.end());
        std::string list;
        for (double t : times) list += (list.empty() ? "" : ",") + num(t);
        const std::string tol = rng.coin(0.7) ? "1e-10" : num(rng.log_uniform(1e-13, 1e-6));
        const Outcome o = run(dir, "run r.toml --json - --csv out.csv --tol " + tol + " --times " + list);
        INFO("case " << i << ", --tol " << tol << "\n" << text << "\nstderr:\n" << o.err.substr(0, 2000));
        REQUIRE((o.code == 0 || o.code == 1 || o.code == 2));
        if (o.code != 0) continue;
        ++ran;
        const plateau::jsonmini::Value js = plateau::jsonmini::parse(o.out);
        CHECK(all_finite(js));
        Table t;
        REQUIRE(read_csv(slurp(dir.file("out.csv")), t));
        REQUIRE(t.rows.size() == times.size());
        const double scale = std::max(1.0, delivered(c, c.until));
        for (const auto& col : c.amounts) {
            const int k = t.column(col);
            REQUIRE(k >= 0);
            for (const auto& r : t.rows) {
                INFO(col << " at " << r[0] << " h");
                CHECK(r[static_cast<std::size_t>(k)] >= -1e-9 * scale);
            }
        }
        // Mass balance at the end: elimination is cl x conc, so what has left is cl x AUC(0, T).
        if (c.linear) {
            double in_body = 0;
            for (const auto& col : c.amounts) in_body += t.rows.back()[static_cast<std::size_t>(t.column(col))];
            const double auc = plateau::jsonmini::number(js, "auc/value");
            const double T = plateau::jsonmini::number(js, "horizon/to");
            CHECK(T == Approx(c.until).epsilon(1e-12));
            const double budget = std::max(1e-6, 1e4 * std::stod(tol));
            INFO("in body " << in_body << " mg, eliminated " << c.cl * auc << " mg, delivered " << delivered(c, T));
            CHECK(std::fabs(in_body + c.cl * auc - delivered(c, T)) <= budget * scale);
        }
        // At a bolus time the value is the one just after the dose: central jumps by the bolus amounts.
        const int central = t.column("central_mg");
        for (std::size_t r = 1; r < t.rows.size(); ++r) {
            const double now = t.rows[r][0], before = t.rows[r - 1][0];
            if (std::fabs(now - before - 1e-6) > 1e-9) continue;
            double jump = 0;
            for (const Dose& d : c.doses)
                for (int k = 0; k < d.count && d.over == 0 && !d.oral; ++k)
                    if (d.at + k * d.every == now) jump += d.amount;
            if (jump == 0) continue;
            const double got = t.rows[r][static_cast<std::size_t>(central)] - t.rows[r - 1][static_cast<std::size_t>(central)];
            INFO("bolus of " << jump << " mg at " << now << " h");
            CHECK(got == Approx(jump).epsilon(1e-3).margin(1e-4 * t.rows[r][static_cast<std::size_t>(central)]));
        }
    }
    // The generator writes valid regimens: most of them must run for the checks above to mean anything.
    CHECK(ran >= kGeneratedCases * 8 / 10);
}

TEST_CASE("invariants: mutated regimen and model files end with exit 0, 1 or 2 and finite output", "[invariants]") {
    Rng rng;
    rng.g.seed(kSeed + 1);
    TempDir dir("invariants");
    const std::string models = std::string(PLATEAU_SOURCE_DIR) + "/models/";
    const char* const model_ids[] = {"one-compartment-iv", "two-compartment-iv", "one-compartment-oral",
                                     "one-compartment-mm-iv", "transit-oral", "zelmarin"};
    int codes[3] = {0, 0, 0};
    for (int i = 0; i < kMutatedCases; ++i) {
        const bool model_case = rng.coin(0.4);
        std::string regimen = regimen_text(generate(rng));
        std::string model_text;
        if (model_case) {
            // The regimen names a mutated copy of a built-in model, by path.
            const std::string id = model_ids[rng.pick(static_cast<int>(std::size(model_ids)))];
            model_text = mutate(rng, slurp(models + id + ".toml"));
            dir.write("m.toml", model_text);
            regimen = "id = \"mutated\"\nmodel = \"m.toml\"\n\n[[doses]]\nroute = \"iv\"\namount = \"" +
                      num(rng.log_uniform(0.1, 1e4)) + " mg\"\nevery = \"8 h\"\ncount = " + std::to_string(1 + rng.pick(5)) +
                      "\n";
        } else {
            regimen = mutate(rng, regimen);
        }
        dir.write("r.toml", regimen);
        const Outcome o = run(dir, "run r.toml --json -");
        INFO("case " << i << "\nregimen:\n" << regimen << "\nmodel:\n" << model_text << "\nstderr:\n"
                     << o.err.substr(0, 2000));
        REQUIRE((o.code == 0 || o.code == 1 || o.code == 2));
        ++codes[o.code];
        if (o.code == 0) CHECK(all_finite(plateau::jsonmini::parse(o.out)));
        if (model_case) {
            const Outcome chk = run(dir, "check m.toml");
            CHECK((chk.code == 0 || chk.code == 1));
        }
    }
    // Both outcomes occur: the mutations reach the loaders' errors and also leave runnable files.
    CHECK(codes[0] > 0);
    CHECK(codes[1] > 0);
}

// Saturable elimination with a km far below the concentrations (near zero order): the series runs straight
// through zero; the engine ends the step where the amount reaches zero.
TEST_CASE("invariants: saturable elimination with km = 1e-11 mg/L keeps amounts non-negative", "[invariants]") {
    TempDir dir("invariants");
    dir.write("r.toml", "id = \"mm-tiny-km\"\nmodel = \"one-compartment-mm-iv\"\n\n[parameters]\nkm = \"1e-11 mg/L\"\n\n"
                        "[[doses]]\nroute = \"iv\"\namount = \"100 mg\"\n\n[horizon]\nuntil = \"24 h\"\n");
    const Outcome o = run(dir, "run r.toml --csv - --step 15min");
    REQUIRE(o.code == 0);
    Table t;
    REQUIRE(read_csv(o.out, t));
    const int k = t.column("central_mg");
    for (const auto& r : t.rows) CHECK(r[static_cast<std::size_t>(k)] >= -1e-9 * 100);
}
