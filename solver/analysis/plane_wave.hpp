// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The free field of a plane wave entering a horizontally layered ground from the half-space
/// below, at any angle of incidence: the exact steady-state solution (P–SV coupled, SH apart) that
/// the domain reduction method needs on its layer of cells, in the frequency domain
/// (LayeredPlaneWave) and, through a Fourier synthesis, in the time domain (PlaneWavePulse).
///
/// Method (docs/theory.md, "Inclined plane waves"): in each layer the field is the sum of up- and
/// down-going P and S plane waves sharing the horizontal slowness p (Snell's law); the free
/// surface (two tractions zero) and the continuity of displacement and traction at each interface
/// give a square linear system for their amplitudes, the "global matrix" form of the
/// Thomson (1950)–Haskell (1953) problem (Knopoff 1964, Bull. Seismol. Soc. Am. 54, 431–438;
/// from memory). Up-going waves are referred to the bottom of their layer and down-going ones to
/// its top, so that no exponential in the system exceeds one in modulus (the usual cure for the
/// loss of precision of propagator matrices at high frequency; checked mathematically).
///
/// Conventions: time factor e^{iωt}; z up, the surface at z = 0; h the horizontal coordinate along
/// the direction the wave travels, t the horizontal one 90° anticlockwise from it; a wave of
/// slowness (p, s_z) varies as e^{−iω(p h + s_z z)}. Polarisations (complex unit vectors,
/// v* the complex speed, η = √(1/v*² − p²) with Im η ≤ 0 so that up-going waves decay upward):
///   P up  v*(p, η)    P down  v*(p, −η)      (components h, z)
///   SV up v*(η, −p)   SV down v*(η, p)       (at vertical incidence: along +h)
///   SH    along +t.
/// `amplitude` is twice the incident wave's displacement amplitude, phase zero at the top of the
/// half-space on h = 0: at vertical incidence that is the bedrock *outcrop* motion, as in
/// VerticalColumn.
#include <array>
#include <complex>
#include <cstddef>
#include <vector>

#include "solver/analysis/harmonic.hpp"

namespace voidsign::solver {

/// One layer at one frequency: complex Lamé constants [Pa] and (possibly complex, for
/// mass-proportional damping) density [kg/m³]; thickness [m], ignored for the last layer, the
/// half-space.
struct ComplexLayer {
  Complex lambda, mu, density;
  double thickness = 0;
};

enum class WaveKind { p, sv, sh };

/// Layers with hysteretic damping: λ* = λ(1 + 2iξ), μ* = μ(1 + 2iξ) (as the FE model).
std::vector<ComplexLayer> hysteretic_layers(const std::vector<HarmonicLayer>& layers);

/// Layers with Rayleigh damping, as the transient FE model sees them at ω: M ü + (αM + βK) u̇ + K u
/// gives λ* = λ(1 + iωβ), μ* = μ(1 + iωβ), ρ* = ρ(1 − iα/ω). ω > 0.
struct RayleighLayer {
  Elastic elastic;
  double alpha = 0;      ///< 1/s
  double beta = 0;       ///< s
  double thickness = 0;  ///< m
};
std::vector<ComplexLayer> rayleigh_layers(const std::vector<RayleighLayer>& layers, double omega);

/// The horizontal slowness [s/m] of a wave of the given kind arriving at `incidence` [rad] from
/// the vertical in the (undamped) half-space: p = sin θ / V (V its P or S speed). Negative angles
/// give negative slowness (in plane strain: a wave travelling toward −x).
double incidence_slowness(const Elastic& half_space, WaveKind kind, double incidence);

/// The exact field of one incident plane wave at one frequency.
class LayeredPlaneWave {
 public:
  /// omega > 0 [rad/s]; slowness p [s/m], real (|p| below the slowest speed's inverse is not
  /// required: evanescent parts are handled). Throws std::invalid_argument for bad layers and
  /// std::runtime_error when the system is singular (grazing incidence in a layer, p = 1/V).
  LayeredPlaneWave(std::vector<ComplexLayer> layers, WaveKind kind, double omega, double slowness,
                   Complex amplitude);

  /// Displacement (u_h, u_t, u_z) [m] at horizontal coordinate h [m] and `depth` [m] ≥ 0 below
  /// the surface.
  std::array<Complex, 3> displacement(double h, double depth) const;

  /// The amplitudes of the waves sent back down into the half-space per unit incident
  /// amplitude, phase at its top (P and S; SH: the second): the reflection coefficients of the
  /// whole layered ground, for checks.
  std::array<Complex, 2> reflected() const;

  WaveKind kind() const { return kind_; }
  double slowness() const { return p_; }
  double omega() const { return omega_; }

 private:
  struct Layer {
    Complex lambda, mu;
    Complex eta_p, eta_s;  // vertical slownesses
    Complex vp, vs;        // complex speeds
    double z_top = 0, z_bottom = 0;  // z of its top and bottom (bottom = −∞ for the half-space)
  };
  int layer_at(double z) const;
  // The d (up to 4) field values [u_h, u_z, t_h, t_z] (SH: [u_t, t_t]) of wave w of layer j
  // with unit amplitude at height z.
  std::array<Complex, 4> wave_field(int j, int w, double z) const;

