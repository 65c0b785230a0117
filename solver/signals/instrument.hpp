// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// What an instrument makes of a surface signal: the quantity it measures, the radar
/// line-of-sight projection, averaging over a time window and over a pixel, and sampling at
/// benchmarks. The sensor catalogue is in sensor_catalogue.hpp.
///
/// Frames and signs. East–north–up (ENU): the model's x = east, y = north, z = up (3D); a 2D
/// profile runs along a horizontal bearing (the azimuth of +x, degrees clockwise from north).
/// Displacements in m, positive along the axes; angles in degrees at the interface.
///
/// Line of sight (LOS): the unit vector points from the ground TO the satellite, and the LOS
/// displacement is u·l̂. POSITIVE LOS = MOTION TOWARD THE SATELLITE (the range shortens);
/// subsidence reads negative. A right-looking radar flying along heading h (clockwise from
/// north) looks toward azimuth h + 90°, so the ground-to-satellite vector points to azimuth
/// α = h − 90° (left-looking: h + 90°), tilted from the vertical by the incidence angle θ:
///     l̂ = (sin θ·sin α, sin θ·cos α, cos θ)   (east, north, up).
/// Motion along the flight track is invisible (l̂ has no component along h).
#include <functional>
#include <optional>
#include <span>
#include <string_view>
#include <vector>

