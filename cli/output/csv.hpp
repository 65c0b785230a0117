// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A small builder for numeric CSV tables: `# ` comment lines first (units, provenance), then one
/// line of column names, then rows of numbers in shortest round-trip form ("0.1", "1e-05",
/// "nan", "inf"). Lines end in "\n"; names holding a comma, quote or line break are quoted.
#include <cstddef>
#include <filesystem>
#include <initializer_list>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace voidsign::cli {

/// Formats `v` as the shortest text that reads back to exactly `v`.
std::string format_number(double v);

/// A table of doubles with named columns.
class CsvTable {
 public:
  /// A table with these column names (at least one).
  explicit CsvTable(std::vector<std::string> columns);

  /// Adds a comment line, written as "# text" before the column names. Line breaks in `text`
  /// start new comment lines.
  void comment(std::string_view text);
  /// Appends a row; throws std::invalid_argument unless it has one value per column.
  void add_row(std::span<const double> values);
  /// Same, for a braced list of values.
  void add_row(std::initializer_list<double> values);

  std::size_t n_columns() const { return columns_.size(); }
  std::size_t n_rows() const { return n_columns() ? values_.size() / n_columns() : 0; }

  /// The whole table as text.
  std::string str() const;
  /// Writes str() to `path` atomically (write_text_atomic); throws WriteError on failure.
  void write(const std::filesystem::path& path) const;

 private:
  std::vector<std::string> comments_;
  std::vector<std::string> columns_;
  std::vector<double> values_;  // row-major
};

}  // namespace voidsign::cli
