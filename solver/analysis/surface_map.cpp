// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/surface_map.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <unordered_map>

namespace voidsign::solver {

namespace {

// Derivatives (∂/∂x, ∂/∂y) of the facet's shape functions at its own nodes, for a facet lying in
// a horizontal plane.
void facet_gradients(const mesh::Mesh& m, const mesh::Facet& f, int nn, double dx[6][6], double dy[6][6]) {
  static constexpr double ref[6][2] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}};
  for (int q = 0; q < nn; ++q) {
    const double r = ref[q][0], s = ref[q][1], u = 1 - r - s;
    double dr[6], ds[6];
    if (nn == 6) {
      dr[0] = 1 - 4 * u; dr[1] = 4 * r - 1; dr[2] = 0; dr[3] = 4 * (u - r); dr[4] = 4 * s; dr[5] = -4 * s;
      ds[0] = 1 - 4 * u; ds[1] = 0; ds[2] = 4 * s - 1; ds[3] = -4 * r; ds[4] = 4 * r; ds[5] = 4 * (u - s);
    } else {
      dr[0] = -1; dr[1] = 1; dr[2] = 0;
      ds[0] = -1; ds[1] = 0; ds[2] = 1;
    }
    double xr = 0, xs = 0, yr = 0, ys = 0;
    for (int a = 0; a < nn; ++a) {
      const auto& p = m.nodes[f.nodes[a]];
      xr += dr[a] * p[0];
      xs += ds[a] * p[0];
      yr += dr[a] * p[1];
      ys += ds[a] * p[1];
    }
    const double det = xr * ys - xs * yr;
    for (int a = 0; a < nn; ++a) {
      dx[q][a] = (ys * dr[a] - yr * ds[a]) / det;
      dy[q][a] = (-xs * dr[a] + xr * ds[a]) / det;
    }
  }
}

}  // namespace

SurfaceMap surface_map(const StaticProblem& p, const StaticResult& r, const FarField& far, double y_centre) {
  const mesh::Mesh& m = *p.mesh;
  if (m.dim() != 3) throw std::invalid_argument("surface_map: 3D meshes only");
  SurfaceMap map;
  map.nodes_per_triangle = mesh::nodes_per_facet(m.type);
  std::unordered_map<int, int> index;
  for (int n : m.surface_nodes) {
    index[n] = static_cast<int>(map.points.size());
    SurfacePoint sp;
    sp.x = m.nodes[n][0];
    sp.y = m.nodes[n][1];
    sp.u = node_displacement(p, r.voided.u, static_cast<std::size_t>(n));
    sp.u_ref = node_displacement(p, r.reference.u, static_cast<std::size_t>(n));
    for (int i = 0; i < 3; ++i) sp.du[i] = sp.u[i] - sp.u_ref[i];
    map.points.push_back(sp);
    map.mesh_node.push_back(n);
  }
  // Gradients of the anomaly, averaged over the facets sharing a node.
  std::vector<int> count(map.points.size(), 0);
  std::vector<std::array<double, 6>> grad(map.points.size(), std::array<double, 6>{});  // dux/dx, dux/dy, duy/dx, duy/dy, duz/dx, duz/dy
  const int nn = map.nodes_per_triangle;
  for (const mesh::Facet& f : m.facets) {
    if (f.kind != mesh::FacetKind::surface) continue;
    double dx[6][6], dy[6][6];
    facet_gradients(m, f, nn, dx, dy);
    for (int a = 0; a < nn; ++a) map.triangles.push_back(index.at(f.nodes[a]));
    for (int q = 0; q < nn; ++q) {
      const int iq = index.at(f.nodes[q]);
      for (int a = 0; a < nn; ++a) {
        const auto& du = map.points[static_cast<std::size_t>(index.at(f.nodes[a]))].du;
        for (int c = 0; c < 3; ++c) {
          grad[static_cast<std::size_t>(iq)][2 * c] += dx[q][a] * du[static_cast<std::size_t>(c)];
          grad[static_cast<std::size_t>(iq)][2 * c + 1] += dy[q][a] * du[static_cast<std::size_t>(c)];
        }
      }
      ++count[static_cast<std::size_t>(iq)];
    }
  }
  for (std::size_t i = 0; i < map.points.size(); ++i) {
    if (!count[i]) continue;
    for (double& g : grad[i]) g /= count[i];
    SurfacePoint& sp = map.points[i];
    sp.strain_xx = grad[i][0];
    sp.strain_yy = grad[i][3];
    sp.strain_xy = 0.5 * (grad[i][1] + grad[i][2]);
    sp.tilt_x = grad[i][4];
    sp.tilt_y = grad[i][5];
  }
  // Far field: a ring around the voids, else the block's edge.
  double sum = 0;
  int n_far = 0;
  const bool ring_inside = far.offset > 0 && far.x_centre - far.offset > m.x_min && far.x_centre + far.offset < m.x_max &&
                           y_centre - far.offset > m.y_min && y_centre + far.offset < m.y_max;
  for (const SurfacePoint& sp : map.points) {
    const double dist = std::hypot(sp.x - far.x_centre, sp.y - y_centre);
    const double tol = 1e-9 * (m.x_max - m.x_min);
    const bool edge = sp.x < m.x_min + tol || sp.x > m.x_max - tol || sp.y < m.y_min + tol || sp.y > m.y_max - tol;
    if (ring_inside ? std::abs(dist - far.offset) <= 0.05 * far.offset : edge) {
      sum += sp.du[2];
      ++n_far;
    }
  }
  const double far_uz = n_far ? sum / n_far : 0.0;
  for (SurfacePoint& sp : map.points) sp.duz_rel = sp.du[2] - far_uz;
  return map;
}

