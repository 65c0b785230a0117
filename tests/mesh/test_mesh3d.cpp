// SPDX-License-Identifier: GPL-3.0-or-later
// The 3D mesher and 3D mesh topology: tetrahedra of a layered block with a sphere, a yawed box
// and a plunging tunnel; volumes, tags, boundary facets, midside nodes, quality, the cell
// estimate, and .vtu output.
#include <doctest/doctest.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <filesystem>
#include <map>
#include <numbers>
#include <set>
#include <string>
#include <vector>

#include <vtkCell.h>
#include <vtkCellType.h>
#include <vtkNew.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridReader.h>

#include "mesh/build/mesher.hpp"
#include "mesh/io/vtk_writer.hpp"

namespace fs = std::filesystem;
using namespace voidsign::mesh;
using std::numbers::pi;

namespace {

constexpr int kEdge[6][2] = {{0, 1}, {1, 2}, {2, 0}, {0, 3}, {1, 3}, {2, 3}};  // VTK tet10 edges

// ---------------------------------------------------------------------------------------------
// The test block: 40 × 30 × 24 m, interfaces at z = −4, −12, −24 (bottom). The sphere crosses
// z = −4, the tunnel plunges through z = −12, the box is yawed by 35°.

Geometry3D test_block(int order) {
  Geometry3D g;
  g.width = 40;
  g.length = 30;
  g.depth = 24;
  g.layer_thickness = {4, 8, 12};
  g.sizing.far = 4;
  g.sizing.near_void = 0.5;
  g.sizing.surface = 1.5;
  g.sizing.gradient = 0.3;
  g.sizing.order = order;
  VoidSolid s;
  s.kind = VoidSolid::Kind::sphere;
  s.cx = -8;
  s.cy = 4;
  s.cz = -4.5;
  s.radius = 2;
  VoidSolid b;
  b.kind = VoidSolid::Kind::box;
  b.cx = 8;
  b.cy = -5;
  b.cz = -8;
  b.size = {5, 2.5, 3};
  b.yaw_deg = 35;
  VoidSolid t;
  t.kind = VoidSolid::Kind::tunnel;
  t.from = {-15, -10, -9};
  t.to = {12, 9, -15};
  t.radius = 1.2;
  g.voids = {s, b, t};
  return g;
}

double tunnel_length(const VoidSolid& t) {
  return std::hypot(t.to[0] - t.from[0], t.to[1] - t.from[1], t.to[2] - t.from[2]);
}

// Signed distance to the void's surface: < 0 inside.
double signed_distance(const VoidSolid& v, const Point& p) {
  switch (v.kind) {
    case VoidSolid::Kind::sphere:
      return std::hypot(p[0] - v.cx, p[1] - v.cy, p[2] - v.cz) - v.radius;
    case VoidSolid::Kind::box: {
      const double a = v.yaw_deg * pi / 180;
      const double dx = p[0] - v.cx, dy = p[1] - v.cy;
      const double q[3] = {std::cos(a) * dx + std::sin(a) * dy, -std::sin(a) * dx + std::cos(a) * dy,
                           p[2] - v.cz};
      double out2 = 0, in = -1e300;
      for (int i = 0; i < 3; ++i) {
        const double e = std::abs(q[i]) - v.size[i] / 2;
        out2 += e > 0 ? e * e : 0;
        in = std::max(in, e);
      }
      return in > 0 ? std::sqrt(out2) : in;
    }
    case VoidSolid::Kind::tunnel: {
      const double len = tunnel_length(v);
      double ax[3], rel[3];
      for (int i = 0; i < 3; ++i) {
        ax[i] = (v.to[i] - v.from[i]) / len;
        rel[i] = p[i] - v.from[i];
      }
      const double t = rel[0] * ax[0] + rel[1] * ax[1] + rel[2] * ax[2];
      const double r = std::hypot(rel[0] - t * ax[0], rel[1] - t * ax[1], rel[2] - t * ax[2]);
      const double er = r - v.radius, ea = std::abs(t - len / 2) - len / 2;
      if (er <= 0 && ea <= 0) return std::max(er, ea);
      return std::hypot(std::max(er, 0.0), std::max(ea, 0.0));
    }
  }
  return 0;
}

const Mesh& quadratic_block() {
  static const Mesh m = build_mesh_3d(test_block(2));
  return m;
}

// ---------------------------------------------------------------------------------------------
// Integrals over cells and facets.

double det3(const double J[3][3]) {
  return J[0][0] * (J[1][1] * J[2][2] - J[1][2] * J[2][1]) -
         J[0][1] * (J[1][0] * J[2][2] - J[1][2] * J[2][0]) +
         J[0][2] * (J[1][0] * J[2][1] - J[1][1] * J[2][0]);
}

// Cell volume: det J is cubic on a tet10, so the 5-point degree-3 rule is exact.
double cell_volume(const Mesh& m, std::size_t c) {
  static constexpr double qp[5][4] = {{0.25, 0.25, 0.25, -0.8},
                                      {0.5, 1.0 / 6, 1.0 / 6, 0.45},
                                      {1.0 / 6, 0.5, 1.0 / 6, 0.45},
                                      {1.0 / 6, 1.0 / 6, 0.5, 0.45},
                                      {1.0 / 6, 1.0 / 6, 1.0 / 6, 0.45}};
  static constexpr double dL[4][3] = {{-1, -1, -1}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
  const int* v = m.cell(c);
  const int n = m.npc();
  double vol = 0;
  for (const auto& q : qp) {
    const double L[4] = {1 - q[0] - q[1] - q[2], q[0], q[1], q[2]};
    double J[3][3] = {};
    for (int k = 0; k < n; ++k) {
      double g[3];
      for (int j = 0; j < 3; ++j)
        g[j] = n == 4 ? dL[k][j]
               : k < 4 ? (4 * L[k] - 1) * dL[k][j]
                       : 4 * (L[kEdge[k - 4][0]] * dL[kEdge[k - 4][1]][j] +
                              L[kEdge[k - 4][1]] * dL[kEdge[k - 4][0]][j]);
      for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) J[i][j] += m.nodes[v[k]][i] * g[j];
    }
    vol += q[3] * det3(J) / 6;
  }
  return vol;
}

// Facet area: the 6-point degree-4 rule on the (possibly curved) tri6 map, or the flat area.
double facet_area(const Mesh& m, const Facet& f) {
  auto at = [&](int k) { return m.nodes[f.nodes[k]]; };
  if (m.type == CellType::tet4) {
    double u[3], w[3];
    for (int i = 0; i < 3; ++i) {
      u[i] = at(1)[i] - at(0)[i];
      w[i] = at(2)[i] - at(0)[i];
    }
    return 0.5 * std::hypot(u[1] * w[2] - u[2] * w[1], u[2] * w[0] - u[0] * w[2],
                            u[0] * w[1] - u[1] * w[0]);
  }
  constexpr double a = 0.445948490915965, b = 0.091576213509771;
  constexpr double wa = 0.223381589678011, wb = 0.109951743655322;
  const double qp[6][3] = {{a, a, wa},         {1 - 2 * a, a, wa}, {a, 1 - 2 * a, wa},
                           {b, b, wb},         {1 - 2 * b, b, wb}, {b, 1 - 2 * b, wb}};
  double area = 0;
  for (const auto& q : qp) {
    const double r = q[0], s = q[1], t = 1 - r - s;
    const double dr[6] = {1 - 4 * t, 4 * r - 1, 0, 4 * (t - r), 4 * s, -4 * s};
    const double ds[6] = {1 - 4 * t, 0, 4 * s - 1, -4 * r, 4 * r, 4 * (t - s)};
    double xr[3] = {}, xs[3] = {};
    for (int k = 0; k < 6; ++k)
      for (int i = 0; i < 3; ++i) {
        xr[i] += dr[k] * at(k)[i];
        xs[i] += ds[k] * at(k)[i];
      }
    area += q[2] * 0.5 *
            std::hypot(xr[1] * xs[2] - xr[2] * xs[1], xr[2] * xs[0] - xr[0] * xs[2],
                       xr[0] * xs[1] - xr[1] * xs[0]);
  }
  return area;
}

Point centroid(const Mesh& m, std::size_t c) {
  Point p{0, 0, 0};
  for (int k = 0; k < 4; ++k)
    for (int i = 0; i < 3; ++i) p[i] += m.nodes[m.cell(c)[k]][i] / 4;
  return p;
}

// ---------------------------------------------------------------------------------------------
// A hand-built unit cube [0, 1] × [0, 1] × [−1, 0] cut into the six tetrahedra around its
// diagonal (0,0,−1)–(1,1,0); optionally with midside nodes.

Mesh kuhn_cube(bool quadratic) {
  Mesh m;
  for (int v = 0; v < 8; ++v)
    m.nodes.push_back({double(v & 1), double((v >> 1) & 1), double((v >> 2) & 1) - 1.0});
  const int perms[6][3] = {{0, 1, 2}, {0, 2, 1}, {1, 0, 2}, {1, 2, 0}, {2, 0, 1}, {2, 1, 0}};
  std::map<std::pair<int, int>, int> mids;
  for (const auto& p : perms) {
    std::array<int, 4> t{0, 1 << p[0], (1 << p[0]) | (1 << p[1]), 7};
    const Point& a = m.nodes[t[0]];
    double e[3][3];
    for (int k = 0; k < 3; ++k)
      for (int i = 0; i < 3; ++i) e[k][i] = m.nodes[t[k + 1]][i] - a[i];
    if (det3(e) < 0) std::swap(t[1], t[2]);
    m.cells.insert(m.cells.end(), t.begin(), t.end());
    if (!quadratic) continue;
    for (const auto& ed : kEdge) {
      const auto key = std::minmax(t[ed[0]], t[ed[1]]);
      auto it = mids.find(key);
      if (it == mids.end()) {
        const Point& p0 = m.nodes[key.first];
        const Point& p1 = m.nodes[key.second];
        m.nodes.push_back({(p0[0] + p1[0]) / 2, (p0[1] + p1[1]) / 2, (p0[2] + p1[2]) / 2});
        it = mids.emplace(key, static_cast<int>(m.nodes.size()) - 1).first;
      }
      m.cells.push_back(it->second);
    }
  }
  m.type = quadratic ? CellType::tet10 : CellType::tet4;
  m.layer.assign(6, 0);
  m.void_id.assign(6, -1);
  return m;
}

/// A fresh folder under the system temp folder, removed at scope exit.
struct ScratchDir {
  fs::path path;
  explicit ScratchDir(const std::string& tag)
      : path(fs::temp_directory_path() /
             ("voidsign-m3d-" + tag + "-" + std::to_string(static_cast<long>(::getpid())))) {
    fs::remove_all(path);
    fs::create_directories(path);
  }
  ~ScratchDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

}  // namespace

// ---------------------------------------------------------------------------------------------

TEST_CASE("3D mesher: tet10 block with three voids has no inverted cells and good shapes") {
  const Mesh& m = quadratic_block();
  CHECK(m.type == CellType::tet10);
  CHECK(m.dim() == 3);
  CHECK(m.n_voids == 3);
  CHECK(m.cells.size() == m.n_cells() * 10);
  const Quality q = measure_quality(m);
  MESSAGE("cells ", m.n_cells(), ", nodes ", m.n_nodes(), ", min shape ", q.min_quality,
          ", mean shape ", q.mean_quality, ", min det J ratio ", q.min_jacobian_ratio);
  CHECK(q.n_inverted == 0);
  CHECK(q.min_quality > 0.05);
  CHECK(q.mean_quality > 0.6);
  CHECK(q.min_jacobian_ratio > 0.05);
  CHECK(m.x_min == doctest::Approx(-20));
  CHECK(m.x_max == doctest::Approx(20));
  CHECK(m.y_min == doctest::Approx(-15));
  CHECK(m.y_max == doctest::Approx(15));
  CHECK(m.z_min == doctest::Approx(-24));
  CHECK(m.z_max == doctest::Approx(0).scale(1));
}

TEST_CASE("3D mesher: void cells carry their void id and the voids' volumes") {
  const Geometry3D g = test_block(2);
  const Mesh& m = quadratic_block();
  std::vector<double> vol(3, 0.0);
  std::size_t misplaced = 0, solid_inside = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const Point p = centroid(m, c);
    const int k = m.void_id[c];
    if (k >= 0) {
      REQUIRE(k < 3);
      vol[k] += cell_volume(m, c);
      // Corners on or in a convex void: the centroid is inside it.
      if (signed_distance(g.voids[k], p) > 1e-9) ++misplaced;
    } else {
      // A solid cell may poke into a void only by a chord's sag.
      for (const VoidSolid& v : g.voids)
        if (signed_distance(v, p) < -0.5 * g.sizing.near_void) ++solid_inside;
    }
  }
  CHECK(misplaced == 0);
  CHECK(solid_inside == 0);
  const VoidSolid& t = g.voids[2];
  const double exact[3] = {4.0 / 3 * pi * 8, 5 * 2.5 * 3, pi * t.radius * t.radius * tunnel_length(t)};
  for (int k = 0; k < 3; ++k) {
    MESSAGE("void ", k, ": volume ", vol[k], " of ", exact[k]);
    CHECK(vol[k] == doctest::Approx(exact[k]).epsilon(0.01));
  }
}

