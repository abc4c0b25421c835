#include "report/format.hpp"

#include <cmath>
#include <cstdio>

namespace plateau::report {

std::string auc_unit(std::string_view u) {
    if (u.empty()) return "h";
    const auto slash = u.find('/');
    if (slash == std::string_view::npos) return std::string(u) + "·h";
    return std::string(u.substr(0, slash)) + "·h" + std::string(u.substr(slash));
}

std::string num(double v, int sig) {
    if (!std::isfinite(v)) return "—";
    char buf[64];
    const double a = std::abs(v);
    if (a != 0.0 && (a >= 1e7 || a < 1e-4)) {
        std::snprintf(buf, sizeof buf, "%.*e", sig - 1, v);
        return buf;
    }
    // Decimals so that `sig` significant digits show, at least none.
    int digits = a == 0.0 ? 0 : static_cast<int>(std::floor(std::log10(a))) + 1;
    int decimals = std::max(0, sig - digits);
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
    std::string s = buf;
    // Trailing zeros carry no information: "10.0000" -> "10", "0.156250" -> "0.15625".
    if (s.find('.') != std::string::npos) {
        while (s.back() == '0') s.pop_back();
        if (s.back() == '.') s.pop_back();
    }
    if (s == "-0" || s.rfind("-0.", 0) == 0) {
        bool zero = s.find_first_not_of("-0.") == std::string::npos;
        if (zero) s.erase(0, 1);
    }
    return s;
}

std::string hours(std::optional<double> h, int decimals) {
    if (!h) return "—";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f h", decimals, *h);
    return buf;
}

std::string general(double v, int digits) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*g", digits, v);
    return buf;
}

std::string tolerance_text(double tol) { return general(tol, 6); }

std::string percent(double fraction) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.1f %%", 100.0 * fraction);
    return buf;
}

double in_output_unit(const model::Output& o, double canonical) { return canonical / o.unit.factor; }

std::size_t display_width(std::string_view s) {
    std::size_t w = 0;
    for (unsigned char c : s)
        if ((c & 0xC0) != 0x80) ++w;
    return w;
}

std::string pad_right(std::string_view s, std::size_t width) {
    std::string out(s);
    for (std::size_t w = display_width(s); w < width; ++w) out += ' ';
    return out;
}

std::string pad_left(std::string_view s, std::size_t width) {
    std::string out;
    for (std::size_t w = display_width(s); w < width; ++w) out += ' ';
    return out + std::string(s);
}

std::string day_clock(double t, double start_clock) {
    // Calendar days: day 1 is the day t = 0 falls on, and a new day starts at midnight.
    const long minutes = std::lround((t + start_clock) * 60.0);  // from midnight before t = 0
    const long day = (minutes >= 0 ? minutes / 1440 : -((-minutes + 1439) / 1440)) + 1;
    const long of_day = (minutes % 1440 + 1440) % 1440;
    char buf[48];
    std::snprintf(buf, sizeof buf, "day %ld %02ld:%02ld", day, of_day / 60, of_day % 60);
    return buf;
}

}  // namespace plateau::report