Anomaly summarize_map(const SurfaceMap& map, const mesh::Mesh& m) {
  (void)m;
  Anomaly a;
  if (map.points.empty()) return a;
  a.uz_min = a.uz_max = map.points[0].du[2];
  std::size_t i_rel = 0;
  for (std::size_t i = 0; i < map.points.size(); ++i) {
    const SurfacePoint& p = map.points[i];
    if (p.du[2] < a.uz_min) { a.uz_min = p.du[2]; a.x_uz_min = p.x; a.y_uz_min = p.y; }
    if (p.du[2] > a.uz_max) { a.uz_max = p.du[2]; a.x_uz_max = p.x; a.y_uz_max = p.y; }
    const double uh = std::hypot(p.du[0], p.du[1]);
    if (uh > a.ux_absmax) { a.ux_absmax = uh; a.x_ux_absmax = p.x; a.y_ux_absmax = p.y; }
    const double tilt = std::hypot(p.tilt_x, p.tilt_y);
    if (tilt > a.tilt_absmax) { a.tilt_absmax = tilt; a.x_tilt_absmax = p.x; a.y_tilt_absmax = p.y; }
    // Principal horizontal strains of [[exx, exy], [exy, eyy]].
    const double c = 0.5 * (p.strain_xx + p.strain_yy), rad = std::hypot(0.5 * (p.strain_xx - p.strain_yy), p.strain_xy);
    a.strain_max = std::max(a.strain_max, c + rad);
    a.strain_min = std::min(a.strain_min, c - rad);
    const double e = std::max(std::abs(c + rad), std::abs(c - rad));
    if (e > a.strain_absmax) { a.strain_absmax = e; a.x_strain_absmax = p.x; a.y_strain_absmax = p.y; }
    if (p.duz_rel < map.points[i_rel].duz_rel) i_rel = i;
  }
  a.rel_uz_min = map.points[i_rel].duz_rel;
  a.far_field_uz = map.points[i_rel].du[2] - map.points[i_rel].duz_rel;
  // Trough volume over the surface triangles (corner values, linear per triangle).
  const int nn = map.nodes_per_triangle;
  for (std::size_t t = 0; t + static_cast<std::size_t>(nn) <= map.triangles.size(); t += static_cast<std::size_t>(nn)) {
    const SurfacePoint& p0 = map.points[static_cast<std::size_t>(map.triangles[t])];
    const SurfacePoint& p1 = map.points[static_cast<std::size_t>(map.triangles[t + 1])];
    const SurfacePoint& p2 = map.points[static_cast<std::size_t>(map.triangles[t + 2])];
    const double area = 0.5 * std::abs((p1.x - p0.x) * (p2.y - p0.y) - (p2.x - p0.x) * (p1.y - p0.y));
    const double s = std::min(p0.duz_rel, 0.0) + std::min(p1.duz_rel, 0.0) + std::min(p2.duz_rel, 0.0);
    a.trough_volume -= area * s / 3;
  }
  return a;
}

}  // namespace voidsign::solver
