// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A layered elastic block meshed with tetrahedra on a structured grid, used by the linear-solver
/// benchmark (solver_bench) and the solver tests. Independent of the project's mesher and element
/// library on purpose: it only needs Eigen.
///
/// Geometry: x ∈ [0, lx], y ∈ [0, ly], z ∈ [0, lz] with z = lz the ground surface. Each cell of an
/// nx × ny × nz grid is split into six tetrahedra around its diagonal from (0,0,0) to (1,1,1)
/// (Kuhn's subdivision), which is conforming across cells. Every edge of that subdivision joins
/// two grid points whose indices differ by 0 or 1 in each direction and increase together, so on
/// the grid of double resolution its midpoint is a grid point: quadratic tetrahedra (tet10, VTK
/// node order) take their mid-edge nodes from there, and every point of the fine grid is a node.
///
/// Unknowns: three per node, interleaved (u_x, u_y, u_z of node i at 3i, 3i+1, 3i+2).
/// Boundaries: the base fixed, the four sides on rollers, a uniform pressure on a square patch
/// of the surface. An optional spherical cavity removes the elements whose centroid lies inside.
#include <Eigen/Dense>
#include <Eigen/SparseCore>
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <numeric>
#include <stdexcept>
#include <vector>

namespace voidsign::bench {

using SparseMatrix = Eigen::SparseMatrix<double, Eigen::ColMajor, int>;
using Vector = Eigen::VectorXd;
using Point = std::array<double, 3>;
using Matrix6 = Eigen::Matrix<double, 6, 6>;

/// Isotropic Hooke matrix, Voigt order xx, yy, zz, yz, xz, xy with engineering shear strains.
inline Matrix6 isotropic_elasticity(double e, double nu) {
  const double lambda = e * nu / ((1 + nu) * (1 - 2 * nu));
  const double mu = e / (2 * (1 + nu));
  Matrix6 d = Matrix6::Zero();
  for (int i = 0; i < 3; ++i) {
    for (int j = 0; j < 3; ++j) d(i, j) = lambda;
    d(i, i) += 2 * mu;
    d(i + 3, i + 3) = mu;
  }
  return d;
}

/// Derivatives of the shape functions with respect to the natural coordinates (ξ, η, ζ) of the
/// 4-node (N = 4) or 10-node (N = 10) tetrahedron, VTK node order. Barycentric coordinates
/// L0 = 1 − ξ − η − ζ, L1 = ξ, L2 = η, L3 = ζ; corners Li(2Li − 1), mid-edge nodes 4 La Lb on
/// the edges (0,1) (1,2) (0,2) (0,3) (1,3) (2,3).
template <int N>
Eigen::Matrix<double, N, 3> tet_shape_gradients(double xi, double eta, double zeta) {
  static_assert(N == 4 || N == 10);
  static const double dl[4][3] = {{-1, -1, -1}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
  const double l[4] = {1 - xi - eta - zeta, xi, eta, zeta};
  Eigen::Matrix<double, N, 3> g;
  for (int a = 0; a < 4; ++a)
    for (int k = 0; k < 3; ++k) g(a, k) = (N == 4 ? 1.0 : 4 * l[a] - 1) * dl[a][k];
  if constexpr (N == 10) {
    static const int edge[6][2] = {{0, 1}, {1, 2}, {0, 2}, {0, 3}, {1, 3}, {2, 3}};
    for (int e = 0; e < 6; ++e) {
      const int a = edge[e][0], b = edge[e][1];
      for (int k = 0; k < 3; ++k) g(4 + e, k) = 4 * (l[a] * dl[b][k] + l[b] * dl[a][k]);
    }
  }
  return g;
}

/// Stiffness ∫ Bᵀ D B dV of an isoparametric tetrahedron with nodes x (VTK order). tet4: one
/// point (exact); tet10: the 4-point rule of degree 2, exact for straight-sided elements.
/// Throws when det J ≤ 0 at a quadrature point.
template <int N>
Eigen::Matrix<double, 3 * N, 3 * N> tet_stiffness(const std::array<Point, N>& x, const Matrix6& d) {
  constexpr int nq = N == 4 ? 1 : 4;
  const double qa = 0.5854101966249685, qb = 0.1381966011250105;
  const double qp[4][3] = {{qb, qb, qb}, {qa, qb, qb}, {qb, qa, qb}, {qb, qb, qa}};
  const double q1[3] = {0.25, 0.25, 0.25};
  const double w = N == 4 ? 1.0 / 6.0 : 1.0 / 24.0;
  Eigen::Matrix<double, 3 * N, 3 * N> k = Eigen::Matrix<double, 3 * N, 3 * N>::Zero();
  for (int q = 0; q < nq; ++q) {
    const double* p = N == 4 ? q1 : qp[q];
    const Eigen::Matrix<double, N, 3> gn = tet_shape_gradients<N>(p[0], p[1], p[2]);
    Eigen::Matrix3d jac = Eigen::Matrix3d::Zero();  // J(i, j) = ∂x_i/∂ξ_j
    for (int a = 0; a < N; ++a)
      for (int i = 0; i < 3; ++i)
        for (int j = 0; j < 3; ++j) jac(i, j) += x[a][i] * gn(a, j);
    const double det = jac.determinant();
    if (!(det > 0)) throw std::runtime_error("tet_stiffness: det J <= 0");
    const Eigen::Matrix<double, N, 3> gx = gn * jac.inverse();  // ∂N_a/∂x_j
    Eigen::Matrix<double, 6, 3 * N> b = Eigen::Matrix<double, 6, 3 * N>::Zero();
    for (int a = 0; a < N; ++a) {
      const double dx = gx(a, 0), dy = gx(a, 1), dz = gx(a, 2);
      b(0, 3 * a) = dx;
      b(1, 3 * a + 1) = dy;
      b(2, 3 * a + 2) = dz;
      b(3, 3 * a + 1) = dz;
      b(3, 3 * a + 2) = dy;
      b(4, 3 * a) = dz;
      b(4, 3 * a + 2) = dx;
      b(5, 3 * a) = dy;
      b(5, 3 * a + 1) = dx;
    }
    k.noalias() += (w * det) * (b.transpose() * d * b);
  }
  return k;
}

/// One horizontal layer, listed from the surface down.
struct BlockLayer {
  double thickness;
  double young;
  double poisson;
};

struct BlockSpec {
  int nx = 8, ny = 8, nz = 4;             ///< cells per direction
  double lx = 60, ly = 60, lz = 30;       ///< metres
  bool quadratic = false;                 ///< tet10 instead of tet4
  std::vector<BlockLayer> layers = {{10, 20e6, 0.3}, {1e9, 2e9, 0.3}};  ///< soft over stiff
  double pressure = 100e3;                ///< Pa, downwards
  double patch_half_width = 7.5;          ///< m; ≥ lx/2 and ly/2 loads the whole surface
  double cavity_radius = 0;               ///< m; 0 = no cavity
  double cavity_depth = 15;               ///< m below the surface, of the cavity's centre
  double distortion = 0;                  ///< smooth interior distortion, in cell sizes (tests)
};

struct BlockModel {
  SparseMatrix lower;            ///< lower triangle of K, before constraints
  Vector load;                   ///< consistent nodal forces, before constraints
  std::vector<char> fixed;       ///< per dof
  std::vector<Point> nodes;      ///< coordinates, node i ↔ dofs 3i..3i+2
  std::vector<int> cells;        ///< npe node indices per element
  std::vector<char> active;      ///< per element (false inside the cavity)
  int nodes_per_element = 4;
  double volume = 0;             ///< of the active elements
  std::size_t dofs() const { return 3 * nodes.size(); }
};

namespace detail {

/// Vertices of the six tetrahedra of a unit cell, as corner bit masks (bit 0 = x, 1 = y, 2 = z),
/// each positively oriented.
inline std::array<std::array<int, 4>, 6> kuhn_tets() {
  std::array<std::array<int, 4>, 6> t{};
  int perm[3] = {0, 1, 2};
  int n = 0;
  do {
    const int v1 = 1 << perm[0];
    const int v2 = v1 | (1 << perm[1]);
    std::array<int, 4> tet = {0, v1, v2, 7};
    // Orientation: sign of det[e_p0, e_p1, e_p2] = parity of the permutation.
    int inversions = 0;
    for (int i = 0; i < 3; ++i)
      for (int j = i + 1; j < 3; ++j) inversions += perm[i] > perm[j];
    if (inversions % 2) std::swap(tet[1], tet[2]);
    t[n++] = tet;
  } while (std::next_permutation(perm, perm + 3));
  return t;
}

}  // namespace detail

/// Builds the mesh, the lower-triangle stiffness (pattern from all elements, cavity elements
/// contributing zeros), the load and the fixed dofs. Assembly is parallel over elements (OpenMP).
inline BlockModel build_block(const BlockSpec& s) {
  if (s.nx < 1 || s.ny < 1 || s.nz < 1) throw std::invalid_argument("build_block: empty grid");
  const int r = s.quadratic ? 2 : 1;
  const int gx = r * s.nx + 1, gy = r * s.ny + 1, gz = r * s.nz + 1;
  const double hx = s.lx / (r * s.nx), hy = s.ly / (r * s.ny), hz = s.lz / (r * s.nz);
  auto gid = [&](int i, int j, int k) { return i + gx * (j + gy * k); };
  BlockModel m;
  m.nodes_per_element = s.quadratic ? 10 : 4;
  const int npe = m.nodes_per_element;
  const std::size_t nn = static_cast<std::size_t>(gx) * gy * gz;
  m.nodes.resize(nn);

  // Vertex positions (even fine-grid indices when quadratic), then mid-edge nodes at midpoints.
  const double pi = 3.14159265358979323846;
  const double amp = s.distortion * std::min({s.lx / s.nx, s.ly / s.ny, s.lz / s.nz});
  auto vertex_position = [&](int i, int j, int k) {
    const double x = i * hx, y = j * hy, z = k * hz;
    Point p = {x, y, z};
    if (amp != 0) {
      const double bump = std::sin(pi * x / s.lx) * std::sin(pi * y / s.ly) * std::sin(pi * z / s.lz);
      p[0] += amp * bump * std::cos(2.3 * y / s.ly + 0.4);
      p[1] += amp * bump * std::sin(1.7 * z / s.lz + 0.9);
      p[2] += amp * bump * std::cos(2.9 * x / s.lx + 0.2);
    }
    return p;
  };
  for (int k = 0; k < gz; ++k)
    for (int j = 0; j < gy; ++j)
      for (int i = 0; i < gx; ++i) {
        const int odd[3] = {i % r, j % r, k % r};
        if (!odd[0] && !odd[1] && !odd[2]) {
          m.nodes[gid(i, j, k)] = vertex_position(i, j, k);
        } else {
          const Point a = vertex_position(i - odd[0], j - odd[1], k - odd[2]);
          const Point b = vertex_position(i + odd[0], j + odd[1], k + odd[2]);
          m.nodes[gid(i, j, k)] = {(a[0] + b[0]) / 2, (a[1] + b[1]) / 2, (a[2] + b[2]) / 2};
        }
      }

  // Elements.
  static const int edge[6][2] = {{0, 1}, {1, 2}, {0, 2}, {0, 3}, {1, 3}, {2, 3}};
  const auto tets = detail::kuhn_tets();
  const std::size_t ne = static_cast<std::size_t>(6) * s.nx * s.ny * s.nz;
  m.cells.resize(ne * npe);
  m.active.assign(ne, 1);
  std::vector<int> material(ne, 0);
  const Point centre = {s.lx / 2, s.ly / 2, s.lz - s.cavity_depth};
  std::size_t e = 0;
  for (int ck = 0; ck < s.nz; ++ck)
    for (int cj = 0; cj < s.ny; ++cj)
      for (int ci = 0; ci < s.nx; ++ci)
        for (const auto& t : tets) {
          int g[4][3];
          for (int v = 0; v < 4; ++v) {
            g[v][0] = r * (ci + (t[v] & 1));
            g[v][1] = r * (cj + ((t[v] >> 1) & 1));
            g[v][2] = r * (ck + ((t[v] >> 2) & 1));
          }
          int* c = &m.cells[e * npe];
          for (int v = 0; v < 4; ++v) c[v] = gid(g[v][0], g[v][1], g[v][2]);
          if (s.quadratic)
            for (int q = 0; q < 6; ++q) {
              const int a = edge[q][0], b = edge[q][1];
              c[4 + q] = gid((g[a][0] + g[b][0]) / 2, (g[a][1] + g[b][1]) / 2, (g[a][2] + g[b][2]) / 2);
            }
          Point xc = {0, 0, 0};
          for (int v = 0; v < 4; ++v)
            for (int d = 0; d < 3; ++d) xc[d] += m.nodes[c[v]][d] / 4;
          const double depth = s.lz - xc[2];
          double top = 0;
          int layer = 0;
          while (layer + 1 < static_cast<int>(s.layers.size()) && depth > top + s.layers[layer].thickness) {
            top += s.layers[layer].thickness;
            ++layer;
          }
          material[e] = layer;
          if (s.cavity_radius > 0) {
            const double dx = xc[0] - centre[0], dy = xc[1] - centre[1], dz = xc[2] - centre[2];
            if (dx * dx + dy * dy + dz * dz < s.cavity_radius * s.cavity_radius) m.active[e] = 0;
          }
          ++e;
        }

  // Node-level lower pattern: for node j, the sorted nodes i ≥ j sharing an element (j first).
  std::vector<std::vector<int>> adj(nn);
  for (std::size_t n = 0; n < nn; ++n) adj[n].push_back(static_cast<int>(n));
  for (std::size_t el = 0; el < ne; ++el) {
    const int* c = &m.cells[el * npe];
    for (int a = 0; a < npe; ++a)
      for (int b = 0; b < npe; ++b)
        if (c[a] > c[b]) adj[c[b]].push_back(c[a]);
  }
  std::vector<int> nptr(nn + 1, 0), nidx;
  for (std::size_t n = 0; n < nn; ++n) {
    auto& v = adj[n];
    std::sort(v.begin(), v.end());
    v.erase(std::unique(v.begin(), v.end()), v.end());
    nptr[n + 1] = nptr[n] + static_cast<int>(v.size());
  }
  nidx.reserve(nptr[nn]);
  for (auto& v : adj) {
    nidx.insert(nidx.end(), v.begin(), v.end());
    std::vector<int>().swap(v);
  }

  // Dof-level lower CSC: column 3n+c holds rows 3n+c..3n+2, then 3 rows per neighbour node.
  const std::size_t nd = 3 * nn;
  std::vector<long long> colptr(nd + 1, 0);
  for (std::size_t n = 0; n < nn; ++n)
    for (int c = 0; c < 3; ++c) {
      const long long len = (3 - c) + 3LL * (nptr[n + 1] - nptr[n] - 1);
      colptr[3 * n + c + 1] = colptr[3 * n + c] + len;
    }
  if (colptr[nd] > 2000000000LL) throw std::runtime_error("build_block: too many nonzeros");
  m.lower.resize(static_cast<int>(nd), static_cast<int>(nd));
  m.lower.resizeNonZeros(static_cast<Eigen::Index>(colptr[nd]));
  int* outer = m.lower.outerIndexPtr();
  int* inner = m.lower.innerIndexPtr();
  double* val = m.lower.valuePtr();
  for (std::size_t j = 0; j <= nd; ++j) outer[j] = static_cast<int>(colptr[j]);
  for (std::size_t n = 0; n < nn; ++n)
    for (int c = 0; c < 3; ++c) {
      int p = outer[3 * n + c];
      for (int rr = c; rr < 3; ++rr) inner[p++] = static_cast<int>(3 * n) + rr;
      for (int q = nptr[n] + 1; q < nptr[n + 1]; ++q)
        for (int rr = 0; rr < 3; ++rr) inner[p++] = 3 * nidx[q] + rr;
    }
  std::fill(val, val + colptr[nd], 0.0);

  std::vector<Matrix6> d;
  for (const auto& l : s.layers) d.push_back(isotropic_elasticity(l.young, l.poisson));
  double volume = 0;
  const long long nel = static_cast<long long>(ne);
#pragma omp parallel for schedule(dynamic, 256) reduction(+ : volume)
  for (long long el = 0; el < nel; ++el) {
    if (!m.active[el]) continue;
    const int* c = &m.cells[el * npe];
    Eigen::MatrixXd ke;
    if (s.quadratic) {
      std::array<Point, 10> x;
      for (int a = 0; a < 10; ++a) x[a] = m.nodes[c[a]];
      ke = tet_stiffness<10>(x, d[material[el]]);
    } else {
      std::array<Point, 4> x;
      for (int a = 0; a < 4; ++a) x[a] = m.nodes[c[a]];
      ke = tet_stiffness<4>(x, d[material[el]]);
    }
    {
      const Point& a = m.nodes[c[0]];
      Eigen::Matrix3d j;
      for (int v = 0; v < 3; ++v)
        for (int k = 0; k < 3; ++k) j(k, v) = m.nodes[c[v + 1]][k] - a[k];
      volume += j.determinant() / 6;
    }
    for (int a = 0; a < npe; ++a)
      for (int b = 0; b < npe; ++b) {
        const int ra = c[a], cb = c[b];
        if (ra < cb) continue;
        const int* first = nidx.data() + nptr[cb];
        const int* last = nidx.data() + nptr[cb + 1];
        const int q = static_cast<int>(std::lower_bound(first, last, ra) - first);
        for (int cc = 0; cc < 3; ++cc) {
          const int base = outer[3 * cb + cc];
          for (int rr = (ra == cb ? cc : 0); rr < 3; ++rr) {
            const int pos = base + (q == 0 ? rr - cc : (3 - cc) + 3 * (q - 1) + rr);
#pragma omp atomic
            val[pos] += ke(3 * a + rr, 3 * b + cc);
          }
        }
      }
  }
  m.volume = volume;

  // Surface load: the top face of each surface cell is split along its (0,0)–(1,1) diagonal.
  m.load = Vector::Zero(static_cast<Eigen::Index>(nd));
  const double xc = s.lx / 2, yc = s.ly / 2;
  for (int cj = 0; cj < s.ny; ++cj)
    for (int ci = 0; ci < s.nx; ++ci) {
      const int k = r * s.nz;
      const int tri[2][3][2] = {{{0, 0}, {1, 0}, {1, 1}}, {{0, 0}, {1, 1}, {0, 1}}};
      for (const auto& t : tri) {
        int g[3][2];
        for (int v = 0; v < 3; ++v) {
          g[v][0] = r * (ci + t[v][0]);
          g[v][1] = r * (cj + t[v][1]);
        }
        const Point& p0 = m.nodes[gid(g[0][0], g[0][1], k)];
        const Point& p1 = m.nodes[gid(g[1][0], g[1][1], k)];
        const Point& p2 = m.nodes[gid(g[2][0], g[2][1], k)];
        const double cx = (p0[0] + p1[0] + p2[0]) / 3, cy = (p0[1] + p1[1] + p2[1]) / 3;
        if (std::abs(cx - xc) > s.patch_half_width || std::abs(cy - yc) > s.patch_half_width) continue;
        const double area = 0.5 * std::abs((p1[0] - p0[0]) * (p2[1] - p0[1]) - (p2[0] - p0[0]) * (p1[1] - p0[1]));
        const double f = -s.pressure * area / 3;
        if (!s.quadratic) {
          for (int v = 0; v < 3; ++v) m.load[3 * gid(g[v][0], g[v][1], k) + 2] += f;
        } else {  // tri6 under uniform pressure: nothing at the corners, a third at each mid-edge
          for (int v = 0; v < 3; ++v) {
            const int w = (v + 1) % 3;
            m.load[3 * gid((g[v][0] + g[w][0]) / 2, (g[v][1] + g[w][1]) / 2, k) + 2] += f;
          }
        }
      }
    }

  // Supports: base fixed, sides on rollers, nodes of the cavity interior (no active element) fixed.
  m.fixed.assign(nd, 0);
  std::vector<char> used(nn, 0);
  for (std::size_t el = 0; el < ne; ++el)
    if (m.active[el])
      for (int a = 0; a < npe; ++a) used[m.cells[el * npe + a]] = 1;
  for (int k = 0; k < gz; ++k)
    for (int j = 0; j < gy; ++j)
      for (int i = 0; i < gx; ++i) {
        const std::size_t n = gid(i, j, k);
        if (k == 0 || !used[n]) m.fixed[3 * n] = m.fixed[3 * n + 1] = m.fixed[3 * n + 2] = 1;
        if (i == 0 || i == gx - 1) m.fixed[3 * n] = 1;
        if (j == 0 || j == gy - 1) m.fixed[3 * n + 1] = 1;
      }
  return m;
}

/// Zeroes the rows and columns of the fixed dofs (pattern kept) and gives each a positive
/// diagonal: its own, or the mean diagonal when it had none. The load is zeroed there too
/// (homogeneous supports).
inline void constrain_block(BlockModel& m) {
  SparseMatrix& k = m.lower;
  double sum = 0;
  long count = 0;
  for (int j = 0; j < k.outerSize(); ++j)
    for (SparseMatrix::InnerIterator it(k, j); it; ++it)
      if (it.row() == j && it.value() > 0) {
        sum += it.value();
        ++count;
      }
  const double mean = count ? sum / static_cast<double>(count) : 1.0;
  for (int j = 0; j < k.outerSize(); ++j)
    for (SparseMatrix::InnerIterator it(k, j); it; ++it) {
      const int i = static_cast<int>(it.row());
      if (i == j) {
        if (m.fixed[j] && !(it.value() > 0)) it.valueRef() = mean;
      } else if (m.fixed[i] || m.fixed[j]) {
        it.valueRef() = 0;
      }
    }
  for (std::size_t i = 0; i < m.fixed.size(); ++i)
    if (m.fixed[i]) m.load[static_cast<Eigen::Index>(i)] = 0;
}

/// y = K x with K symmetric, given by its lower triangle.
inline Vector symmetric_product(const SparseMatrix& lower, const Vector& x) {
  return lower.selfadjointView<Eigen::Lower>() * x;
}

}  // namespace voidsign::bench