TEST_CASE("3D mesher: each layer fills its slab and the sphere and tunnel split across layers") {
  const Mesh& m = quadratic_block();
  const double z_top[3] = {0, -4, -12}, z_bot[3] = {-4, -12, -24};
  std::vector<double> vol(3, 0.0);
  std::set<std::pair<int, int>> void_layers;
  std::size_t outside = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const int l = m.layer[c];
    REQUIRE(l >= 0);
    REQUIRE(l < 3);
    vol[l] += cell_volume(m, c);
    const double z = centroid(m, c)[2];
    if (z > z_top[l] + 1e-9 || z < z_bot[l] - 1e-9) ++outside;
    if (m.void_id[c] >= 0) void_layers.insert({m.void_id[c], l});
  }
  CHECK(outside == 0);
  for (int l = 0; l < 3; ++l) CHECK(vol[l] == doctest::Approx(40 * 30 * (z_top[l] - z_bot[l])).epsilon(1e-9));
  const std::set<std::pair<int, int>> expected = {{0, 0}, {0, 1}, {1, 1}, {2, 1}, {2, 2}};
  CHECK(void_layers == expected);
}

TEST_CASE("3D mesher: boundary facets cover the block's sides and the void walls") {
  const Geometry3D g = test_block(2);
  const Mesh& m = quadratic_block();
  std::map<FacetKind, double> area;
  std::vector<double> wall(3, 0.0);
  std::size_t bad_cell = 0, inward = 0;
  for (const Facet& f : m.facets) {
    const double a = facet_area(m, f);
    area[f.kind] += a;
    if (f.kind == FacetKind::void_wall) {
      REQUIRE(f.void_id >= 0);
      REQUIRE(f.void_id < 3);
      wall[f.void_id] += a;
    } else {
      CHECK(f.void_id == -1);
    }
    if (f.cell < 0 || m.void_id[f.cell] >= 0) ++bad_cell;
    // Corner order: right-hand normal out of the cell.
    const Point c = centroid(m, f.cell);
    const Point& p0 = m.nodes[f.nodes[0]];
    const Point& p1 = m.nodes[f.nodes[1]];
    const Point& p2 = m.nodes[f.nodes[2]];
    const double u[3] = {p1[0] - p0[0], p1[1] - p0[1], p1[2] - p0[2]};
    const double w[3] = {p2[0] - p0[0], p2[1] - p0[1], p2[2] - p0[2]};
    const double n[3] = {u[1] * w[2] - u[2] * w[1], u[2] * w[0] - u[0] * w[2], u[0] * w[1] - u[1] * w[0]};
    if (n[0] * (p0[0] - c[0]) + n[1] * (p0[1] - c[1]) + n[2] * (p0[2] - c[2]) <= 0) ++inward;
  }
  CHECK(bad_cell == 0);
  CHECK(inward == 0);
  CHECK(area[FacetKind::surface] == doctest::Approx(40 * 30).epsilon(1e-9));
  CHECK(area[FacetKind::bottom] == doctest::Approx(40 * 30).epsilon(1e-9));
  CHECK(area[FacetKind::left] == doctest::Approx(30 * 24).epsilon(1e-9));
  CHECK(area[FacetKind::right] == doctest::Approx(30 * 24).epsilon(1e-9));
  CHECK(area[FacetKind::front] == doctest::Approx(40 * 24).epsilon(1e-9));
  CHECK(area[FacetKind::back] == doctest::Approx(40 * 24).epsilon(1e-9));
  const VoidSolid& t = g.voids[2];
  const double exact[3] = {4 * pi * 4, 2 * (5 * 2.5 + 2.5 * 3 + 3 * 5),
                           2 * pi * t.radius * tunnel_length(t) + 2 * pi * t.radius * t.radius};
  for (int k = 0; k < 3; ++k) {
    MESSAGE("void ", k, ": wall area ", wall[k], " of ", exact[k]);
    CHECK(wall[k] == doctest::Approx(exact[k]).epsilon(0.01));
  }
}

