// Quantities with units. Everything inside the engine is in mg, L and h; this module converts at the boundary.
#pragma once

#include <string>
#include <string_view>

namespace plateau::units {

// Largest exponent of a base dimension (mg^64) a unit or an expression may reach; beyond it is an error.
inline constexpr int kMaxDimExponent = 64;

// Deepest nesting of parentheses, signs and powers in a unit or a model expression (both parsers recurse).
inline constexpr int kMaxNesting = 200;

// Exponents of the three base dimensions: mass (amount), volume, time.
// The arithmetic saturates just past ±kMaxDimExponent instead of overflowing, so a chain of products and powers
// can never wrap around to a legal dimension; callers check in_range() and report where it went out.
struct Dim {
    int mass = 0;
    int volume = 0;
    int time = 0;

    bool operator==(const Dim&) const = default;
    bool dimensionless() const { return mass == 0 && volume == 0 && time == 0; }
    bool in_range() const { return fits(mass) && fits(volume) && fits(time); }
    Dim operator*(const Dim& o) const { return {sat(1LL * mass + o.mass), sat(1LL * volume + o.volume), sat(1LL * time + o.time)}; }
    Dim operator/(const Dim& o) const { return {sat(1LL * mass - o.mass), sat(1LL * volume - o.volume), sat(1LL * time - o.time)}; }
    Dim pow(long long k) const { return {sat(mass * sat(k)), sat(volume * sat(k)), sat(time * sat(k))}; }

private:
    static constexpr bool fits(int e) { return e >= -kMaxDimExponent && e <= kMaxDimExponent; }
    static constexpr int sat(long long e) {
        constexpr long long cap = kMaxDimExponent + 1;
        return static_cast<int>(e > cap ? cap : e < -cap ? -cap : e);
    }
};

inline constexpr Dim kNone{0, 0, 0};
inline constexpr Dim kMass{1, 0, 0};          // amount, mg
inline constexpr Dim kVolume{0, 1, 0};        // L
inline constexpr Dim kTime{0, 0, 1};          // h
inline constexpr Dim kRate{0, 0, -1};         // 1/h
inline constexpr Dim kConc{1, -1, 0};         // mg/L
inline constexpr Dim kAmountRate{1, 0, -1};   // mg/h
inline constexpr Dim kFlow{0, 1, -1};         // L/h (clearance)
inline constexpr Dim kExposure{1, -1, 1};     // mg*h/L (AUC)

// A unit: value_in_canonical = value_in_unit * factor.
struct Unit {
    double factor = 1.0;
    Dim dim{};
};

// A value converted to canonical units (mg, L, h).
struct Quantity {
    double value = 0.0;
    Dim dim{};
};

// Parses a unit expression: products '*', quotients '/', integer powers '^' (e.g. "h^-1", "L^2"),
// a leading "1/" ("1/h"), '%' (0.01, dimensionless) and the empty string (dimensionless).
// Mass: ng ug µg mcg mg g kg. Volume: mL dL L (also l, ml, dl). Time: s min h d wk, also sec, mins, minute(s),
// hr(s), hour(s), day(s), week(s).
// Throws plateau::TextError (offset within `text`) naming what was given and what is accepted.
Unit parse_unit(std::string_view text);

// Parses "<number> [unit]", e.g. "250 mg", "30min", "0.12 1/h", "75 %", "0.8". Non-finite numbers are errors.
Quantity parse_quantity(std::string_view text);

// As above, and checks the dimension: throws TextError("expected <what_expected(expected)>, got '<text>'").
Quantity parse_quantity(std::string_view text, Dim expected);

// Human name of a dimension, e.g. "a concentration (mass/volume)", "a duration (time)", "a dimensionless number".
std::string dim_name(Dim d);

// The canonical unit text of a dimension: "mg", "L", "h", "1/h", "mg/L", "mg/h", "L/h", "mg*h/L", "" (none).
std::string canonical_unit(Dim d);

// Converts a canonical value into the given unit (inverse of the factor).
inline double to_unit(double canonical_value, const Unit& u) { return canonical_value / u.factor; }

}  // namespace plateau::units
