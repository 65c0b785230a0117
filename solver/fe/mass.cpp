// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/fe/mass.hpp"

#include <omp.h>

#include <algorithm>
#include <array>
#include <exception>

namespace voidsign::solver {

namespace {

// N_a N_b has degree 2p on a cell of order p, one more with the axisymmetric weight r. The
// stiffness rules of element.cpp are one or two degrees short of that for tri6 and tet10.

// Dunavant (1985) degree 2, 3 points (area 1/2).
constexpr QuadPoint tri_deg2[] = {
    {1.0 / 6, 1.0 / 6, 0, 1.0 / 6}, {2.0 / 3, 1.0 / 6, 0, 1.0 / 6}, {1.0 / 6, 2.0 / 3, 0, 1.0 / 6}};
// Radon's 7-point degree-5 rule (Dunavant 1985, rule 5), weights for area 1/2.
constexpr double r5a = 0.470142064105115, r5b = 0.101286507323456;
constexpr double r5w0 = 0.225 / 2, r5wa = 0.132394152788506 / 2, r5wb = 0.125939180544827 / 2;
constexpr QuadPoint tri_deg5[] = {{1.0 / 3, 1.0 / 3, 0, r5w0},
                                  {r5a, r5a, 0, r5wa},
                                  {1 - 2 * r5a, r5a, 0, r5wa},
                                  {r5a, 1 - 2 * r5a, 0, r5wa},
                                  {r5b, r5b, 0, r5wb},
                                  {1 - 2 * r5b, r5b, 0, r5wb},
                                  {r5b, 1 - 2 * r5b, 0, r5wb}};
// Keast (1986) degree 2, 4 points (volume 1/6).
constexpr double k2a = 0.585410196624969, k2b = 0.138196601125011;
constexpr QuadPoint tet_deg2[] = {
    {k2b, k2b, k2b, 1.0 / 24}, {k2a, k2b, k2b, 1.0 / 24}, {k2b, k2a, k2b, 1.0 / 24}, {k2b, k2b, k2a, 1.0 / 24}};

// Conical product rule for the tetrahedron (Stroud 1971): the Duffy map
// x = u, y = (1−u)v, z = (1−u)(1−v)w with dV = (1−u)²(1−v) du dv dw turns a monomial of
// degree p into one of degree p+2 in u, ≤ p+1 in v and ≤ p in w, so 4 × 4 × 3 Gauss–Legendre
// points integrate every polynomial of degree 5 exactly.
struct GaussRule {
  std::array<double, 4> x{}, w{};
  int n = 0;
};

GaussRule gauss01(int n) {
  GaussRule g;
  g.n = n;
  if (n == 3) {
    const double x[3] = {-0.7745966692414834, 0.0, 0.7745966692414834};
    const double w[3] = {0.5555555555555556, 0.8888888888888888, 0.5555555555555556};
    for (int i = 0; i < 3; ++i) {
      g.x[static_cast<std::size_t>(i)] = 0.5 * (1 + x[i]);
      g.w[static_cast<std::size_t>(i)] = 0.5 * w[i];
    }
  } else {
    const double x[4] = {-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526};
    const double w[4] = {0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538};
    for (int i = 0; i < 4; ++i) {
      g.x[static_cast<std::size_t>(i)] = 0.5 * (1 + x[i]);
      g.w[static_cast<std::size_t>(i)] = 0.5 * w[i];
    }
  }
  return g;
}

std::array<QuadPoint, 48> make_tet_deg5() {
  std::array<QuadPoint, 48> q{};
  const GaussRule gu = gauss01(4), gv = gauss01(4), gw = gauss01(3);
  std::size_t k = 0;
  for (int i = 0; i < gu.n; ++i)
    for (int j = 0; j < gv.n; ++j)
      for (int l = 0; l < gw.n; ++l) {
        const double u = gu.x[static_cast<std::size_t>(i)], v = gv.x[static_cast<std::size_t>(j)],
                     w = gw.x[static_cast<std::size_t>(l)];
        q[k++] = {u, (1 - u) * v, (1 - u) * (1 - v) * w,
                  gu.w[static_cast<std::size_t>(i)] * gv.w[static_cast<std::size_t>(j)] *
                      gw.w[static_cast<std::size_t>(l)] * (1 - u) * (1 - u) * (1 - v)};
      }
  return q;
}

const std::array<QuadPoint, 48>& tet_deg5() {
  static const std::array<QuadPoint, 48> q = make_tet_deg5();
  return q;
}

using Span = std::span<const QuadPoint>;

}  // namespace

namespace detail {

bool cell_mass(const mesh::Mesh& m, std::size_t c, const DensityOf& density_of, Kinematics k, std::span<double> s,
               std::exception_ptr& error) {
  try {
    scalar_mass(m, c, density_of(c), k, s);
    return true;
  } catch (...) {
#pragma omp critical(voidsign_mass_error)
    if (!error) error = std::current_exception();
    return false;
  }
}

}  // namespace detail

std::span<const QuadPoint> mass_quadrature(mesh::CellType t, Kinematics k) {
  switch (t) {
    case mesh::CellType::tri3: return k == Kinematics::axisymmetric ? Span(tri_deg5) : Span(tri_deg2);
    case mesh::CellType::tri6: return Span(tri_deg5);
    case mesh::CellType::tet4: return Span(tet_deg2);
    case mesh::CellType::tet10: return Span(tet_deg5());
  }
  return {};
}

void scalar_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> me) {
  const int n = m.npc();
  std::fill(me.begin(), me.begin() + n * n, 0.0);
  for (const QuadPoint& q : mass_quadrature(m.type, k)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    const double w = density * volume_weight(sh, q.w, k);
    for (int a = 0; a < n; ++a) {
      const double wa = w * sh.N[static_cast<std::size_t>(a)];
      for (int b = 0; b < n; ++b) me[static_cast<std::size_t>(a * n + b)] += wa * sh.N[static_cast<std::size_t>(b)];
    }
  }
}

