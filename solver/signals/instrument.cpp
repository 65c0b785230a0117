// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/signals/instrument.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <stdexcept>
#include <string>

namespace voidsign::solver {

namespace {

constexpr double pi = std::numbers::pi;
constexpr double deg = pi / 180;

[[noreturn]] void fail(const std::string& what) { throw std::invalid_argument(what); }

/// A number for a message, in %g form ("0.1", "1e-05").
std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

void check_profile(std::span<const double> x, std::span<const double> u) {
  if (x.size() != u.size()) fail("profile: x and u differ in length");
  if (x.size() < 2) fail("profile: it needs at least two nodes");
  for (std::size_t i = 0; i < x.size(); ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(u[i])) fail("profile: non-finite value");
    if (i > 0 && !(x[i] > x[i - 1])) fail("profile: x must be strictly increasing");
  }
}

/// Segment i with x[i] ≤ xq ≤ x[i+1] (the last one at the right end).
std::size_t segment_of(std::span<const double> x, double xq) {
  auto it = std::upper_bound(x.begin(), x.end(), xq);
  auto i = static_cast<std::size_t>(it - x.begin());
  return std::min(i == 0 ? 0 : i - 1, x.size() - 2);
}

double interpolate(std::span<const double> x, std::span<const double> u, std::size_t i, double xq) {
  const double t = (xq - x[i]) / (x[i + 1] - x[i]);
  return u[i] + t * (u[i + 1] - u[i]);
}

/// Running integral of the piecewise-linear profile at the nodes (trapezoids, exact).
std::vector<double> cumulative_integral(std::span<const double> x, std::span<const double> u) {
  std::vector<double> c(x.size(), 0.0);
  for (std::size_t i = 1; i < x.size(); ++i) c[i] = c[i - 1] + 0.5 * (x[i] - x[i - 1]) * (u[i] + u[i - 1]);
  return c;
}

/// ∫_{x.front()}^{xq} u dx from the running integral.
double integral_to(std::span<const double> x, std::span<const double> u, const std::vector<double>& c, double xq) {
  const std::size_t i = segment_of(x, xq);
  return c[i] + 0.5 * (xq - x[i]) * (u[i] + interpolate(x, u, i, xq));
}

/// Legendre polynomial P_n(t) and its derivative, by the three-term recurrence.
std::pair<double, double> legendre(int n, double t) {
  double p0 = 1, p1 = t;
  for (int k = 2; k <= n; ++k) {
    const double p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
    p0 = p1;
    p1 = p2;
  }
  if (n == 0) return {1, 0};
  return {p1, n * (t * p1 - p0) / (t * t - 1)};
}

}  // namespace

std::string_view quantity_name(MeasuredQuantity q) {
  switch (q) {
    case MeasuredQuantity::los_displacement: return "los_displacement";
    case MeasuredQuantity::vertical_displacement: return "vertical_displacement";
    case MeasuredQuantity::horizontal_displacement: return "horizontal_displacement";
    case MeasuredQuantity::tilt: return "tilt";
    case MeasuredQuantity::horizontal_strain: return "horizontal_strain";
    case MeasuredQuantity::vertical_velocity: return "vertical_velocity";
    case MeasuredQuantity::vertical_acceleration: return "vertical_acceleration";
  }
  return "";
}

std::string_view quantity_unit(MeasuredQuantity q) {
  switch (q) {
    case MeasuredQuantity::los_displacement:
    case MeasuredQuantity::vertical_displacement:
    case MeasuredQuantity::horizontal_displacement: return "m";
    case MeasuredQuantity::tilt: return "rad";
    case MeasuredQuantity::horizontal_strain: return "1";
    case MeasuredQuantity::vertical_velocity: return "m/s";
    case MeasuredQuantity::vertical_acceleration: return "m/s^2";
  }
  return "";
}

Enu los_unit_vector(const RadarGeometry& g) {
  if (!(g.incidence_deg >= 0 && g.incidence_deg < 90))
    fail("radar incidence " + num(g.incidence_deg) + "°: must lie in [0, 90)");
  if (!std::isfinite(g.heading_deg)) fail("radar heading must be finite");
  // Ground-to-satellite azimuth: opposite to the look direction, which is 90° to the right
  // (right-looking) or left of the flight heading.
  const double azimuth = (g.look == LookSide::right ? g.heading_deg - 90 : g.heading_deg + 90) * deg;
  const double s = std::sin(g.incidence_deg * deg);
  return {s * std::sin(azimuth), s * std::cos(azimuth), std::cos(g.incidence_deg * deg)};
}

double los_displacement(const RadarGeometry& g, const Enu& u) {
  const Enu l = los_unit_vector(g);
  return u.east * l.east + u.north * l.north + u.up * l.up;
}

Enu profile_to_enu(double u_profile, double u_up, double profile_bearing_deg) {
  const double b = profile_bearing_deg * deg;
  return {u_profile * std::sin(b), u_profile * std::cos(b), u_up};
}

double los_displacement_profile(const RadarGeometry& g, double u_profile, double u_up, double profile_bearing_deg) {
  return los_displacement(g, profile_to_enu(u_profile, u_up, profile_bearing_deg));
}

double synthetic_aperture_time(double wavelength_m, double slant_range_m, double azimuth_resolution_m,
                               double platform_speed_m_s) {
  if (!(wavelength_m > 0 && slant_range_m > 0 && azimuth_resolution_m > 0 && platform_speed_m_s > 0))
    fail("synthetic_aperture_time: every input must be positive");
  return wavelength_m * slant_range_m / (2 * azimuth_resolution_m * platform_speed_m_s);
}