TEST_CASE("3D mesher: surface nodes are the surface facets' nodes, on z = 0, sorted by x then y") {
  const Mesh& m = quadratic_block();
  std::set<int> from_facets;
  for (const Facet& f : m.facets)
    if (f.kind == FacetKind::surface)
      for (int k = 0; k < 6; ++k) from_facets.insert(f.nodes[k]);
  const std::set<int> listed(m.surface_nodes.begin(), m.surface_nodes.end());
  CHECK(listed.size() == m.surface_nodes.size());
  CHECK(listed == from_facets);
  bool sorted = true, on_top = true;
  for (std::size_t i = 0; i < m.surface_nodes.size(); ++i) {
    const Point& p = m.nodes[m.surface_nodes[i]];
    on_top = on_top && std::abs(p[2]) < 1e-9;
    if (i == 0) continue;
    const Point& q = m.nodes[m.surface_nodes[i - 1]];
    sorted = sorted && (q[0] < p[0] || (q[0] == p[0] && q[1] <= p[1]));
  }
  CHECK(sorted);
  CHECK(on_top);
}

TEST_CASE("3D mesher: tet10 midside nodes sit at their VTK edge's midpoint, or on a void surface") {
  const Geometry3D g = test_block(2);
  const Mesh& m = quadratic_block();
  std::size_t exact = 0, curved = 0, wrong = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const int* v = m.cell(c);
    for (int e = 0; e < 6; ++e) {
      const Point& a = m.nodes[v[kEdge[e][0]]];
      const Point& b = m.nodes[v[kEdge[e][1]]];
      const Point& p = m.nodes[v[4 + e]];
      const double len = std::hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
      const double off = std::hypot(p[0] - (a[0] + b[0]) / 2, p[1] - (a[1] + b[1]) / 2,
                                    p[2] - (a[2] + b[2]) / 2);
      if (off <= 1e-9 * len) {
        ++exact;
        continue;
      }
      double on_void = 1e300;
      for (const VoidSolid& s : g.voids) on_void = std::min(on_void, std::abs(signed_distance(s, p)));
      if (on_void < 1e-6 && off < 0.3 * len)
        ++curved;
      else
        ++wrong;
    }
  }
  MESSAGE("midside nodes: ", exact, " at the chord midpoint, ", curved, " on a curved void surface");
  CHECK(wrong == 0);
  CHECK(curved > 0);
  CHECK(exact > 5 * curved);
  // Facets: corners, then the midside nodes of c0c1, c1c2, c2c0.
  std::size_t facet_wrong = 0;
  for (const Facet& f : m.facets)
    for (int e = 0; e < 3; ++e) {
      const Point& a = m.nodes[f.nodes[e]];
      const Point& b = m.nodes[f.nodes[(e + 1) % 3]];
      const Point& p = m.nodes[f.nodes[3 + e]];
      const double len = std::hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
      if (std::hypot(p[0] - (a[0] + b[0]) / 2, p[1] - (a[1] + b[1]) / 2, p[2] - (a[2] + b[2]) / 2) >
          0.3 * len)
        ++facet_wrong;
    }
  CHECK(facet_wrong == 0);
}

