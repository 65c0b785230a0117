// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The void's surface signature: with-voids minus without-voids on the ground surface, and the
/// quantities derived from it. Signs: z up, settlement negative, tilt = d(Δu_z)/dx,
/// strain = d(Δu_x)/dx (extension positive).
#include <vector>

#include "solver/analysis/static.hpp"

namespace voidsign::solver {

struct SurfaceRow {
  double x = 0;
  double ux = 0, uz = 0, ux_ref = 0, uz_ref = 0;
  double dux = 0, duz = 0;
  double duz_rel = 0;   ///< Δu_z minus its far-field value (see surface_profile), m
  double tilt = 0;      ///< rad
  double strain = 0;    ///< -
  double curvature = 0; ///< 1/m
};

struct Anomaly {
  double uz_min = 0, uz_max = 0;      ///< m
  double x_uz_min = 0, x_uz_max = 0;  ///< where, m
  double ux_absmax = 0, x_ux_absmax = 0;  ///< 3D: horizontal magnitude
  double tilt_absmax = 0, x_tilt_absmax = 0;
  double strain_absmax = 0, x_strain_absmax = 0;
  double y_uz_min = 0, y_uz_max = 0, y_ux_absmax = 0, y_tilt_absmax = 0, y_strain_absmax = 0;  ///< 3D positions, m
  double strain_min = 0, strain_max = 0;  ///< compressive / tensile peaks
  double curvature_absmax = 0;
  double far_field_uz = 0;           ///< Δu_z at the far-field points, m
  double rel_uz_min = 0;             ///< settlement relative to the far field, m
  double trough_volume = 0;          ///< m³/m (plane strain) or m³ (axisymmetric), relative to far field
  double inflexion_offset = 0;       ///< from the deepest point to the inflexion point, m
};

/// Where the "far field" of the relative settlement is taken.
struct FarField {
  double x_centre = 0;  ///< centre of the voids, m
  /// Offset from the centre, m; 0 = the block's edge(s). In plane strain an offset fixed in
  /// terms of the void depth keeps the relative settlement independent of the block size
  /// (the Flamant terms cancel between fixed points); at the block's edge it is not.
  double offset = 0;
};

/// Surface rows sorted by x. duz_rel is Δu_z minus the mean Δu_z at x_centre ± offset
/// (plane strain; points outside the block fall back to its edge) or at r = offset
/// (axisymmetric, where the axis is the centre).
std::vector<SurfaceRow> surface_profile(const mesh::Mesh& m, const StaticResult& r, const FarField& far = {});

/// Peak values of a profile. `axisymmetric` integrates the trough volume as 2π∫ r Δu dr.
Anomaly summarize(const std::vector<SurfaceRow>& rows, bool axisymmetric);

/// First derivative at each sample of y(x) by three-point non-uniform differences
/// (second-order accurate; one-sided at the ends). x strictly increasing.
std::vector<double> derivative(const std::vector<double>& x, const std::vector<double>& y);
/// Second derivative likewise.
std::vector<double> second_derivative(const std::vector<double>& x, const std::vector<double>& y);

}  // namespace voidsign::solver
