// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/scenario/psd_table.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
#include <optional>
#include <sstream>
#include <system_error>
#include <utility>

#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "cli/scenario/suggest.hpp"

namespace voidsign::cli {

namespace {

namespace fs = std::filesystem;
using solver::PsdQuantity;

struct ColumnKind {
  std::string_view name;
  PsdQuantity quantity;
  bool decibels;
};

constexpr ColumnKind column_kinds[] = {
    {"accel_psd_m2_s4_hz", PsdQuantity::acceleration, false},
    {"vel_psd_m2_s2_hz", PsdQuantity::velocity, false},
    {"disp_psd_m2_hz", PsdQuantity::displacement, false},
    {"accel_psd_db", PsdQuantity::acceleration, true},
    {"vel_psd_db", PsdQuantity::velocity, true},
    {"disp_psd_db", PsdQuantity::displacement, true},
};

constexpr std::string_view frequency_column = "f_hz";

/// One comma-separated cell, trimmed, with the 1-based column where its text starts.
struct Cell {
  std::string_view text;
  int col = 1;
};

/// One line of the file, without its line break.
struct Line {
  std::string_view text;
  int number = 0;  // 1-based
};

class Reader {
 public:
  Reader(std::string_view text, std::string file) : text_(text), file_(std::move(file)) {
    if (text_.starts_with("\xEF\xBB\xBF")) text_.remove_prefix(3);  // UTF-8 byte-order mark
  }

  /// The next line that is neither blank nor a comment, if any.
  std::optional<Line> next_content_line() {
    while (!ended_) {
      Line l = next_line();
      const std::string_view t = trim(l.text);
      if (!t.empty() && t.front() != '#') return l;
    }
    return std::nullopt;
  }

  [[noreturn]] void fail(int line, int col, const std::string& problem) const {
    throw InputError(file_ + ":" + std::to_string(line) + ":" + std::to_string(col) + ": " + problem);
  }

  static std::string_view trim(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t' || s.back() == '\r')) s.remove_suffix(1);
    return s;
  }

  /// The 1-based column just after the last non-blank character of `line`.
  static int end_col(std::string_view line) {
    while (!line.empty() && (line.back() == ' ' || line.back() == '\t' || line.back() == '\r')) line.remove_suffix(1);
    return static_cast<int>(line.size()) + 1;
  }

  /// The cells of a raw line, each trimmed, with the column where its text starts.
  static std::vector<Cell> split(std::string_view line) {
    std::vector<Cell> cells;
    std::size_t start = 0;
    while (true) {
      const std::size_t comma = line.find(',', start);
      const std::string_view raw = line.substr(start, comma == std::string_view::npos ? std::string_view::npos : comma - start);
      std::size_t lead = 0;
      while (lead < raw.size() && (raw[lead] == ' ' || raw[lead] == '\t')) ++lead;
      if (trim(raw).empty()) lead = 0;  // a blank cell is reported where it starts
      cells.push_back({trim(raw), static_cast<int>(start + lead) + 1});
      if (comma == std::string_view::npos) break;
      start = comma + 1;
    }
    return cells;
  }

 private:
  Line next_line() {
    const std::size_t nl = text_.find('\n', pos_);
    const std::size_t end = nl == std::string_view::npos ? text_.size() : nl;
    Line l{text_.substr(pos_, end - pos_), ++line_no_};
    if (nl == std::string_view::npos) ended_ = true;
    pos_ = nl == std::string_view::npos ? text_.size() : nl + 1;
    return l;
  }

