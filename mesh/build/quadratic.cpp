// SPDX-License-Identifier: GPL-3.0-or-later
#include "mesh/build/quadratic.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <span>
#include <string>
#include <utility>

#include "mesh/build/gmsh_common.hpp"

namespace voidsign::mesh::gmsh_detail {

namespace {

using Edge = std::array<int, 2>;

// Edges in VTK order: the midside node (corners + e) of the quadratic cell sits on edge e.
// (Gmsh's own 10-node tetrahedron orders them 01, 12, 20, 03, 23, 13.)
constexpr Edge kTriEdge[3] = {{{0, 1}}, {{1, 2}}, {{2, 0}}};
constexpr Edge kTetEdge[6] = {{{0, 1}}, {{1, 2}}, {{2, 0}}, {{0, 3}}, {{1, 3}}, {{2, 3}}};

std::span<const Edge> cell_edges(CellType linear) {
  if (linear == CellType::tri3) return kTriEdge;
  return kTetEdge;
}

// The distinct edges of a linear mesh, numbered by (smaller node, larger node).
struct EdgeTable {
  std::vector<std::size_t> start;  // the edges whose smaller node is a: start[a] .. start[a + 1]
  std::vector<int> lo, hi;         // end nodes of each edge, lo < hi
  std::vector<int> of_cell;        // per cell and local edge e: the edge id

