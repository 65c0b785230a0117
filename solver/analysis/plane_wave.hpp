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

}  // namespace voidsign::solver
