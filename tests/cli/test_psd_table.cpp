// SPDX-License-Identifier: GPL-3.0-or-later
// User PSD tables (noise: {table: psd.csv}): valid files read into SI units, and every rejected
// file names the file, the line and the column of the mistake, with a hint.
#include <doctest/doctest.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include "cli/errors.hpp"
#include "cli/scenario/psd_table.hpp"

namespace fs = std::filesystem;
using namespace voidsign::cli;
using voidsign::solver::PsdQuantity;

namespace {

/// A fresh folder under the system temp folder, removed at scope exit.
struct ScratchDir {
  fs::path path;
  explicit ScratchDir(const std::string& tag)
      : path(fs::temp_directory_path() /
             ("voidsign-psd-" + tag + "-" + std::to_string(static_cast<long>(::getpid())))) {
    fs::remove_all(path);
    fs::create_directories(path);
  }
  ~ScratchDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

/// Writes `text` to DIR/psd.csv and returns its path.
fs::path write_table(const ScratchDir& dir, const std::string& text) {
  const fs::path p = dir.path / "psd.csv";
  std::ofstream(p, std::ios::binary) << text;
  return p;
}

/// The InputError message of reading `text` from a file, with the file's path shortened to
/// "psd.csv"; "" if the file is accepted.
std::string error_of(const std::string& text) {
  ScratchDir dir("err");
  const fs::path p = write_table(dir, text);
  try {
    read_psd_table(p);
  } catch (const InputError& e) {
    std::string m = e.what();
    const std::string full = p.string();
    if (m.starts_with(full)) m = "psd.csv" + m.substr(full.size());
    return m;
  }
  return "";
}

bool contains(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

}  // namespace

TEST_CASE("PSD table: a valid file with comments, blank lines, spaces and CRLF line ends") {
  ScratchDir dir("ok");
  const fs::path p = write_table(dir,
                                 "\xEF\xBB\xBF# Vertical ambient noise over a quarry floor (invented example)\r\n"
                                 "# velocity PSD, one-sided\r\n"
                                 "\r\n"
                                 " f_hz , vel_psd_m2_s2_hz \r\n"
                                 "0.1,2.0e-14\r\n"
                                 "  # a comment between rows\r\n"
                                 "1, 5e-16\r\n"
                                 "+20,1E-17");
  const PsdTable t = read_psd_table(p);
  CHECK(t.column == "vel_psd_m2_s2_hz");
  CHECK(!t.decibels);
  CHECK(t.psd.quantity == PsdQuantity::velocity);
  REQUIRE(t.psd.f_hz.size() == 3);
  CHECK(t.psd.f_hz[0] == 0.1);
  CHECK(t.psd.f_hz[2] == 20);
  CHECK(t.psd.value[1] == 5e-16);
  CHECK(t.psd.value[2] == 1e-17);
  CHECK(t.first_row_line == 5);
  CHECK(t.last_row_line == 8);
  CHECK(t.file == p.string());
  CHECK_NOTHROW(check_band_in_table(t, 0.1, 20));
  CHECK_NOTHROW(check_band_in_table(t, 0.5, 2));
}

TEST_CASE("PSD table: dB columns convert by 10^(dB/10) and state the quantity") {
  const PsdTable a = parse_psd_table("f_hz,accel_psd_db\n0.1,-140\n10,-165.5\n", "a.csv");
  CHECK(a.decibels);
  CHECK(a.psd.quantity == PsdQuantity::acceleration);
  CHECK(a.psd.value[0] == doctest::Approx(1e-14).epsilon(1e-14).scale(0));
  CHECK(a.psd.value[1] == doctest::Approx(std::pow(10.0, -16.55)).epsilon(1e-14).scale(0));
  CHECK(parse_psd_table("f_hz,disp_psd_db\n1,-200\n2,-210\n", "d.csv").psd.quantity == PsdQuantity::displacement);
  CHECK(parse_psd_table("f_hz,disp_psd_m2_hz\n1,1e-20\n2,1e-21\n", "d.csv").psd.quantity == PsdQuantity::displacement);
  CHECK(parse_psd_table("f_hz,accel_psd_m2_s4_hz\n1,1e-16\n2,1e-16\n", "a.csv").psd.quantity == PsdQuantity::acceleration);
  CHECK(parse_psd_table("f_hz,vel_psd_db\n1,-150\n2,-150\n", "v.csv").psd.quantity == PsdQuantity::velocity);
  CHECK(psd_column_names().size() == 6);
}

TEST_CASE("PSD table: header mistakes name line and column") {
  // Unknown or unit-less PSD column.
  std::string m = error_of("# measured\nf_hz,psd\n0.1,1e-14\n1,1e-15\n");
  CHECK(m.starts_with("psd.csv:2:6: unknown PSD column 'psd'"));
  CHECK(contains(m, "accel_psd_m2_s4_hz"));
  // A near miss gets a suggestion.
  m = error_of("f_hz,vel_psd_m2_s_hz\n0.1,1e-14\n1,1e-15\n");
  CHECK(m.starts_with("psd.csv:1:6: unknown PSD column 'vel_psd_m2_s_hz'"));
  CHECK(contains(m, "did you mean 'vel_psd_m2_s2_hz'?"));
  // The frequency column.
  m = error_of("freq,accel_psd_db\n0.1,-140\n1,-150\n");
  CHECK(m.starts_with("psd.csv:1:1: first column 'freq' must be 'f_hz'"));
  // Column count.
  m = error_of("\n\nf_hz,accel_psd_db,vel_psd_db\n0.1,-140,-150\n");
  CHECK(m.starts_with("psd.csv:3:19: the header names 3 column(s)"));
  m = error_of("f_hz\n0.1\n");
  CHECK(m.starts_with("psd.csv:1:5: the header names 1 column(s)"));
  // Nothing but comments.
  m = error_of("# only a comment\n\n");
  CHECK(m.starts_with("psd.csv:1:1: no header line"));
  m = error_of("");
  CHECK(m.starts_with("psd.csv:1:1: no header line"));
}

TEST_CASE("PSD table: cell mistakes name line and column") {
  const std::string head = "# units are in the column name\nf_hz,accel_psd_m2_s4_hz\n";  // lines 1-2
  std::string m = error_of(head + "0.1,1e-14\n0.5,abc\n");
  CHECK(m.starts_with("psd.csv:4:5: 'abc' is not a number"));
  m = error_of(head + "0.1,1e-14\n0.5x,1e-15\n");
  CHECK(m.starts_with("psd.csv:4:1: '0.5x' is not a number"));
  m = error_of(head + "0.1,1e-14\n0.5,  \n");
  CHECK(m.starts_with("psd.csv:4:5: empty cell"));
  m = error_of(head + "0.1,1e-14\n0.5,nan\n");
  CHECK(m.starts_with("psd.csv:4:5: 'nan' is not a finite number"));
  m = error_of(head + "0.1,1e-14\n0.5,1e-15,7\n");
  CHECK(m.starts_with("psd.csv:4:11: row has 3 cell(s) but the header names 2"));
  m = error_of(head + "0.1,1e-14\n0.5\n");
  CHECK(m.starts_with("psd.csv:4:4: row has 1 cell(s) but the header names 2"));
  m = error_of(head + "0.1,1e-14\n1,1e999\n");
  CHECK(m.starts_with("psd.csv:4:3: '1e999' is out of the range of a double"));
}

TEST_CASE("PSD table: frequencies and values out of order or out of range name line and column") {
  const std::string head = "f_hz,vel_psd_m2_s2_hz\n";  // line 1
  std::string m = error_of(head + "0.1,1e-14\n0.5,1e-15\n0.5,1e-16\n");
  CHECK(m.starts_with("psd.csv:4:1: frequency 0.5 Hz does not exceed 0.5 Hz on line 3"));
  CHECK(contains(m, "strictly increasing"));
  m = error_of(head + "0.1,1e-14\n0.05,1e-15\n");
  CHECK(m.starts_with("psd.csv:3:1: frequency 0.05 Hz does not exceed 0.1 Hz on line 2"));
  m = error_of(head + "0,1e-14\n1,1e-15\n");
  CHECK(m.starts_with("psd.csv:2:1: frequency 0 Hz must be positive"));
  m = error_of(head + "-1,1e-14\n1,1e-15\n");
  CHECK(m.starts_with("psd.csv:2:1: frequency -1 Hz must be positive"));
  m = error_of(head + "0.1,1e-14\n1,0\n");
  CHECK(m.starts_with("psd.csv:3:3: PSD value 0 must be positive"));
  m = error_of(head + "0.1,-1e-14\n1,1e-15\n");
  CHECK(m.starts_with("psd.csv:2:5: PSD value -1e-14 must be positive"));
  // A dB column takes negative values; a value that overflows once converted does not.
  CHECK(error_of("f_hz,vel_psd_db\n0.1,-150\n1,-160\n").empty());
  m = error_of("f_hz,vel_psd_db\n0.1,-150\n1,4000\n");
  CHECK(m.starts_with("psd.csv:3:3: PSD value 4000 dB is beyond the range"));
}

TEST_CASE("PSD table: fewer than two rows, and missing files") {
  std::string m = error_of("f_hz,disp_psd_m2_hz\n# no rows yet\n");
  CHECK(m.starts_with("psd.csv:1:1: the table has 0 data row(s)"));
  m = error_of("f_hz,disp_psd_m2_hz\n\n1,1e-18\n");
  CHECK(m.starts_with("psd.csv:3:1: the table has 1 data row(s)"));
  CHECK(contains(m, "at least two rows"));
  ScratchDir dir("missing");
  try {
    read_psd_table(dir.path / "absent.csv");
    FAIL("no error for a missing file");
  } catch (const InputError& e) {
    CHECK(contains(e.what(), "absent.csv: no such PSD table file"));
  }
  try {
    read_psd_table(dir.path);
    FAIL("no error for a folder");
  } catch (const InputError& e) {
    CHECK(contains(e.what(), "is a folder"));
  }
}

TEST_CASE("PSD table: a band outside the table names the band and the table's range") {
  const PsdTable t = parse_psd_table("# header on line 2\nf_hz,accel_psd_db\n0.2,-140\n5,-150\n12,-160\n", "psd.csv");
  CHECK_NOTHROW(check_band_in_table(t, 0.2, 12));
  try {
    check_band_in_table(t, 0.1, 20);
    FAIL("no error for a band outside the table");
  } catch (const InputError& e) {
    const std::string m = e.what();
    CHECK(m.starts_with("psd.csv:3:1: band [0.1, 20] Hz reaches outside the PSD table psd.csv, which covers 0.2 to 12 Hz"));
    CHECK(contains(m, "(extend the table or narrow the band)"));
  }
  try {
    check_band_in_table(t, 1, 13, "case.yaml:14:11: key 'analyses.ambient.band'");
    FAIL("no error for a band above the table");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).starts_with(
        "case.yaml:14:11: key 'analyses.ambient.band': band [1, 13] Hz reaches outside the PSD table psd.csv"));
  }
  CHECK_THROWS_AS(check_band_in_table(t, 5, 1), InputError);
  CHECK_THROWS_AS(check_band_in_table(t, 0, 1), InputError);
}
