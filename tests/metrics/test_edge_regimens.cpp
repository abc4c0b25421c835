// Edge cases found in review, each run end to end through regimen files. Values are closed forms computed in
// the comments; wording checks need no source.
#include <catch2/catch.hpp>

#include <cmath>

#include "support.hpp"

using plateau::testing::run_text;
using plateau::testing::write_temp;
using Catch::Matchers::WithinRel;

TEST_CASE("metrics: a bolus right after an infusion ends is a step boundary at its own time", "[metrics]") {
    // 0.7 h + 0.1 h is 0.7999999999999999 in binary; the bolus is at 0.8 h. Before it, only the 100 mg infusion
    // has entered: C(0.8) = (k0/CL)(1 − e^{−k·0.1}) with k0 = 1000 mg/h, CL = 5 L/h, V = 40 L, k = 0.125 /h
    // (closed form, computed); the trough of the first interval is that value, not the one after the bolus.
    const auto r = run_text("fp.toml", R"(
id = "fp"
model = "one-compartment-iv"
[[doses]]
route = "iv"
amount = "100 mg"
at = "0.7 h"
over = "0.1 h"
[[doses]]
route = "iv"
amount = "1000 mg"
at = "0.8 h"
[horizon]
until = "10 h"
)");
    const double c08 = 1000.0 / 5.0 * (1.0 - std::exp(-0.125 * 0.1));
    REQUIRE(r.exposure.intervals.size() == 2);
    CHECK_THAT(r.exposure.intervals[0].trough, WithinRel(c08, 1e-9));
    CHECK_THAT(r.exposure.intervals[0].peak.value, WithinRel(c08, 1e-9));
    // After the bolus: c08 + 1000/40 mg/L (closed form, computed).
    CHECK_THAT(r.exposure.intervals[1].peak.value, WithinRel(c08 + 25.0, 1e-9));
}

TEST_CASE("metrics: tiny doses into an empty model keep their relative accuracy", "[metrics]") {
    // A 48-h infusion into empty compartments: C(48) = (R/CL)(1 − e^{−6}), R = D/48 h (closed form, computed).
    // Relative error control must hold whatever the scale of the dose (1 g or 1 ng).
    for (const char* amount : {"1 g", "1 ng"}) {
        const double d = std::string(amount) == "1 g" ? 1000.0 : 1e-6;
        const auto r = run_text("tiny.toml", std::string(R"(
id = "tiny"
model = "one-compartment-iv"
[[doses]]
route = "iv"
amount = ")") + amount + R"("
over = "48 h"
[horizon]
until = "48 h"
)");
        const double c48 = d / 48.0 / 5.0 * (1.0 - std::exp(-6.0));
        CHECK_THAT(r.exposure.peak.value, WithinRel(c48, 1e-9));
        // AUC over 0..48 = (R/CL)(48 − (1 − e^{−6})/k), k = 0.125 /h (closed form, computed).
        CHECK_THAT(r.exposure.auc, WithinRel(d / 48.0 / 5.0 * (48.0 - (1.0 - std::exp(-6.0)) / 0.125), 1e-9));
    }
}

TEST_CASE("metrics: a threshold exactly at a plateau is not crossed by round-off", "[metrics]") {
    // A continuous infusion settles at R/CL = 20 mg/h / 5 L/h = 4 mg/L (closed form, computed): at steady state
    // it is never above 4 mg/L, and a window [1, 4] mg/L holds the whole interval.
    const auto r = run_text("plateau.toml", R"(
id = "plateau"
model = "one-compartment-iv"
[[doses]]
route = "iv"
amount = "480 mg"
every = "24 h"
count = 10
over = "24 h"
[targets]
above = "4 mg/L"
window = ["1 mg/L", "4 mg/L"]
[horizon]
until = "240 h"
)");
    REQUIRE(r.exposure.steady);
    REQUIRE(r.exposure.steady->found);
    CHECK(r.exposure.steady->constant);
    CHECK_THAT(r.exposure.steady->peak.value, WithinRel(4.0, 1e-9));
    CHECK(r.exposure.steady->above_hours == 0.0);
    CHECK(r.exposure.steady->window_hours == Approx(24.0).epsilon(1e-12));
}

TEST_CASE("metrics: a lag longer than the interval", "[metrics]") {
    // tlag 20 h, a dose every 8 h: the first intervals show nothing. The minimum is counted from the first real
    // peak, and the accumulation ratio (first interval shows no exposure) is undefined.
    const auto r = run_text("lag.toml", R"(
id = "lag"
model = "one-compartment-oral"
[parameters]
tlag = "20 h"
[[doses]]
route = "oral"
amount = "100 mg"
every = "8 h"
count = 10
)");
    CHECK(r.exposure.minimum.value > 0.0);
    CHECK(r.exposure.minimum.time > 20.0);
    REQUIRE(r.exposure.steady);
    REQUIRE(r.exposure.steady->found);
    CHECK(std::isnan(r.exposure.steady->accumulation));
    CHECK(r.exposure.steady->trough > 0.0);
}

TEST_CASE("metrics: a model whose rates depend on t has no periodic steady state", "[metrics]") {
    const std::string model = write_temp("tvar.toml", R"(
id = "tvar"
summary = "clearance rising with time, a test model"
[parameters]
cl = { value = "5 L/h", about = "clearance" }
v = { value = "40 L", about = "volume" }
th = { value = "24 h", about = "time scale" }
[compartments]
central = "mg"
[rates]
central = "-cl*(1 + t/th)/v*central"
[outputs]
conc = { expr = "central/v", unit = "mg/L" }
[routes]
iv = { into = "central" }
)");
    const auto r = run_text("tvreg.toml", "id = \"tvreg\"\nmodel = \"" + model + R"("
[[doses]]
route = "iv"
amount = "100 mg"
every = "12 h"
count = 4
)");
    REQUIRE(r.exposure.steady);
    CHECK_FALSE(r.exposure.steady->found);
    CHECK(r.exposure.steady->why_not.find("depend on the time t") != std::string::npos);
}

TEST_CASE("metrics: whole-number powers stay analytic where the base is zero", "[metrics]") {
    // An Emax-type output with a literal Hill exponent 3 on an empty compartment at t = 0: c³/(ec50³ + c³) must
    // integrate, and after a bolus C0 = 100 mg / 40 L = 2.5 mg/L it equals 2.5³/(1 + 2.5³) (closed form).
    const std::string model = write_temp("hill3.toml", R"(
id = "hill3"
summary = "one compartment with a Hill output, a test model"
[parameters]
cl = { value = "5 L/h", about = "clearance" }
v = { value = "40 L", about = "volume" }
ec50 = { value = "1 mg/L", about = "half-effect concentration" }
[compartments]
central = "mg"
[rates]
central = "-cl/v*central"
[outputs]
effect = { expr = "(central/v/ec50)^3/(1 + (central/v/ec50)^3) * 1", unit = "" }
[routes]
iv = { into = "central" }
)");
    const auto r = run_text("hill3-reg.toml", "id = \"hill3-reg\"\nmodel = \"" + model + R"("
[[doses]]
route = "iv"
amount = "100 mg"
at = "1 h"
[horizon]
until = "24 h"
)");
    REQUIRE(r.sim.outcome == plateau::taylor::Outcome::Ok);
    const double c = 2.5;
    CHECK_THAT(r.exposure.peak.value, WithinRel(c * c * c / (1 + c * c * c), 1e-9));
    CHECK(r.exposure.peak.time == Approx(1.0));
}