TEST_CASE("3D mesher: order 1 gives tet4 cells with the same tags and exact flat volumes") {
  const Geometry3D g = test_block(1);
  const Mesh m = build_mesh_3d(g);
  CHECK(m.type == CellType::tet4);
  CHECK(m.cells.size() == m.n_cells() * 4);
  const Quality q = measure_quality(m);
  CHECK(q.n_inverted == 0);
  CHECK(q.min_jacobian_ratio == 1.0);
  std::vector<double> vol(3, 0.0);
  double total = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const double v = cell_volume(m, c);
    total += v;
    if (m.void_id[c] >= 0) vol[m.void_id[c]] += v;
  }
  CHECK(total == doctest::Approx(40 * 30 * 24).epsilon(1e-9));
  CHECK(vol[1] == doctest::Approx(5 * 2.5 * 3).epsilon(1e-9));          // the box is flat-sided
  CHECK(vol[0] == doctest::Approx(4.0 / 3 * pi * 8).epsilon(0.03));      // inscribed polyhedra
  const VoidSolid& t = g.voids[2];
  CHECK(vol[2] == doctest::Approx(pi * t.radius * t.radius * tunnel_length(t)).epsilon(0.03));
  double top = 0;
  for (const Facet& f : m.facets) {
    CHECK(f.nodes[3] == -1);
    if (f.kind == FacetKind::surface) top += facet_area(m, f);
  }
  CHECK(top == doctest::Approx(40 * 30).epsilon(1e-9));
}

