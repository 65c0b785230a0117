// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Power spectral densities of ground motion and the standard ambient-noise models.
///
/// Convention: every PSD here is ONE-SIDED, defined on positive frequencies only, so that the
/// variance of the signal is the integral of the PSD over f > 0:  σ² = ∫₀^∞ PSD(f) df, and the
/// RMS in a band is √(∫_{f_lo}^{f_hi} PSD(f) df). SI units throughout: frequencies in Hz, PSD in
/// (m/s²)²/Hz (acceleration), (m/s)²/Hz (velocity) or m²/Hz (displacement); dB values are
/// 10·log10 of the PSD in those units ("dB re 1 (m/s²)²/Hz" etc.).
///
/// A tabulated PSD is read as a piecewise power law between its points (straight lines on
/// log–log axes); interpolation and band integration are exact for that reading.
///
/// The noise models are J. Peterson (1993), "Observations and modeling of seismic background
/// noise", U.S. Geological Survey Open-File Report 93-322: the New Low and New High Noise
/// Models (NLNM, NHNM) of the vertical ground acceleration, PSD_dB(T) = A + B·log10(T) with T
/// the period in seconds, piecewise from the published breakpoint table, defined for
/// 0.1 s ≤ T ≤ 100000 s (10 Hz down to 1e-5 Hz).
///
/// Every function throws std::invalid_argument for arguments outside its domain (a frequency
/// outside a table or outside the models' range, a malformed table, a reversed band).
#include <span>
#include <string_view>
#include <vector>

namespace voidsign::solver {

/// What a PSD describes. Each quantity has its SI unit: see psd_unit.
enum class PsdQuantity {
  acceleration,  ///< (m/s²)²/Hz
  velocity,      ///< (m/s)²/Hz
  displacement   ///< m²/Hz
};

/// The SI unit of a one-sided PSD of `q`, e.g. "(m/s^2)^2/Hz".
std::string_view psd_unit(PsdQuantity q);

/// A one-sided PSD tabulated at increasing frequencies, read as a piecewise power law.
struct Psd {
  std::vector<double> f_hz;   ///< Hz, strictly increasing, > 0; at least two points
  std::vector<double> value;  ///< PSD at f_hz, > 0, in the SI unit of `quantity`
  PsdQuantity quantity = PsdQuantity::acceleration;
};

/// Throws std::invalid_argument unless `psd` has at least two points, equal lengths, finite
/// strictly increasing positive frequencies and finite positive values.
void check_psd(const Psd& psd);

/// The same spectrum expressed as another quantity, point by point: a harmonic motion of
/// angular frequency ω = 2πf has |a| = ω|v| = ω²|d|, so PSD_v = PSD_a/ω², PSD_d = PSD_a/ω⁴.
/// A power law stays a power law, so the log–log reading of the table is preserved.
Psd convert(const Psd& psd, PsdQuantity to);

/// The PSD at f_hz by log–log interpolation (exact for the piecewise power law), in the unit
/// of psd.quantity. f_hz must lie in [psd.f_hz.front(), psd.f_hz.back()].
double psd_at(const Psd& psd, double f_hz);

/// ∫_{f_lo}^{f_hi} PSD(f) df, integrated exactly for the piecewise power law between table
/// points; the variance in the band (one-sided convention) in m², (m/s)² or (m/s²)².
/// Requires psd.f_hz.front() ≤ f_lo ≤ f_hi ≤ psd.f_hz.back().
double band_variance(const Psd& psd, double f_lo_hz, double f_hi_hz);

/// √band_variance: the RMS of the quantity in the band [m, m/s or m/s²].
double band_rms(const Psd& psd, double f_lo_hz, double f_hi_hz);

/// ∫_a^b v(a)·(f/a)^α df for 0 < a ≤ b: the integral of one power-law piece that takes the
/// value v_a at a and has log–log slope α. Stable through α = −1 (where it is v_a·a·ln(b/a)).
double power_law_integral(double v_a, double a_hz, double b_hz, double alpha);

/// One frequency band [Hz].
struct FrequencyBand {
  double lo_hz = 0;      ///< lower edge, Hz
  double hi_hz = 0;      ///< upper edge, Hz
  double centre_hz = 0;  ///< nominal centre of the full band (unchanged by clipping), Hz
};

/// The base-2 octave bands that overlap [f_lo, f_hi] (0 < f_lo < f_hi), clipped to it: centres
/// 1 Hz·2^k (k integer), edges centre·2^(−1/2) and centre·2^(+1/2). The bands are in increasing
/// order; the first starts at f_lo, the last ends at f_hi, and each band's upper edge is the
/// next band's lower edge bit for bit (no gaps, no overlaps). A band that would only touch
/// [f_lo, f_hi] at one point is left out.
std::vector<FrequencyBand> octave_bands(double f_lo_hz, double f_hi_hz);

/// Peterson's (1993) two vertical noise models.
enum class NoiseModel {
  low,  ///< New Low Noise Model (NLNM): the quietest observed vertical ground acceleration
  high  ///< New High Noise Model (NHNM): the noisiest
};

/// One row of Peterson's table: the row applies from its period up to (not including) the next
/// row's period; the last row up to 100000 s.
struct PetersonRow {
  double period_s = 0;         ///< s
  double a_db = 0;             ///< dB re 1 (m/s²)²/Hz
  double b_db_per_decade = 0;  ///< dB per decade of period
};

/// The published breakpoint table of `m`, by increasing period.
std::span<const PetersonRow> peterson_table(NoiseModel m);

constexpr double peterson_min_period_s = 0.1;     ///< s; the models are undefined below
constexpr double peterson_max_period_s = 100000;  ///< s; and above

/// The model's acceleration PSD [dB re 1 (m/s²)²/Hz] at period T [s], A + B·log10(T) with the
/// row whose period is the largest not above T. T in [0.1, 100000] s (a relative tolerance of
/// 1e-12 at the ends absorbs the rounding of 1/f).
double peterson_db(NoiseModel m, double period_s);

/// The model's acceleration PSD [(m/s²)²/Hz] at f [Hz], 1e-5 ≤ f ≤ 10 Hz.
double peterson_accel_psd(NoiseModel m, double f_hz);

/// The model sampled at the given frequencies (strictly increasing, within 1e-5–10 Hz), as a
/// PSD of quantity `q`.
Psd peterson_psd(NoiseModel m, std::span<const double> f_hz, PsdQuantity q = PsdQuantity::acceleration);

/// The model sampled at f_lo, f_hi and every breakpoint strictly between them, as a PSD of
/// quantity `q`. Each piece of the model is a power law in f, so the log–log reading of this
/// table follows the model to within its own jumps at the breakpoints (below 0.02 dB).
Psd peterson_breakpoints_psd(NoiseModel m, double f_lo_hz, double f_hi_hz, PsdQuantity q = PsdQuantity::acceleration);

/// ∫_{f_lo}^{f_hi} PSD(f) df of the model as quantity `q`, integrated exactly piece by piece
/// (each piece 10^(A/10)·T^(B/10) is a power law in f); 1e-5 ≤ f_lo ≤ f_hi ≤ 10 Hz.
/// In m², (m/s)² or (m/s²)².
double peterson_band_variance(NoiseModel m, double f_lo_hz, double f_hi_hz, PsdQuantity q);

}  // namespace voidsign::solver
