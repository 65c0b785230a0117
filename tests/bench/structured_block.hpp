// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
// A structured plane block for the dynamic benchmarks: width × depth below z = 0, centred on
// x = 0, rectangles of side h split into two tri6 with alternating diagonals, midside nodes at
// the chord midpoints; one layer, no voids. block_3d: its 3D counterpart of tet10 (Gmsh).
#include <algorithm>
#include <cmath>

#include "mesh/build/mesher.hpp"
#include "mesh/core/mesh.hpp"

namespace voidsign::bench {

inline mesh::Mesh block(double width, double depth, double h) {
  mesh::Mesh m;
  m.type = mesh::CellType::tri6;
  const int nx = static_cast<int>(std::lround(width / h)), nz = static_cast<int>(std::lround(depth / h));
  const int gx = 2 * nx + 1, gz = 2 * nz + 1;
  for (int k = 0; k < gz; ++k)
    for (int i = 0; i < gx; ++i) m.nodes.push_back({-0.5 * width + 0.5 * h * i, 0.0, -depth + 0.5 * h * k});
  auto id = [&](int i, int k) { return k * gx + i; };
  auto mid = [&](int p, int q) { return id((p % gx + q % gx) / 2, (p / gx + q / gx) / 2); };
  for (int k = 0; k < nz; ++k)
    for (int i = 0; i < nx; ++i) {
      const int a = id(2 * i, 2 * k), b = id(2 * i + 2, 2 * k), c = id(2 * i + 2, 2 * k + 2), d = id(2 * i, 2 * k + 2);
      auto tri = [&](int p, int q, int r) {
        m.cells.insert(m.cells.end(), {p, q, r, mid(p, q), mid(q, r), mid(r, p)});
        m.layer.push_back(0);
        m.void_id.push_back(-1);
      };
      if ((i + k) % 2 == 0) {
        tri(a, b, c);
        tri(a, c, d);
      } else {
        tri(a, b, d);
        tri(b, c, d);
      }
    }
  m.x_min = -0.5 * width;
  m.x_max = 0.5 * width;
  m.z_min = -depth;
  m.z_max = 0;
  mesh::finish_topology(m, 1e-6);
  return m;
}

/// A box 2 D × 2 D × D of quadratic tetrahedra of uniform size, one layer, no voids, with about
/// `target_dofs` unknowns (3 per node): the size is calibrated on two trial meshes first.
inline mesh::Mesh block_3d(double target_dofs, double depth = 40) {
  auto build = [&](double h) {
    mesh::Geometry3D g;
    g.width = g.length = 2 * depth;
    g.depth = depth;
    g.layer_thickness = {depth};
    g.sizing.far = g.sizing.near_void = g.sizing.surface = h;
    g.sizing.gradient = 0.3;
    g.sizing.order = 2;
    return mesh::build_mesh_3d(g);
  };
  // Two corrections: a coarse mesh has relatively more boundary nodes than a fine one.
  double h = depth / 6;
  for (int pass = 0; pass < 2; ++pass) h *= std::cbrt(3 * static_cast<double>(build(h).n_nodes()) / target_dofs);
  return build(h);
}

}  // namespace voidsign::bench
