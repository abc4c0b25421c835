#include "core/suggest.hpp"

#include <algorithm>

namespace plateau {

namespace {

char lower(char c) { return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c; }

bool same_ignoring_case(std::string_view a, std::string_view b) {
    if (a.size() != b.size()) return false;
    for (std::size_t i = 0; i < a.size(); ++i)
        if (lower(a[i]) != lower(b[i])) return false;
    return true;
}

}  // namespace

std::size_t edit_distance(std::string_view a, std::string_view b) {
    // Optimal string alignment: three rows of the dynamic-programming table.
    const std::size_t n = b.size();
    std::vector<std::size_t> before(n + 1), prev(n + 1), cur(n + 1);
    for (std::size_t j = 0; j <= n; ++j) prev[j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
        cur[0] = i;
        for (std::size_t j = 1; j <= n; ++j) {
            const std::size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
            cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
            if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                cur[j] = std::min(cur[j], before[j - 2] + 1);
        }
        std::swap(before, prev);
        std::swap(prev, cur);
    }
    return prev[n];
}

std::string closest(std::string_view word, const std::vector<std::string>& candidates) {
    if (word.empty()) return {};
    for (const auto& c : candidates)
        if (c != word && same_ignoring_case(word, c)) return c;
    const std::size_t allowed = word.size() >= 6 ? 2 : 1;
    // Among equally close candidates, the one that starts like the word: "mgg" is more likely "mg" than "mcg".
    auto prefix = [&](const std::string& c) {
        std::size_t n = 0;
        while (n < c.size() && n < word.size() && c[n] == word[n]) ++n;
        return n;
    };
    std::string best;
    std::size_t best_d = allowed + 1, best_p = 0;
    for (const auto& c : candidates) {
        if (c == word) continue;
        const std::size_t d = edit_distance(word, c);
        if (d > allowed || d >= word.size()) continue;
        if (d < best_d || (d == best_d && prefix(c) > best_p)) {
            best = c;
            best_d = d;
            best_p = prefix(c);
        }
    }
    return best;
}

std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates) {
    const std::string c = closest(word, candidates);
    return c.empty() ? std::string() : "; did you mean '" + c + "'?";
}

}  // namespace plateau