TEST_CASE("3D mesher: a tunnel running out through the block's side is cut at the side") {
  Geometry3D g;
  g.width = 30;
  g.length = 20;
  g.depth = 15;
  g.layer_thickness = {5, 10};
  g.sizing.far = 4;
  g.sizing.near_void = 0.6;
  g.sizing.surface = 2;
  g.sizing.gradient = 0.4;
  g.sizing.order = 2;
  VoidSolid t;
  t.kind = VoidSolid::Kind::tunnel;
  t.from = {-5, -30, -6};  // starts 20 m beyond y = −10
  t.to = {-5, 4, -6};
  t.radius = 1.5;
  g.voids = {t};
  const Mesh m = build_mesh_3d(g);
  double vol = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    if (m.void_id[c] == 0) vol += cell_volume(m, c);
  CHECK(vol == doctest::Approx(pi * 1.5 * 1.5 * 14).epsilon(0.01));
  // The ground's front face has the tunnel's mouth cut out of it; the mouth itself is a front
  // facet of the void's cells (the model without voids needs its supports).
  double front = 0, mouth = 0;
  for (const Facet& f : m.facets)
    if (f.kind == FacetKind::front) (f.void_id < 0 ? front : mouth) += facet_area(m, f);
  CHECK(front == doctest::Approx(30 * 15 - pi * 1.5 * 1.5).epsilon(0.002));
  CHECK(front + mouth == doctest::Approx(30 * 15).epsilon(1e-9));
}

