#include <catch2/catch.hpp>

#include <string>
#include <string_view>
#include <utility>

#include "core/diagnostic.hpp"
#include "core/suggest.hpp"
#include "units/units.hpp"

using namespace plateau::units;
using plateau::TextError;

namespace {

TextError quantity_error(std::string_view text) {
    try {
        parse_quantity(text);
    } catch (const TextError& e) {
        return e;
    }
    FAIL("no error for '" << std::string(text) << "'");
    return TextError("", 0);
}

TextError unit_error(std::string_view text) {
    try {
        parse_unit(text);
    } catch (const TextError& e) {
        return e;
    }
    FAIL("no error for '" << std::string(text) << "'");
    return TextError("", 0);
}

TextError dim_error(std::string_view text, Dim expected) {
    try {
        parse_quantity(text, expected);
    } catch (const TextError& e) {
        return e;
    }
    FAIL("no error for '" << std::string(text) << "'");
    return TextError("", 0);
}

void check_unit(std::string_view text, double factor, Dim dim) {
    INFO("unit '" << std::string(text) << "'");
    const Unit u = parse_unit(text);
    CHECK(u.factor == factor);
    CHECK(u.dim == dim);
}

}  // namespace

TEST_CASE("units: mass units and their exact factors", "[units]") {
    check_unit("ng", 1e-6, kMass);         // common practice, no source (SI prefixes)
    check_unit("ug", 1e-3, kMass);         // common practice, no source
    check_unit("\xC2\xB5g", 1e-3, kMass);  // micro sign U+00B5; common practice, no source
    check_unit("\xCE\xBCg", 1e-3, kMass);  // Greek mu U+03BC; common practice, no source
    check_unit("mcg", 1e-3, kMass);        // common practice, no source
    check_unit("mg", 1.0, kMass);          // canonical unit
    check_unit("g", 1e3, kMass);           // common practice, no source
    check_unit("kg", 1e6, kMass);          // common practice, no source
}

TEST_CASE("units: volume units and their exact factors", "[units]") {
    check_unit("mL", 1e-3, kVolume);  // SI definition
    check_unit("ml", 1e-3, kVolume);  // SI definition
    check_unit("dL", 0.1, kVolume);   // SI definition
    check_unit("dl", 0.1, kVolume);   // SI definition
    check_unit("L", 1.0, kVolume);    // canonical unit
    check_unit("l", 1.0, kVolume);    // canonical unit
}

TEST_CASE("units: time units, percent and the empty unit", "[units]") {
    check_unit("s", 1.0 / 3600.0, kTime);    // SI definition: 3600 s in 1 h
    check_unit("sec", 1.0 / 3600.0, kTime);  // SI definition
    check_unit("min", 1.0 / 60.0, kTime);    // SI definition: 60 min in 1 h
    check_unit("h", 1.0, kTime);             // canonical unit
    check_unit("hr", 1.0, kTime);            // canonical unit
    check_unit("d", 24.0, kTime);            // common practice, no source
    check_unit("day", 24.0, kTime);          // common practice, no source
    check_unit("days", 24.0, kTime);         // common practice, no source
    check_unit("wk", 168.0, kTime);          // common practice, no source: 7 * 24 h
    check_unit("week", 168.0, kTime);        // common practice, no source
    check_unit("%", 0.01, kNone);            // common practice, no source
    check_unit("", 1.0, kNone);              // dimensionless
    check_unit("  ", 1.0, kNone);            // dimensionless
}

