// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/fe/element.hpp"

#include <stdexcept>
#include <string>

namespace voidsign::solver {

Sym6 hooke(const Elastic& m, const Sym6& e) {
  const double nu = m.poisson;
  const double lambda = m.young * nu / ((1 + nu) * (1 - 2 * nu));
  const double mu = m.young / (2 * (1 + nu));
  const double tr = e[0] + e[1] + e[2];
  return {lambda * tr + 2 * mu * e[0], lambda * tr + 2 * mu * e[1], lambda * tr + 2 * mu * e[2],
          mu * e[3], mu * e[4], mu * e[5]};
}

namespace {

// Dunavant (1985) triangle rules and Keast (1986) tetrahedron rules; weights sum to the
// reference measure (1/2, 1/6).
constexpr QuadPoint tri1[] = {{1.0 / 3, 1.0 / 3, 0, 0.5}};
constexpr QuadPoint tri3[] = {{1.0 / 6, 1.0 / 6, 0, 1.0 / 6}, {2.0 / 3, 1.0 / 6, 0, 1.0 / 6}, {1.0 / 6, 2.0 / 3, 0, 1.0 / 6}};
constexpr double a6 = 0.445948490915965, b6 = 0.091576213509771;
constexpr double wa6 = 0.223381589678011 / 2, wb6 = 0.109951743655322 / 2;
constexpr QuadPoint tri6[] = {{a6, a6, 0, wa6}, {1 - 2 * a6, a6, 0, wa6}, {a6, 1 - 2 * a6, 0, wa6},
                              {b6, b6, 0, wb6}, {1 - 2 * b6, b6, 0, wb6}, {b6, 1 - 2 * b6, 0, wb6}};
constexpr QuadPoint tet1[] = {{0.25, 0.25, 0.25, 1.0 / 6}};
constexpr double ta = 0.585410196624969, tb = 0.138196601125011;
constexpr QuadPoint tet4[] = {{tb, tb, tb, 1.0 / 24}, {ta, tb, tb, 1.0 / 24}, {tb, ta, tb, 1.0 / 24}, {tb, tb, ta, 1.0 / 24}};
// Keast rule 3 (degree 3): centroid −4/30, and four points at (1/6, 1/6, 1/6, 1/2), 9/120; ×1/6.
constexpr QuadPoint tet5[] = {{0.25, 0.25, 0.25, -4.0 / 30 / 6},
                              {1.0 / 6, 1.0 / 6, 1.0 / 6, 9.0 / 120 / 6},
                              {0.5, 1.0 / 6, 1.0 / 6, 9.0 / 120 / 6},
                              {1.0 / 6, 0.5, 1.0 / 6, 9.0 / 120 / 6},
                              {1.0 / 6, 1.0 / 6, 0.5, 9.0 / 120 / 6}};

constexpr std::array<double, 3> ref_tri3[] = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}};
constexpr std::array<double, 3> ref_tri6[] = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {0.5, 0, 0}, {0.5, 0.5, 0}, {0, 0.5, 0}};
constexpr std::array<double, 3> ref_tet4[] = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
constexpr std::array<double, 3> ref_tet10[] = {{0, 0, 0},     {1, 0, 0},   {0, 1, 0},     {0, 0, 1},     {0.5, 0, 0},
                                               {0.5, 0.5, 0}, {0, 0.5, 0}, {0, 0, 0.5}, {0.5, 0, 0.5}, {0, 0.5, 0.5}};

