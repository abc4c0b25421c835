// Unit expressions and quantities: a small recursive-descent parser over the unit names below.
#include "units/units.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <string>
#include <string_view>
#include <system_error>
#include <vector>

#include "core/diagnostic.hpp"
#include "core/suggest.hpp"

namespace plateau::units {
namespace {

constexpr const char* kUnitHint = "a unit such as mg, L, h, mg/L, L/h, 1/h";
constexpr const char* kJoinHint = "'*', '/' or '^' joining units, or the end of the text";
constexpr const char* kNumberHint = "a number with a unit, e.g. '250 mg'";
constexpr int kMaxExponent = 12;

struct NamedUnit {
    std::string_view name;
    double factor;
    Dim dim;
};

// Factors into mg, L and h. Time also under the spelled-out names people type ("2 hours", "30 mins").
constexpr NamedUnit kUnits[] = {
    {"ng", 1e-6, kMass},          {"ug", 1e-3, kMass},           {"\xC2\xB5g", 1e-3, kMass},
    {"\xCE\xBCg", 1e-3, kMass},   {"mcg", 1e-3, kMass},          {"mg", 1.0, kMass},
    {"g", 1e3, kMass},            {"kg", 1e6, kMass},            {"mL", 1e-3, kVolume},
    {"ml", 1e-3, kVolume},        {"dL", 0.1, kVolume},          {"dl", 0.1, kVolume},
    {"L", 1.0, kVolume},          {"l", 1.0, kVolume},           {"s", 1.0 / 3600.0, kTime},
    {"sec", 1.0 / 3600.0, kTime}, {"min", 1.0 / 60.0, kTime},    {"mins", 1.0 / 60.0, kTime},
    {"minute", 1.0 / 60.0, kTime}, {"minutes", 1.0 / 60.0, kTime}, {"h", 1.0, kTime},
    {"hr", 1.0, kTime},           {"hrs", 1.0, kTime},           {"hour", 1.0, kTime},
    {"hours", 1.0, kTime},        {"d", 24.0, kTime},            {"day", 24.0, kTime},
    {"days", 24.0, kTime},        {"wk", 168.0, kTime},          {"week", 168.0, kTime},
    {"weeks", 168.0, kTime},      {"%", 0.01, kNone},
};

// The unit names, for "did you mean" suggestions.
std::vector<std::string> unit_names() {
    std::vector<std::string> out;
    for (const NamedUnit& nu : kUnits) out.emplace_back(nu.name);
    return out;
}

bool is_letter(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); }
bool is_digit(char c) { return c >= '0' && c <= '9'; }

// Length of the micro sign (U+00B5) or Greek mu (U+03BC) at position i, or 0.
std::size_t micro_at(std::string_view s, std::size_t i) {
    if (i + 1 < s.size() && ((s[i] == '\xC2' && s[i + 1] == '\xB5') || (s[i] == '\xCE' && s[i + 1] == '\xBC')))
        return 2;
    return 0;
}

std::string quoted(std::string_view s) {
    std::string q(1, '\'');
    q.append(s).push_back('\'');
    return q;
}

// Quoted, cut to its first 40 bytes (on a character boundary) when longer: messages stay one line.
std::string shorten(std::string_view s) {
    if (s.size() <= 40) return quoted(s);
    std::size_t n = 40;
    while (n > 0 && (static_cast<unsigned char>(s[n]) & 0xC0) == 0x80) --n;
    return quoted(s.substr(0, n)) + "...";
}

class Parser {
public:
    explicit Parser(std::string_view text, std::size_t pos = 0) : text_(text), pos_(pos) {}

    std::size_t pos() const { return pos_; }
    bool at_end() { skip_spaces(); return pos_ >= text_.size(); }

    void skip_spaces() {
        while (pos_ < text_.size() && (text_[pos_] == ' ' || text_[pos_] == '\t')) ++pos_;
    }

    [[noreturn]] void fail(const std::string& message, std::size_t offset, std::size_t length,
                           const std::string& expected) const {
        throw TextError(message, offset, length == 0 ? 1 : length, expected);
    }