namespace voidsign::solver {

/// The surface quantity an instrument measures.
enum class MeasuredQuantity {
  los_displacement,         ///< m, along the radar line of sight, positive toward the satellite
  vertical_displacement,    ///< m, up positive
  horizontal_displacement,  ///< m, along the profile (2D) or its largest horizontal component
  tilt,                     ///< rad, d(u_z)/dx
  horizontal_strain,        ///< 1 (m/m), d(u_x)/dx, extension positive
  vertical_velocity,        ///< m/s (ground motion, dynamic)
  vertical_acceleration     ///< m/s² (ground motion, dynamic)
};

/// The snake_case name of `q` as written in outputs, e.g. "los_displacement".
std::string_view quantity_name(MeasuredQuantity q);
/// The SI unit of `q`: "m", "rad", "1", "m/s" or "m/s^2".
std::string_view quantity_unit(MeasuredQuantity q);

// ---------------------------------------------------------------------------------------------
// Radar line of sight

/// Which side of the flight track the radar looks to.
enum class LookSide { right, left };

/// The viewing geometry of one radar track.
struct RadarGeometry {
  double incidence_deg = 40;  ///< angle of the LOS from the vertical at the ground, 0 ≤ θ < 90
  double heading_deg = -12;   ///< flight direction, degrees clockwise from north
  LookSide look = LookSide::right;
};

/// A vector in the east–north–up frame (m, or dimensionless for directions).
struct Enu {
  double east = 0;
  double north = 0;
  double up = 0;
};

/// The unit vector from the ground to the satellite (see the file comment). Throws
/// std::invalid_argument unless 0 ≤ incidence < 90°.
Enu los_unit_vector(const RadarGeometry& g);

/// The LOS displacement [m] of the ground displacement u [m, ENU]: u·l̂, positive toward the
/// satellite.
double los_displacement(const RadarGeometry& g, const Enu& u);

/// A displacement of a 2D profile in ENU: u_profile [m] along the profile's +x, which points to
/// `profile_bearing_deg` (clockwise from north; 90 = east), and u_up [m].
Enu profile_to_enu(double u_profile, double u_up, double profile_bearing_deg = 90);

/// The LOS displacement [m] of a 2D profile's displacement (u_profile along +x, u_up).
double los_displacement_profile(const RadarGeometry& g, double u_profile, double u_up,
                                double profile_bearing_deg = 90);

/// Speed of light in vacuum [m/s] (exact, SI definition).
constexpr double speed_of_light_m_s = 299792458.0;

/// How long a synthetic-aperture radar dwells on one target [s]: the aperture needed for an
/// azimuth resolution ρ is L ≈ λR/(2ρ), flown at the platform speed v: T = λR/(2ρv).
/// λ wavelength [m], R slant range [m], ρ azimuth resolution [m], v speed [m/s]; all > 0.
double synthetic_aperture_time(double wavelength_m, double slant_range_m,
                               double azimuth_resolution_m, double platform_speed_m_s);

// ---------------------------------------------------------------------------------------------
// Time window

/// The fraction of a sinusoid's amplitude that survives averaging over a window of W seconds:
/// the mean of A·sin(2πft + φ) over [t0, t0 + W] is A·sinc(fW)·sin(2πf(t0 + W/2) + φ), with
/// sinc(x) = sin(πx)/(πx); for the worst phase its magnitude is A·|sinc(fW)|, and its RMS over
/// uniformly random phases is A·|sinc(fW)|/√2 (the gain is the same). Returns |sinc(fW)|.
/// f ≥ 0 [Hz], W ≥ 0 [s]; W = 0 (an instantaneous reading) gives 1.
double window_gain(double f_hz, double window_s);

// ---------------------------------------------------------------------------------------------
// Footprint (pixel) averaging

/// The boxcar mean of the piecewise-linear profile u(x) over a pixel of width p centred at
/// each node: (1/|I|)∫_I u dx with I = [x_i − p/2, x_i + p/2] ∩ [x.front(), x.back()]. A pixel
/// that hangs over an end of the profile averages only the part that lies on the profile
/// (nothing is extrapolated). Exact for the piecewise-linear profile (to rounding).
/// x [m] strictly increasing (non-uniform spacing allowed), u any unit, same length ≥ 2,
/// p ≥ 0 [m]; p = 0 returns u.
std::vector<double> pixel_average(std::span<const double> x, std::span<const double> u, double pixel_m);

/// A field sampled at a horizontal point (x, y) [m].
using SurfaceSampler = std::function<double(double x_m, double y_m)>;

/// The mean of f over the square pixel [xc − p/2, xc + p/2] × [yc − p/2, yc + p/2] by tensor
/// Gauss–Legendre quadrature: the pixel is split into cells × cells squares and each gets
/// points × points nodes. Exact for polynomials of degree ≤ 2·points − 1 in each of x and y.
/// For a Gaussian bowl S·exp(−(x² + y²)/(2i²)) the default (10 points, 1 cell) is within
/// 1e-15·|S| of the exact mean for pixels up to p = 2i and 2e-10·|S| at p = 4i (measured in
/// tests/solver/test_signals.cpp); raise `cells` for pixels much wider than the signal's
/// features (p = 10i with 4 cells: within 1e-9·|S|). p > 0 [m],
/// 1 ≤ points ≤ 32, cells ≥ 1; f is called points²·cells² times.
double square_average(const SurfaceSampler& f, double xc_m, double yc_m, double pixel_m,
                      int points = 10, int cells = 1);

/// Gauss–Legendre nodes and weights on [−1, 1] (n from 1 to 32), nodes increasing.
struct GaussRule {
  std::vector<double> nodes;
  std::vector<double> weights;
};
GaussRule gauss_legendre(int n);

// ---------------------------------------------------------------------------------------------
// Benchmarks (levelling, GNSS stations)

/// What a line of benchmarks sees of a profile u(x) (vertical or horizontal displacement).
/// A surveyor measures each benchmark against a datum benchmark far from the disturbance, so
/// the readings are u(x_k) − u(x_ref); the signal is the largest of them in magnitude. The
/// differential movement between neighbouring benchmarks is reported too.
struct BenchmarkReading {
  std::vector<double> x_m;      ///< benchmark positions, m (origin + k·spacing on the profile)
  std::vector<double> reading;  ///< u(x_k) − u(x_ref), same unit as u
  double reference_x_m = 0;     ///< position of the datum benchmark, m
  double peak = 0;              ///< the reading largest in magnitude (signed); 0 if none
  double x_peak_m = 0;          ///< where, m
  double distance_to_reference_m = 0;  ///< |x_peak − x_ref|, m (for σ that grows with distance)
  double adjacent_peak = 0;     ///< largest |u(x_{k+1}) − u(x_k)| between neighbours; 0 if < 2
  double x_adjacent_m = 0;      ///< the lower benchmark of that pair, m
};

/// Samples the piecewise-linear profile u(x) at benchmarks origin + k·spacing (all integers k
/// whose position lies on [x.front(), x.back()]). The datum benchmark sits at reference_x (on
/// the profile) or, by default, at the end of the profile farther from the node of largest
/// |u|. x [m] strictly increasing, same length as u, ≥ 2; spacing > 0 [m].
BenchmarkReading sample_benchmarks(std::span<const double> x, std::span<const double> u, double spacing_m,
                                   double origin_m = 0, std::optional<double> reference_x_m = std::nullopt);

/// Linear interpolation of the profile u(x) at xq [m], xq within [x.front(), x.back()].
double profile_at(std::span<const double> x, std::span<const double> u, double xq_m);

}  // namespace voidsign::solver