TEST_CASE("units: compound units, powers and groups", "[units]") {
    check_unit("mg/L", 1.0, kConc);
    check_unit("L/h", 1.0, kFlow);
    check_unit("1/h", 1.0, kRate);
    check_unit("1 / h", 1.0, kRate);
    check_unit("mg/h", 1.0, kAmountRate);
    check_unit("mg*h/L", 1.0, kExposure);
    check_unit("mg\xC2\xB7h/L", 1.0, kExposure);  // middle dot U+00B7
    check_unit("h*mg/L", 1.0, kExposure);
    check_unit("ug/mL", 1.0, kConc);                 // common practice, no source: 1e-3 / 1e-3
    check_unit("mg/dL", 10.0, kConc);                // common practice, no source: 1 / 0.1
    check_unit("g/h", 1e3, kAmountRate);             // common practice, no source
    check_unit("1/min", 60.0, kRate);                // SI definition
    check_unit("h^-1", 1.0, kRate);
    check_unit("min^-1", 60.0, kRate);               // SI definition
    check_unit("d^-1", 1.0 / 24.0, kRate);           // common practice, no source
    check_unit("L^2", 1.0, Dim{0, 2, 0});
    check_unit("mL^2", 1e-6, Dim{0, 2, 0});          // SI definition: (1e-3)^2
    check_unit("h ^ 2", 1.0, Dim{0, 0, 2});
    check_unit("mg/L/h", 1.0, Dim{1, -1, -1});       // left-associative: mg/(L*h)
    check_unit("mg/(L*h)", 1.0, Dim{1, -1, -1});
    check_unit("(mg/L)^2", 1.0, Dim{2, -2, 0});
    check_unit("(1/h)", 1.0, kRate);
    check_unit("%/h", 0.01, kRate);                  // common practice, no source
    check_unit("L/L", 1.0, kNone);

    const Unit ng_ml = parse_unit("ng/mL");  // common practice, no source: 1e-6 / 1e-3 mg/L
    CHECK(ng_ml.factor == Approx(1e-3).epsilon(1e-15));
    CHECK(ng_ml.dim == kConc);
    const Unit ml_min = parse_unit("mL/min");  // SI definition: 1e-3 L * 60 / h
    CHECK(ml_min.factor == Approx(0.06).epsilon(1e-15));
    CHECK(ml_min.dim == kFlow);
    const Unit mg_min_ml = parse_unit("mg*min/mL");  // SI definition: (1/60) / 1e-3
    CHECK(mg_min_ml.factor == Approx(1000.0 / 60.0).epsilon(1e-15));
    CHECK(mg_min_ml.dim == kExposure);
}

TEST_CASE("units: dimension arithmetic", "[units]") {
    CHECK(kMass / kVolume == kConc);
    CHECK(kConc * kTime == kExposure);
    CHECK(kVolume / kTime == kFlow);
    CHECK(kNone / kTime == kRate);
    CHECK(kRate.pow(-1) == kTime);
    CHECK(kConc.pow(2) == Dim{2, -2, 0});
    CHECK(kNone.dimensionless());
    CHECK_FALSE(kRate.dimensionless());
}

TEST_CASE("units: quantities convert to mg, L and h", "[units]") {
    struct Case {
        const char* text;
        double value;
        Dim dim;
    };
    const Case cases[] = {
        {"250 mg", 250.0, kMass},
        {"1.2 1/h", 1.2, kRate},
        {"4.8 L/h", 4.8, kFlow},
        {"30 min", 0.5, kTime},            // SI definition: 30/60 h
        {"4 mg/L", 4.0, kConc},
        {"75 %", 0.75, kNone},              // common practice, no source
        {"0.5 ug/mL", 0.5, kConc},          // common practice, no source: 1 ug/mL = 1 mg/L
        {"2 g/h", 2000.0, kAmountRate},     // common practice, no source
        {"15min", 0.25, kTime},             // SI definition: 15/60 h
        {"1e-3 g", 1.0, kMass},             // common practice, no source
        {"-2 h", -2.0, kTime},
        {"+2 h", 2.0, kTime},
        {"0.8", 0.8, kNone},
        {"  0.8  ", 0.8, kNone},
        {"3 d", 72.0, kTime},               // common practice, no source
        {"2 wk", 336.0, kTime},             // common practice, no source
        {"90 s", 0.025, kTime},             // SI definition: 90/3600 h
        {"12 mg*h/L", 12.0, kExposure},
        {"100 \xC2\xB5g", 0.1, kMass},      // common practice, no source
        {"1e5min", 1e5 / 60.0, kTime},      // SI definition
        {".5 L", 0.5, kVolume},
        {"5. L", 5.0, kVolume},
        {"1e-310 mg", 1e-310, kMass},       // subnormal but representable
    };
    for (const Case& c : cases) {
        INFO("quantity '" << c.text << "'");
        const Quantity q = parse_quantity(c.text);
        CHECK(q.value == Approx(c.value).epsilon(1e-15));
        CHECK(q.dim == c.dim);
    }
    CHECK(parse_quantity("4 mg/L", kConc).value == 4.0);
    CHECK(parse_quantity("30 min", kTime).value == Approx(0.5).epsilon(1e-15));  // SI definition
}

