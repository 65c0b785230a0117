// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/fe/pml.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace voidsign::solver {

namespace {

// Symmetric 14-point tetrahedron rule of degree 5 (weights for the reference volume 1/6).
constexpr double t5a = 0.0927352503108912, t5b = 0.3108859192633006, t5c = 0.4544962958743504;
constexpr double t5wa = 0.01224884051939366, t5wb = 0.01878132095300264, t5wc = 0.007091003462846911;
constexpr double t5a3 = 1 - 3 * t5a, t5b3 = 1 - 3 * t5b, t5c2 = 0.5 - t5c;
constexpr QuadPoint tet14[] = {
    {t5a, t5a, t5a, t5wa},    {t5a3, t5a, t5a, t5wa},   {t5a, t5a3, t5a, t5wa},   {t5a, t5a, t5a3, t5wa},
    {t5b, t5b, t5b, t5wb},    {t5b3, t5b, t5b, t5wb},   {t5b, t5b3, t5b, t5wb},   {t5b, t5b, t5b3, t5wb},
    {t5c, t5c, t5c2, t5wc},   {t5c, t5c2, t5c, t5wc},   {t5c, t5c2, t5c2, t5wc},  {t5c2, t5c, t5c, t5wc},
    {t5c2, t5c, t5c2, t5wc},  {t5c2, t5c2, t5c, t5wc}};

void require_supported(Kinematics k) {
  if (k == Kinematics::axisymmetric)
    throw std::invalid_argument("frequency-domain elements: axisymmetric kinematics is not supported (plane strain or 3D)");
}

// Depth into a band whose inner edge is `edge`, growing in the direction `sign` (±1).
double into(double v, double edge, double sign) { return std::max(0.0, sign * (v - edge)); }

}  // namespace

double pml_attenuation(double thickness, double c_fast, double reflection, int order) {
  if (!(thickness > 0) || !(c_fast > 0) || !(reflection > 0 && reflection < 1) || order < 0)
    throw std::invalid_argument("pml_attenuation: need thickness > 0, speed > 0, 0 < reflection < 1, order >= 0");
  return (order + 1) * c_fast * std::log(1 / reflection) / (2 * thickness);
}

double pml_reflection(const PmlLayout& pml, double c, double angle) {
  if (!(pml.thickness > 0)) return 1.0;
  return std::exp(-2 * std::cos(angle) * pml.omega0 * pml.thickness / ((pml.order + 1) * c));
}

PmlLayout pml_layout(const mesh::Mesh& m, double thickness, double omega0, int order, double kappa0) {
  PmlLayout p;
  p.thickness = thickness;
  p.omega0 = omega0;
  p.kappa0 = kappa0;
  p.order = order;
  p.three_d = m.dim() == 3;
  p.x_lo = m.x_min + thickness;
  p.x_hi = m.x_max - thickness;
  p.y_lo = m.y_min + thickness;
  p.y_hi = m.y_max - thickness;
  p.z_lo = m.z_min + thickness;
  if (thickness > 0 && (p.x_lo >= p.x_hi || p.z_lo >= m.z_max || (p.three_d && p.y_lo >= p.y_hi)))
    throw std::invalid_argument("pml_layout: the absorbing band is thicker than the block allows");
  return p;
}

bool in_pml(const PmlLayout& pml, const std::array<double, 3>& x) {
  if (!(pml.thickness > 0)) return false;
  if (x[0] < pml.x_lo || x[0] > pml.x_hi || x[2] < pml.z_lo) return true;
  return pml.three_d && (x[1] < pml.y_lo || x[1] > pml.y_hi);
}

std::array<Complex, 3> pml_stretch(const PmlLayout& pml, double x, double y, double z, double omega) {
  std::array<Complex, 3> s{1.0, 1.0, 1.0};
  if (!(pml.thickness > 0)) return s;
  const double ell[3] = {std::max(into(x, pml.x_lo, -1), into(x, pml.x_hi, 1)),
                         pml.three_d ? std::max(into(y, pml.y_lo, -1), into(y, pml.y_hi, 1)) : 0.0,
                         into(z, pml.z_lo, -1)};
  for (int i = 0; i < 3; ++i) {
    if (ell[i] <= 0) continue;
    const double g = std::pow(std::min(ell[i] / pml.thickness, 1.0), pml.order);
    // e^{iωt}: an outgoing wave e^{−ik x̃} decays when Im x̃ < 0, hence the minus sign.
    s[static_cast<std::size_t>(i)] = Complex(1 + pml.kappa0 * g, -pml.omega0 * g / omega);
  }
  return s;
}

