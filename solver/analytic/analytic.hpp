// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Closed-form reference solutions used to verify the finite-element results.
///
/// Every function is pure and returns values in the project's conventions, whatever the
/// convention of the publication it comes from:
///   - x horizontal, z up, ground surface at z = 0 (points in the ground have z < 0);
///     "depth" is always a positive distance below the surface;
///   - displacements u_x, u_z, u_r: u_z positive UP (a settlement is negative),
///     u_r positive away from the axis or the centre;
///   - stresses tension positive (compression is negative), strains extension positive;
///   - tilt = du_z/dx (or du_z/dr in axisymmetry), in rad (small-angle slope).
/// SI units throughout: m, Pa, N, kg/m^3, rad.
///
/// Each group cites the original publication and how far the formula has been checked.
#include <span>

#include "solver/fe/constants.hpp"

namespace voidsign::solver::analytic {

using solver::standard_gravity;

/// Shear modulus G = E / (2 (1 + nu)) [Pa] from Young's modulus [Pa] and Poisson's ratio.
double shear_modulus(double young_pa, double poisson);

/// Earth-pressure ratio at rest of a laterally constrained linear-elastic column,
/// K0 = nu / (1 - nu) (no lateral strain under vertical loading).
double k0_laterally_constrained(double poisson);

// ---------------------------------------------------------------------------------------------
// Kirsch (1898): circular hole in an infinite plate under a biaxial far field.
// Stresses: E. G. Kirsch (1898), Z. VDI 42, 797-807 (paper not read). Stresses and
// excavation-induced displacements as in B. H. G. Brady & E. T. Brown (2004), Rock Mechanics
// for Underground Mining, 3rd ed., eq. 6.18. Status: verified from the textbook's text and
// checked mathematically (traction-free wall, far-field limit, equilibrium, Hooke's law).
// Plane strain; no free surface and no gravity gradient (a deep opening).
// ---------------------------------------------------------------------------------------------

/// Inputs of the Kirsch solution, in project terms.
struct KirschCase {
  double radius_m = 0;          ///< hole radius a [m]
  double sxx_far_pa = 0;        ///< far-field horizontal principal stress, tension positive [Pa]
  double szz_far_pa = 0;        ///< far-field vertical principal stress, tension positive [Pa]
  double shear_modulus_pa = 0;  ///< G [Pa]
  double poisson = 0;           ///< nu [-]
  /// Uniform pressure acting on the hole wall from inside (support, fluid), positive pushing
  /// the wall outward [Pa]. Added by Lame's thick-cylinder superposition (exact).
  double wall_pressure_pa = 0;
};

/// Stresses and excavation-induced displacements at one point around the hole.
/// Polar angle theta is measured from +x toward +z (the hole axis is along y); u_theta is
/// positive in the direction of increasing theta.
struct KirschPoint {
  double srr_pa = 0, stt_pa = 0, srt_pa = 0;  ///< polar stresses, tension positive [Pa]
  double sxx_pa = 0, szz_pa = 0, sxz_pa = 0;  ///< the same stresses in x-z axes [Pa]
  /// Displacement caused by making the hole (the far-field state has zero displacement) [m].
  double ur_m = 0, ut_m = 0;
  double ux_m = 0, uz_m = 0;  ///< the same displacement in x-z axes [m]
};

/// Kirsch solution at polar coordinates (r >= a, theta) about the hole centre.
KirschPoint kirsch_at(const KirschCase& c, double r_m, double theta_rad);

/// Kirsch solution at offset (dx, dz) from the hole centre (project axes, z up).
KirschPoint kirsch_at_offset(const KirschCase& c, double dx_m, double dz_m);

// ---------------------------------------------------------------------------------------------
// Mogi (1958) point source, with the finite-sphere correction of McTigue (1987).
// K. Mogi (1958), Bull. Earthq. Res. Inst. Univ. Tokyo 36, 99-134; D. F. McTigue (1987),
// J. Geophys. Res. 92(B12), 12931-12940, eqs. (52)-(53). Status: verified against independent
// implementations and checked mathematically (uplift volume 2(1-nu) dV, e_rr = du_r/dr).
// Homogeneous elastic half-space, flat free surface; Mogi needs a << d, McTigue is O((a/d)^3)
// and usable up to about a/d = 0.5. For a cavity excavated under overburden, dP = -p0 holds
// only for an isotropic initial stress (K0 = 1) without a gravity gradient.
// ---------------------------------------------------------------------------------------------

/// A pressurised spherical cavity below the surface.
struct SphereSource {
  double radius_m = 0;            ///< sphere radius a [m]
  double depth_m = 0;             ///< depth of the centre d [m], positive
  double pressure_change_pa = 0;  ///< dP [Pa], positive for inflation
  double shear_modulus_pa = 0;    ///< G [Pa]
  double poisson = 0;             ///< nu [-]
  bool mctigue_correction = false;  ///< multiply by McTigue's (1987) finite-sphere factor
};

/// Surface motion of an axisymmetric source at horizontal distance r from its axis.
struct AxisymmetricSurfacePoint {
  double uz_m = 0;       ///< vertical displacement, up positive [m]
  double ur_m = 0;       ///< radial displacement, away from the axis positive [m]
  double tilt_rad = 0;   ///< du_z/dr [rad] (negative outside the axis for inflation)
  double err = 0;        ///< radial surface strain du_r/dr, extension positive [-]
  double ett = 0;        ///< hoop surface strain u_r/r (its limit on the axis) [-]
};

/// Mogi (optionally McTigue-corrected) surface displacement, tilt and strains at r >= 0.
AxisymmetricSurfacePoint mogi_surface(const SphereSource& s, double r_m);

/// McTigue's (1987) factor 1 - (a/d)^3 [ (1+nu)/(2(7-5nu)) - 15(2-nu) d^2/(4(7-5nu) R^2) ],
/// R^2 = r^2 + d^2, by which both Mogi surface components are multiplied.
double mctigue_factor(const SphereSource& s, double r_m);

/// Volume change of the point-source cavity, dV = pi a^3 dP / G [m^3] (Mogi's strength).
/// The surface uplift volume of the Mogi solution is 2(1 - nu) dV.
double mogi_cavity_volume_change_m3(const SphereSource& s);

// ---------------------------------------------------------------------------------------------
// Verruijt & Booker (1996): tunnel in an elastic half-plane, ground loss (epsilon) and
// ovalisation (delta) modes. A. Verruijt & J. R. Booker (1996), Geotechnique 46(4), 753-756,
// extending C. Sagaseta (1987), Geotechnique 37(3), 301-320.
// Status: form from memory, checked mathematically (traction-free surface, equilibrium, wall
// displacement for R/h -> 0, surface equals full field). The paper's own definitions of
// epsilon and delta are unconfirmed; the definitions used here are stated below.
// Plane strain, linear elasticity, leading order in R/h (approximate for R/h >~ 0.3).
// ---------------------------------------------------------------------------------------------

/// A circular tunnel and its two deformation modes.
struct TunnelCase {
  double radius_m = 0;  ///< tunnel radius R [m]
  double depth_m = 0;   ///< depth of the tunnel axis h [m], positive
  double poisson = 0;   ///< nu [-], 0 <= nu <= 0.5
  /// Uniform radial contraction: the wall moves in by epsilon R. Area loss ~ 2 pi epsilon R^2
  /// (volume-loss ratio V_L = 2 epsilon).
  double epsilon = 0;
  /// Ovalisation: wall displacement u_r = delta R cos(2 phi), phi from the horizontal; for
  /// delta > 0 the springlines move out, crown and invert move in.
  double delta = 0;
};

/// Surface motion of a plane-strain source at horizontal position x.
struct PlaneSurfacePoint {
  double ux_m = 0;        ///< horizontal displacement [m]
  double uz_m = 0;        ///< vertical displacement, up positive (settlement negative) [m]
  double tilt_rad = 0;    ///< du_z/dx [rad]
  double strain_xx = 0;   ///< du_x/dx, extension positive [-]
};

/// Verruijt & Booker surface solution at z = 0 for a tunnel axis at x = 0.
PlaneSurfacePoint verruijt_booker_surface(const TunnelCase& t, double x_m);

/// Displacement at a point of the ground [m].
struct Displacement2 {
  double ux_m = 0, uz_m = 0;
};

/// Verruijt & Booker full displacement field at (x, z), z <= 0 (project axes, tunnel axis at
/// x = 0, z = -h). Singular at the tunnel centre; meaningful outside the tunnel.
Displacement2 verruijt_booker_field(const TunnelCase& t, double x_m, double z_m);

/// epsilon for a given volume-loss ratio (area loss / pi R^2, e.g. 0.01 for 1 %), to first
/// order: epsilon = V_L / 2.
double verruijt_booker_epsilon(double volume_loss_ratio);

// ---------------------------------------------------------------------------------------------
// Boussinesq (1885): elastic half-space under a surface point load, and under a uniform
// pressure on a circle. J. Boussinesq (1885), Application des potentiels..., Gauthier-Villars;
// displacement forms as in Jaeger, Cook & Zimmerman (2007), Fundamentals of Rock Mechanics,
// 4th ed., pp. 408-409; circular area after Timoshenko & Goodier (1970), Theory of
// Elasticity, 3rd ed. Status: verified against an independent implementation and checked
// numerically (superposition of point loads). Weightless, homogeneous, linear elastic.
// ---------------------------------------------------------------------------------------------

/// Axisymmetric displacement at one point [m].
struct AxisymmetricDisplacement {
  double uz_m = 0;  ///< up positive (a downward load gives negative values)
  double ur_m = 0;  ///< away from the axis positive
};

/// Displacement under a downward point load P [N] on the surface, at radial distance r and
/// height z <= 0 (project axes; (r, z) != (0, 0)).
AxisymmetricDisplacement boussinesq_point_load(double load_n, double young_pa, double poisson,
                                               double r_m, double z_m);

/// Surface vertical displacement (up positive) at radial distance r >= 0 from the centre of a
/// flexible circle of radius a carrying a uniform pressure q (positive pushing down) [m].
double circular_load_surface_uz(double pressure_pa, double load_radius_m, double young_pa,
                                double poisson, double r_m);

/// Mean vertical surface displacement over the loaded circle,
/// -16 q a (1 - nu^2) / (3 pi E) [m].
double circular_load_mean_uz(double pressure_pa, double load_radius_m, double young_pa,
                             double poisson);

// ---------------------------------------------------------------------------------------------
// Lithostatic (geostatic) stress of a horizontally layered column: sigma_zz is the weight of
// the overburden, sigma_xx = K0 sigma_zz per layer. Total stresses, no pore pressure.
// Exact for a laterally constrained, horizontally layered column.
// ---------------------------------------------------------------------------------------------

/// One horizontal layer of the column, listed from the surface down.
struct ColumnLayer {
  double thickness_m = 0;    ///< [m]; the last layer continues below its base
  double density_kg_m3 = 0;  ///< bulk density [kg/m^3]
  double k0 = 0;             ///< horizontal / vertical stress ratio [-]
};

/// Initial stress at one height.
struct LithostaticStress {
  double szz_pa = 0;  ///< vertical, tension positive (negative in the ground) [Pa]
  double sxx_pa = 0;  ///< horizontal, = K0 szz (also the out-of-plane stress) [Pa]
};

/// Lithostatic stress at height z (project axes; zero at and above the surface). At a layer
/// interface sigma_zz is continuous and sigma_xx takes the K0 of the layer above.
/// Throws std::invalid_argument for an empty column.
LithostaticStress lithostatic_stress(std::span<const ColumnLayer> layers, double z_m,
                                     double gravity_m_s2 = standard_gravity);

// ---------------------------------------------------------------------------------------------
// Inglis (1913): elliptical hole in an infinite plate. C. E. Inglis (1913), Trans. Inst. Naval
// Architects 55, 219-241. Status: sigma (1 + 2a/b) verified in secondary reference texts only;
// biaxial values by superposition; the boundary hoop-stress formula is from memory, checked
// only for consistency (it reproduces the verified values and the Kirsch limit).
// Semi-axis a is perpendicular to the remote stress sigma, b parallel to it; tension positive.
// ---------------------------------------------------------------------------------------------

/// Largest hoop stress, at the ends of the a-axis, under a uniaxial remote stress:
/// sigma (1 + 2a/b) [Pa].
double inglis_max_stress(double remote_pa, double semi_axis_a_m, double semi_axis_b_m);

/// Hoop stresses at the ends of both axes under a biaxial remote field
/// (sigma perpendicular to the a-axis, K sigma parallel to it).
struct InglisBiaxial {
  double at_a_end_pa = 0;  ///< sigma (1 + 2a/b) - K sigma
  double at_b_end_pa = 0;  ///< K sigma (1 + 2b/a) - sigma
};
InglisBiaxial inglis_biaxial(double remote_pa, double k_ratio, double semi_axis_a_m,
                             double semi_axis_b_m);

/// Hoop stress on the boundary point (a cos t, b sin t) for a uniaxial remote stress at angle
/// beta to the a-axis (FROM MEMORY; consistency checks only):
/// sigma [1 - m^2 + 2m cos 2beta - 2 cos 2(t - beta)] / (1 - 2m cos 2t + m^2),
/// m = (a - b)/(a + b).
double inglis_boundary_hoop_stress(double remote_pa, double beta_rad, double semi_axis_a_m,
                                   double semi_axis_b_m, double t_rad);

// ---------------------------------------------------------------------------------------------
// Empirical Gaussian settlement trough (common practice rules, not solutions of mechanics):
// shape after R. B. Peck (1969), Proc. 7th ICSMFE, State-of-the-Art Volume, 225-290; width
// i = K z0 after M. P. O'Reilly & B. M. New (1982), Tunnelling '82, 173-181 (both read in
// secondary sources only). s_max = V_s / (sqrt(2 pi) i) follows from the trough's area; the
// horizontal movements assume displacement vectors pointing at the tunnel axis (O'Reilly &
// New), so u_x = -(x / z0) s(x).
// ---------------------------------------------------------------------------------------------

/// Trough width parameter i = K z0 [m] (distance from the axis to the inflexion point).
double trough_width(double k, double axis_depth_m);

/// Settlement volume per metre of tunnel, V_s = V_L pi D^2 / 4 [m^3/m]; V_L is a ratio
/// (0.01 for 1 %).
double trough_volume_per_metre(double volume_loss_ratio, double diameter_m);

/// Largest settlement s_max = V_s / (sqrt(2 pi) i) [m] (a positive magnitude).
double trough_max_settlement(double volume_per_metre_m3, double width_i_m);

/// A Gaussian trough centred on x = 0.
struct GaussianTrough {
  double smax_m = 0;        ///< largest settlement, positive magnitude [m]
  double width_i_m = 0;     ///< i [m]
  double axis_depth_m = 0;  ///< z0 [m]
};

/// The trough of a tunnel of diameter D at axis depth z0 with volume loss V_L and width
/// factor K.
GaussianTrough gaussian_trough(double volume_loss_ratio, double diameter_m, double k,
                               double axis_depth_m);

/// Trough quantities at one surface position x.
struct TroughPoint {
  double settlement_m = 0;     ///< s(x) = s_max exp(-x^2 / 2i^2), positive downward [m]
  double uz_m = 0;             ///< -s(x) [m]
  double ux_m = 0;             ///< -(x / z0) s(x): toward the axis [m]
  double tilt_rad = 0;         ///< du_z/dx = s x / i^2 [rad]
  double strain_xx = 0;        ///< du_x/dx = (s / z0)(x^2 / i^2 - 1) [-]
  double curvature_per_m = 0;  ///< d^2u_z/dx^2 = (s / i^2)(1 - x^2 / i^2) [1/m]
};
TroughPoint gaussian_trough_at(const GaussianTrough& t, double x_m);

/// Extreme values of the trough (closed form).
struct TroughExtremes {
  double max_slope = 0;              ///< s_max e^-0.5 / i, at x = +-i [rad, magnitude]
  double max_slope_at_m = 0;         ///< i
  double max_compression = 0;        ///< -s_max / z0 at x = 0 (negative) [-]
  double max_tension = 0;            ///< 2 e^-1.5 s_max / z0, at x = +-sqrt(3) i [-]
  double max_tension_at_m = 0;       ///< sqrt(3) i
  double axis_curvature_per_m = 0;   ///< s_max / i^2 (sagging, positive with z up) [1/m]
};
TroughExtremes gaussian_trough_extremes(const GaussianTrough& t);

}  // namespace voidsign::solver::analytic