  WaveKind kind_;
  double omega_, p_;
  double traction_scale_ = 1;
  std::vector<Layer> layers_;
  // Amplitudes: per layer 4 (P up, P down, S up, S down; SH: up, down, 0, 0); half-space: the
  // incident (known) and the reflected ones.
  std::vector<std::array<Complex, 4>> amp_;
};

/// The free field of a HarmonicProblem's plane wave at one frequency, in model axes.
class IncidentField {
 public:
  /// Throws std::invalid_argument for an SH wave in plane strain (three_d false) or |θ| ≥ π/2.
  IncidentField(const std::vector<HarmonicLayer>& layers, const PlaneWave& wave, double omega, bool three_d);
  /// (u_x, u_y, u_z) [m] at (x, y) and `depth` [m] below the surface.
  std::array<Complex, 3> at(double x, double y, double depth) const;

 private:
  LayeredPlaneWave wave_;
  double cos_az_, sin_az_;
};

/// The kind of a PlaneWave (P, SV or SH).
WaveKind wave_kind(const PlaneWave& wave);

/// The free field of a plane-wave *pulse* in a layered ground with Rayleigh damping, in time:
/// twice the incident displacement at the top of the half-space on h = 0 is
/// amplitude × r(t − delay), r the unit Ricker wavelet (1 − 2π²f²τ²) exp(−π²f²τ²).
///
/// Built by Fourier synthesis: the sampled wavelet's spectrum times the exact transfer function
/// of LayeredPlaneWave (with the Rayleigh-damped moduli the FE model has at each frequency, so
/// that the DRM's free field is the one the mesh propagates), on a grid of depths through each
/// layer, inverted by FFT (Eigen's FFT module). Values at a point come from the histories at the
/// neighbouring depths and times by four-point Lagrange interpolation in depth (within the
/// layer) and in the delayed time τ = t − p h (a plane wave is invariant along h but for that
/// delay). Sampling: 40 samples per period of the peak frequency in time, 20 per S wavelength at
/// 2.5 × the peak frequency in depth (interpolation error below 1e-3 of the peak; measured in
/// tests/solver/test_plane_wave.cpp); the FFT window is at least eight times the span needed
/// plus 30 s, so that the reverberation of the layers has died out before it wraps around.
class PlaneWavePulse {
 public:
  struct Spec {
    std::vector<RayleighLayer> layers;  ///< top down; the last is the half-space
    WaveKind kind = WaveKind::sv;
    double incidence = 0;  ///< rad from the vertical in the half-space; plane strain: signed
    double azimuth = 0;    ///< rad, 3D: direction of travel
    bool three_d = false;
    double amplitude = 1;  ///< m: twice the incident wave's peak
    double peak_hz = 5;    ///< the wavelet's peak frequency [Hz]
    /// Time the incident pulse's peak passes the top of the half-space at h = 0 [s]; 0 = early
    /// enough that the pulse (1.5 / peak_hz either side of its peak) reaches no point of the
    /// given range before t = 0.
    double delay_s = 0;
  };
  /// Points of interest: depths up to max_depth [m], horizontal coordinates (x, y) within
  /// [x_lo, x_hi] × [y_lo, y_hi] [m]; times 0 … t_end [s]. Throws std::invalid_argument for bad
  /// input (SH in plane strain, |θ| ≥ 90°, peak_hz ≤ 0, t_end ≤ 0).
  PlaneWavePulse(const Spec& spec, double t_end, double max_depth, std::array<double, 4> xy_range);

  /// Displacement u [m] and velocity v [m/s] (d = 2: x, z; 3D: x, y, z) at (x, y), `depth` below
  /// the surface, time t [s]; zero before the pulse arrives.
  void at(double x, double y, double depth, double t, double* u, double* v) const;

  /// The delay chosen when Spec::delay_s is 0, for the same points [s].
  static double automatic_delay(const Spec& spec, double max_depth, std::array<double, 4> xy_range);

  double delay() const { return delay_; }
  /// The earliest time the pulse (its peak less 1.5 / peak_hz) reaches a point of the range [s].
  double earliest_arrival() const { return earliest_; }
  double bytes() const;
  std::size_t depth_samples() const { return depth_.size(); }
  std::size_t fft_length() const { return n_fft_; }
  double sample_interval() const { return dt_; }

 private:
  Spec spec_;
  double p_ = 0, cos_az_ = 1, sin_az_ = 0, delay_ = 0, earliest_ = 0;
  double dt_ = 0, tau0_ = 0;   // history sample interval and the time of sample 0 (τ)
  std::size_t n_tau_ = 0, n_fft_ = 0;
  int comps_ = 2;              // 2: (h, z); 1: t (SH)
  std::vector<double> depth_;  // depth of each sample [m]
  struct Span {
    std::size_t first, count;
    double top, step;
  };
  std::vector<Span> spans_;    // per layer: its samples (uniform in depth)
  std::vector<double> top_;    // depth of each layer's top
  std::vector<double> u_, v_;  // [sample][comp][τ]
};

}  // namespace voidsign::solver
