// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Frequency-domain element matrices for steady-state elastodynamics: the dynamic stiffness
/// S(ω) = K* − ω² M of a cell, with hysteretic damping and, inside an absorbing band, perfectly
/// matched layers (PML) by complex coordinate stretching.
///
/// Conventions (docs/theory.md, "Harmonic response"):
/// - time factor e^{iωt}: u(x, t) = Re[U(x) e^{iωt}], ω in rad/s;
/// - hysteretic damping by a complex modulus, E* = E (1 + 2iξ) with ν real, so that λ* and μ*
///   (and every wave speed squared) carry the same factor; ξ is the damping ratio (Kramer 1996,
///   §5.4, the frequency-independent "complex stiffness" model; checked mathematically: the
///   energy lost per cycle is 4πξ times the peak strain energy);
/// - PML: unsplit-field complex stretching of Basu & Chopra (2003, Comput. Methods Appl. Mech.
///   Engrg. 192, 1337–1375; from memory), ∂/∂x̃_i = (1/s_i) ∂/∂x_i, with
///     s_i(ℓ) = 1 + κ₀ (ℓ/L)^m − i (Ω₀/ω) (ℓ/L)^m,
///   ℓ the distance into the band along axis i, L its thickness and m the grading order. The
///   1/ω scaling (Basu & Chopra's 1/a₀) makes the attenuation the same at every frequency.
/// The weak form ∫ B̃ᵀ D* B̃ J dV − ω² ∫ ρ Nᵀ N J dV with J = s_x s_y s_z (plane strain: s_x s_z)
/// gives complex *symmetric* (not Hermitian) element matrices.
///
/// Plane strain (tri3/tri6, unknowns u_x, u_z) and 3D solid (tet4/tet10, u_x, u_y, u_z) only;
/// axisymmetric models are refused. SI units; z up.
#include <array>
#include <complex>
#include <span>

#include "mesh/core/mesh.hpp"
#include "solver/fe/element.hpp"

namespace voidsign::solver {

using Complex = std::complex<double>;

/// The hysteretic factor 1 + 2iξ that turns a real modulus into E*.
inline Complex hysteretic_factor(double damping_ratio) { return {1.0, 2.0 * damping_ratio}; }

/// Where the absorbing band lies and how strongly it stretches. The band runs along the sides
/// x = x_min, x_max (and y = y_min, y_max in 3D) and the bottom z = z_min of the meshed block,
/// `thickness` wide, inside the block; the top (the ground surface) has none.
struct PmlLayout {
  double thickness = 0;  ///< L [m]; 0 = no absorbing band
  double x_lo = 0, x_hi = 0;  ///< inner edges of the side bands [m]
  double y_lo = 0, y_hi = 0;  ///< inner edges of the front/back bands [m] (3D)
  double z_lo = 0;            ///< inner edge of the bottom band [m]
  bool three_d = false;       ///< y bands present
  double omega0 = 0;  ///< Ω₀ [rad/s]: imaginary stretching at the outer edge, times ω
  double kappa0 = 0;  ///< κ₀ [-]: real stretching at the outer edge (0 = none)
  int order = 2;      ///< m, polynomial grading
};

/// Ω₀ that gives the theoretical reflection `reflection` at normal incidence for a wave of
/// speed `c_fast` [m/s] crossing the band twice (in and back from its fixed outer edge):
///   R = exp(−2 Ω₀ L / ((m + 1) c))   ⇒   Ω₀ = (m + 1) c ln(1/R) / (2 L).
/// Slower waves (S, Rayleigh) are damped more, so `c_fast` should be the largest P-wave speed.
/// Checked mathematically: ∫₀ᴸ (Ω₀/ω)(ℓ/L)^m dℓ · ω/c = Ω₀ L / ((m + 1) c).
double pml_attenuation(double thickness, double c_fast, double reflection, int order);

/// Theoretical reflection of a plane wave of speed c [m/s] reaching the band at `angle` [rad]
/// from its normal: R(θ) = exp(−2 cos θ Ω₀ L / ((m + 1) c)).
double pml_reflection(const PmlLayout& pml, double c, double angle);

/// The band of thickness L [m] inside the mesh's bounding box (y bands in 3D).
PmlLayout pml_layout(const mesh::Mesh& m, double thickness, double omega0, int order = 2, double kappa0 = 0);

/// Whether point p [m] lies inside the band.
bool in_pml(const PmlLayout& pml, const std::array<double, 3>& p);

/// Stretch factors (s_x, s_y, s_z) at point (x, y, z) [m] for ω [rad/s]; 1 outside the band.
std::array<Complex, 3> pml_stretch(const PmlLayout& pml, double x, double y, double z, double omega);

/// Quadrature used for the dynamic matrices: degree 4 on triangles (Dunavant 1985, 6 points),
/// degree 5 on tetrahedra (a symmetric 14-point rule with positive weights, as tabulated for
/// example by Walkington 2000; values from memory, exactness checked in
/// tests/solver/test_harmonic.cpp), so that the consistent mass is exact on straight cells.
std::span<const QuadPoint> dynamic_quadrature(mesh::CellType t);

/// Dynamic stiffness S_e(ω) of cell c, row-major, (n·d)² entries overwritten (d = 2 plane strain,
/// 3 solid). `damping` is ξ; ω [rad/s]; `pml` null or the cell is not to be stretched → ordinary
/// damped element, (1 + 2iξ) K_e − ω² M_e. Throws std::invalid_argument for axisymmetry.
void dynamic_stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, double damping, Kinematics k,
                       double omega, const PmlLayout* pml, std::span<Complex> se);

/// The frequency-independent parts of an unstretched cell: the undamped stiffness K_e (the
/// static kernel, `stiffness`) and the consistent mass M_e = ∫ ρ Nᵀ N dV [kg], row-major,
/// (n·d)² entries each, overwritten. Then S_e(ω) = (1 + 2iξ) K_e − ω² M_e.
void dynamic_parts(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k, std::span<double> ke,
                   std::span<double> me);

}  // namespace voidsign::solver