    // The token at the current position, for messages: a run of letters or a single UTF-8 code point.
    std::string_view token() const {
        std::size_t end = pos_;
        while (end < text_.size() && (is_letter(text_[end]) || micro_at(text_, end) > 0))
            end += micro_at(text_, end) > 0 ? 2 : 1;
        if (end == pos_) {
            end = pos_ + 1;
            while (end < text_.size() && (static_cast<unsigned char>(text_[end]) & 0xC0) == 0x80) ++end;
        }
        return text_.substr(pos_, end - pos_);
    }

    // expression := term { ('*' | '·' | '/') term }, left-associative.
    Unit expression() {
        skip_spaces();
        const std::size_t start = pos_;
        Unit u = term();
        for (;;) {
            skip_spaces();
            bool divide = false;
            if (peek("*")) {
                pos_ += 1;
            } else if (peek("\xC2\xB7")) {
                pos_ += 2;
            } else if (peek("/")) {
                pos_ += 1;
                divide = true;
            } else {
                return u;
            }
            const Unit r = term();
            u = divide ? Unit{u.factor / r.factor, u.dim / r.dim} : Unit{u.factor * r.factor, u.dim * r.dim};
            check_size(u, start);
        }
    }

    // After a complete unit expression only spaces may follow.
    void expect_end() {
        if (!at_end()) {
            const std::string_view tok = token();
            fail("unexpected " + quoted(tok) + " after the unit in " + quoted(text_), pos_, tok.size(), kJoinHint);
        }
    }

private:
    bool peek(std::string_view s) const { return text_.substr(pos_, s.size()) == s; }

    // term := primary [ '^' integer ]
    Unit term() {
        skip_spaces();
        const std::size_t base = pos_;
        Unit u = primary();
        skip_spaces();
        if (!peek("^")) return u;
        const std::size_t caret = pos_++;
        skip_spaces();
        const std::size_t start = pos_;
        bool negative = false;
        if (peek("-") || peek("+")) negative = text_[pos_++] == '-';
        int k = 0;
        const std::size_t digits = pos_;
        while (pos_ < text_.size() && is_digit(text_[pos_])) {
            if (k <= kMaxExponent) k = k * 10 + (text_[pos_] - '0');
            ++pos_;
        }
        if (pos_ == digits)
            fail("expected an integer exponent after '^' in " + quoted(text_), caret, 1, "an integer such as 2 or -1");
        if (k > kMaxExponent)
            fail("exponent " + quoted(text_.substr(start, pos_ - start)) + " is too large in " + quoted(text_), start,
                 pos_ - start, "an integer between -12 and 12");
        if (negative) k = -k;
        double f = 1.0;
        for (int i = 0; i < (k < 0 ? -k : k); ++i) f *= u.factor;
        const Unit r{k < 0 ? 1.0 / f : f, u.dim.pow(k)};
        check_size(r, base);
        return r;
    }

    // A unit whose exponents or factor leave what a double and the dimension check can hold is refused where it
    // was built (from `begin` to the current position), e.g. ((L^12)^12)^12 or (kg^12)^12.
    void check_size(const Unit& u, std::size_t begin) const {
        if (!u.dim.in_range())
            fail("the unit " + shorten(text_.substr(begin, pos_ - begin)) + " has a power of mass, volume or time beyond " +
                     std::to_string(kMaxDimExponent),
                 begin, pos_ - begin, "powers of mg, L and h from -" + std::to_string(kMaxDimExponent) + " to " +
                                          std::to_string(kMaxDimExponent));
        if (!std::isfinite(u.factor) || u.factor == 0.0)
            fail("the unit " + shorten(text_.substr(begin, pos_ - begin)) + " is too large or too small to represent",
                 begin, pos_ - begin, "a unit whose size in mg, L and h is between 1e-308 and 1e308");
    }

