// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/signals/noise_model.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <stdexcept>
#include <string>

namespace voidsign::solver {

namespace {

constexpr double two_pi = 2 * std::numbers::pi;

// J. Peterson (1993), Observations and modeling of seismic background noise, U.S. Geological
// Survey Open-File Report 93-322: the NLNM and NHNM breakpoint tables (period [s], A [dB],
// B [dB/decade]; PSD = A + B·log10(T) in dB re 1 (m/s²)²/Hz). Status: the coefficients agree
// digit for digit with three independent copies of the table and with a sampled open
// implementation to within its rounding; the report's own pages were not read.
// tests/data/peterson-1993.csv is the check copy read by the tests.
constexpr std::array<PetersonRow, 21> nlnm{{
    {0.10, -162.36, 5.64},   {0.17, -166.70, 0.00},   {0.40, -170.00, -8.30},
    {0.80, -166.40, 28.90},  {1.24, -168.60, 52.48},  {2.40, -159.98, 29.81},
    {4.30, -141.10, 0.00},   {5.00, -71.36, -99.77},  {6.00, -97.26, -66.49},
    {10.00, -132.18, -31.57}, {12.00, -205.27, 36.16}, {15.60, -37.65, -104.33},
    {21.90, -114.37, -47.10}, {31.60, -160.58, -16.28}, {45.00, -187.50, 0.00},
    {70.00, -216.47, 15.70}, {101.00, -185.00, 0.00}, {154.00, -168.34, -7.61},
    {328.00, -217.43, 11.90}, {600.00, -258.28, 26.60}, {10000.00, -346.88, 48.75},
}};
constexpr std::array<PetersonRow, 11> nhnm{{
    {0.10, -108.73, -17.23}, {0.22, -150.34, -80.50}, {0.32, -122.31, -23.87},
    {0.80, -116.85, 32.51},  {3.80, -108.48, 18.08},  {4.60, -74.66, -32.95},
    {6.30, 0.66, -127.18},   {7.90, -93.37, -22.42},  {15.40, 73.54, -162.98},
    {20.00, -151.52, 10.01}, {354.80, -206.66, 31.63},
}};

// Relative slack at the models' period limits, for periods computed as 1/f.
constexpr double limit_slack = 1e-12;

[[noreturn]] void fail(const std::string& what) { throw std::invalid_argument(what); }

/// A number for a message, in %g form ("0.1", "1e-05").
std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

/// Power of ω in PSD_q = PSD_acc / ω^(2·order): 0 acceleration, 1 velocity, 2 displacement.
int order_of(PsdQuantity q) {
  switch (q) {
    case PsdQuantity::acceleration: return 0;
    case PsdQuantity::velocity: return 1;
    case PsdQuantity::displacement: return 2;
  }
  return 0;
}

/// Index i of the table segment [f_i, f_{i+1}] that holds f (the last one for f = f.back()).
std::size_t segment_of(const std::vector<double>& f, double f_hz) {
  auto it = std::upper_bound(f.begin(), f.end(), f_hz);
  auto i = static_cast<std::size_t>(it - f.begin());
  return std::min(i == 0 ? 0 : i - 1, f.size() - 2);
}

/// Log–log slope of segment i.
double slope(const Psd& p, std::size_t i) {
  return std::log(p.value[i + 1] / p.value[i]) / std::log(p.f_hz[i + 1] / p.f_hz[i]);
}

void check_in_table(const Psd& p, double f_hz) {
  if (!(f_hz >= p.f_hz.front() && f_hz <= p.f_hz.back()))
    fail("frequency " + num(f_hz) + " Hz lies outside the PSD table (" +
         num(p.f_hz.front()) + "–" + num(p.f_hz.back()) + " Hz)");
}

/// Clamp a period within the rounding slack of the models' limits; reject anything else.
double checked_period(double period_s) {
  if (!(period_s >= peterson_min_period_s * (1 - limit_slack) &&
        period_s <= peterson_max_period_s * (1 + limit_slack)))
    fail("period " + num(period_s) +
         " s lies outside the Peterson (1993) noise models' range of 0.1–100000 s");
  return std::clamp(period_s, peterson_min_period_s, peterson_max_period_s);
}

std::size_t row_of(std::span<const PetersonRow> t, double period_s) {
  auto it = std::upper_bound(t.begin(), t.end(), period_s,
                             [](double p, const PetersonRow& r) { return p < r.period_s; });
  return static_cast<std::size_t>(it - t.begin()) - 1;  // period ≥ t[0].period_s = 0.1 s
}

double row_db(const PetersonRow& r, double period_s) { return r.a_db + r.b_db_per_decade * std::log10(period_s); }

double from_db(double db) { return std::pow(10.0, db / 10); }

void check_band(double f_lo, double f_hi) {
  if (!(f_lo > 0 && f_lo <= f_hi && std::isfinite(f_hi)))
    fail("invalid frequency band [" + num(f_lo) + ", " + num(f_hi) +
         "] Hz: it needs 0 < f_lo ≤ f_hi");
}

}  // namespace

std::string_view psd_unit(PsdQuantity q) {
  switch (q) {
    case PsdQuantity::acceleration: return "(m/s^2)^2/Hz";
    case PsdQuantity::velocity: return "(m/s)^2/Hz";
    case PsdQuantity::displacement: return "m^2/Hz";
  }
  return "";
}

void check_psd(const Psd& p) {
  if (p.f_hz.size() != p.value.size())
    fail("PSD table: " + std::to_string(p.f_hz.size()) + " frequencies but " +
         std::to_string(p.value.size()) + " values");
  if (p.f_hz.size() < 2) fail("PSD table: it needs at least two points");
  for (std::size_t i = 0; i < p.f_hz.size(); ++i) {
    if (!(std::isfinite(p.f_hz[i]) && p.f_hz[i] > 0)) fail("PSD table: frequencies must be finite and positive");
    if (!(std::isfinite(p.value[i]) && p.value[i] > 0)) fail("PSD table: values must be finite and positive");
    if (i > 0 && !(p.f_hz[i] > p.f_hz[i - 1])) fail("PSD table: frequencies must be strictly increasing");
  }
}

Psd convert(const Psd& p, PsdQuantity to) {
  check_psd(p);
  Psd out{p.f_hz, p.value, to};
  const int power = 2 * (order_of(p.quantity) - order_of(to));
  for (std::size_t i = 0; i < out.value.size(); ++i) out.value[i] *= std::pow(two_pi * p.f_hz[i], power);
  return out;
}

double psd_at(const Psd& p, double f_hz) {
  check_psd(p);
  check_in_table(p, f_hz);
  const std::size_t i = segment_of(p.f_hz, f_hz);
  return p.value[i] * std::exp(slope(p, i) * std::log(f_hz / p.f_hz[i]));
}

double power_law_integral(double v_a, double a_hz, double b_hz, double alpha) {
  if (!(a_hz > 0 && a_hz <= b_hz)) fail("power_law_integral: needs 0 < a ≤ b");
  const double l = std::log(b_hz / a_hz);
  const double x = (alpha + 1) * l;
  // ∫_a^b v_a (f/a)^α df = v_a·a·(e^{(α+1)L} − 1)/(α+1) = v_a·a·L·expm1(x)/x, x = (α+1)L.
  const double growth = std::abs(x) < 1e-12 ? 1 + x / 2 : std::expm1(x) / x;
  return v_a * a_hz * l * growth;
}

double band_variance(const Psd& p, double f_lo, double f_hi) {
  check_psd(p);
  check_band(f_lo, f_hi);
  check_in_table(p, f_lo);
  check_in_table(p, f_hi);
  double sum = 0;
  for (std::size_t i = segment_of(p.f_hz, f_lo); i + 1 < p.f_hz.size() && p.f_hz[i] < f_hi; ++i) {
    const double a = std::max(f_lo, p.f_hz[i]);
    const double b = std::min(f_hi, p.f_hz[i + 1]);
    if (!(b > a)) continue;
    const double alpha = slope(p, i);
    sum += power_law_integral(p.value[i] * std::exp(alpha * std::log(a / p.f_hz[i])), a, b, alpha);
  }
  return sum;
}

double band_rms(const Psd& p, double f_lo, double f_hi) { return std::sqrt(band_variance(p, f_lo, f_hi)); }

std::vector<FrequencyBand> octave_bands(double f_lo, double f_hi) {
  if (!(f_lo > 0 && f_lo < f_hi && std::isfinite(f_hi)))
    fail("octave bands: the band [" + num(f_lo) + ", " + num(f_hi) +
         "] Hz needs 0 < f_lo < f_hi");
  // Band k spans [√2·2^(k−1), √2·2^k): computing both edges from the same constant makes a
  // band's upper edge and the next band's lower edge the same double.
  constexpr double s2 = std::numbers::sqrt2;
  auto upper = [](int k) { return std::ldexp(s2, k); };
  int k_lo = static_cast<int>(std::floor(std::log2(f_lo) + 0.5));
  while (upper(k_lo) <= f_lo) ++k_lo;      // f_lo must lie below band k_lo's upper edge
  while (upper(k_lo - 1) > f_lo) --k_lo;   // and at or above its lower edge
  int k_hi = static_cast<int>(std::ceil(std::log2(f_hi) - 0.5));
  while (upper(k_hi) < f_hi) ++k_hi;       // f_hi must lie at or below band k_hi's upper edge
  while (upper(k_hi - 1) >= f_hi) --k_hi;  // and above its lower edge
  std::vector<FrequencyBand> out;
  for (int k = k_lo; k <= k_hi; ++k)
    out.push_back({std::max(f_lo, upper(k - 1)), std::min(f_hi, upper(k)), std::ldexp(1.0, k)});
  return out;
}

std::span<const PetersonRow> peterson_table(NoiseModel m) {
  if (m == NoiseModel::low) return nlnm;
  return nhnm;
}

double peterson_db(NoiseModel m, double period_s) {
  const double t = checked_period(period_s);
  const auto table = peterson_table(m);
  return row_db(table[row_of(table, t)], t);
}

double peterson_accel_psd(NoiseModel m, double f_hz) {
  if (!(f_hz > 0)) fail("frequency " + num(f_hz) + " Hz: must be positive");
  return from_db(peterson_db(m, 1 / f_hz));
}

Psd peterson_psd(NoiseModel m, std::span<const double> f_hz, PsdQuantity q) {
  Psd acc{{f_hz.begin(), f_hz.end()}, {}, PsdQuantity::acceleration};
  for (double f : f_hz) acc.value.push_back(peterson_accel_psd(m, f));
  return convert(acc, q);
}

Psd peterson_breakpoints_psd(NoiseModel m, double f_lo, double f_hi, PsdQuantity q) {
  check_band(f_lo, f_hi);
  if (!(f_lo < f_hi)) fail("Peterson sampling: the band needs f_lo < f_hi");
  Psd acc{{f_lo}, {peterson_accel_psd(m, f_lo)}, PsdQuantity::acceleration};
  const auto table = peterson_table(m);
  // Breakpoints by increasing frequency = decreasing period; each is evaluated at its own
  // period so that it takes the row that starts there.
  for (auto r = table.rbegin(); r != table.rend(); ++r) {
    const double f = 1 / r->period_s;
    if (f > f_lo && f < f_hi) {
      acc.f_hz.push_back(f);
      acc.value.push_back(from_db(row_db(*r, r->period_s)));
    }
  }
  acc.f_hz.push_back(f_hi);
  acc.value.push_back(peterson_accel_psd(m, f_hi));
  return convert(acc, q);
}

double peterson_band_variance(NoiseModel m, double f_lo, double f_hi, PsdQuantity q) {
  check_band(f_lo, f_hi);
  checked_period(1 / f_lo);
  checked_period(1 / f_hi);
  const auto table = peterson_table(m);
  const int n = order_of(q);
  double sum = 0;
  for (std::size_t k = 0; k < table.size(); ++k) {
    // Row k covers periods [T_k, T_{k+1}), i.e. frequencies (1/T_{k+1}, 1/T_k].
    const double t_end = k + 1 < table.size() ? table[k + 1].period_s : peterson_max_period_s;
    const double a = std::max(f_lo, 1 / t_end);
    const double b = std::min(f_hi, 1 / table[k].period_s);
    if (!(b > a)) continue;
    // 10^(A/10)·T^(B/10) with T = 1/f, divided by (2πf)^(2n): slope −B/10 − 2n in log f.
    const double v_a = from_db(row_db(table[k], 1 / a)) / std::pow(two_pi * a, 2 * n);
    sum += power_law_integral(v_a, a, b, -table[k].b_db_per_decade / 10 - 2 * n);
  }
  return sum;
}

}  // namespace voidsign::solver