std::span<const QuadPoint> dynamic_quadrature(mesh::CellType t) {
  if (mesh::dim_of(t) == 2) return accurate_quadrature(t);
  return std::span<const QuadPoint>(tet14);
}

void dynamic_stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, double damping, Kinematics k,
                       double omega, const PmlLayout* pml, std::span<Complex> se) {
  require_supported(k);
  const int n = m.npc();
  const int d = dofs_per_node(k);
  const int nd = n * d;
  std::fill(se.begin(), se.begin() + nd * nd, Complex(0.0));
  const double nu = mat.poisson;
  const Complex f = hysteretic_factor(damping);
  const Complex lambda = f * (mat.young * nu / ((1 + nu) * (1 - 2 * nu)));
  const Complex mu = f * (mat.young / (2 * (1 + nu)));
  const double w2rho = omega * omega * mat.density;
  for (const QuadPoint& q : dynamic_quadrature(m.type)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    std::array<Complex, 3> s{1.0, 1.0, 1.0};
    if (pml) s = pml_stretch(*pml, sh.x, sh.y, sh.z, omega);
    // Physical components used: (x, z) in plane strain, (x, y, z) in 3D.
    const Complex jac = d == 2 ? s[0] * s[2] : s[0] * s[1] * s[2];
    const Complex wj = q.w * sh.detj * jac;
    Complex g[max_cell_nodes][3];
    for (int a = 0; a < n; ++a) {
      if (d == 2) {
        g[a][0] = sh.dx[a] / s[0];
        g[a][1] = sh.dz[a] / s[2];
      } else {
        g[a][0] = sh.dx[a] / s[0];
        g[a][1] = sh.dy[a] / s[1];
        g[a][2] = sh.dz[a] / s[2];
      }
    }
    // S_{ai,bj} += wJ [λ g_i^a g_j^b + μ g_j^a g_i^b + δ_ij (μ g^a·g^b − ω² ρ N_a N_b)].
    for (int a = 0; a < n; ++a) {
      Complex lg[3], mg[3];
      for (int i = 0; i < d; ++i) {
        lg[i] = wj * lambda * g[a][i];
        mg[i] = wj * mu * g[a][i];
      }
      const Complex mass_a = wj * (w2rho * sh.N[a]);
      for (int b = a; b < n; ++b) {
        Complex dot = 0;
        for (int i = 0; i < d; ++i) dot += mg[i] * g[b][i];
        const Complex diag = dot - mass_a * sh.N[b];
        for (int i = 0; i < d; ++i)
          for (int j = 0; j < d; ++j) {
            Complex v = lg[i] * g[b][j] + mg[j] * g[b][i];
            if (i == j) v += diag;
            se[static_cast<std::size_t>((d * a + i) * nd + d * b + j)] += v;
          }
      }
    }
  }
  // Mirror the upper block triangle (b >= a) into the lower one: S is symmetric.
  for (int a = 0; a < n; ++a)
    for (int b = a + 1; b < n; ++b)
      for (int i = 0; i < d; ++i)
        for (int j = 0; j < d; ++j)
          se[static_cast<std::size_t>((d * b + j) * nd + d * a + i)] = se[static_cast<std::size_t>((d * a + i) * nd + d * b + j)];
}

void dynamic_parts(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k, std::span<double> ke,
                   std::span<double> me) {
  require_supported(k);
  stiffness(m, c, mat, k, ke);
  const int n = m.npc();
  const int d = dofs_per_node(k);
  const int nd = n * d;
  std::fill(me.begin(), me.begin() + nd * nd, 0.0);
  for (const QuadPoint& q : dynamic_quadrature(m.type)) {
    const ShapeAt sh = shape_at(m, c, q.r, q.s, q.t);
    const double w = q.w * sh.detj * mat.density;
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b) {
        const double v = w * sh.N[a] * sh.N[b];
        for (int i = 0; i < d; ++i) me[static_cast<std::size_t>((d * a + i) * nd + d * b + i)] += v;
      }
  }
}

}  // namespace voidsign::solver
