// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/fe/element.hpp"

#include <stdexcept>
#include <string>

namespace voidsign::solver {

Voigt4 hooke(const Elastic& m, const Voigt4& e) {
  const double nu = m.poisson;
  const double lambda = m.young * nu / ((1 + nu) * (1 - 2 * nu));
  const double mu = m.young / (2 * (1 + nu));
  const double tr = e[0] + e[1] + e[3];
  return {lambda * tr + 2 * mu * e[0], lambda * tr + 2 * mu * e[1], mu * e[2], lambda * tr + 2 * mu * e[3]};
}

namespace {

// Dunavant (1985) rules on the reference triangle, weights summing to 1/2.
constexpr QuadPoint rule1[] = {{1.0 / 3, 1.0 / 3, 0.5}};
constexpr QuadPoint rule3[] = {{1.0 / 6, 1.0 / 6, 1.0 / 6}, {2.0 / 3, 1.0 / 6, 1.0 / 6}, {1.0 / 6, 2.0 / 3, 1.0 / 6}};
constexpr double a6 = 0.445948490915965, b6 = 0.091576213509771;
constexpr double wa6 = 0.223381589678011 / 2, wb6 = 0.109951743655322 / 2;
constexpr QuadPoint rule6[] = {{a6, a6, wa6}, {1 - 2 * a6, a6, wa6}, {a6, 1 - 2 * a6, wa6},
                               {b6, b6, wb6}, {1 - 2 * b6, b6, wb6}, {b6, 1 - 2 * b6, wb6}};

constexpr std::array<double, 2> ref3[] = {{0, 0}, {1, 0}, {0, 1}};
constexpr std::array<double, 2> ref6[] = {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}};

void reference_shapes(mesh::CellType t, double r, double s, double* N, double* dr, double* ds) {
  if (t == mesh::CellType::tri3) {
    N[0] = 1 - r - s; N[1] = r; N[2] = s;
    dr[0] = -1; dr[1] = 1; dr[2] = 0;
    ds[0] = -1; ds[1] = 0; ds[2] = 1;
    return;
  }
  const double u = 1 - r - s;
  N[0] = u * (2 * u - 1); N[1] = r * (2 * r - 1); N[2] = s * (2 * s - 1);
  N[3] = 4 * r * u; N[4] = 4 * r * s; N[5] = 4 * s * u;
  dr[0] = 1 - 4 * u; dr[1] = 4 * r - 1; dr[2] = 0; dr[3] = 4 * (u - r); dr[4] = 4 * s; dr[5] = -4 * s;
  ds[0] = 1 - 4 * u; ds[1] = 0; ds[2] = 4 * s - 1; ds[3] = -4 * r; ds[4] = 4 * r; ds[5] = 4 * (u - s);
}

}  // namespace

std::span<const QuadPoint> quadrature(mesh::CellType t, Kinematics k) {
  if (t == mesh::CellType::tri3) return k == Kinematics::plane_strain ? std::span<const QuadPoint>(rule1) : std::span<const QuadPoint>(rule3);
  return k == Kinematics::plane_strain ? std::span<const QuadPoint>(rule3) : std::span<const QuadPoint>(rule6);
}

std::span<const std::array<double, 2>> node_reference_points(mesh::CellType t) {
  return t == mesh::CellType::tri3 ? std::span<const std::array<double, 2>>(ref3) : std::span<const std::array<double, 2>>(ref6);
}

ShapeAt shape_at(const mesh::Mesh& m, std::size_t c, double r, double s) {
  ShapeAt sh;
  sh.n = m.npc();
  double dr[6], ds[6];
  reference_shapes(m.type, r, s, sh.N.data(), dr, ds);
  const int* v = m.cell(c);
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

double volume_weight(const ShapeAt& sh, double w, Kinematics k) {
  return k == Kinematics::axisymmetric ? w * sh.detj * sh.x : w * sh.detj;
}

Voigt4 strain_at(const ShapeAt& sh, const double* u, Kinematics k) {
  Voigt4 e{0, 0, 0, 0};
  for (int a = 0; a < sh.n; ++a) {
    const double ux = u[2 * a], uz = u[2 * a + 1];
    e[0] += sh.dx[a] * ux;
    e[1] += sh.dz[a] * uz;
    e[2] += sh.dz[a] * ux + sh.dx[a] * uz;
    if (k == Kinematics::axisymmetric) e[3] += sh.N[a] * ux / sh.x;
  }
  return e;
}

namespace {

// Columns of B for node a: B_a is 4 × 2. Rows: xx, zz, xz, out.
struct BCol {
  double b[4][2];
};

BCol b_of(const ShapeAt& sh, int a, Kinematics k) {
  BCol B{};
  B.b[0][0] = sh.dx[a];
  B.b[1][1] = sh.dz[a];
  B.b[2][0] = sh.dz[a];
  B.b[2][1] = sh.dx[a];
  if (k == Kinematics::axisymmetric) B.b[3][0] = sh.N[a] / sh.x;
  return B;
}

}  // namespace

void stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k, std::span<double> ke) {
  const int n = m.npc();
  const int nd = 2 * n;
  std::fill(ke.begin(), ke.begin() + nd * nd, 0.0);
  const double nu = mat.poisson;
  const double lambda = mat.young * nu / ((1 + nu) * (1 - 2 * nu));
  const double mu = mat.young / (2 * (1 + nu));
  const double D[4][4] = {{lambda + 2 * mu, lambda, 0, lambda},
                          {lambda, lambda + 2 * mu, 0, lambda},
                          {0, 0, mu, 0},
                          {lambda, lambda, 0, lambda + 2 * mu}};
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s);
    const double w = volume_weight(sh, q.w, k);
    BCol B[6];
    for (int a = 0; a < n; ++a) B[a] = b_of(sh, a, k);
    for (int a = 0; a < n; ++a) {
      // DB_a = D · B_a (4 × 2)
      double DB[4][2];
      for (int i = 0; i < 4; ++i)
        for (int j = 0; j < 2; ++j) {
          double sum = 0;
          for (int l = 0; l < 4; ++l) sum += D[i][l] * B[a].b[l][j];
          DB[i][j] = sum;
        }
      for (int b = 0; b < n; ++b)
        for (int i = 0; i < 2; ++i)
          for (int j = 0; j < 2; ++j) {
            double sum = 0;
            for (int l = 0; l < 4; ++l) sum += B[b].b[l][i] * DB[l][j];
            ke[(2 * b + i) * nd + 2 * a + j] += w * sum;
          }
    }
  }
}

void add_stress_divergence(const mesh::Mesh& m, std::size_t c, Kinematics k, StressField sigma, const void* ctx,
                           std::span<double> f) {
  const int n = m.npc();
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s);
    const double w = volume_weight(sh, q.w, k);
    const Voigt4 s = sigma(sh.x, sh.z, ctx);
    for (int a = 0; a < n; ++a) {
      const BCol B = b_of(sh, a, k);
      for (int i = 0; i < 2; ++i) {
        double sum = 0;
        for (int l = 0; l < 4; ++l) sum += B.b[l][i] * s[l];
        f[2 * a + i] += w * sum;
      }
    }
  }
}

void add_body_force(const mesh::Mesh& m, std::size_t c, Kinematics k, double bx, double bz, std::span<double> f) {
  const int n = m.npc();
  for (const QuadPoint& q : quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s);
    const double w = volume_weight(sh, q.w, k);
    for (int a = 0; a < n; ++a) {
      f[2 * a] += w * sh.N[a] * bx;
      f[2 * a + 1] += w * sh.N[a] * bz;
    }
  }
}

}  // namespace voidsign::solver