// Shapes and reference derivatives. Barycentric L0 = 1 − r − s − t, L1 = r, L2 = s, L3 = t.
void reference_shapes(mesh::CellType type, double r, double s, double t, double* N, double* dr, double* ds,
                      double* dt) {
  switch (type) {
    case mesh::CellType::tri3:
      N[0] = 1 - r - s; N[1] = r; N[2] = s;
      dr[0] = -1; dr[1] = 1; dr[2] = 0;
      ds[0] = -1; ds[1] = 0; ds[2] = 1;
      for (int a = 0; a < 3; ++a) dt[a] = 0;
      return;
    case mesh::CellType::tri6: {
      const double u = 1 - r - s;
      N[0] = u * (2 * u - 1); N[1] = r * (2 * r - 1); N[2] = s * (2 * s - 1);
      N[3] = 4 * r * u; N[4] = 4 * r * s; N[5] = 4 * s * u;
      dr[0] = 1 - 4 * u; dr[1] = 4 * r - 1; dr[2] = 0; dr[3] = 4 * (u - r); dr[4] = 4 * s; dr[5] = -4 * s;
      ds[0] = 1 - 4 * u; ds[1] = 0; ds[2] = 4 * s - 1; ds[3] = -4 * r; ds[4] = 4 * r; ds[5] = 4 * (u - s);
      for (int a = 0; a < 6; ++a) dt[a] = 0;
      return;
    }
    case mesh::CellType::tet4:
      N[0] = 1 - r - s - t; N[1] = r; N[2] = s; N[3] = t;
      dr[0] = -1; dr[1] = 1; dr[2] = 0; dr[3] = 0;
      ds[0] = -1; ds[1] = 0; ds[2] = 1; ds[3] = 0;
      dt[0] = -1; dt[1] = 0; dt[2] = 0; dt[3] = 1;
      return;
    case mesh::CellType::tet10: {
      const double L[4] = {1 - r - s - t, r, s, t};
      // dL_i/d(r, s, t)
      const double G[4][3] = {{-1, -1, -1}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
      for (int i = 0; i < 4; ++i) {
        N[i] = L[i] * (2 * L[i] - 1);
        dr[i] = (4 * L[i] - 1) * G[i][0];
        ds[i] = (4 * L[i] - 1) * G[i][1];
        dt[i] = (4 * L[i] - 1) * G[i][2];
      }
      static constexpr int edge[6][2] = {{0, 1}, {1, 2}, {2, 0}, {0, 3}, {1, 3}, {2, 3}};
      for (int e = 0; e < 6; ++e) {
        const int i = edge[e][0], j = edge[e][1];
        N[4 + e] = 4 * L[i] * L[j];
        dr[4 + e] = 4 * (G[i][0] * L[j] + L[i] * G[j][0]);
        ds[4 + e] = 4 * (G[i][1] * L[j] + L[i] * G[j][1]);
        dt[4 + e] = 4 * (G[i][2] * L[j] + L[i] * G[j][2]);
      }
      return;
    }
  }
}

using Span = std::span<const QuadPoint>;

}  // namespace

std::span<const QuadPoint> quadrature(mesh::CellType t, Kinematics k) {
  switch (t) {
    case mesh::CellType::tri3: return k == Kinematics::plane_strain ? Span(tri1) : Span(tri3);
    case mesh::CellType::tri6: return k == Kinematics::plane_strain ? Span(tri3) : Span(tri6);
    case mesh::CellType::tet4: return Span(tet1);
    case mesh::CellType::tet10: return Span(tet4);
  }
  return {};
}

std::span<const QuadPoint> accurate_quadrature(mesh::CellType t) {
  return mesh::dim_of(t) == 2 ? Span(tri6) : Span(tet5);
}

std::span<const std::array<double, 3>> node_reference_points(mesh::CellType t) {
  using S = std::span<const std::array<double, 3>>;
  switch (t) {
    case mesh::CellType::tri3: return S(ref_tri3);
    case mesh::CellType::tri6: return S(ref_tri6);
    case mesh::CellType::tet4: return S(ref_tet4);
    case mesh::CellType::tet10: return S(ref_tet10);
  }
  return {};
}

std::array<double, 3> reference_centroid(mesh::CellType t) {
  return mesh::dim_of(t) == 2 ? std::array<double, 3>{1.0 / 3, 1.0 / 3, 0} : std::array<double, 3>{0.25, 0.25, 0.25};
}

