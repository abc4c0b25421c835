// "Did you mean ...?" for a misspelt name: the one edit-distance helper every diagnostic uses (keys, units, model
// ids, routes, outputs, identifiers, command-line options).
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace plateau {

// Edits (insert, delete, substitute, swap two neighbours) that turn `a` into `b`, by byte.
std::size_t edit_distance(std::string_view a, std::string_view b);

// The candidate closest to `word`, or "" when none is close enough to be a likely typo: the same letters in
// another case, or at most one edit (two for words of six letters or more) and fewer edits than `word` has
// letters.
// Ties go to the candidate with the longest common prefix, then to the earlier one.
std::string closest(std::string_view word, const std::vector<std::string>& candidates);

// "; did you mean 'x'?" for the closest candidate, or "" (appended to an "unknown ..." message).
std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates);

}  // namespace plateau