void consistent_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> me) {
  const int n = m.npc();
  const int d = dofs_per_node(k);
  const int nd = n * d;
  std::array<double, max_cell_nodes * max_cell_nodes> s{};
  scalar_mass(m, c, density, k, s);
  std::fill(me.begin(), me.begin() + nd * nd, 0.0);
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int i = 0; i < d; ++i)
        me[static_cast<std::size_t>((d * a + i) * nd + d * b + i)] = s[static_cast<std::size_t>(a * n + b)];
}

void lumped_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> diag) {
  // Row sums (Σ_b M_ab) would conserve the mass too, but for quadratic cells they give the
  // corner nodes zero (tri6) or negative (tet10) mass, since ∫N_a dV vanishes or changes sign
  // there; HRZ keeps the consistent diagonal's proportions, which are all positive.
  const int n = m.npc();
  const int d = dofs_per_node(k);
  std::array<double, max_cell_nodes * max_cell_nodes> s{};
  scalar_mass(m, c, density, k, s);
  double total = 0, trace = 0;
  for (int a = 0; a < n; ++a) {
    trace += s[static_cast<std::size_t>(a * n + a)];
    for (int b = 0; b < n; ++b) total += s[static_cast<std::size_t>(a * n + b)];
  }
  const double scale = trace > 0 ? total / trace : 0.0;
  for (int a = 0; a < n; ++a)
    for (int i = 0; i < d; ++i) diag[static_cast<std::size_t>(d * a + i)] = scale * s[static_cast<std::size_t>(a * n + a)];
}

void assemble_mass(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active, const DensityOf& density_of,
                   SparseMatrix& mm) {
  std::fill(mm.valuePtr(), mm.valuePtr() + mm.nonZeros(), 0.0);
  const int n = m.npc();
  const int d = dofs_per_node(kin);
  const long nc = static_cast<long>(m.n_cells());
  const int* outer = mm.outerIndexPtr();
  const int* rows = mm.innerIndexPtr();
  double* vals = mm.valuePtr();
  std::exception_ptr error;
#pragma omp parallel
  {
    std::array<double, max_cell_nodes * max_cell_nodes> s{};
#pragma omp for schedule(dynamic, 512)
    for (long c = 0; c < nc; ++c) {
      const auto cu = static_cast<std::size_t>(c);
      if (!active[cu] || !detail::cell_mass(m, cu, density_of, kin, s, error)) continue;
      const int* v = m.cell(cu);
      for (int b = 0; b < n; ++b)
        for (int i = 0; i < d; ++i) {
          const int col = d * v[b] + i;
          const int* first = rows + outer[col];
          const int* last = rows + outer[col + 1];
          for (int a = 0; a < n; ++a) {
            const int row = d * v[a] + i;
            if (row < col) continue;
            const auto pos = std::lower_bound(first, last, row) - rows;
#pragma omp atomic
            vals[pos] += s[static_cast<std::size_t>(a * n + b)];
          }
        }
    }
  }
  if (error) std::rethrow_exception(error);
}

Vector assemble_lumped_mass(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                            const DensityOf& density_of) {
  const int n = m.npc();
  const int d = dofs_per_node(kin);
  Vector out = Vector::Zero(static_cast<Eigen::Index>(d) * static_cast<Eigen::Index>(m.n_nodes()));
  double* o = out.data();
  const long nc = static_cast<long>(m.n_cells());
  std::exception_ptr error;
#pragma omp parallel
  {
    std::array<double, 3 * max_cell_nodes> diag{};
#pragma omp for schedule(dynamic, 512)
    for (long c = 0; c < nc; ++c) {
      const auto cu = static_cast<std::size_t>(c);
      if (!active[cu]) continue;
      try {
        lumped_mass(m, cu, density_of(cu), kin, diag);
      } catch (...) {
#pragma omp critical(voidsign_mass_error)
        if (!error) error = std::current_exception();
        continue;
      }
      const int* v = m.cell(cu);
      for (int a = 0; a < n; ++a)
        for (int i = 0; i < d; ++i) {
#pragma omp atomic
          o[d * v[a] + i] += diag[static_cast<std::size_t>(d * a + i)];
        }
    }
  }
  if (error) std::rethrow_exception(error);
  return out;
}

void constrain_mass(SparseMatrix& mm, const std::vector<char>& fixed) {
  const int n = static_cast<int>(mm.cols());
  const int* outer = mm.outerIndexPtr();
  const int* rows = mm.innerIndexPtr();
  double* vals = mm.valuePtr();
  for (int j = 0; j < n; ++j)
    for (int p = outer[j]; p < outer[j + 1]; ++p)
      if (fixed[static_cast<std::size_t>(j)] || fixed[static_cast<std::size_t>(rows[p])]) vals[p] = 0;
}

void constrain_lumped_mass(Vector& mass, const std::vector<char>& fixed) {
  for (Eigen::Index j = 0; j < mass.size(); ++j)
    if (fixed[static_cast<std::size_t>(j)]) mass[j] = 0;
}

}  // namespace voidsign::solver