ShapeAt shape_at(const mesh::Mesh& m, std::size_t c, double r, double s, double t) {
  ShapeAt sh;
  sh.n = m.npc();
  double dr[max_cell_nodes], ds[max_cell_nodes], dt[max_cell_nodes];
  reference_shapes(m.type, r, s, t, sh.N.data(), dr, ds, dt);
  const int* v = m.cell(c);
  if (m.dim() == 2) {
    double xr = 0, xs = 0, zr = 0, zs = 0;
    for (int a = 0; a < sh.n; ++a) {
      const auto& p = m.nodes[v[a]];
      sh.x += sh.N[a] * p[0];
      sh.z += sh.N[a] * p[2];
      xr += dr[a] * p[0];
      xs += ds[a] * p[0];
      zr += dr[a] * p[2];
      zs += ds[a] * p[2];
    }
    sh.detj = xr * zs - xs * zr;
    if (!(sh.detj > 0)) throw std::runtime_error("cell " + std::to_string(c) + " is inverted or degenerate (det J <= 0)");
    const double inv = 1.0 / sh.detj;
    for (int a = 0; a < sh.n; ++a) {
      sh.dx[a] = (zs * dr[a] - zr * ds[a]) * inv;
      sh.dz[a] = (-xs * dr[a] + xr * ds[a]) * inv;
    }
    return sh;
  }
  // J[i][j] = ∂x_i/∂ξ_j
  double J[3][3] = {};
  for (int a = 0; a < sh.n; ++a) {
    const auto& p = m.nodes[v[a]];
    sh.x += sh.N[a] * p[0];
    sh.y += sh.N[a] * p[1];
    sh.z += sh.N[a] * p[2];
    for (int i = 0; i < 3; ++i) {
      J[i][0] += p[i] * dr[a];
      J[i][1] += p[i] * ds[a];
      J[i][2] += p[i] * dt[a];
    }
  }
  const double c00 = J[1][1] * J[2][2] - J[1][2] * J[2][1];
  const double c01 = J[1][2] * J[2][0] - J[1][0] * J[2][2];
  const double c02 = J[1][0] * J[2][1] - J[1][1] * J[2][0];
  sh.detj = J[0][0] * c00 + J[0][1] * c01 + J[0][2] * c02;
  if (!(sh.detj > 0)) throw std::runtime_error("cell " + std::to_string(c) + " is inverted or degenerate (det J <= 0)");
  const double inv = 1.0 / sh.detj;
  // K = J⁻¹: K[j][i] = ∂ξ_j/∂x_i.
  double K[3][3];
  K[0][0] = c00 * inv;
  K[1][0] = c01 * inv;
  K[2][0] = c02 * inv;
  K[0][1] = (J[0][2] * J[2][1] - J[0][1] * J[2][2]) * inv;
  K[1][1] = (J[0][0] * J[2][2] - J[0][2] * J[2][0]) * inv;
  K[2][1] = (J[0][1] * J[2][0] - J[0][0] * J[2][1]) * inv;
  K[0][2] = (J[0][1] * J[1][2] - J[0][2] * J[1][1]) * inv;
  K[1][2] = (J[0][2] * J[1][0] - J[0][0] * J[1][2]) * inv;
  K[2][2] = (J[0][0] * J[1][1] - J[0][1] * J[1][0]) * inv;
  for (int a = 0; a < sh.n; ++a) {
    sh.dx[a] = dr[a] * K[0][0] + ds[a] * K[1][0] + dt[a] * K[2][0];
    sh.dy[a] = dr[a] * K[0][1] + ds[a] * K[1][1] + dt[a] * K[2][1];
    sh.dz[a] = dr[a] * K[0][2] + ds[a] * K[1][2] + dt[a] * K[2][2];
  }
  return sh;
}

double volume_weight(const ShapeAt& sh, double w, Kinematics k) {
  return k == Kinematics::axisymmetric ? w * sh.detj * sh.x : w * sh.detj;
}