TEST_CASE("3D mesher: a coarse near-void size still resolves a sphere cap cut by an interface") {
  Geometry3D g;
  g.width = 20;
  g.length = 20;
  g.depth = 12;
  g.layer_thickness = {3, 9};
  g.sizing.far = 6;
  g.sizing.near_void = 3;  // coarser than the sphere itself
  g.sizing.surface = 4;
  g.sizing.order = 2;
  VoidSolid s;
  s.cz = -4.2;  // the cap above z = −3 is 0.3 m high
  s.radius = 1.5;
  g.voids = {s};
  const Mesh m = build_mesh_3d(g);
  CHECK(measure_quality(m).n_inverted == 0);
  double vol = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    if (m.void_id[c] == 0) vol += cell_volume(m, c);
  CHECK(vol == doctest::Approx(4.0 / 3 * pi * 1.5 * 1.5 * 1.5).epsilon(0.02));
}

TEST_CASE("3D mesher: rejects voids outside the block and bad sizes") {
  Geometry3D g = test_block(1);
  g.voids.resize(1);
  g.voids[0].cz = -40;  // below the bottom
  CHECK_THROWS_AS(build_mesh_3d(g), MeshError);
  g = test_block(1);
  g.sizing.near_void = 0;
  CHECK_THROWS_AS(build_mesh_3d(g), MeshError);
  CHECK_THROWS_AS(estimate_cells_3d(g), MeshError);
  g = test_block(1);
  g.voids[2].to = g.voids[2].from;
  CHECK_THROWS_AS(build_mesh_3d(g), MeshError);
}

