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

int nodes_per_cell(CellType t) {
  switch (t) {
    case CellType::tri3: return 3;
    case CellType::tri6: return 6;
    case CellType::tet4: return 4;
    case CellType::tet10: return 10;
  }
  return 0;
}
int nodes_per_facet(CellType t) {
  switch (t) {
    case CellType::tri3: return 2;
    case CellType::tri6: return 3;
    case CellType::tet4: return 3;
    case CellType::tet10: return 6;
  }
  return 0;
}
int order_of(CellType t) { return t == CellType::tri3 || t == CellType::tet4 ? 1 : 2; }
int dim_of(CellType t) { return t == CellType::tri3 || t == CellType::tri6 ? 2 : 3; }

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

// 2D: boundary edges of the solid triangles.
void finish_topology_2d(Mesh& m, double tol) {
  const int npc = m.npc();
  const std::size_t nc = m.n_cells();
  std::unordered_map<std::uint64_t, EdgeUse> solid;
  std::unordered_map<std::uint64_t, EdgeUse> void_edges;
  solid.reserve(nc * 2);
  for (std::size_t c = 0; c < nc; ++c) {
    const int* v = m.cell(c);
    for (int e = 0; e < 3; ++e) {
      const auto key = edge_key(v[edge_corner[e][0]], v[edge_corner[e][1]]);
      EdgeUse& u = m.void_id[c] >= 0 ? void_edges[key] : solid[key];
      ++u.count;
      u.cell = static_cast<int>(c);
      u.local = e;
    }
  }

  auto facet_of = [&](const EdgeUse& use) {
    const int* v = m.cell(static_cast<std::size_t>(use.cell));
    Facet f;
    f.nodes[0] = v[edge_corner[use.local][0]];
    f.nodes[1] = v[edge_corner[use.local][1]];
    if (npc == 6) f.nodes[2] = v[3 + use.local];
    f.cell = use.cell;
    return f;
  };
  m.facets.clear();
  for (const auto& [key, use] : solid) {
    if (use.count != 1) continue;
    Facet f = facet_of(use);
    bool outer = false;
    f.kind = classify(m, f.nodes[0], f.nodes[1], tol, &outer);
    if (!outer) {
      auto it = void_edges.find(key);
      if (it == void_edges.end())
        throw std::runtime_error("mesh has an internal boundary that is neither the block's edge nor a void wall");
      f.void_id = m.void_id[static_cast<std::size_t>(it->second.cell)];
    }
    m.facets.push_back(f);
  }
  // Edges of void cells on the block's sides (a void cut by the axis or a side): the model
  // without voids needs their supports and loads too.
  for (const auto& [key, use] : void_edges) {
    if (use.count != 1 || solid.count(key)) continue;
    Facet f = facet_of(use);
    bool outer = false;
    f.kind = classify(m, f.nodes[0], f.nodes[1], tol, &outer);
    if (!outer) throw std::runtime_error("mesh has a void boundary that is neither the block's edge nor a void wall");
    f.void_id = m.void_id[static_cast<std::size_t>(use.cell)];
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

// Tetrahedron faces as (corners, midside nodes) in VTK numbering. The corners run so that their
// right-hand normal points out of a positively oriented cell (det J > 0); the midside nodes sit on
// the face's edges c0c1, c1c2, c2c0.
constexpr int tet_face[4][6] = {
    {0, 2, 1, 6, 5, 4},  // opposite corner 3
    {0, 1, 3, 4, 8, 7},  // opposite corner 2
    {1, 2, 3, 5, 9, 8},  // opposite corner 0
    {0, 3, 2, 7, 9, 6},  // opposite corner 1
};

bool on_plane(const Mesh& m, const int* v, int axis, double value, double tol) {
  for (int k = 0; k < 3; ++k)
    if (std::abs(m.nodes[v[k]][axis] - value) >= tol) return false;
  return true;
}

// Which side of the block a face with corners v lies on, if any.
bool classify_face(const Mesh& m, const int* v, double tol, FacetKind* kind) {
  const struct {
    int axis;
    double value;
    FacetKind kind;
  } sides[6] = {{2, m.z_max, FacetKind::surface}, {2, m.z_min, FacetKind::bottom},
                {0, m.x_min, FacetKind::left},    {0, m.x_max, FacetKind::right},
                {1, m.y_min, FacetKind::front},   {1, m.y_max, FacetKind::back}};
  for (const auto& side : sides)
    if (on_plane(m, v, side.axis, side.value, tol)) {
      *kind = side.kind;
      return true;
    }
  return false;
}

// One face of one cell, filed under its smallest corner: b < c are the other two corners.
struct FaceUse {
  int b, c;
  int cell;
  int local;
};

// 3D: faces of solid tetrahedra that no other solid tetrahedron shares. Faces are matched by
// bucketing them under their smallest corner node, which is linear in the mesh size and
// independent of any hash order.
void finish_topology_3d(Mesh& m, double tol) {
  const std::size_t nc = m.n_cells();
  const std::size_t nn = m.n_nodes();
  std::vector<std::size_t> start(nn + 1, 0);
  auto sorted_corners = [&](std::size_t cell, int local) {
    const int* v = m.cell(cell);
    std::array<int, 3> f = {v[tet_face[local][0]], v[tet_face[local][1]], v[tet_face[local][2]]};
    std::sort(f.begin(), f.end());
    return f;
  };
  for (std::size_t c = 0; c < nc; ++c)
    for (int f = 0; f < 4; ++f) ++start[static_cast<std::size_t>(sorted_corners(c, f)[0]) + 1];
  for (std::size_t i = 0; i < nn; ++i) start[i + 1] += start[i];
  std::vector<FaceUse> uses(start[nn]);
  {
    std::vector<std::size_t> fill(start.begin(), start.end() - 1);
    for (std::size_t c = 0; c < nc; ++c)
      for (int f = 0; f < 4; ++f) {
        const auto k = sorted_corners(c, f);
        uses[fill[static_cast<std::size_t>(k[0])]++] = {k[1], k[2], static_cast<int>(c), f};
      }
  }

  m.facets.clear();
  for (std::size_t a = 0; a < nn; ++a) {
    const auto first = uses.begin() + static_cast<std::ptrdiff_t>(start[a]);
    const auto last = uses.begin() + static_cast<std::ptrdiff_t>(start[a + 1]);
    std::sort(first, last, [](const FaceUse& p, const FaceUse& q) {
      return std::tie(p.b, p.c, p.cell) < std::tie(q.b, q.c, q.cell);
    });
    for (auto g = first; g != last;) {
      auto e = g;
      int n_solid = 0;
      const FaceUse* solid = nullptr;
      int void_id = -1;
      for (; e != last && e->b == g->b && e->c == g->c; ++e) {
        const int vid = m.void_id[static_cast<std::size_t>(e->cell)];
        if (vid < 0) {
          ++n_solid;
          solid = &*e;
        } else if (void_id < 0) {
          void_id = vid;
        }
      }
      if (e - g > 2) throw std::runtime_error("mesh has a face shared by more than two cells");
      const bool lone_void = n_solid == 0 && e - g == 1;  // a void cell's face on the block's side
      const FaceUse* owner = lone_void ? &*g : solid;
      g = e;
      if (n_solid != 1 && !lone_void) continue;
      const int* v = m.cell(static_cast<std::size_t>(owner->cell));
      const int* local = tet_face[owner->local];
      Facet f;
      for (int k = 0; k < nodes_per_facet(m.type); ++k) f.nodes[k] = v[local[k]];
      f.cell = owner->cell;
      if (lone_void) {
        if (!classify_face(m, f.nodes.data(), tol, &f.kind))
          throw std::runtime_error("mesh has a void boundary that is neither the block's side nor a void wall");
        f.void_id = void_id;
      } else if (!classify_face(m, f.nodes.data(), tol, &f.kind)) {
        if (void_id < 0)
          throw std::runtime_error(
              "mesh has an internal boundary that is neither the block's side nor a void wall");
        f.kind = FacetKind::void_wall;
        f.void_id = void_id;
      }
      m.facets.push_back(f);
    }
  }
  std::sort(m.facets.begin(), m.facets.end(), [](const Facet& a, const Facet& b) {
    return std::tie(a.cell, a.nodes[0], a.nodes[1], a.nodes[2]) <
           std::tie(b.cell, b.nodes[0], b.nodes[1], b.nodes[2]);
  });

  std::vector<char> on_surface(nn, 0);
  for (const Facet& f : m.facets) {
    if (f.kind != FacetKind::surface) continue;
    for (int k = 0; k < nodes_per_facet(m.type); ++k) on_surface[f.nodes[k]] = 1;
  }
  m.surface_nodes.clear();
  for (std::size_t i = 0; i < nn; ++i)
    if (on_surface[i]) m.surface_nodes.push_back(static_cast<int>(i));
  std::stable_sort(m.surface_nodes.begin(), m.surface_nodes.end(), [&](int a, int b) {
    const Point& p = m.nodes[a];
    const Point& q = m.nodes[b];
    return p[0] < q[0] || (p[0] == q[0] && p[1] < q[1]);
  });
}

}  // namespace

void finish_topology(Mesh& m, double tol) {
  if (m.nodes.empty() || m.cells.empty()) throw std::invalid_argument("finish_topology: empty mesh");
  if (m.cells.size() != m.n_cells() * static_cast<std::size_t>(m.npc()) ||
      m.void_id.size() != m.n_cells())
    throw std::invalid_argument("finish_topology: cells, layer and void_id do not match");
  m.x_min = m.y_min = m.z_min = std::numeric_limits<double>::max();
  m.x_max = m.y_max = m.z_max = std::numeric_limits<double>::lowest();
  for (const Point& p : m.nodes) {
    m.x_min = std::min(m.x_min, p[0]);
    m.x_max = std::max(m.x_max, p[0]);
    m.y_min = std::min(m.y_min, p[1]);
    m.y_max = std::max(m.y_max, p[1]);
    m.z_min = std::min(m.z_min, p[2]);
    m.z_max = std::max(m.z_max, p[2]);
  }
  if (m.dim() == 2)
    finish_topology_2d(m, tol);
  else
    finish_topology_3d(m, tol);
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

// det J of the tet10 map at (r, s, t), barycentric L = (1 − r − s − t, r, s, t).
double tet10_detj(const Mesh& m, const int* v, double r, double s, double t) {
  const double L[4] = {1 - r - s - t, r, s, t};
  static constexpr double dL[4][3] = {{-1, -1, -1}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
  static constexpr int edge[6][2] = {{0, 1}, {1, 2}, {2, 0}, {0, 3}, {1, 3}, {2, 3}};
  double J[3][3] = {};  // J[i][j] = ∂x_i/∂ξ_j
  auto add = [&](int node, const double g[3]) {
    const Point& p = m.nodes[v[node]];
    for (int i = 0; i < 3; ++i)
      for (int j = 0; j < 3; ++j) J[i][j] += p[i] * g[j];
  };
  for (int k = 0; k < 4; ++k) {  // corners: L(2L − 1)
    const double g[3] = {(4 * L[k] - 1) * dL[k][0], (4 * L[k] - 1) * dL[k][1], (4 * L[k] - 1) * dL[k][2]};
    add(k, g);
  }
  for (int e = 0; e < 6; ++e) {  // edges: 4 La Lb
    const int a = edge[e][0], b = edge[e][1];
    double g[3];
    for (int j = 0; j < 3; ++j) g[j] = 4 * (L[a] * dL[b][j] + L[b] * dL[a][j]);
    add(4 + e, g);
  }
  return J[0][0] * (J[1][1] * J[2][2] - J[1][2] * J[2][1]) -
         J[0][1] * (J[1][0] * J[2][2] - J[1][2] * J[2][0]) +
         J[0][2] * (J[1][0] * J[2][1] - J[1][1] * J[2][0]);
}

// Tetrahedron measures: shape 6√2·V/ℓ_rms³ of the corners (1 for the regular tetrahedron,
// → 0 for slivers and needles), and for tet10 det J at the corners, edge midpoints and centroid.
void measure_tet(const Mesh& m, const int* v, double* shape, bool* inverted, double* ratio) {
  const Point& a = m.nodes[v[0]];
  double e[3][3];
  for (int k = 0; k < 3; ++k)
    for (int i = 0; i < 3; ++i) e[k][i] = m.nodes[v[k + 1]][i] - a[i];
  const double vol6 = e[0][0] * (e[1][1] * e[2][2] - e[1][2] * e[2][1]) -
                      e[0][1] * (e[1][0] * e[2][2] - e[1][2] * e[2][0]) +
                      e[0][2] * (e[1][0] * e[2][1] - e[1][1] * e[2][0]);
  double l2 = 0;
  for (int p = 0; p < 4; ++p)
    for (int r = p + 1; r < 4; ++r)
      for (int i = 0; i < 3; ++i) {
        const double d = m.nodes[v[p]][i] - m.nodes[v[r]][i];
        l2 += d * d;
      }
  const double lrms = std::sqrt(l2 / 6);
  *shape = lrms > 0 ? std::sqrt(2.0) * vol6 / (lrms * lrms * lrms) : 0.0;
  *inverted = vol6 <= 0;
  *ratio = 1;
  if (m.type != CellType::tet10) return;
  static constexpr double pts[11][3] = {{0, 0, 0},     {1, 0, 0},     {0, 1, 0},       {0, 0, 1},
                                        {0.5, 0, 0},   {0.5, 0.5, 0}, {0, 0.5, 0},     {0, 0, 0.5},
                                        {0.5, 0, 0.5}, {0, 0.5, 0.5}, {0.25, 0.25, 0.25}};
  double jmin = std::numeric_limits<double>::max(), jmax = std::numeric_limits<double>::lowest();
  for (const auto& p : pts) {
    const double j = tet10_detj(m, v, p[0], p[1], p[2]);
    jmin = std::min(jmin, j);
    jmax = std::max(jmax, j);
  }
  if (jmin <= 0) *inverted = true;
  *ratio = jmax > 0 ? jmin / jmax : 0;
}

}  // namespace

Quality measure_quality(const Mesh& m) {
  Quality q;
  q.min_quality = 1;
  q.min_jacobian_ratio = 1;
  double sum = 0;
  const std::size_t nc = m.n_cells();
  static constexpr double pts[7][2] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}, {1.0 / 3, 1.0 / 3}};
  auto tally = [&](std::size_t c, double shape, bool inverted, double ratio) {
    if (inverted) ++q.n_inverted;
    const double s = inverted ? 0.0 : shape;
    sum += s;
    if (s < q.min_quality) {
      q.min_quality = s;
      q.worst_cell = c;
    }
    q.min_jacobian_ratio = std::min(q.min_jacobian_ratio, ratio);
  };
  for (std::size_t c = 0; c < nc; ++c) {
    const int* v = m.cell(c);
    if (m.dim() == 3) {
      double shape = 0, ratio = 1;
      bool inverted = false;
      measure_tet(m, v, &shape, &inverted, &ratio);
      tally(c, shape, inverted, ratio);
      continue;
    }
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
    tally(c, shape, inverted, ratio);
  }
  q.mean_quality = nc ? sum / static_cast<double>(nc) : 0;
  return q;
}

}  // namespace voidsign::mesh
