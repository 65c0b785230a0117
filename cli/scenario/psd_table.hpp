// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// User-supplied ambient-noise spectra (`noise: {table: psd.csv}`): a two-column CSV file of a
/// one-sided PSD against frequency, read into a solver::Psd in SI units.
///
/// Format (docs/instruments.md):
///   - lines whose first non-blank character is '#' are comments; blank lines are skipped;
///   - the first other line names the two columns: `f_hz` and one PSD column whose name states
///     the quantity and the unit:
///       accel_psd_m2_s4_hz  (m/s²)²/Hz       accel_psd_db  dB re 1 (m/s²)²/Hz
///       vel_psd_m2_s2_hz    (m/s)²/Hz        vel_psd_db    dB re 1 (m/s)²/Hz
///       disp_psd_m2_hz      m²/Hz            disp_psd_db   dB re 1 m²/Hz
///   - then at least two rows of numbers, frequency strictly increasing and positive, PSD
///     positive (dB columns: any finite value, converted by 10^(dB/10)).
/// Every mistake throws InputError "FILE:LINE:COL: problem (hint)", LINE and COL 1-based.
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "solver/signals/noise_model.hpp"

namespace voidsign::cli {

/// A PSD table as read from a file.
struct PsdTable {
  solver::Psd psd;             ///< linear SI units of psd.quantity (dB columns converted)
  std::string file;            ///< the file as named in messages
  std::string column;          ///< the PSD column's name as written
  bool decibels = false;       ///< the file gave dB values
  int first_row_line = 0;      ///< 1-based line of the first data row
  int last_row_line = 0;       ///< 1-based line of the last data row
};

/// The accepted PSD column names, in the order listed in the file comment.
std::vector<std::string> psd_column_names();

/// Reads and validates `file`; messages name it as file.string().
PsdTable read_psd_table(const std::filesystem::path& file);

/// Parses the text of a PSD table; `file_label` names it in messages.
PsdTable parse_psd_table(std::string_view text, const std::string& file_label);

/// Throws InputError unless table.psd covers [f_lo, f_hi] [Hz] (0 < f_lo < f_hi). The message
/// names the band and the table's range. It starts with `where` (e.g.
/// "scenario.yaml:14:11: key 'analyses.ambient.band'") or, when `where` is empty, with the
/// table's file and the line of its first data row.
void check_band_in_table(const PsdTable& table, double f_lo_hz, double f_hi_hz, const std::string& where = "");

}  // namespace voidsign::cli
