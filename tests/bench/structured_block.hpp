// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
// A structured plane block for the dynamic benchmarks: width × depth below z = 0, centred on
// x = 0, rectangles of side h split into two tri6 with alternating diagonals, midside nodes at
// the chord midpoints; one layer, no voids.
#include <cmath>

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

}  // namespace voidsign::bench