TEST_CASE("units: to_unit inverts the factor", "[units]") {
    CHECK(to_unit(0.5, parse_unit("min")) == Approx(30.0).epsilon(1e-15));    // SI definition
    CHECK(to_unit(2000.0, parse_unit("g")) == Approx(2.0).epsilon(1e-15));    // common practice, no source
    CHECK(to_unit(4.0, parse_unit("ng/mL")) == Approx(4000.0).epsilon(1e-14));  // common practice, no source
}

TEST_CASE("units: dim_name", "[units]") {
    CHECK(dim_name(kMass) == "an amount (mass)");
    CHECK(dim_name(kVolume) == "a volume");
    CHECK(dim_name(kTime) == "a duration (time)");
    CHECK(dim_name(kRate) == "a rate constant (1/time)");
    CHECK(dim_name(kConc) == "a concentration (mass/volume)");
    CHECK(dim_name(kAmountRate) == "an input rate (mass/time)");
    CHECK(dim_name(kFlow) == "a clearance (volume/time)");
    CHECK(dim_name(kExposure) == "an exposure (mass*time/volume)");
    CHECK(dim_name(kNone) == "a dimensionless number");
    CHECK(dim_name(Dim{2, -1, 0}) == "a quantity of dimension mass^2/volume");
    CHECK(dim_name(Dim{1, -1, -1}) == "a quantity of dimension mass/(volume*time)");
    CHECK(dim_name(Dim{0, 0, -2}) == "a quantity of dimension 1/time^2");
    CHECK(dim_name(Dim{1, 1, 0}) == "a quantity of dimension mass*volume");
}

TEST_CASE("units: canonical_unit", "[units]") {
    CHECK(canonical_unit(kMass) == "mg");
    CHECK(canonical_unit(kVolume) == "L");
    CHECK(canonical_unit(kTime) == "h");
    CHECK(canonical_unit(kRate) == "1/h");
    CHECK(canonical_unit(kConc) == "mg/L");
    CHECK(canonical_unit(kAmountRate) == "mg/h");
    CHECK(canonical_unit(kFlow) == "L/h");
    CHECK(canonical_unit(kExposure) == "mg*h/L");
    CHECK(canonical_unit(kNone) == "");
    CHECK(canonical_unit(Dim{2, -1, 0}) == "mg^2/L");
    CHECK(canonical_unit(Dim{1, -1, -1}) == "mg/(L*h)");
    CHECK(canonical_unit(Dim{0, 0, -2}) == "1/h^2");
    CHECK(canonical_unit(Dim{1, 1, 2}) == "mg*L*h^2");

    // Every canonical unit text parses back to its dimension with factor 1.
    const Dim dims[] = {kMass, kVolume, kTime, kRate, kConc, kAmountRate, kFlow, kExposure, kNone,
                        Dim{2, -1, 0}, Dim{1, -1, -1}, Dim{0, 0, -2}, Dim{-1, 2, -3}};
    for (const Dim& d : dims) {
        const Unit u = parse_unit(canonical_unit(d));
        CHECK(u.dim == d);
        CHECK(u.factor == 1.0);
    }
}