    // primary := name | '%' | '(' expression ')' | '1' (only before '/')
    Unit primary() {
        skip_spaces();
        if (pos_ >= text_.size())
            fail("missing unit at the end of " + quoted(text_), text_.size(), 1, kUnitHint);
        const char c = text_[pos_];
        if (c == '(') {
            // Nesting is bounded like a model expression's, so a deep unit is an error rather than a stack overflow.
            if (++depth_ > kMaxNesting)
                fail(shorten(text_) + " is nested more than " + std::to_string(kMaxNesting) +
                         " parentheses deep",
                     pos_, 1, "at most " + std::to_string(kMaxNesting) + " levels of parentheses");
            ++pos_;
            const Unit u = expression();
            --depth_;
            skip_spaces();
            if (!peek(")")) fail("missing ')' in " + quoted(text_), pos_, 1, "')'");
            ++pos_;
            return u;
        }
        if (c == '1') {
            Parser ahead(text_, pos_ + 1);
            ahead.skip_spaces();
            if (ahead.peek("/")) {
                ++pos_;
                return Unit{1.0, kNone};
            }
        }
        if (c == '%' || is_letter(c) || micro_at(text_, pos_) > 0) {
            const std::string_view name = c == '%' ? text_.substr(pos_, 1) : token();
            for (const NamedUnit& nu : kUnits) {
                if (nu.name == name) {
                    pos_ += name.size();
                    return Unit{nu.factor, nu.dim};
                }
            }
            fail("unknown unit " + quoted(name) + " in " + quoted(text_) + did_you_mean(name, unit_names()), pos_,
                 name.size(), kUnitHint);
        }
        const std::string_view tok = token();
        fail("expected a unit, got " + quoted(tok) + " in " + quoted(text_), pos_, tok.size(), kUnitHint);
    }

    std::string_view text_;
    std::size_t pos_;
    int depth_ = 0;
};

// True if a decimal literal that from_chars reported out of range is too large (false: too close to zero).
bool overflows(std::string_view num) {
    long point = -1, first = -1, digits = 0, exponent = 0;
    std::size_t i = 0;
    if (i < num.size() && (num[i] == '-' || num[i] == '+')) ++i;
    for (; i < num.size() && num[i] != 'e' && num[i] != 'E'; ++i) {
        if (num[i] == '.') {
            point = digits;
        } else {
            if (first < 0 && num[i] != '0') first = digits;
            ++digits;
        }
    }
    if (point < 0) point = digits;
    bool negative = false;
    if (++i < num.size() && (num[i] == '-' || num[i] == '+')) negative = num[i++] == '-';
    for (; i < num.size() && is_digit(num[i]); ++i)
        if (exponent < 100000) exponent = exponent * 10 + (num[i] - '0');
    return (point - first) + (negative ? -exponent : exponent) > 0;
}

const char* dim_word(int base) { return base == 0 ? "mass" : base == 1 ? "volume" : "time"; }
const char* unit_word(int base) { return base == 0 ? "mg" : base == 1 ? "L" : "h"; }

// "a^2*b/(c*d)" from the exponents, with the words given for mass, volume and time.
std::string formula(Dim d, const char* (*word)(int)) {
    const int e[3] = {d.mass, d.volume, d.time};
    std::string num, den;
    int den_count = 0;
    for (int b = 0; b < 3; ++b) {
        if (e[b] == 0) continue;
        std::string& part = e[b] > 0 ? num : den;
        const int k = e[b] > 0 ? e[b] : -e[b];
        if (!part.empty()) part += '*';
        part += word(b);
        if (k != 1) part.append(1, '^').append(std::to_string(k));
        if (e[b] < 0) ++den_count;
    }
    if (den.empty()) return num;
    if (num.empty()) num.push_back('1');
    num.push_back('/');
    if (den_count > 1) return num.append(1, '(').append(den).append(1, ')');
    return num.append(den);
}

}  // namespace

Unit parse_unit(std::string_view text) {
    Parser p(text);
    if (p.at_end()) return Unit{1.0, kNone};
    const Unit u = p.expression();
    p.expect_end();
    return u;
}