double window_gain(double f_hz, double window_s) {
  if (!(f_hz >= 0 && window_s >= 0 && std::isfinite(f_hz * window_s)))
    fail("window_gain: needs finite f ≥ 0 and W ≥ 0");
  const double x = pi * f_hz * window_s;
  return x == 0 ? 1.0 : std::abs(std::sin(x) / x);
}

std::vector<double> pixel_average(std::span<const double> x, std::span<const double> u, double pixel_m) {
  check_profile(x, u);
  if (!(pixel_m >= 0 && std::isfinite(pixel_m))) fail("pixel width must be finite and ≥ 0");
  if (pixel_m == 0) return {u.begin(), u.end()};
  const auto c = cumulative_integral(x, u);
  std::vector<double> out(x.size());
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double a = std::max(x.front(), x[i] - pixel_m / 2);
    const double b = std::min(x.back(), x[i] + pixel_m / 2);
    out[i] = (integral_to(x, u, c, b) - integral_to(x, u, c, a)) / (b - a);
  }
  return out;
}

GaussRule gauss_legendre(int n) {
  if (n < 1 || n > 32) fail("Gauss–Legendre rule: 1 to 32 points");
  GaussRule r{std::vector<double>(static_cast<std::size_t>(n)), std::vector<double>(static_cast<std::size_t>(n))};
  for (int k = 0; k < n; ++k) {
    // Newton from the Chebyshev-like first guess; the roots of P_n are simple.
    double t = -std::cos(pi * (k + 0.75) / (n + 0.5));
    for (int it = 0; it < 100; ++it) {
      const auto [p, dp] = legendre(n, t);
      const double step = p / dp;
      t -= step;
      if (std::abs(step) < 1e-16) break;
    }
    const double dp = legendre(n, t).second;
    r.nodes[static_cast<std::size_t>(k)] = t;
    r.weights[static_cast<std::size_t>(k)] = 2 / ((1 - t * t) * dp * dp);
  }
  return r;
}

double square_average(const SurfaceSampler& f, double xc, double yc, double pixel_m, int points, int cells) {
  if (!(pixel_m > 0 && std::isfinite(pixel_m))) fail("pixel width must be finite and > 0");
  if (cells < 1) fail("square_average: cells must be ≥ 1");
  const GaussRule g = gauss_legendre(points);
  const double h = pixel_m / cells;  // side of one cell
  double sum = 0;
  for (int cx = 0; cx < cells; ++cx) {
    for (int cy = 0; cy < cells; ++cy) {
      const double x0 = xc - pixel_m / 2 + (cx + 0.5) * h;
      const double y0 = yc - pixel_m / 2 + (cy + 0.5) * h;
      for (std::size_t i = 0; i < g.nodes.size(); ++i)
        for (std::size_t j = 0; j < g.nodes.size(); ++j)
          sum += g.weights[i] * g.weights[j] * f(x0 + 0.5 * h * g.nodes[i], y0 + 0.5 * h * g.nodes[j]);
    }
  }
  // Weights sum to 2 per direction on [−1, 1]: the mean is the sum over 4 per cell.
  return sum / (4.0 * cells * cells);
}

double profile_at(std::span<const double> x, std::span<const double> u, double xq) {
  check_profile(x, u);
  if (!(xq >= x.front() && xq <= x.back()))
    fail("position " + num(xq) + " m lies outside the profile");
  return interpolate(x, u, segment_of(x, xq), xq);
}

BenchmarkReading sample_benchmarks(std::span<const double> x, std::span<const double> u, double spacing_m,
                                   double origin_m, std::optional<double> reference_x_m) {
  check_profile(x, u);
  if (!(spacing_m > 0 && std::isfinite(spacing_m) && std::isfinite(origin_m)))
    fail("benchmark spacing must be finite and > 0, the origin finite");
  BenchmarkReading r;
  if (reference_x_m) {
    r.reference_x_m = *reference_x_m;
  } else {
    // Datum benchmark: the profile end farther from the largest movement.
    std::size_t imax = 0;
    for (std::size_t i = 1; i < u.size(); ++i)
      if (std::abs(u[i]) > std::abs(u[imax])) imax = i;
    r.reference_x_m = (x[imax] - x.front() >= x.back() - x[imax]) ? x.front() : x.back();
  }
  const double u_ref = profile_at(x, u, r.reference_x_m);
  // Benchmarks origin + k·s on the profile; a relative slack absorbs rounding at the ends.
  const double slack = 1e-9 * spacing_m;
  const auto k_first = static_cast<long>(std::ceil((x.front() - origin_m - slack) / spacing_m));
  const auto k_last = static_cast<long>(std::floor((x.back() - origin_m + slack) / spacing_m));
  std::vector<double> at;
  for (long k = k_first; k <= k_last; ++k) {
    const double xk = std::clamp(origin_m + static_cast<double>(k) * spacing_m, x.front(), x.back());
    r.x_m.push_back(xk);
    at.push_back(profile_at(x, u, xk));
    r.reading.push_back(at.back() - u_ref);
  }
  for (std::size_t k = 0; k < r.reading.size(); ++k) {
    if (std::abs(r.reading[k]) > std::abs(r.peak)) {
      r.peak = r.reading[k];
      r.x_peak_m = r.x_m[k];
      r.distance_to_reference_m = std::abs(r.x_peak_m - r.reference_x_m);
    }
    if (k + 1 < at.size() && std::abs(at[k + 1] - at[k]) > r.adjacent_peak) {
      r.adjacent_peak = std::abs(at[k + 1] - at[k]);
      r.x_adjacent_m = r.x_m[k];
    }
  }
  return r;
}

}  // namespace voidsign::solver
