// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The geometry a 2D mesh is built from, in plain numbers: no scenario, no YAML. z is up and
/// the ground surface is z = 0.
#include <array>
#include <string>
#include <vector>

namespace voidsign::mesh {

/// One cavity outline in the x–z plane.
struct VoidOutline {
  enum class Kind { circle, ellipse, rectangle, polygon };
  Kind kind = Kind::circle;
  double cx = 0, cz = 0;       ///< centre [m] (circle, ellipse, rectangle); z < 0
  double radius = 0;           ///< circle [m]
  double a = 0, b = 0;         ///< ellipse semi-axes [m]; a along the direction `angle_deg`
  double angle_deg = 0;        ///< ellipse / rectangle rotation, anticlockwise from +x
  double width = 0, height = 0;  ///< rectangle [m]
  std::vector<std::array<double, 2>> points;  ///< polygon corners (x, z) [m]
};

/// Mesh size controls [m].
struct Sizing {
  double far = 5;        ///< far-field size
  double near_void = 0.25;  ///< on void boundaries
  double surface = 1;    ///< along the ground surface
  int order = 2;         ///< 1 linear, 2 quadratic
  /// Size gradient dh/dd [-]: the size grows by this much per metre of distance from a void or
  /// from the surface, until it reaches `far`.
  double gradient = 0.25;
};

/// A layered block with cavities. Layers are listed top down by thickness; the last one runs
/// to the bottom.
struct Geometry2D {
  bool axisymmetric = false;  ///< domain r ∈ [0, width/2] instead of x ∈ [−width/2, width/2]
  double width = 100, depth = 50;
  std::vector<double> layer_thickness;  ///< top down; the last entry may be ignored
  std::vector<VoidOutline> voids;
  Sizing sizing;
};

}  // namespace voidsign::mesh