  // Edge id of {a, b}, or −1.
  int find(int a, int b) const {
    if (a > b) std::swap(a, b);
    const auto first = hi.begin() + static_cast<std::ptrdiff_t>(start[static_cast<std::size_t>(a)]);
    const auto last = hi.begin() + static_cast<std::ptrdiff_t>(start[static_cast<std::size_t>(a) + 1]);
    const auto it = std::lower_bound(first, last, b);
    return it != last && *it == b ? static_cast<int>(it - hi.begin()) : -1;
  }
};

EdgeTable build_edges(const Mesh& m, std::span<const Edge> edges) {
  const std::size_t nn = m.n_nodes(), nc = m.n_cells(), ne = edges.size();
  // Bucket the edges of every cell under their smaller node, then sort each small bucket.
  std::vector<std::size_t> first(nn + 1, 0);
  for (std::size_t c = 0; c < nc; ++c)
    for (const auto& e : edges)
      ++first[static_cast<std::size_t>(std::min(m.cell(c)[e[0]], m.cell(c)[e[1]])) + 1];
  for (std::size_t i = 0; i < nn; ++i) first[i + 1] += first[i];
  std::vector<std::pair<int, int>> slot(first[nn]);  // (larger node, ne·cell + local edge)
  {
    std::vector<std::size_t> fill(first.begin(), first.end() - 1);
    for (std::size_t c = 0; c < nc; ++c)
      for (std::size_t e = 0; e < ne; ++e) {
        const int a = m.cell(c)[edges[e][0]], b = m.cell(c)[edges[e][1]];
        slot[fill[static_cast<std::size_t>(std::min(a, b))]++] = {std::max(a, b), static_cast<int>(ne * c + e)};
      }
  }
  EdgeTable t;
  t.start.assign(nn + 1, 0);
  t.of_cell.assign(ne * nc, -1);
  for (std::size_t a = 0; a < nn; ++a) {
    t.start[a] = t.hi.size();
    const auto b0 = slot.begin() + static_cast<std::ptrdiff_t>(first[a]);
    const auto b1 = slot.begin() + static_cast<std::ptrdiff_t>(first[a + 1]);
    std::sort(b0, b1);
    for (auto it = b0; it != b1; ++it) {
      if (it == b0 || it->first != (it - 1)->first) {
        t.lo.push_back(static_cast<int>(a));
        t.hi.push_back(it->first);
      }
      t.of_cell[static_cast<std::size_t>(it->second)] = static_cast<int>(t.hi.size()) - 1;
    }
  }
  t.start[nn] = t.hi.size();
  return t;
}

// min det J / max det J over the corners, edge midpoints and centroid of a quadratic cell
// (tri6 in the x–z plane or tet10; ≤ 0 when the cell folds).
double jacobian_ratio(const std::vector<Point>& x, const int* v, bool tet) {
  static constexpr double tri_pts[7][3] = {{0, 0, 0},     {1, 0, 0},   {0, 1, 0},          {0.5, 0, 0},
                                           {0.5, 0.5, 0}, {0, 0.5, 0}, {1. / 3, 1. / 3, 0}};
  static constexpr double tet_pts[11][3] = {{0, 0, 0},     {1, 0, 0},     {0, 1, 0},       {0, 0, 1},
                                            {0.5, 0, 0},   {0.5, 0.5, 0}, {0, 0.5, 0},     {0, 0, 0.5},
                                            {0.5, 0, 0.5}, {0, 0.5, 0.5}, {0.25, 0.25, 0.25}};
  static constexpr double dL[4][3] = {{-1, -1, -1}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
  const int dim = tet ? 3 : 2, corners = dim + 1;
  const auto edges = tet ? std::span<const Edge>(kTetEdge) : std::span<const Edge>(kTriEdge);
  const int n = corners + static_cast<int>(edges.size());
  // Physical coordinates used: (x, z) in 2D, (x, y, z) in 3D.
  const int axis[2][3] = {{0, 2, -1}, {0, 1, 2}};
  double jmin = std::numeric_limits<double>::max(), jmax = std::numeric_limits<double>::lowest();
  const std::span<const double[3]> pts = tet ? std::span<const double[3]>(tet_pts) : std::span<const double[3]>(tri_pts);
  for (const auto& p : pts) {
    double L[4] = {1 - p[0] - p[1] - p[2], p[0], p[1], p[2]};
    if (!tet) L[0] = 1 - p[0] - p[1];
    double J[3][3] = {};
    for (int k = 0; k < n; ++k) {
      double g[3] = {};
      for (int j = 0; j < dim; ++j) {
        const double dl0 = tet ? dL[0][j] : -1.0;
        auto dLk = [&](int c) { return c == 0 ? dl0 : dL[c][j]; };
        if (k < corners) {
          g[j] = (4 * L[k] - 1) * dLk(k);
        } else {
          const Edge& e = edges[static_cast<std::size_t>(k - corners)];
          g[j] = 4 * (L[e[0]] * dLk(e[1]) + L[e[1]] * dLk(e[0]));
        }
      }
      const Point& xk = x[static_cast<std::size_t>(v[k])];
      for (int i = 0; i < dim; ++i)
        for (int j = 0; j < dim; ++j) J[i][j] += xk[static_cast<std::size_t>(axis[tet][i])] * g[j];
    }
    const double det = tet ? J[0][0] * (J[1][1] * J[2][2] - J[1][2] * J[2][1]) -
                                 J[0][1] * (J[1][0] * J[2][2] - J[1][2] * J[2][0]) +
                                 J[0][2] * (J[1][0] * J[2][1] - J[1][1] * J[2][0])
                           : J[0][0] * J[1][1] - J[0][1] * J[1][0];
    jmin = std::min(jmin, det);
    jmax = std::max(jmax, det);
  }
  return jmax > 0 ? jmin / jmax : -1.0;
}

// Curved cells whose det J varies more than this (min/max) get straight edges back: such a cell
// is a flat sliver on the curved outline that its bulging midside nodes nearly fold.
constexpr double kMinJacobianRatio = 0.1;

// Gmsh's model coordinates of our point: 2D sections live in Gmsh's (x, y) plane.
Point to_gmsh(const Point& p, bool tet) { return tet ? p : Point{p[0], p[2], 0.0}; }
Point from_gmsh(const Point& p, bool tet) { return tet ? p : Point{p[0], 0.0, p[1]}; }

}  // namespace

void make_quadratic(Mesh& m, const std::vector<int>& node_of_tag) {
  if (m.type != CellType::tri3 && m.type != CellType::tet4)
    throw MeshError("make_quadratic needs a tri3 or tet4 mesh");
  const bool tet = m.type == CellType::tet4;
  const auto edges = cell_edges(m.type);
  const int corners = tet ? 4 : 3, ne = static_cast<int>(edges.size());
  const EdgeTable t = build_edges(m, edges);
  const std::size_t n_corner = m.n_nodes(), n_edges = t.hi.size(), nc = m.n_cells();
  std::vector<Point> chord(n_edges);
  for (std::size_t e = 0; e < n_edges; ++e) {
    const Point& a = m.nodes[static_cast<std::size_t>(t.lo[e])];
    const Point& b = m.nodes[static_cast<std::size_t>(t.hi[e])];
    chord[e] = {(a[0] + b[0]) / 2, (a[1] + b[1]) / 2, (a[2] + b[2]) / 2};
  }

  // Which curved model entity each edge lies on: surfaces first (3D), then curves, which win.
  std::vector<std::pair<int, int>> owner(n_edges, {0, 0});  // (dim, tag); dim 0 = none
  auto claim = [&](int dim, int tag) {
    std::string type;
    gmsh::model::getType(dim, tag, type);
    if (type == (dim == 2 ? "Plane" : "Line")) return;
    std::vector<std::size_t> etags, enodes;
    const int n = dim == 2 ? 3 : 2;
    gmsh::model::mesh::getElementsByType(dim == 2 ? 2 : 1, etags, enodes, tag);
    for (std::size_t k = 0; k < etags.size(); ++k)
      for (int i = 0; i < (dim == 2 ? 3 : 1); ++i) {
        const int a = tag_value(node_of_tag, static_cast<int>(enodes[k * n + i]));
        const int b = tag_value(node_of_tag, static_cast<int>(enodes[k * n + (i + 1) % n]));
        const int e = a >= 0 && b >= 0 ? t.find(a, b) : -1;
        if (e >= 0) owner[static_cast<std::size_t>(e)] = {dim, tag};
      }
  };
  for (int dim = tet ? 2 : 1; dim >= 1; --dim) {
    gmsh::vectorpair entities;
    gmsh::model::getEntities(entities, dim);
    for (const auto& [d, tag] : entities) claim(d, tag);
  }
  std::vector<std::size_t> by_owner(n_edges);
  for (std::size_t e = 0; e < n_edges; ++e) by_owner[e] = e;
  std::stable_sort(by_owner.begin(), by_owner.end(),
                   [&](std::size_t p, std::size_t q) { return owner[p] < owner[q]; });

  std::vector<Point> mid = chord;
  std::vector<char> curved(n_edges, 0);
  for (std::size_t i = 0; i < n_edges;) {
    const auto [dim, tag] = owner[by_owner[i]];
    std::size_t j = i;
    while (j < n_edges && owner[by_owner[j]] == owner[by_owner[i]]) ++j;
    if (dim > 0) {
      std::vector<double> xyz, closest, param;
      for (std::size_t k = i; k < j; ++k) {
        const Point g = to_gmsh(chord[by_owner[k]], tet);
        xyz.insert(xyz.end(), g.begin(), g.end());
      }
      gmsh::model::getClosestPoint(dim, tag, xyz, closest, param);
      for (std::size_t k = i; k < j && 3 * (k - i) + 2 < closest.size(); ++k) {
        const std::size_t e = by_owner[k];
        const Point p = from_gmsh({closest[3 * (k - i)], closest[3 * (k - i) + 1], closest[3 * (k - i) + 2]}, tet);
        const Point& a = m.nodes[static_cast<std::size_t>(t.lo[e])];
        const Point& b = m.nodes[static_cast<std::size_t>(t.hi[e])];
        const double len = std::hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
        const double moved = std::hypot(p[0] - chord[e][0], p[1] - chord[e][1], p[2] - chord[e][2]);
        if (moved < 0.5 * len) {  // a projection that strays further found the wrong sheet
          mid[e] = p;
          curved[e] = moved > 0;
        }
      }
    }
    i = j;
  }

  const int npc = corners + ne;
  std::vector<int> cells(nc * static_cast<std::size_t>(npc));
  for (std::size_t c = 0; c < nc; ++c) {
    for (int k = 0; k < corners; ++k) cells[npc * c + k] = m.cells[corners * c + k];
    for (int e = 0; e < ne; ++e)
      cells[npc * c + corners + e] = static_cast<int>(n_corner) + t.of_cell[ne * c + e];
  }
  m.nodes.insert(m.nodes.end(), mid.begin(), mid.end());
  m.cells = std::move(cells);
  m.type = tet ? CellType::tet10 : CellType::tri6;

  // Straighten the edges of cells that the curved nodes (nearly) fold, until none is left.
  for (bool changed = true; changed;) {
    changed = false;
    for (std::size_t c = 0; c < nc; ++c) {
      const int* v = m.cell(c);
      bool any = false;
      for (int e = 0; e < ne; ++e) any = any || curved[static_cast<std::size_t>(v[corners + e]) - n_corner];
      if (!any || jacobian_ratio(m.nodes, v, tet) >= kMinJacobianRatio) continue;
      for (int e = 0; e < ne; ++e) {
        const std::size_t id = static_cast<std::size_t>(v[corners + e]) - n_corner;
        if (!curved[id]) continue;
        curved[id] = 0;
        m.nodes[static_cast<std::size_t>(v[corners + e])] = chord[id];
        changed = true;
      }
    }
  }

  // Number the nodes in order of first use.
  std::vector<int> renum(m.n_nodes(), -1);
  std::vector<Point> nodes;
  nodes.reserve(m.n_nodes());
  for (int& v : m.cells) {
    if (renum[static_cast<std::size_t>(v)] < 0) {
      renum[static_cast<std::size_t>(v)] = static_cast<int>(nodes.size());
      nodes.push_back(m.nodes[static_cast<std::size_t>(v)]);
    }
    v = renum[static_cast<std::size_t>(v)];
  }
  m.nodes = std::move(nodes);
}

}  // namespace voidsign::mesh::gmsh_detail
