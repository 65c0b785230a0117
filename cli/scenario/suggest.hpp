// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Nearest-valid-word suggestions for unknown keys and values in a scenario file.
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace voidsign::cli {

/// Edit distance between `a` and `b`: insertions, deletions, substitutions and swaps of two
/// adjacent characters each cost 1 (optimal string alignment). ASCII letters compare without
/// regard to case, and '_' equals '-', so `near_void` is 0 away from `near-void`.
std::size_t edit_distance(std::string_view a, std::string_view b);

/// The candidate nearest to `word`, if it is close enough to be a likely slip: at most
/// max(2, |word|/3) edits and fewer edits than `word` has characters. Ties go to the candidate
/// listed first. Empty when nothing is that close.
std::optional<std::string> nearest_word(std::string_view word,
                                        const std::vector<std::string>& candidates);

/// Hint text for an unknown `word`, without parentheses: "did you mean 'radius'?" when a
/// candidate is close; "did you mean 'stiff-clay' or 'soft-clay'?" when `word` is one
/// hyphen-separated part of up to three candidates; otherwise "expected one of: a, b, c";
/// "" when there are no candidates.
std::string suggestion_hint(std::string_view word, const std::vector<std::string>& candidates);

}  // namespace voidsign::cli