  std::string_view text_;
  std::string file_;
  std::size_t pos_ = 0;
  int line_no_ = 0;
  bool ended_ = false;
};

std::string column_list() {
  std::string s;
  for (const auto& k : column_kinds) s += (s.empty() ? "" : ", ") + std::string(k.name);
  return s;
}

/// The PSD column of the header, or an error at its cell.
const ColumnKind& header_kind(const Reader& r, const Line& l) {
  const auto cells = Reader::split(l.text);
  const int line = l.number;
  if (cells.size() != 2) {
    const int col = cells.size() > 2 ? cells[2].col : Reader::end_col(l.text);
    r.fail(line, col, "the header names " + std::to_string(cells.size()) +
                          " column(s); a PSD table has two (the first line that is not a comment names "
                          "them, e.g. f_hz,accel_psd_m2_s4_hz)");
  }
  if (cells[0].text != frequency_column)
    r.fail(line, cells[0].col, "first column '" + std::string(cells[0].text) +
                                   "' must be 'f_hz' (frequency in Hz)");
  for (const auto& k : column_kinds)
    if (cells[1].text == k.name) return k;
  std::vector<std::string> names = psd_column_names();
  std::string hint = suggestion_hint(cells[1].text, names);
  if (hint.starts_with("did you mean")) hint += "; the name states the quantity and its unit";
  else hint = "the name states the quantity and its unit: one of " + column_list();
  r.fail(line, cells[1].col, "unknown PSD column '" + std::string(cells[1].text) + "' (" + hint + ")");
}

/// A cell as a finite number, or an error at the cell.
double number_in(const Reader& r, int line, const Cell& c) {
  if (c.text.empty()) r.fail(line, c.col, "empty cell (expected a number)");
  std::string_view t = c.text;
  if (t.front() == '+') t.remove_prefix(1);
  double v = 0;
  const auto [end, ec] = std::from_chars(t.data(), t.data() + t.size(), v);
  if (ec == std::errc::result_out_of_range)
    r.fail(line, c.col, "'" + std::string(c.text) + "' is out of the range of a double");
  if (ec != std::errc{} || end != t.data() + t.size())
    r.fail(line, c.col, "'" + std::string(c.text) + "' is not a number (write e.g. 0.5 or 1.2e-15)");
  if (!std::isfinite(v)) r.fail(line, c.col, "'" + std::string(c.text) + "' is not a finite number");
  return v;
}

/// The linear PSD value of a cell: positive as given, or 10^(dB/10).
double psd_value(const Reader& r, int line, const Cell& c, bool decibels) {
  const double v = number_in(r, line, c);
  if (!decibels) {
    if (!(v > 0))
      r.fail(line, c.col, "PSD value " + format_number(v) + " must be positive (power cannot be zero or negative "
                                                  "on log-log axes; a _db column takes any finite value)");
    return v;
  }
  const double lin = std::pow(10.0, v / 10);
  if (!(lin > 0 && std::isfinite(lin)))
    r.fail(line, c.col, "PSD value " + format_number(v) + " dB is beyond the range of a double once converted");
  return lin;
}

}  // namespace

std::vector<std::string> psd_column_names() {
  std::vector<std::string> out;
  for (const auto& k : column_kinds) out.emplace_back(k.name);
  return out;
}

PsdTable parse_psd_table(std::string_view text, const std::string& file_label) {
  Reader r(text, file_label);
  const auto header = r.next_content_line();
  if (!header)
    r.fail(1, 1,
           "no header line (the first line that is not a comment names the columns, e.g. "
           "f_hz,accel_psd_m2_s4_hz)");
  const ColumnKind& kind = header_kind(r, *header);
  PsdTable t;
  t.file = file_label;
  t.column = std::string(kind.name);
  t.decibels = kind.decibels;
  t.psd.quantity = kind.quantity;
  int previous_line = 0;
  while (const auto l = r.next_content_line()) {
    const auto cells = Reader::split(l->text);
    if (cells.size() != 2) {
      const int col = cells.size() > 2 ? cells[2].col : Reader::end_col(l->text);
      r.fail(l->number, col, "row has " + std::to_string(cells.size()) +
                                 " cell(s) but the header names 2 (one frequency and one PSD value per row)");
    }
    const double f = number_in(r, l->number, cells[0]);
    if (!(f > 0))
      r.fail(l->number, cells[0].col, "frequency " + format_number(f) + " Hz must be positive (the table is read on "
                                                              "log-log axes)");
    if (!t.psd.f_hz.empty() && !(f > t.psd.f_hz.back()))
      r.fail(l->number, cells[0].col, "frequency " + format_number(f) + " Hz does not exceed " + format_number(t.psd.f_hz.back()) +
                                          " Hz on line " + std::to_string(previous_line) +
                                          " (sort the rows by strictly increasing frequency, without repeats)");
    t.psd.f_hz.push_back(f);
    t.psd.value.push_back(psd_value(r, l->number, cells[1], kind.decibels));
    if (t.first_row_line == 0) t.first_row_line = l->number;
    t.last_row_line = previous_line = l->number;
  }
  if (t.psd.f_hz.size() < 2)
    r.fail(t.psd.f_hz.empty() ? header->number : t.last_row_line, 1,
           "the table has " + std::to_string(t.psd.f_hz.size()) +
               " data row(s) (a PSD table needs at least two rows to span a band)");
  return t;
}

PsdTable read_psd_table(const fs::path& file) {
  std::error_code ec;
  const std::string name = file.string();
  if (!fs::exists(file, ec)) throw InputError(name + ": no such PSD table file");
  if (fs::is_directory(file, ec)) throw InputError(name + ": is a folder, not a PSD table file");
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(name + ": cannot open the PSD table for reading");
  std::ostringstream buf;
  buf << in.rdbuf();
  if (in.bad()) throw InputError(name + ": cannot read the PSD table");
  return parse_psd_table(buf.str(), name);
}

void check_band_in_table(const PsdTable& t, double f_lo, double f_hi, const std::string& where) {
  const std::string lead = where.empty() ? t.file + ":" + std::to_string(t.first_row_line) + ":1: " : where + ": ";
  const std::string band = "band [" + format_number(f_lo) + ", " + format_number(f_hi) + "] Hz";
  if (!(f_lo > 0 && f_lo < f_hi && std::isfinite(f_hi)))
    throw InputError(lead + band + " is not a band (it needs 0 < low < high)");
  const double lo = t.psd.f_hz.front(), hi = t.psd.f_hz.back();
  if (f_lo < lo || f_hi > hi)
    throw InputError(lead + band + " reaches outside the PSD table " + t.file + ", which covers " + format_number(lo) +
                     " to " + format_number(hi) + " Hz (extend the table or narrow the band)");
}

}  // namespace voidsign::cli