namespace {

// Parses "<number> [unit]"; sets `unit_start` to the offset of the unit (text.size() if there is none).
Quantity parse_number_and_unit(std::string_view text, std::size_t& unit_start) {
    Parser p(text);
    if (p.at_end()) throw TextError("empty quantity", 0, 1, kNumberHint);
    const std::size_t start = p.pos();
    std::size_t first = start;
    if (text[first] == '+' && first + 1 < text.size() && (is_digit(text[first + 1]) || text[first + 1] == '.'))
        ++first;
    double value = 0.0;
    const auto [ptr, ec] = std::from_chars(text.data() + first, text.data() + text.size(), value);
    const std::size_t end = static_cast<std::size_t>(ptr - text.data());
    if (ec == std::errc::invalid_argument) {
        std::size_t last = text.size();
        while (last > start && (text[last - 1] == ' ' || text[last - 1] == '\t')) --last;
        throw TextError("expected a number at the start of " + quoted(text.substr(start, last - start)), start, 1,
                        kNumberHint);
    }
    const std::string_view num = text.substr(start, end - start);
    if (ec == std::errc::result_out_of_range && !overflows(num))
        throw TextError(quoted(num) + " is too close to zero to represent", start, num.size(),
                        "a number of magnitude above 1e-308, or 0");
    if (ec != std::errc() || !std::isfinite(value))
        throw TextError(quoted(num) + " is not a finite number", start, num.size(), "a finite number, e.g. '250 mg'");

    Parser up(text, end);
    Unit u{1.0, kNone};
    unit_start = text.size();
    if (!up.at_end()) {
        unit_start = up.pos();
        u = up.expression();
        up.expect_end();
    }
    const double canonical = value * u.factor;
    if (!std::isfinite(canonical))
        throw TextError(quoted(text) + " is not a finite number once converted to mg, L and h", start,
                        text.size() - start, "a smaller value");
    return Quantity{canonical, u.dim};
}

}  // namespace

Quantity parse_quantity(std::string_view text) {
    std::size_t unit_start = 0;
    return parse_number_and_unit(text, unit_start);
}

namespace {
// The units worth suggesting for a dimension, for "unknown unit" messages.
std::string unit_examples(Dim d) {
    if (d == kMass) return "an amount unit: ng, ug, mg, g, kg";
    if (d == kVolume) return "a volume unit: mL, dL, L";
    if (d == kTime) return "a time unit: s, min, h, d, wk";
    if (d == kRate) return "a rate unit such as 1/h or 1/min";
    if (d == kConc) return "a concentration unit such as mg/L, ug/mL, ng/mL";
    if (d == kAmountRate) return "an input rate unit such as mg/h or g/d";
    if (d == kFlow) return "a clearance unit such as L/h or mL/min";
    if (d == kExposure) return "an exposure unit such as mg*h/L";
    if (d == kNone) return "a plain number or a percentage, like 0.8 or 80 %";
    return "a unit of " + dim_name(d);
}
}  // namespace

Quantity parse_quantity(std::string_view text, Dim expected) {
    std::size_t unit_start = 0;
    Quantity q;
    try {
        q = parse_number_and_unit(text, unit_start);
    } catch (const TextError& e) {
        // The generic unit list is less help than the units this value needs.
        if (std::string_view(e.what()).rfind("unknown unit", 0) == 0)
            throw TextError(e.what(), e.offset(), e.length(), unit_examples(expected));
        throw;
    }
    if (q.dim == expected) return q;
    // Point at the unit if there is one, else at the whole text.
    std::size_t b = unit_start, e = text.size();
    if (b == e) b = 0;
    while (b < e && (text[b] == ' ' || text[b] == '\t')) ++b;
    while (e > b && (text[e - 1] == ' ' || text[e - 1] == '\t')) --e;
    const std::string got = q.dim.dimensionless() ? "dimensionless" : formula(q.dim, dim_word);
    throw TextError("expected " + dim_name(expected) + ", got " + quoted(text) + " (" + got + ")", b, e - b,
                    dim_name(expected));
}

std::string dim_name(Dim d) {
    if (d == kNone) return "a dimensionless number";
    if (d == kMass) return "an amount (mass)";
    if (d == kVolume) return "a volume";
    if (d == kTime) return "a duration (time)";
    if (d == kRate) return "a rate constant (1/time)";
    if (d == kConc) return "a concentration (mass/volume)";
    if (d == kAmountRate) return "an input rate (mass/time)";
    if (d == kFlow) return "a clearance (volume/time)";
    if (d == kExposure) return "an exposure (mass*time/volume)";
    return "a quantity of dimension " + formula(d, dim_word);
}

std::string canonical_unit(Dim d) { return formula(d, unit_word); }

}  // namespace plateau::units