namespace {

// B_a: 6 × d block of node a (rows xx, yy, zz, xy, yz, xz).
struct BBlock {
  double b[6][3];
};

BBlock b_of(const ShapeAt& sh, int a, Kinematics k) {
  BBlock B{};
  if (k == Kinematics::solid) {
    B.b[0][0] = sh.dx[a];
    B.b[1][1] = sh.dy[a];
    B.b[2][2] = sh.dz[a];
    B.b[3][0] = sh.dy[a];
    B.b[3][1] = sh.dx[a];
    B.b[4][1] = sh.dz[a];
    B.b[4][2] = sh.dy[a];
    B.b[5][0] = sh.dz[a];
    B.b[5][2] = sh.dx[a];
    return B;
  }
  // 2D unknowns (u_x, u_z) in columns 0 and 1.
  B.b[0][0] = sh.dx[a];
  B.b[2][1] = sh.dz[a];
  B.b[5][0] = sh.dz[a];
  B.b[5][1] = sh.dx[a];
  if (k == Kinematics::axisymmetric) B.b[1][0] = sh.N[a] / sh.x;
  return B;
}

}  // namespace

Sym6 strain_at(const ShapeAt& sh, const double* u, Kinematics k) {
  const int d = dofs_per_node(k);
  Sym6 e{};
  for (int a = 0; a < sh.n; ++a) {
    const BBlock B = b_of(sh, a, k);
    for (int i = 0; i < 6; ++i)
      for (int j = 0; j < d; ++j) e[i] += B.b[i][j] * u[d * a + j];
  }
  return e;
}

void stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k, std::span<double> ke) {
  const int n = m.npc();
  const int d = dofs_per_node(k);
  const int nd = d * n;
  std::fill(ke.begin(), ke.begin() + nd * nd, 0.0);
  const double nu = mat.poisson;
  const double lambda = mat.young * nu / ((1 + nu) * (1 - 2 * nu));
  const double mu = mat.young / (2 * (1 + nu));
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    const double w = volume_weight(sh, q.w, k);
    double B[6][3 * max_cell_nodes] = {};
    for (int a = 0; a < n; ++a) {
      const BBlock Ba = b_of(sh, a, k);
      for (int i = 0; i < 6; ++i)
        for (int j = 0; j < d; ++j) B[i][d * a + j] = Ba.b[i][j];
    }
    // DB = D·B, D isotropic: normal block λ + 2μ δ, shear μ.
    double DB[6][3 * max_cell_nodes];
    for (int col = 0; col < nd; ++col) {
      const double tr = B[0][col] + B[1][col] + B[2][col];
      for (int i = 0; i < 3; ++i) DB[i][col] = lambda * tr + 2 * mu * B[i][col];
      for (int i = 3; i < 6; ++i) DB[i][col] = mu * B[i][col];
    }
    for (int p = 0; p < nd; ++p)
      for (int q2 = 0; q2 < nd; ++q2) {
        double sum = 0;
        for (int i = 0; i < 6; ++i) sum += B[i][p] * DB[i][q2];
        ke[p * nd + q2] += w * sum;
      }
  }
}

void add_stress_divergence(const mesh::Mesh& m, std::size_t c, Kinematics k, StressField sigma, const void* ctx,
                           std::span<double> f) {
  const int n = m.npc();
  const int d = dofs_per_node(k);
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    const double w = volume_weight(sh, q.w, k);
    const Sym6 s = sigma(sh.x, sh.y, sh.z, ctx);
    for (int a = 0; a < n; ++a) {
      const BBlock B = b_of(sh, a, k);
      for (int j = 0; j < d; ++j) {
        double sum = 0;
        for (int i = 0; i < 6; ++i) sum += B.b[i][j] * s[i];
        f[d * a + j] += w * sum;
      }
    }
  }
}

void add_body_force(const mesh::Mesh& m, std::size_t c, Kinematics k, const std::array<double, 3>& b,
                    std::span<double> f) {
  const int n = m.npc();
  const int d = dofs_per_node(k);
  const double comp[3] = {b[0], d == 3 ? b[1] : b[2], b[2]};
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    const double w = volume_weight(sh, q.w, k);
    for (int a = 0; a < n; ++a)
      for (int j = 0; j < d; ++j) f[d * a + j] += w * sh.N[a] * comp[j];
  }
}

}  // namespace voidsign::solver
