// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The geometry a 3D mesh is built from: a layered block x ∈ [−width/2, width/2],
/// y ∈ [−length/2, length/2], z ∈ [−depth, 0] (z up, surface z = 0) with cavities.
#include <array>
#include <vector>

#include "mesh/build/geometry.hpp"

namespace voidsign::mesh {

/// One cavity in 3D.
struct VoidSolid {
  enum class Kind { sphere, box, tunnel };
  Kind kind = Kind::sphere;
  double cx = 0, cy = 0, cz = 0;   ///< centre [m] (sphere, box); z < 0
  double radius = 0;               ///< sphere, tunnel [m]
  std::array<double, 3> size{0, 0, 0};  ///< box edge lengths along its own x, y, z [m]
  double yaw_deg = 0;              ///< box rotation about the vertical, anticlockwise from +x
  std::array<double, 3> from{0, 0, 0};  ///< tunnel axis start (x, y, z) [m]
  std::array<double, 3> to{0, 0, 0};    ///< tunnel axis end (x, y, z) [m]
};

struct Geometry3D {
  double width = 100, length = 100, depth = 50;
  /// Only the quarter x ≥ 0, y ≥ 0 of the block (problems symmetric about x = 0 and y = 0, as
  /// in the verification cases): the planes x = 0 and y = 0 become faces of the block, where
  /// rollers are exactly the symmetry condition.
  bool quarter = false;
  /// When positive, the `surface` size holds only within this horizontal distance of
  /// (focus_x, focus_y) and grows by the size gradient beyond it, as it does with depth: for
  /// half-space checks on wide blocks. 0 (default): the surface size holds over the whole top.
  double surface_radius = 0;
  double focus_x = 0, focus_y = 0;
  std::vector<double> layer_thickness;  ///< top down; the last layer runs to the bottom
  std::vector<VoidSolid> voids;
  Sizing sizing;
};

}  // namespace voidsign::mesh
