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
  std::vector<double> layer_thickness;  ///< top down; the last layer runs to the bottom
  std::vector<VoidSolid> voids;
  Sizing sizing;
};

}  // namespace voidsign::mesh
