// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The 3D signature on the ground surface: with-voids minus without-voids at every surface node,
/// with tilts and horizontal strains from the surface interpolation. Signs: z up, settlement
/// negative, tilt_x = ∂Δu_z/∂x, strain_xx = ∂Δu_x/∂x (extension positive).
#include <array>
#include <vector>

#include "solver/analysis/signature.hpp"
#include "solver/analysis/static.hpp"

namespace voidsign::solver {

struct SurfacePoint {
  double x = 0, y = 0;
  std::array<double, 3> u{}, u_ref{}, du{};  ///< (x, y, z) components, m
  double duz_rel = 0;                       ///< Δu_z minus its far-field value, m
  double tilt_x = 0, tilt_y = 0;            ///< rad
  double strain_xx = 0, strain_yy = 0, strain_xy = 0;  ///< tensor components, -
};

struct SurfaceMap {
  std::vector<SurfacePoint> points;  ///< sorted by x, then y
  std::vector<int> mesh_node;        ///< the mesh node of each point
  int nodes_per_triangle = 3;        ///< 3 or 6
  std::vector<int> triangles;        ///< surface facets as indices into points, flat
};

/// Surface map of a 3D result. The far field is the mean Δu_z on the ring of surface points at
/// distance `far.offset` (± 5 %) from (far.x_centre, y_centre), or the block's edge when
/// the ring leaves the block or offset is 0.
SurfaceMap surface_map(const StaticProblem& p, const StaticResult& r, const FarField& far, double y_centre);

/// Peaks of a surface map. ux_absmax is the largest horizontal displacement magnitude,
/// tilt_absmax the largest slope magnitude, strain_min / strain_max the extreme principal
/// horizontal strains; trough_volume integrates the settled part of duz_rel [m³].
Anomaly summarize_map(const SurfaceMap& map, const mesh::Mesh& m);

}  // namespace voidsign::solver
