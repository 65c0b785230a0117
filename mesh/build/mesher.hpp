// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The mesher interface: geometry in, tagged mesh out. The void regions are meshed and tagged,
/// not cut away, so that the model without voids can reuse the very same mesh.
#include <stdexcept>
#include <string>

#include "mesh/build/geometry.hpp"
#include "mesh/build/geometry3d.hpp"
#include "mesh/core/mesh.hpp"

namespace voidsign::mesh {

/// Thrown when a geometry cannot be meshed (self-intersecting polygon, degenerate result).
struct MeshError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// Builds a conforming mesh of the layered block: cell edges follow layer interfaces and void
/// outlines; void interiors are meshed and tagged void_id = k. Calls finish_topology.
Mesh build_mesh_2d(const Geometry2D& g);

/// Rough count of cells the sizing will produce (area integral of 1/h² with the grading),
/// for memory estimates before meshing.
double estimate_cells_2d(const Geometry2D& g);

/// The same in 3D: tetrahedra (tet10 for order 2, tet4 for order 1), conforming to layer
/// interfaces and void surfaces, void interiors meshed and tagged. Calls finish_topology.
Mesh build_mesh_3d(const Geometry3D& g);

/// Rough count of tetrahedra the sizing will produce, for estimates before meshing.
double estimate_cells_3d(const Geometry3D& g);

}  // namespace voidsign::mesh
