// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Closed-form references for the dynamic analyses: beam natural frequencies, the Rayleigh
/// wave speed, and the one-dimensional SH response of layered ground.
///
/// SI units: m, s, Hz, Pa, kg/m³. Damping ratios ξ are fractions (0.05 = 5 %), applied as a
/// frequency-independent complex shear modulus G* = G(1 + 2iξ), i.e. V* = V√(1 + 2iξ)
/// (exact Kelvin–Voigt form at each frequency). Time factor e^{iωt}. Each group cites its
/// source and how far it has been checked.
#include <complex>
#include <span>
#include <vector>

namespace voidsign::solver::analytic {

// ---------------------------------------------------------------------------------------------
// Euler–Bernoulli beams. R. D. Blevins (1979), Formulas for Natural Frequency and Mode Shape,
// Van Nostrand Reinhold, Table 8-1 (table number from memory): f_n = λ_n²/(2π L²) √(EI/m),
// clamped–clamped roots of cos λ cosh λ = 1 (λ1 = 4.73004074, λ2 = 7.85320462). Status: the
// roots are re-solved here and match those values (tests). Thin beams only: shear deformation
// and rotary inertia are neglected, which overestimates the frequency of thick strips.
// ---------------------------------------------------------------------------------------------

/// λ_n of a clamped–clamped (or free–free elastic) beam, n ≥ 1: the n-th positive root of
/// cos λ cosh λ = 1 (Newton from (2n+1)π/2).
double clamped_clamped_lambda(int n);

/// n-th natural frequency [Hz] of a clamped–clamped beam of length L [m], bending stiffness
/// EI [N m²] and mass per length m [kg/m].
double beam_clamped_clamped_hz(int n, double length_m, double bending_stiffness_nm2, double mass_per_length_kg_m);

/// The same for a strip of thickness t [m] spanning L in plane strain (a plate strip: modulus
/// E/(1 − ν²), I = t³/12 and m = ρt per metre of width).
double strip_clamped_clamped_hz(int n, double span_m, double thickness_m, double young_pa, double poisson,
                                double density_kg_m3);

// ---------------------------------------------------------------------------------------------
// Rayleigh waves on a homogeneous isotropic half-space. Lord Rayleigh (1885), Proc. London
// Math. Soc. 17, 4-11: secular equation (2 − ξ²)² = 4 √(1 − κ²ξ²) √(1 − ξ²), ξ = c_R/c_S,
// κ² = (1 − 2ν)/(2(1 − ν)). Status: verified against an independent implementation; solved
// here and checked against the Poisson-solid closed form ξ² = 2 − 2/√3 (ν = 1/4).
// ---------------------------------------------------------------------------------------------

/// c_R / c_S, the root in (0, 1) of the Rayleigh equation, for 0 ≤ ν < 0.5 (bisection on a
/// bracket that holds over that whole range, to machine precision). Throws
/// std::invalid_argument outside it.
double rayleigh_speed_ratio(double poisson);

/// The approximation c_R / c_S ≈ (0.87 + 1.12ν)/(1 + ν), commonly credited to I. A. Viktorov
/// (1967), Rayleigh and Lamb Waves, Plenum (some sources credit L. Bergmann 1948; attribution
/// not checked in either book). Within 0.15 % of the root for 0.2 ≤ ν ≤ 0.45 (tests).
double rayleigh_speed_ratio_viktorov(double poisson);

// ---------------------------------------------------------------------------------------------
// One-dimensional site response to vertically incident SH waves.
// Uniform damped layer on elastic rock: S. L. Kramer (1996), Geotechnical Earthquake
// Engineering, Prentice Hall, §7.2 (the damped layer on elastic rock; equation numbers not
// checked): F = u_surface / u_outcrop = 1/(cos(k*H) + i α* sin(k*H)), k* = ω/V_s*,
// α* = ρ_s V_s* / (ρ_r V_r*). Layered ground: the SH propagator matrix of W. T. Thomson (1950),
// J. Appl. Phys. 21, 89-93, and N. A. Haskell (1953), Bull. Seismol. Soc. Am. 43, 17-34.
// Status: verified against independent implementations (check values in the tests) and
// checked mathematically (one layer reduces to Kramer's form; splitting a layer changes
// nothing). Linear viscoelastic, horizontally layered, vertical incidence. "Outcrop" motion is
// twice the upgoing amplitude in the rock.
// ---------------------------------------------------------------------------------------------

/// A horizontal layer.
struct ShLayer {
  double thickness_m = 0;
  double vs_m_s = 0;         ///< shear-wave speed [m/s]
  double density_kg_m3 = 0;
  double damping = 0;        ///< ξ [-]
};

/// The half-space (bedrock) under the layers. vs_m_s = +∞ models a rigid base (then the
/// outcrop motion is the base motion).
struct ShHalfSpace {
  double vs_m_s = 0;
  double density_kg_m3 = 0;
  double damping = 0;  ///< ξ [-]
};

/// Complex shear-wave speed V√(1 + 2iξ) [m/s].
std::complex<double> complex_shear_speed(double vs_m_s, double damping);

/// Kramer's surface/outcrop transfer function F(ω) of one layer on rock, at f [Hz] (f ≥ 0).
std::complex<double> sh_layer_transfer(double freq_hz, const ShLayer& layer, const ShHalfSpace& rock);

/// Fundamental frequency of a layer on a much stiffer base, V_s/(4H) [Hz] (Kramer 1996, §7.2).
double sh_layer_fundamental_hz(const ShLayer& layer);

/// Haskell–Thomson surface/outcrop transfer function of layers (top down) over a half-space,
/// one value per frequency [Hz]. Starting from u = 1, τ = 0 at the surface, each layer's
/// propagator [[cos kh, sin kh/(G*k)], [−G*k sin kh, cos kh]] carries (u, τ = G* ∂u/∂z) down;
/// at the rock the upgoing amplitude is ½(u + τ/(iωρ_r V_r*)) and F = 1/(2·upgoing).
std::vector<std::complex<double>> sh_column_transfer(std::span<const ShLayer> layers, const ShHalfSpace& rock,
                                                     std::span<const double> freq_hz);

}  // namespace voidsign::solver::analytic