TEST_CASE("estimate_cells_3d predicts the mesher's cell count") {
  const Geometry3D g = test_block(2);
  const double est = estimate_cells_3d(g);
  const double ratio = static_cast<double>(quadratic_block().n_cells()) / est;
  MESSAGE("cells ", quadratic_block().n_cells(), ", estimate ", est, ", ratio ", ratio);
  CHECK(ratio > 0.85);
  CHECK(ratio < 1.15);
  Geometry3D plain = g;
  plain.voids.clear();
  plain.sizing.order = 1;
  plain.sizing.surface = 0.75;  // enough cells (~2·10⁴) for the boundary not to dominate
  const Mesh m = build_mesh_3d(plain);
  const double plain_ratio = static_cast<double>(m.n_cells()) / estimate_cells_3d(plain);
  MESSAGE("no voids: cells ", m.n_cells(), ", ratio ", plain_ratio);
  CHECK(plain_ratio > 0.85);
  CHECK(plain_ratio < 1.15);
}

TEST_CASE("finish_topology on a hand-built cube of six tetrahedra") {
  for (const bool quadratic : {false, true}) {
    CAPTURE(quadratic);
    Mesh m = kuhn_cube(quadratic);
    finish_topology(m, 1e-9);
    CHECK(m.facets.size() == 12);  // two triangles on each side
    std::map<FacetKind, int> count;
    for (const Facet& f : m.facets) ++count[f.kind];
    for (FacetKind k : {FacetKind::surface, FacetKind::bottom, FacetKind::left, FacetKind::right,
                        FacetKind::front, FacetKind::back})
      CHECK(count[k] == 2);
    CHECK(m.surface_nodes.size() == (quadratic ? 9u : 4u));  // corners (+ edge and diagonal mids)
    const std::vector<Point> expect_first = {{0, 0, 0}, {0, 0.5, 0}, {0, 1, 0}};
    if (quadratic)
      for (int i = 0; i < 3; ++i) CHECK(m.nodes[m.surface_nodes[i]] == expect_first[i]);

    // Excavate one cell: its two outer faces stay as sides of a void cell, its two inner faces
    // become void walls of the ground cells next to it.
    m.void_id[3] = 0;
    m.n_voids = 1;
    finish_topology(m, 1e-9);
    CHECK(m.facets.size() == 14);
    int walls = 0, void_sides = 0;
    for (const Facet& f : m.facets) {
      if (f.cell == 3) {
        ++void_sides;
        CHECK(f.kind != FacetKind::void_wall);
        CHECK(f.void_id == 0);
      }
      if (f.kind == FacetKind::void_wall) {
        CHECK(f.cell != 3);
        ++walls;
        CHECK(f.void_id == 0);
      }
      if (quadratic)
        for (int e = 0; e < 3; ++e) {
          const Point& a = m.nodes[f.nodes[e]];
          const Point& b = m.nodes[f.nodes[(e + 1) % 3]];
          const Point& p = m.nodes[f.nodes[3 + e]];
          for (int i = 0; i < 3; ++i) CHECK(p[i] == doctest::Approx((a[i] + b[i]) / 2));
        }
    }
    CHECK(walls == 2);
    CHECK(void_sides == 2);
  }
}

TEST_CASE("finish_topology rejects an internal hole that is no void") {
  Mesh m = kuhn_cube(false);
  m.cells.erase(m.cells.begin() + 12, m.cells.begin() + 16);  // drop cell 3
  m.layer.pop_back();
  m.void_id.pop_back();
  CHECK_THROWS_AS(finish_topology(m, 1e-9), std::runtime_error);
}

