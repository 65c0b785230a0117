// SPDX-License-Identifier: GPL-3.0-or-later
#include "mesh/core/mesh.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <stdexcept>
#include <tuple>
#include <unordered_map>

namespace voidsign::mesh {

int nodes_per_cell(CellType t) { return t == CellType::tri3 ? 3 : 6; }
int nodes_per_facet(CellType t) { return t == CellType::tri3 ? 2 : 3; }
int order_of(CellType t) { return t == CellType::tri3 ? 1 : 2; }

namespace {

std::uint64_t edge_key(int a, int b) {
  auto lo = static_cast<std::uint64_t>(std::min(a, b));
  auto hi = static_cast<std::uint64_t>(std::max(a, b));
  return (lo << 32) | hi;
}

struct EdgeUse {
  int count = 0;
  int cell = -1;
  int local = 0;  // edge index within the cell: 0 = (0,1), 1 = (1,2), 2 = (2,0)
};

constexpr int edge_corner[3][2] = {{0, 1}, {1, 2}, {2, 0}};

FacetKind classify(const Mesh& m, int a, int b, double tol, bool* on_outer) {
  const Point& pa = m.nodes[a];
  const Point& pb = m.nodes[b];
  auto both = [&](auto pred) { return pred(pa) && pred(pb); };
  *on_outer = true;
  if (both([&](const Point& p) { return std::abs(p[2] - m.z_max) < tol; })) return FacetKind::surface;
  if (both([&](const Point& p) { return std::abs(p[2] - m.z_min) < tol; })) return FacetKind::bottom;
  if (both([&](const Point& p) { return std::abs(p[0] - m.x_min) < tol; })) return FacetKind::left;
  if (both([&](const Point& p) { return std::abs(p[0] - m.x_max) < tol; })) return FacetKind::right;
  *on_outer = false;
  return FacetKind::void_wall;
}

}  // namespace

void finish_topology(Mesh& m, double tol) {
  if (m.nodes.empty() || m.cells.empty()) throw std::invalid_argument("finish_topology: empty mesh");
  m.x_min = m.z_min = std::numeric_limits<double>::max();
  m.x_max = m.z_max = std::numeric_limits<double>::lowest();
  for (const Point& p : m.nodes) {
    m.x_min = std::min(m.x_min, p[0]);
    m.x_max = std::max(m.x_max, p[0]);
    m.z_min = std::min(m.z_min, p[2]);
    m.z_max = std::max(m.z_max, p[2]);
  }

  const int npc = m.npc();
  const std::size_t nc = m.n_cells();
  std::unordered_map<std::uint64_t, EdgeUse> solid;
  std::unordered_map<std::uint64_t, int> void_edges;
  solid.reserve(nc * 2);
  for (std::size_t c = 0; c < nc; ++c) {
    const int* v = m.cell(c);
    for (int e = 0; e < 3; ++e) {
      const auto key = edge_key(v[edge_corner[e][0]], v[edge_corner[e][1]]);
      if (m.void_id[c] >= 0) {
        void_edges[key] = m.void_id[c];
        continue;
      }
      EdgeUse& u = solid[key];
      ++u.count;
      u.cell = static_cast<int>(c);
      u.local = e;
    }
  }

  m.facets.clear();
  for (const auto& [key, use] : solid) {
    if (use.count != 1) continue;
    const int* v = m.cell(static_cast<std::size_t>(use.cell));
    Facet f;
    f.nodes[0] = v[edge_corner[use.local][0]];
    f.nodes[1] = v[edge_corner[use.local][1]];
    if (npc == 6) f.nodes[2] = v[3 + use.local];
    f.cell = use.cell;
    bool outer = false;
    f.kind = classify(m, f.nodes[0], f.nodes[1], tol, &outer);
    if (!outer) {
      auto it = void_edges.find(key);
      if (it == void_edges.end())
        throw std::runtime_error("mesh has an internal boundary that is neither the block's edge nor a void wall");
      f.void_id = it->second;
    }
    m.facets.push_back(f);
  }
  // Hash-map iteration order is unspecified: sort so that results do not depend on it.
  std::sort(m.facets.begin(), m.facets.end(), [](const Facet& a, const Facet& b) {
    return std::tie(a.cell, a.nodes[0]) < std::tie(b.cell, b.nodes[0]);
  });

  std::vector<char> on_surface(m.n_nodes(), 0);
  for (const Facet& f : m.facets) {
    if (f.kind != FacetKind::surface) continue;
    for (int k = 0; k < nodes_per_facet(m.type); ++k) on_surface[f.nodes[k]] = 1;
  }
  m.surface_nodes.clear();
  for (std::size_t i = 0; i < on_surface.size(); ++i)
    if (on_surface[i]) m.surface_nodes.push_back(static_cast<int>(i));
  std::sort(m.surface_nodes.begin(), m.surface_nodes.end(),
            [&](int a, int b) { return m.nodes[a][0] < m.nodes[b][0]; });
}

namespace {

// det J of the tri6 map at (r, s), in the x–z plane.
double tri6_detj(const Mesh& m, const int* v, double r, double s) {
  const double t = 1 - r - s;
  // dN/dr and dN/ds for N = {t(2t-1), r(2r-1), s(2s-1), 4rt, 4rs, 4st}
  const double dr[6] = {1 - 4 * t, 4 * r - 1, 0, 4 * (t - r), 4 * s, -4 * s};
  const double ds[6] = {1 - 4 * t, 0, 4 * s - 1, -4 * r, 4 * r, 4 * (t - s)};
  double xr = 0, xs = 0, zr = 0, zs = 0;
  for (int k = 0; k < 6; ++k) {
    const Point& p = m.nodes[v[k]];
    xr += dr[k] * p[0];
    xs += ds[k] * p[0];
    zr += dr[k] * p[2];
    zs += ds[k] * p[2];
  }
  return xr * zs - xs * zr;
}

}  // namespace

Quality measure_quality(const Mesh& m) {
  Quality q;
  q.min_quality = 1;
  q.min_jacobian_ratio = 1;
  double sum = 0;
  const std::size_t nc = m.n_cells();
  static constexpr double pts[7][2] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}, {1.0 / 3, 1.0 / 3}};
  for (std::size_t c = 0; c < nc; ++c) {
    const int* v = m.cell(c);
    const Point& a = m.nodes[v[0]];
    const Point& b = m.nodes[v[1]];
    const Point& d = m.nodes[v[2]];
    const double area2 = (b[0] - a[0]) * (d[2] - a[2]) - (d[0] - a[0]) * (b[2] - a[2]);
    auto len2 = [](const Point& p, const Point& r) {
      return (p[0] - r[0]) * (p[0] - r[0]) + (p[2] - r[2]) * (p[2] - r[2]);
    };
    const double l2 = len2(a, b) + len2(b, d) + len2(d, a);
    // 4√3·A/Σℓ² with A = area2/2: 1 for an equilateral triangle.
    const double shape = l2 > 0 ? 2.0 * std::sqrt(3.0) * area2 / l2 : 0.0;
    bool inverted = area2 <= 0;
    double ratio = 1;
    if (m.type == CellType::tri6) {
      double jmin = std::numeric_limits<double>::max(), jmax = std::numeric_limits<double>::lowest();
      for (const auto& p : pts) {
        const double j = tri6_detj(m, v, p[0], p[1]);
        jmin = std::min(jmin, j);
        jmax = std::max(jmax, j);
      }
      if (jmin <= 0) inverted = true;
      ratio = jmax > 0 ? jmin / jmax : 0;
    }
    if (inverted) ++q.n_inverted;
    const double s = inverted ? 0.0 : shape;
    sum += s;
    if (s < q.min_quality) {
      q.min_quality = s;
      q.worst_cell = c;
    }
    q.min_jacobian_ratio = std::min(q.min_jacobian_ratio, ratio);
  }
  q.mean_quality = nc ? sum / static_cast<double>(nc) : 0;
  return q;
}

}  // namespace voidsign::mesh