TEST_CASE("units: unknown units", "[units]") {
    const char* hint = "a unit such as mg, L, h, mg/L, L/h, 1/h";
    TextError e = quantity_error("4 mgg");
    CHECK(std::string(e.what()) == "unknown unit 'mgg' in '4 mgg'; did you mean 'mg'?");
    CHECK(e.offset() == 2);
    CHECK(e.length() == 3);
    CHECK(e.expected() == hint);

    e = quantity_error("4 mg/Lh");
    CHECK(std::string(e.what()) == "unknown unit 'Lh' in '4 mg/Lh'; did you mean 'L'?");
    CHECK(e.offset() == 5);
    CHECK(e.length() == 2);

    e = quantity_error("4 \xC2\xB5gg");  // 'µgg': 4 bytes
    CHECK(std::string(e.what()) == "unknown unit '\xC2\xB5gg' in '4 \xC2\xB5gg'; did you mean '\xC2\xB5g'?");
    CHECK(e.offset() == 2);
    CHECK(e.length() == 4);

    e = unit_error("MG");  // names are case-sensitive
    CHECK(std::string(e.what()) == "unknown unit 'MG' in 'MG'; did you mean 'mg'?");
    CHECK(e.offset() == 0);
    CHECK(e.expected() == hint);

    e = quantity_error("2 e");  // "2e" is not an exponent: from_chars stops before 'e'
    CHECK(std::string(e.what()) == "unknown unit 'e' in '2 e'");
    CHECK(e.offset() == 2);
}

TEST_CASE("units: missing, empty and non-finite numbers", "[units]") {
    const char* number_hint = "a number with a unit, e.g. '250 mg'";
    TextError e = quantity_error("mg");
    CHECK(std::string(e.what()) == "expected a number at the start of 'mg'");
    CHECK(e.offset() == 0);
    CHECK(e.expected() == number_hint);

    e = quantity_error("  mg/L ");
    CHECK(std::string(e.what()) == "expected a number at the start of 'mg/L'");
    CHECK(e.offset() == 2);

    e = quantity_error("+-2 h");
    CHECK(std::string(e.what()) == "expected a number at the start of '+-2 h'");
    CHECK(e.offset() == 0);

    e = quantity_error("");
    CHECK(std::string(e.what()) == "empty quantity");
    CHECK(e.offset() == 0);
    CHECK(e.expected() == number_hint);

    e = quantity_error("   ");
    CHECK(std::string(e.what()) == "empty quantity");

    e = quantity_error("nan");
    CHECK(std::string(e.what()) == "'nan' is not a finite number");
    CHECK(e.offset() == 0);
    CHECK(e.length() == 3);
    CHECK(e.expected() == "a finite number, e.g. '250 mg'");

    e = quantity_error(" -inf mg");
    CHECK(std::string(e.what()) == "'-inf' is not a finite number");
    CHECK(e.offset() == 1);
    CHECK(e.length() == 4);

    e = quantity_error("infinity h");
    CHECK(std::string(e.what()) == "'infinity' is not a finite number");
    CHECK(e.length() == 8);

    e = quantity_error("1e999 mg");
    CHECK(std::string(e.what()) == "'1e999' is not a finite number");
    CHECK(e.offset() == 0);
    CHECK(e.length() == 5);

    e = quantity_error("1e-400 mg");
    CHECK(std::string(e.what()) == "'1e-400' is too close to zero to represent");
    CHECK(e.offset() == 0);
    CHECK(e.length() == 6);

    e = quantity_error("1e300 kg^12");  // finite number, overflows once converted
    CHECK(std::string(e.what()) == "'1e300 kg^12' is not a finite number once converted to mg, L and h");
    CHECK(e.offset() == 0);
}