TEST_CASE("measure_quality of tetrahedra: 1 for the regular one, inverted ones counted") {
  Mesh m;
  m.type = CellType::tet4;
  m.nodes = {{1, 1, 1}, {1, -1, -1}, {-1, 1, -1}, {-1, -1, 1}};
  const Point& a = m.nodes[0];
  double e[3][3];
  for (int k = 0; k < 3; ++k)
    for (int i = 0; i < 3; ++i) e[k][i] = m.nodes[k + 1][i] - a[i];
  m.cells = det3(e) > 0 ? std::vector<int>{0, 1, 2, 3} : std::vector<int>{0, 2, 1, 3};
  m.layer = {0};
  m.void_id = {-1};
  Quality q = measure_quality(m);
  CHECK(q.min_quality == doctest::Approx(1.0));
  CHECK(q.n_inverted == 0);
  std::swap(m.cells[1], m.cells[2]);
  q = measure_quality(m);
  CHECK(q.n_inverted == 1);
  CHECK(q.min_quality == 0.0);

  // tet10: straight edges give det J ratio 1; a midside node pushed through the cell folds it.
  Mesh t = kuhn_cube(true);
  q = measure_quality(t);
  CHECK(q.n_inverted == 0);
  CHECK(q.min_jacobian_ratio == doctest::Approx(1.0));
  CHECK(q.min_quality == doctest::Approx(q.mean_quality));  // six congruent cells
  const int mid = t.cells[4];                                 // edge 01 of cell 0
  const Point& p0 = t.nodes[t.cells[0]];
  const Point& p1 = t.nodes[t.cells[1]];
  const Point& p3 = t.nodes[t.cells[3]];
  for (int i = 0; i < 3; ++i) t.nodes[mid][i] += 1.5 * (p3[i] - (p0[i] + p1[i]) / 2);
  q = measure_quality(t);
  CHECK(q.n_inverted >= 1);
}

TEST_CASE("write_vtu writes tet10 and tet4 meshes that VTK reads back") {
  ScratchDir dir("tet");
  const Mesh& m = quadratic_block();
  Field layer{"layer", 1, {}};
  for (int l : m.layer) layer.values.push_back(l);
  const fs::path file = dir.path / "block.vtu";
  write_vtu(file, m, {}, {layer});
  vtkNew<vtkXMLUnstructuredGridReader> r;
  r->SetFileName(file.c_str());
  r->Update();
  vtkUnstructuredGrid* grid = r->GetOutput();
  REQUIRE(grid != nullptr);
  CHECK(grid->GetNumberOfPoints() == static_cast<vtkIdType>(m.n_nodes()));
  CHECK(grid->GetNumberOfCells() == static_cast<vtkIdType>(m.n_cells()));
  CHECK(grid->GetCellType(0) == VTK_QUADRATIC_TETRA);
  const std::size_t c = m.n_cells() / 2;
  vtkCell* cell = grid->GetCell(static_cast<vtkIdType>(c));
  REQUIRE(cell->GetNumberOfPoints() == 10);
  for (int k = 0; k < 10; ++k) {
    CHECK(cell->GetPointId(k) == m.cell(c)[k]);
    double p[3];
    grid->GetPoint(cell->GetPointId(k), p);
    for (int i = 0; i < 3; ++i) CHECK(p[i] == m.nodes[m.cell(c)[k]][i]);
  }
  // VTK sees each midside node on the edge we put it on: its edge e runs corner to corner with
  // the midside node third, and that node lies near the corners' midpoint.
  std::size_t off_edge = 0;
  for (std::size_t k = 0; k < m.n_cells(); k += 97) {
    vtkCell* q = grid->GetCell(static_cast<vtkIdType>(k));
    for (int e = 0; e < 6; ++e) {
      vtkCell* edge = q->GetEdge(e);
      REQUIRE(edge->GetNumberOfPoints() == 3);
      double a[3], b[3], mid[3];
      grid->GetPoint(edge->GetPointId(0), a);
      grid->GetPoint(edge->GetPointId(1), b);
      grid->GetPoint(edge->GetPointId(2), mid);
      const double len = std::hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
      if (std::hypot(mid[0] - (a[0] + b[0]) / 2, mid[1] - (a[1] + b[1]) / 2,
                     mid[2] - (a[2] + b[2]) / 2) > 0.3 * len)
        ++off_edge;
    }
  }
  CHECK(off_edge == 0);

  const Mesh lin = kuhn_cube(false);
  const fs::path file4 = dir.path / "cube.vtu";
  write_vtu(file4, lin, {}, {});
  vtkNew<vtkXMLUnstructuredGridReader> r4;
  r4->SetFileName(file4.c_str());
  r4->Update();
  CHECK(r4->GetOutput()->GetNumberOfCells() == 6);
  CHECK(r4->GetOutput()->GetCellType(5) == VTK_TETRA);
}
