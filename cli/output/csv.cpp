// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/output/csv.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <stdexcept>
#include <utility>

#include "cli/output/output_dir.hpp"

namespace voidsign::cli {
namespace {

/// A column name as a CSV field: quoted (with doubled quotes) only when it must be.
std::string csv_field(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char ch : s) {
    if (ch == '"') out += '"';
    out += ch;
  }
  out += '"';
  return out;
}

}  // namespace

std::string format_number(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v < 0 ? "-inf" : "inf";
  std::array<char, 32> buf{};
  const auto [end, ec] = std::to_chars(buf.data(), buf.data() + buf.size(), v);
  if (ec != std::errc{}) throw std::runtime_error("cannot format a number");
  return std::string(buf.data(), end);
}

CsvTable::CsvTable(std::vector<std::string> columns) : columns_(std::move(columns)) {
  if (columns_.empty()) throw std::invalid_argument("CSV table without columns");
}

void CsvTable::comment(std::string_view text) {
  std::size_t start = 0;
  while (true) {
    const std::size_t nl = text.find('\n', start);
    std::string_view line = text.substr(start, nl == std::string_view::npos ? nl : nl - start);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    comments_.emplace_back(line);
    if (nl == std::string_view::npos) break;
    start = nl + 1;
  }
}

void CsvTable::add_row(std::span<const double> values) {
  if (values.size() != columns_.size())
    throw std::invalid_argument("CSV row has " + std::to_string(values.size()) +
                                " values for " + std::to_string(columns_.size()) + " columns");
  values_.insert(values_.end(), values.begin(), values.end());
}

void CsvTable::add_row(std::initializer_list<double> values) {
  add_row(std::span<const double>(values.begin(), values.size()));
}

std::string CsvTable::str() const {
  std::string out;
  for (const std::string& c : comments_) {
    out += c.empty() ? "#" : "# " + c;
    out += '\n';
  }
  for (std::size_t j = 0; j < columns_.size(); ++j) {
    if (j) out += ',';
    out += csv_field(columns_[j]);
  }
  out += '\n';
  const std::size_t nc = columns_.size();
  for (std::size_t r = 0; r < n_rows(); ++r) {
    for (std::size_t j = 0; j < nc; ++j) {
      if (j) out += ',';
      out += format_number(values_[r * nc + j]);
    }
    out += '\n';
  }
  return out;
}

void CsvTable::write(const std::filesystem::path& path) const { write_text_atomic(path, str()); }

}  // namespace voidsign::cli
