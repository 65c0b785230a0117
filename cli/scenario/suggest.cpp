// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/scenario/suggest.hpp"

#include <algorithm>

namespace voidsign::cli {
namespace {

using Strings = std::vector<std::string>;

char fold(char c) {
  if (c >= 'A' && c <= 'Z') return static_cast<char>(c - 'A' + 'a');
  if (c == '_') return '-';
  return c;
}

}  // namespace

std::size_t edit_distance(std::string_view a, std::string_view b) {
  const std::size_t n = a.size(), m = b.size();
  // Three rolling rows suffice for the adjacent-swap term, which looks two rows back.
  std::vector<std::size_t> back2(m + 1), back1(m + 1), row(m + 1);
  for (std::size_t j = 0; j <= m; ++j) back1[j] = j;
  for (std::size_t i = 1; i <= n; ++i) {
    row[0] = i;
    for (std::size_t j = 1; j <= m; ++j) {
      const bool same = fold(a[i - 1]) == fold(b[j - 1]);
      std::size_t best = std::min({back1[j] + 1, row[j - 1] + 1, back1[j - 1] + (same ? 0 : 1)});
      if (i > 1 && j > 1 && fold(a[i - 1]) == fold(b[j - 2]) && fold(a[i - 2]) == fold(b[j - 1]))
        best = std::min(best, back2[j - 2] + 1);
      row[j] = best;
    }
    std::swap(back2, back1);
    std::swap(back1, row);
  }
  return back1[m];
}

std::optional<std::string> nearest_word(std::string_view word,
                                        const std::vector<std::string>& candidates) {
  const std::size_t limit = std::max<std::size_t>(2, word.size() / 3);
  std::optional<std::string> best;
  std::size_t best_d = limit + 1;
  for (const auto& c : candidates) {
    const std::size_t d = edit_distance(word, c);
    if (d < best_d && d < word.size()) {
      best = c;
      best_d = d;
    }
  }
  return best;
}

std::string suggestion_hint(std::string_view word, const std::vector<std::string>& candidates) {
  if (candidates.empty()) return {};
  if (auto near = nearest_word(word, candidates)) return "did you mean '" + *near + "'?";
  // A word that is one part of hyphenated candidates ("clay" in "stiff-clay").
  Strings parts;
  for (const auto& c : candidates) {
    std::size_t start = 0;
    while (start <= c.size()) {
      const std::size_t end = std::min(c.find('-', start), c.size());
      if (end - start == word.size() && edit_distance(c.substr(start, end - start), word) == 0) {
        parts.push_back(c);
        break;
      }
      start = end + 1;
    }
  }
  if (!parts.empty() && parts.size() <= 3) {
    std::string s = "did you mean ";
    for (std::size_t i = 0; i < parts.size(); ++i)
      s += (i == 0 ? "'" : (i + 1 == parts.size() ? " or '" : ", '")) + parts[i] + "'";
    return s + "?";
  }
  std::string s = "expected one of: ";
  for (std::size_t i = 0; i < candidates.size(); ++i) s += (i ? ", " : "") + candidates[i];
  return s;
}

}  // namespace voidsign::cli