TEST_CASE("units: malformed unit expressions", "[units]") {
    const char* join_hint = "'*', '/' or '^' joining units, or the end of the text";
    const char* hint = "a unit such as mg, L, h, mg/L, L/h, 1/h";

    TextError e = quantity_error("4 mg L");
    CHECK(std::string(e.what()) == "unexpected 'L' after the unit in '4 mg L'");
    CHECK(e.offset() == 5);
    CHECK(e.expected() == join_hint);

    e = quantity_error("4 mg abc ");
    CHECK(std::string(e.what()) == "unexpected 'abc' after the unit in '4 mg abc '");
    CHECK(e.offset() == 5);
    CHECK(e.length() == 3);

    e = quantity_error("4 mg2");
    CHECK(std::string(e.what()) == "unexpected '2' after the unit in '4 mg2'");
    CHECK(e.offset() == 4);

    e = quantity_error("2.5.3");
    CHECK(std::string(e.what()) == "expected a unit, got '.' in '2.5.3'");
    CHECK(e.offset() == 3);
    CHECK(e.expected() == hint);

    e = quantity_error("21/h");  // the leading 1 belongs to the number
    CHECK(std::string(e.what()) == "expected a unit, got '/' in '21/h'");
    CHECK(e.offset() == 2);

    e = quantity_error("5 \xE2\x82\xAC");  // euro sign, 3 bytes
    CHECK(std::string(e.what()) == "expected a unit, got '\xE2\x82\xAC' in '5 \xE2\x82\xAC'");
    CHECK(e.offset() == 2);
    CHECK(e.length() == 3);

    e = quantity_error("4 mg/");
    CHECK(std::string(e.what()) == "missing unit at the end of '4 mg/'");
    CHECK(e.offset() == 5);
    CHECK(e.expected() == hint);

    e = quantity_error("4 mg\xC2\xB7");
    CHECK(std::string(e.what()) == "missing unit at the end of '4 mg\xC2\xB7'");
    CHECK(e.offset() == 6);

    e = unit_error("1");
    CHECK(std::string(e.what()) == "expected a unit, got '1' in '1'");
    CHECK(e.offset() == 0);

    e = unit_error("h^");
    CHECK(std::string(e.what()) == "expected an integer exponent after '^' in 'h^'");
    CHECK(e.offset() == 1);
    CHECK(e.expected() == "an integer such as 2 or -1");

    e = unit_error("h^x");
    CHECK(std::string(e.what()) == "expected an integer exponent after '^' in 'h^x'");
    CHECK(e.offset() == 1);

    e = unit_error("h^-13");
    CHECK(std::string(e.what()) == "exponent '-13' is too large in 'h^-13'");
    CHECK(e.offset() == 2);
    CHECK(e.length() == 3);
    CHECK(e.expected() == "an integer between -12 and 12");

    e = unit_error("h^2^2");
    CHECK(std::string(e.what()) == "unexpected '^' after the unit in 'h^2^2'");
    CHECK(e.offset() == 3);

    e = unit_error("(mg/L");
    CHECK(std::string(e.what()) == "missing ')' in '(mg/L'");
    CHECK(e.offset() == 5);
    CHECK(e.expected() == "')'");

    e = unit_error("(mg L)");
    CHECK(std::string(e.what()) == "missing ')' in '(mg L)'");
    CHECK(e.offset() == 4);

    e = unit_error("mg)");
    CHECK(std::string(e.what()) == "unexpected ')' after the unit in 'mg)'");
    CHECK(e.offset() == 2);
}

TEST_CASE("units: dimension checks", "[units]") {
    TextError e = dim_error("4 mg", kConc);
    CHECK(std::string(e.what()) == "expected a concentration (mass/volume), got '4 mg' (mass)");
    CHECK(e.offset() == 2);
    CHECK(e.length() == 2);
    CHECK(e.expected() == "a concentration (mass/volume)");

    e = dim_error("0.8", kTime);
    CHECK(std::string(e.what()) == "expected a duration (time), got '0.8' (dimensionless)");
    CHECK(e.offset() == 0);
    CHECK(e.length() == 3);
    CHECK(e.expected() == "a duration (time)");

    e = dim_error(" 1.2 1/h ", kFlow);
    CHECK(std::string(e.what()) == "expected a clearance (volume/time), got ' 1.2 1/h ' (1/time)");
    CHECK(e.offset() == 5);
    CHECK(e.length() == 3);

    e = dim_error("3 mg/L/h", kExposure);
    CHECK(std::string(e.what()) ==
          "expected an exposure (mass*time/volume), got '3 mg/L/h' (mass/(volume*time))");

    e = dim_error("75 %", kMass);
    CHECK(std::string(e.what()) == "expected an amount (mass), got '75 %' (dimensionless)");
    CHECK(e.offset() == 3);
    CHECK(e.length() == 1);

    // Syntax errors come first, with their own message.
    e = dim_error("4 mgg", kConc);
    CHECK(std::string(e.what()) == "unknown unit 'mgg' in '4 mgg'; did you mean 'mg'?");
}

TEST_CASE("units: an unknown unit where a dimension is expected suggests units of that dimension", "[units]") {
    // Wording of our own messages; no numeric source needed.
    try {
        (void)plateau::units::parse_quantity("3 secs", plateau::units::kTime);
        FAIL("expected a TextError");
    } catch (const plateau::TextError& e) {
        CHECK(std::string(e.what()) == "unknown unit 'secs' in '3 secs'; did you mean 'sec'?");
        CHECK(e.expected() == "a time unit: s, min, h, d, wk");
        CHECK(e.offset() == 2);
    }
    try {
        (void)plateau::units::parse_quantity("4 mg/litre", plateau::units::kConc);
        FAIL("expected a TextError");
    } catch (const plateau::TextError& e) {
        CHECK(e.expected() == "a concentration unit such as mg/L, ug/mL, ng/mL");
    }
}

TEST_CASE("units: spelled-out time units", "[units]") {
    // 1 h = 60 min, 1 d = 24 h, 1 wk = 168 h: definitions of the units (common practice, no source).
    using plateau::units::parse_quantity;
    using plateau::units::kTime;
    const std::pair<const char*, double> cases[] = {
        {"2 hour", 2.0},     {"2 hours", 2.0},   {"2 hr", 2.0},     {"2 hrs", 2.0},      {"30 min", 0.5},
        {"30 mins", 0.5},    {"30 minute", 0.5}, {"30 minutes", 0.5}, {"3 day", 72.0},   {"3 days", 72.0},
        {"1 week", 168.0},   {"2 weeks", 336.0}, {"4 mg/hour", 4.0},  {"0.5 1/hours", 0.5},
    };
    for (const auto& [text, hours] : cases) {
        INFO(text);
        const auto q = parse_quantity(text);
        CHECK(q.value == Approx(hours).epsilon(1e-15));
        if (std::string(text).find('/') == std::string::npos) CHECK(q.dim == kTime);
    }
    // Names stay case-sensitive: "Hours" is not a unit, but the message points to the one meant.
    try {
        (void)parse_quantity("2 Hours", kTime);
        FAIL("expected a TextError");
    } catch (const plateau::TextError& e) {
        CHECK(std::string(e.what()) == "unknown unit 'Hours' in '2 Hours'; did you mean 'hours'?");
    }
}

TEST_CASE("core: did-you-mean suggestions by edit distance", "[units][core]") {
    // Edit distances of short words, counted by hand (common practice, no source).
    CHECK(plateau::edit_distance("evry", "every") == 1);
    CHECK(plateau::edit_distance("orla", "oral") == 1);   // one swap of neighbours
    CHECK(plateau::edit_distance("kitten", "sitting") == 3);
    CHECK(plateau::edit_distance("", "abc") == 3);
    CHECK(plateau::closest("fractoin", {"into", "fraction", "lag"}) == "fraction");
    CHECK(plateau::closest("kel", {"ka", "cl", "v"}).empty());       // two edits from a three-letter word: no guess
    CHECK(plateau::closest("x", {"v", "t"}).empty());                // one letter: anything is one edit away
    CHECK(plateau::closest("simple-orl", {"simple-oral", "two-comp-iv"}) == "simple-oral");
    CHECK(plateau::closest("IV", {"oral", "iv"}) == "iv");
    CHECK(plateau::did_you_mean("cnc", {"conc", "conc_ng"}) == "; did you mean 'conc'?");
    CHECK(plateau::did_you_mean("zzz", {"conc"}).empty());
}
