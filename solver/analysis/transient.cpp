// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/transient.hpp"

#include <omp.h>

#include <Eigen/Dense>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>
#include <numbers>
#include <optional>
#include <stdexcept>
#include <string>

#include "solver/analysis/drm.hpp"
#include "solver/fe/mass.hpp"

namespace voidsign::solver {

namespace {

constexpr double pi = std::numbers::pi;

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

// Wave speeds of an isotropic material: V_p = √((λ + 2μ)/ρ), V_s = √(μ/ρ).
std::array<double, 2> wave_speeds(const Elastic& e) {
  const double mu = e.young / (2 * (1 + e.poisson));
  const double lam = e.young * e.poisson / ((1 + e.poisson) * (1 - 2 * e.poisson));
  return {std::sqrt((lam + 2 * mu) / e.density), std::sqrt(mu / e.density)};
}

void check_problem(const TransientProblem& p) {
  if (p.mesh == nullptr) throw std::invalid_argument("transient: no mesh");
  const auto& m = *p.mesh;
  if ((p.kinematics == Kinematics::solid) != (m.dim() == 3))
    throw std::invalid_argument("transient: kinematics does not match the mesh dimension");
  for (int l : m.layer)
    if (l < 0 || static_cast<std::size_t>(l) >= p.layers.size())
      throw std::invalid_argument("transient: a cell's layer tag has no material");
  for (const auto& l : p.layers) {
    if (!(l.elastic.young > 0) || !(l.elastic.density > 0) || !(l.elastic.poisson > -1 && l.elastic.poisson < 0.5))
      throw std::invalid_argument("transient: a layer has no valid elastic constants");
    if (!(l.damping >= 0 && l.damping < 1)) throw std::invalid_argument("transient: damping ratio outside [0, 1)");
  }
  if (!(p.duration_s > 0)) throw std::invalid_argument("transient: duration must be > 0");
  if (p.time_step_s < 0) throw std::invalid_argument("transient: time step must be >= 0");
  if (!(p.safety > 0 && p.safety <= 1)) throw std::invalid_argument("transient: safety must be in (0, 1]");
  if (p.receiver_every < 1) throw std::invalid_argument("transient: receiver_every must be >= 1");
  for (int r : p.receivers)
    if (r < 0 || static_cast<std::size_t>(r) >= m.n_nodes()) throw std::invalid_argument("transient: receiver node out of range");
  if (p.wave) {
    if (p.kinematics == Kinematics::axisymmetric)
      throw std::invalid_argument("transient: plane waves need a plane-strain or 3D model");
    if (!(p.wave->peak_hz > 0)) throw std::invalid_argument("transient: the plane wave's peak frequency must be > 0");
    if (!(p.wave->wave.amplitude > 0)) throw std::invalid_argument("transient: the plane wave's amplitude must be > 0");
    if (p.wave->delay_s < 0) throw std::invalid_argument("transient: the plane wave's delay must be >= 0");
    if (p.boundary != OuterBoundary::absorbing)
      throw std::invalid_argument("transient: plane waves need the absorbing outer boundary");
  } else if (!(p.source.wavelet.peak_hz > 0)) {
    throw std::invalid_argument("transient: Ricker peak frequency must be > 0");
  }
}

double peak_frequency(const TransientProblem& p) { return p.wave ? p.wave->peak_hz : p.source.wavelet.peak_hz; }

std::vector<RayleighDamping> layer_damping(const TransientProblem& p) {
  std::vector<RayleighDamping> out(p.layers.size());
  double f1 = p.damping_f1_hz, f2 = p.damping_f2_hz;
  if (f1 == 0 && f2 == 0) {
    f1 = peak_frequency(p) / 3;
    f2 = peak_frequency(p) * 3;
  }
  for (std::size_t l = 0; l < p.layers.size(); ++l) {
    if (!(p.layers[l].damping > 0)) continue;
    if (p.damping_fit == TransientProblem::DampingFit::mass_proportional)
      out[l] = {2 * p.layers[l].damping * 2 * pi * std::sqrt(f1 * f2), 0.0};
    else
      out[l] = fit_rayleigh(p.layers[l].damping, f1, f2);
  }
  return out;
}

std::vector<char> active_cells(const mesh::Mesh& m, bool voided) {
  std::vector<char> a(m.n_cells(), 1);
  if (voided)
    for (std::size_t c = 0; c < m.n_cells(); ++c) a[c] = m.void_id[c] < 0;
  return a;
}

bool is_outer(mesh::FacetKind k) { return k != mesh::FacetKind::surface && k != mesh::FacetKind::void_wall; }

// In axisymmetry the left face x = x_min = 0 is the axis.
bool is_axis(const TransientProblem& p, mesh::FacetKind k) {
  return p.kinematics == Kinematics::axisymmetric && k == mesh::FacetKind::left && std::abs(p.mesh->x_min) < 1e-12;
}

// Component of the unknowns normal to an outer face.
int normal_component(mesh::FacetKind k, Kinematics kin) {
  switch (k) {
    case mesh::FacetKind::left:
    case mesh::FacetKind::right: return 0;
    case mesh::FacetKind::front:
    case mesh::FacetKind::back: return 1;
    default: return vertical_dof(kin);
  }
}

// HRZ-lumped weights ∫ w dA shared over a facet's nodes (w = r in axisymmetry, else 1): the
// diagonal of the facet's consistent "mass" ∫ N_a² w dA scaled to sum to ∫ w dA, which keeps
// every share positive (the row sums of a quadratic triangle's corners are zero).
int facet_shares(const TransientProblem& p, const mesh::Facet& f, std::array<double, 6>& share) {
  const auto& m = *p.mesh;
  const int nf = mesh::nodes_per_facet(m.type);
  if (m.dim() == 2) {
    // Four-point Gauss–Legendre on the isoparametric edge (exact for N_a² r on straight edges).
    static constexpr double g[4] = {-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526};
    static constexpr double gw[4] = {0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538};
    std::array<double, 3> diag{0, 0, 0};
    double total = 0;
    for (int q = 0; q < 4; ++q) {
      const double s = g[q];
      std::array<double, 3> n{}, dn{};
      if (nf == 2) {
        n = {0.5 * (1 - s), 0.5 * (1 + s), 0};
        dn = {-0.5, 0.5, 0};
      } else {
        n = {0.5 * s * (s - 1), 0.5 * s * (s + 1), 1 - s * s};
        dn = {s - 0.5, s + 0.5, -2 * s};
      }
      double x = 0, dx = 0, dz = 0;
      for (int a = 0; a < nf; ++a) {
        const auto& pt = m.nodes[static_cast<std::size_t>(f.nodes[a])];
        x += n[a] * pt[0];
        dx += dn[a] * pt[0];
        dz += dn[a] * pt[2];
      }
      const double w = gw[q] * std::hypot(dx, dz) * (p.kinematics == Kinematics::axisymmetric ? x : 1.0);
      total += w;
      for (int a = 0; a < nf; ++a) diag[a] += n[a] * n[a] * w;
    }
    const double sum = diag[0] + diag[1] + diag[2];
    for (int a = 0; a < nf; ++a) share[a] = diag[a] / sum * total;
  } else {
    const auto& p0 = m.nodes[static_cast<std::size_t>(f.nodes[0])];
    const auto& p1 = m.nodes[static_cast<std::size_t>(f.nodes[1])];
    const auto& p2 = m.nodes[static_cast<std::size_t>(f.nodes[2])];
    const double a[3] = {p1[0] - p0[0], p1[1] - p0[1], p1[2] - p0[2]};
    const double b[3] = {p2[0] - p0[0], p2[1] - p0[1], p2[2] - p0[2]};
    const double area = 0.5 * std::sqrt(std::pow(a[1] * b[2] - a[2] * b[1], 2) + std::pow(a[2] * b[0] - a[0] * b[2], 2) +
                                        std::pow(a[0] * b[1] - a[1] * b[0], 2));
    // Flat triangles: HRZ gives 1/3 each (3 nodes), or corners 1/19 and midsides 16/57 (6 nodes),
    // from the consistent diagonals A/6 and A/30, 8A/45.
    for (int k = 0; k < nf; ++k) share[k] = area * (nf == 3 ? 1.0 / 3 : (k < 3 ? 1.0 / 19 : 16.0 / 57));
  }
  return nf;
}

// Runs `f` with one OpenMP thread: the parallel assemblies add with atomics in a varying order,
// and the two models must get bit-identical entries wherever their cells agree.
template <class F>
void serially(F&& f) {
  const int n = omp_get_max_threads();
  omp_set_num_threads(1);
  try {
    f();
  } catch (...) {
    omp_set_num_threads(n);
    throw;
  }
  omp_set_num_threads(n);
}

// One explicit step over rows [0, n): with Dual the stiffness-proportional damping streams its
// own values (β differs between layers), else w = u + βv was formed beforehand (or is u).
template <bool Dual>
void step_rows(std::int64_t n, const std::int64_t* row, const int* col, const double* val, const double* valb,
               const double* w, const double* u, const double* v, const double* a, const double* b, double dt,
               double* un, double* vn) {
#pragma omp parallel for schedule(static)
  for (std::int64_t i = 0; i < n; ++i) {
    double s = 0;
    for (std::int64_t k = row[i]; k < row[i + 1]; ++k) {
      if constexpr (Dual)
        s += val[k] * u[col[k]] + valb[k] * v[col[k]];
      else
        s += val[k] * w[col[k]];
    }
    const double vi = a[i] * v[i] - b[i] * s;
    vn[i] = vi;
    un[i] = u[i] + dt * vi;
  }
}

// The same step over node blocks of D unknowns (block-row CSR, D × D values row-major per
// block, one column index per block): the column indices, a quarter (2D) or a ninth (3D) of the
// CSR's, are a quarter of the bytes the step streams.
template <int D, bool Dual>
void step_blocks(std::int64_t nb, const std::int64_t* brow, const int* bcol, const double* bval, const double* bvalb,
                 const double* w, const double* u, const double* v, const double* a, const double* b, double dt, double* un,
                 double* vn) {
#pragma omp parallel for schedule(static)
  for (std::int64_t I = 0; I < nb; ++I) {
    double s[D] = {};
    for (std::int64_t k = brow[I]; k < brow[I + 1]; ++k) {
      const std::int64_t j0 = static_cast<std::int64_t>(bcol[k]) * D;
      const double* blk = bval + k * D * D;
      if constexpr (Dual) {
        const double* blb = bvalb + k * D * D;
        for (int r = 0; r < D; ++r)
          for (int c = 0; c < D; ++c) s[r] += blk[r * D + c] * u[j0 + c] + blb[r * D + c] * v[j0 + c];
      } else {
        for (int r = 0; r < D; ++r)
          for (int c = 0; c < D; ++c) s[r] += blk[r * D + c] * w[j0 + c];
      }
    }
    for (int r = 0; r < D; ++r) {
      const std::int64_t i = I * D + r;
      const double vi = a[i] * v[i] - b[i] * s[r];
      vn[i] = vi;
      un[i] = u[i] + dt * vi;
    }
  }
}

}  // namespace

RayleighDamping fit_rayleigh(double damping, double f1_hz, double f2_hz) {
  if (!(f1_hz > 0 && f2_hz >= f1_hz)) throw std::invalid_argument("fit_rayleigh: need 0 < f1 <= f2");
  const double w1 = 2 * pi * f1_hz, w2 = 2 * pi * f2_hz;
  return {2 * damping * w1 * w2 / (w1 + w2), 2 * damping / (w1 + w2)};
}

double Ricker::delay() const { return delay_s > 0 ? delay_s : 1.5 / peak_hz; }

double Ricker::operator()(double t) const {
  const double a = pi * peak_hz * (t - delay());
  return amplitude * (1 - 2 * a * a) * std::exp(-a * a);
}

ExplicitModel::ExplicitModel(const TransientProblem& p, bool voided, double dt) : p_(&p), dt_(dt), voided_(voided) {
  check_problem(p);
  if (!(dt > 0)) throw std::invalid_argument("transient: time step must be > 0");
  const auto t0 = std::chrono::steady_clock::now();
  const auto& m = *p.mesh;
  const Kinematics kin = p.kinematics;
  d_ = dofs_per_node(kin);
  const std::size_t nd = static_cast<std::size_t>(d_) * m.n_nodes();
  active_ = active_cells(m, voided);
  const auto damping = layer_damping(p);

  auto material_of = [&](std::size_t c) -> const Elastic& { return p.layers[static_cast<std::size_t>(m.layer[c])].elastic; };
  auto density_of = [&](std::size_t c) { return p.layers[static_cast<std::size_t>(m.layer[c])].elastic.density; };
  SparseMatrix k = stiffness_pattern(m);
  Vector lumped, lumped_alpha;
  bool any_alpha = false, dual = false;
  beta_ = damping.empty() ? 0 : damping[0].beta;
  for (const auto& r : damping) {
    any_alpha = any_alpha || r.alpha != 0;
    dual = dual || r.beta != beta_;
  }
  SparseMatrix kb;
  serially([&] {
    assemble_stiffness(m, kin, active_, material_of, k);
    lumped = assemble_lumped_mass(m, kin, active_, density_of);
    if (any_alpha)
      lumped_alpha = assemble_lumped_mass(m, kin, active_, [&](std::size_t c) {
        return damping[static_cast<std::size_t>(m.layer[c])].alpha * density_of(c);
      });
    if (dual) {
      // Σ β_e K_e: the stiffness is linear in E at fixed ν.
      std::vector<Elastic> scaled(p.layers.size());
      for (std::size_t l = 0; l < p.layers.size(); ++l) {
        scaled[l] = p.layers[l].elastic;
        scaled[l].young *= damping[l].beta;
      }
      kb = stiffness_pattern(m);
      assemble_stiffness(m, kin, active_, [&](std::size_t c) -> const Elastic& {
        return scaled[static_cast<std::size_t>(m.layer[c])];
      }, kb);
    }
  });
  if (dual) beta_ = 0;

  // Constraints: fixed faces, the axis, and every dof without mass (void interiors).
  std::vector<char> fixed(nd, 0);
  Vector dash = Vector::Zero(static_cast<Eigen::Index>(nd));
  for (const auto& f : m.facets) {
    if (!is_outer(f.kind) || !active_[static_cast<std::size_t>(f.cell)]) continue;
    const int nf = mesh::nodes_per_facet(m.type);
    if (is_axis(p, f.kind)) {
      for (int a = 0; a < nf; ++a) fixed[static_cast<std::size_t>(d_ * f.nodes[a])] = 1;
      continue;
    }
    if (p.boundary == OuterBoundary::fixed) {
      for (int a = 0; a < nf; ++a)
        for (int j = 0; j < d_; ++j) fixed[static_cast<std::size_t>(d_ * f.nodes[a] + j)] = 1;
    } else if (p.boundary == OuterBoundary::absorbing) {
      // Lysmer & Kuhlemeyer (1969): t = −ρV_p v_n n − ρV_s v_t.
      const auto& e = p.layers[static_cast<std::size_t>(m.layer[static_cast<std::size_t>(f.cell)])].elastic;
      const auto [vp, vs] = wave_speeds(e);
      std::array<double, 6> share{};
      facet_shares(p, f, share);
      const int nc = normal_component(f.kind, kin);
      for (int a = 0; a < nf; ++a)
        for (int j = 0; j < d_; ++j)
          dash[d_ * f.nodes[a] + j] += share[static_cast<std::size_t>(a)] * e.density * (j == nc ? vp : vs);
    }
  }
  reduced_.assign(nd, -1);
  for (std::size_t j = 0; j < nd; ++j)
    if (!fixed[j] && lumped[static_cast<Eigen::Index>(j)] > 0) {
      reduced_[j] = static_cast<int>(free_.size());
      free_.push_back(static_cast<int>(j));
    }

  // Reduced full-storage rows (CSR): K = L + Lᵀ − diag(L), restricted to the free unknowns.
  Eigen::SparseMatrix<double, Eigen::RowMajor, int> full = k.selfadjointView<Eigen::Lower>();
  Eigen::SparseMatrix<double, Eigen::RowMajor, int> fullb;
  if (dual) fullb = kb.selfadjointView<Eigen::Lower>();
  full.makeCompressed();
  fullb.makeCompressed();
  const std::size_t n = free_.size();
  row_.assign(n + 1, 0);
  for (std::size_t i = 0; i < n; ++i) {
    std::int64_t cnt = 0;
    for (Eigen::SparseMatrix<double, Eigen::RowMajor, int>::InnerIterator it(full, free_[i]); it; ++it)
      cnt += reduced_[static_cast<std::size_t>(it.col())] >= 0;
    row_[i + 1] = row_[i] + cnt;
  }
  col_.resize(static_cast<std::size_t>(row_[n]));
  val_.resize(col_.size());
  if (dual) val_beta_.resize(col_.size());
  // Both matrices come from the same pattern, so their entries share positions.
  const int* fo = full.outerIndexPtr();
  const int* fi = full.innerIndexPtr();
  const double* fv = full.valuePtr();
  const double* fb = dual ? fullb.valuePtr() : nullptr;
  for (std::size_t i = 0; i < n; ++i) {
    std::int64_t q = row_[i];
    for (int e = fo[free_[i]]; e < fo[free_[i] + 1]; ++e) {
      const int r = reduced_[static_cast<std::size_t>(fi[e])];
      if (r < 0) continue;
      const auto qq = static_cast<std::size_t>(q++);
      col_[qq] = r;
      val_[qq] = fv[e];
      if (dual) val_beta_[qq] = fb[e];
    }
  }

  block_rows();
  if (p.wave) build_drm(p, damping);

  // Step coefficients: v⁺ = a v⁻ − b (K w − f), a = (m/Δt − D/2)/(m/Δt + D/2), b = 1/(m/Δt + D/2).
  mass_.resize(n);
  a_.resize(n);
  b_.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const auto j = static_cast<Eigen::Index>(free_[i]);
    mass_[i] = lumped[j];
    const double dd = dash[j] + (any_alpha ? lumped_alpha[j] : 0.0);
    const double den = mass_[i] / dt + 0.5 * dd;
    a_[i] = (mass_[i] / dt - 0.5 * dd) / den;
    b_[i] = 1 / den;
  }
  setup_seconds_ = seconds_since(t0);
}

void ExplicitModel::block_rows() {
  // Blocked when the free unknowns come in whole nodes (no single held component: no axis, no
  // fixed faces) and every coupling is a full d × d block, as the FE pattern gives.
  const int d = d_;
  const std::size_t n = free_.size();
  if (n == 0 || n % static_cast<std::size_t>(d) != 0) return;
  for (std::size_t i = 0; i < n; ++i)
    if (free_[i] != free_[i - i % static_cast<std::size_t>(d)] + static_cast<int>(i % static_cast<std::size_t>(d)) ||
        free_[i - i % static_cast<std::size_t>(d)] % d != 0)
      return;
  const std::size_t nb = n / static_cast<std::size_t>(d);
  for (std::size_t I = 0; I < nb; ++I) {
    const std::int64_t len = row_[I * static_cast<std::size_t>(d) + 1] - row_[I * static_cast<std::size_t>(d)];
    if (len % d != 0) return;
    for (int r = 1; r < d; ++r) {
      const std::size_t i = I * static_cast<std::size_t>(d) + static_cast<std::size_t>(r);
      if (row_[i + 1] - row_[i] != len) return;
    }
    // Columns ascend within a row: each block is d consecutive columns starting at a multiple of d,
    // the same in every row of the block row.
    for (int r = 0; r < d; ++r) {
      const std::size_t i = I * static_cast<std::size_t>(d) + static_cast<std::size_t>(r);
      for (std::int64_t k = row_[i]; k < row_[i + 1]; ++k) {
        const std::int64_t q = k - row_[i];
        const int expected = col_[static_cast<std::size_t>(row_[I * static_cast<std::size_t>(d)] + q - q % d)] +
                             static_cast<int>(q % d);
        if (col_[static_cast<std::size_t>(k)] != expected || (q % d == 0 && col_[static_cast<std::size_t>(k)] % d != 0)) return;
      }
    }
  }
  const bool dual = !val_beta_.empty();
  brow_.assign(nb + 1, 0);
  for (std::size_t I = 0; I < nb; ++I) brow_[I + 1] = brow_[I] + (row_[I * static_cast<std::size_t>(d) + 1] - row_[I * static_cast<std::size_t>(d)]) / d;
  const auto n_blocks = static_cast<std::size_t>(brow_[nb]);
  bcol_.resize(n_blocks);
  bval_.resize(n_blocks * static_cast<std::size_t>(d * d));
  if (dual) bvalb_.resize(bval_.size());
  for (std::size_t I = 0; I < nb; ++I)
    for (int r = 0; r < d; ++r) {
      const std::size_t i = I * static_cast<std::size_t>(d) + static_cast<std::size_t>(r);
      for (std::int64_t k = row_[i]; k < row_[i + 1]; ++k) {
        const std::int64_t q = k - row_[i];
        const auto blk = static_cast<std::size_t>(brow_[I] + q / d);
        const auto c = static_cast<std::size_t>(q % d);
        if (r == 0 && c == 0) bcol_[blk] = col_[static_cast<std::size_t>(k)] / d;
        const std::size_t at = blk * static_cast<std::size_t>(d * d) + static_cast<std::size_t>(r * d) + c;
        bval_[at] = val_[static_cast<std::size_t>(k)];
        if (dual) bvalb_[at] = val_beta_[static_cast<std::size_t>(k)];
      }
    }
  block_ = d;
  // The CSR arrays are no longer needed: keep the memory for the blocks only.
  std::vector<std::int64_t>().swap(row_);
  std::vector<int>().swap(col_);
  std::vector<double>().swap(val_);
  std::vector<double>().swap(val_beta_);
}

void ExplicitModel::build_drm(const TransientProblem& p, const std::vector<RayleighDamping>& damping) {
  const auto& m = *p.mesh;
  std::vector<double> thickness;
  for (const auto& l : p.layers) thickness.push_back(l.thickness);
  DrmLayer layer = drm_layer(m, p.wave->box, {m.x_min, m.x_max, m.y_min, m.y_max, m.z_min}, {}, thickness, "transient");
  inside_ = std::move(layer.inside);
  drm_box_ = layer.box;
  drm_cells_ = layer.cells.size();
  std::vector<char> outer(m.n_nodes(), 0);
  const int nf = mesh::nodes_per_facet(m.type);
  for (const auto& f : m.facets)
    if (is_outer(f.kind))
      for (int a = 0; a < nf; ++a) outer[static_cast<std::size_t>(f.nodes[a])] = 1;
  const int d = d_;
  const int nd = m.npc() * d;
  std::vector<double> ke(static_cast<std::size_t>(nd * nd));
  std::vector<int> slot(m.n_nodes(), -1), row_of(free_.size(), -1);
  std::vector<Eigen::Triplet<double, int>> tk, tb;
  for (const DrmLayer::Cell& lc : layer.cells) {
    const int* v = m.cell(lc.cell);
    for (int a = 0; a < m.npc(); ++a)
      if (outer[static_cast<std::size_t>(v[a])])
        throw std::invalid_argument("transient: the DRM box reaches the block's outer faces (its layer of cells touches the "
                                    "dashpots): make the box smaller or the block larger");
    const auto lj = static_cast<std::size_t>(m.layer[lc.cell]);
    stiffness(m, lc.cell, p.layers[lj].elastic, p.kinematics, ke);
    const double beta = damping[lj].beta;
    for (int r = 0; r < nd; ++r) {
      const bool rb = lc.on_boundary[static_cast<std::size_t>(r / d)];
      const int rr = reduced_[static_cast<std::size_t>(d * v[r / d] + r % d)];
      if (rr < 0) continue;
      int& row = row_of[static_cast<std::size_t>(rr)];
      if (row < 0) {
        row = static_cast<int>(drm_rows_.size());
        drm_rows_.push_back(rr);
      }
      for (int c = 0; c < nd; ++c) {
        if (lc.on_boundary[static_cast<std::size_t>(c / d)] == rb) continue;
        int& sl = slot[static_cast<std::size_t>(v[c / d])];
        if (sl < 0) {
          sl = static_cast<int>(drm_nodes_.size());
          drm_nodes_.push_back(v[c / d]);
        }
        // f_b = −K_be (u⁰_e + β v⁰_e), f_e = +K_eb (u⁰_b + β v⁰_b).
        const double val = (rb ? -1.0 : 1.0) * ke[static_cast<std::size_t>(r * nd + c)];
        tk.emplace_back(row, d * sl + c % d, val);
        if (beta != 0) tb.emplace_back(row, d * sl + c % d, beta * val);
      }
    }
  }
  const auto rows = static_cast<int>(drm_rows_.size()), cols = d * static_cast<int>(drm_nodes_.size());
  drm_k_.resize(rows, cols);
  drm_k_.setFromTriplets(tk.begin(), tk.end());
  drm_beta_.resize(rows, cols);
  drm_beta_.setFromTriplets(tb.begin(), tb.end());
}

void ExplicitModel::multiply(std::span<const double> x, std::span<double> y) const {
  if (block_ > 1) {
    const int d = block_;
    const auto nb = static_cast<std::int64_t>(brow_.size()) - 1;
#pragma omp parallel for schedule(static)
    for (std::int64_t I = 0; I < nb; ++I)
      for (int r = 0; r < d; ++r) {
        double sum = 0;
        for (std::int64_t k = brow_[static_cast<std::size_t>(I)]; k < brow_[static_cast<std::size_t>(I) + 1]; ++k)
          for (int c = 0; c < d; ++c)
            sum += bval_[static_cast<std::size_t>(k * d * d + r * d + c)] * x[static_cast<std::size_t>(bcol_[static_cast<std::size_t>(k)] * d + c)];
        y[static_cast<std::size_t>(I * d + r)] = sum;
      }
    return;
  }
  const auto n = static_cast<std::int64_t>(free_.size());
  const std::int64_t* row = row_.data();
  const int* col = col_.data();
  const double* val = val_.data();
#pragma omp parallel for schedule(static)
  for (std::int64_t i = 0; i < n; ++i) {
    double s = 0;
    for (std::int64_t k = row[i]; k < row[i + 1]; ++k) s += val[k] * x[static_cast<std::size_t>(col[k])];
    y[static_cast<std::size_t>(i)] = s;
  }
}

TransientTraces ExplicitModel::run(int n_steps, int source_node, const TransientCallbacks& cb,
                                   const PlaneWavePulse* pulse) const {
  const auto& p = *p_;
  const std::size_t n = free_.size();
  const auto nr = p.receivers.size();
  const std::size_t d = static_cast<std::size_t>(d_);
  TransientTraces out;
  out.active = active_;
  out.n_free = n;
  out.n_nonzeros = col_.size();
  out.setup_seconds = setup_seconds_;
  const int every = p.receiver_every;
  const std::size_t n_samples = n_steps > 0 ? static_cast<std::size_t>((n_steps - 1) / every + 1) : 0;
  out.time_s.resize(n_samples);
  out.u.assign(n_samples * nr * d, 0.0);
  if (p.record_energy) {
    out.energy.resize(n_samples);
    out.energy_plain.resize(n_samples);
  }

  // Receivers and source in the reduced numbering (−1: held at zero).
  std::vector<int> rec(nr * d, -1);
  for (std::size_t r = 0; r < nr; ++r)
    for (std::size_t j = 0; j < d; ++j) rec[r * d + j] = reduced_[static_cast<std::size_t>(p.receivers[r]) * d + j];
  std::array<int, 3> src{-1, -1, -1};
  std::array<double, 3> dir{0, 0, 0};
  if (source_node >= 0) {
    const auto& s = p.source.direction;
    const std::array<double, 3> dd = d == 3 ? s : std::array<double, 3>{s[0], s[2], 0};
    for (std::size_t j = 0; j < d; ++j) {
      src[j] = reduced_[static_cast<std::size_t>(source_node) * d + j];
      dir[j] = dd[j];
    }
  }

  // All state allocated here; the loop below allocates nothing.
  std::vector<double> u0(n, 0.0), u1(n, 0.0), v0(n, 0.0), v1(n, 0.0), w, scratch, snap;
  const bool dual = !val_beta_.empty() || !bvalb_.empty();
  if (!dual && beta_ != 0) w.assign(n, 0.0);
  if (p.record_energy) scratch.assign(n, 0.0);
  if (cb.snapshot && cb.snapshot_every > 0) snap.assign(d * p.mesh->n_nodes(), 0.0);
  double* u = u0.data();
  double* un = u1.data();
  double* v = v0.data();
  double* vn = v1.data();
  const auto ni = static_cast<std::int64_t>(n);
  const int progress_every = std::max(1, n_steps / 100);

  // Plane wave: free field at the DRM nodes, the effective forces, and the receivers outside the
  // box (their recorded motion is the scattered field plus the free field).
  const auto& mesh = *p.mesh;
  if (pulse && drm_nodes_.empty()) throw std::invalid_argument("transient: a plane-wave pulse for a model without a DRM layer");
  const auto n_drm = static_cast<Eigen::Index>(d * drm_nodes_.size());
  Eigen::VectorXd gu = Eigen::VectorXd::Zero(n_drm), gv = Eigen::VectorXd::Zero(n_drm), fd(drm_k_.rows());
  std::vector<std::size_t> rec_outside;
  if (pulse)
    for (std::size_t r = 0; r < nr; ++r)
      if (!inside_[static_cast<std::size_t>(p.receivers[r])]) rec_outside.push_back(r);
  auto free_field = [&](int node, double t, double* u_out, double* v_out) {
    const auto& x = mesh.nodes[static_cast<std::size_t>(node)];
    pulse->at(x[0], x[1], mesh.z_max - x[2], t, u_out, v_out);
  };

  const auto t0 = std::chrono::steady_clock::now();
  for (int step = 0; step < n_steps; ++step) {
    const double t = step * dt_;
    const bool sample = step % every == 0;
    if (sample) {
      const std::size_t s = static_cast<std::size_t>(step / every);
      out.time_s[s] = t;
      for (std::size_t q = 0; q < rec.size(); ++q)
        if (rec[q] >= 0) out.u[s * nr * d + q] = u[rec[q]];
      for (std::size_t r : rec_outside) {
        double uf[3], vf[3];
        free_field(p.receivers[r], t, uf, vf);
        for (std::size_t j = 0; j < d; ++j) out.u[(s * nr + r) * d + j] += uf[j];
      }
    }
    if (!snap.empty() && step % cb.snapshot_every == 0) {
      std::fill(snap.begin(), snap.end(), 0.0);
      for (std::size_t i = 0; i < n; ++i) snap[static_cast<std::size_t>(free_[i])] = u[i];
      if (pulse)
        for (std::size_t node = 0; node < mesh.n_nodes(); ++node)
          if (!inside_[node]) {
            double uf[3], vf[3];
            free_field(static_cast<int>(node), t, uf, vf);
            for (std::size_t j = 0; j < d; ++j) snap[node * d + j] += uf[j];
          }
      cb.snapshot(step, t, snap);
    }
    const double* wp = u;
    if (!w.empty()) {
      const double beta = beta_;
#pragma omp parallel for schedule(static)
      for (std::int64_t i = 0; i < ni; ++i) w[static_cast<std::size_t>(i)] = u[i] + beta * v[i];
      wp = w.data();
    }
    const auto nb = static_cast<std::int64_t>(brow_.size()) - 1;
    if (block_ == 2 && dual)
      step_blocks<2, true>(nb, brow_.data(), bcol_.data(), bval_.data(), bvalb_.data(), wp, u, v, a_.data(), b_.data(), dt_, un, vn);
    else if (block_ == 2)
      step_blocks<2, false>(nb, brow_.data(), bcol_.data(), bval_.data(), nullptr, wp, u, v, a_.data(), b_.data(), dt_, un, vn);
    else if (block_ == 3 && dual)
      step_blocks<3, true>(nb, brow_.data(), bcol_.data(), bval_.data(), bvalb_.data(), wp, u, v, a_.data(), b_.data(), dt_, un, vn);
    else if (block_ == 3)
      step_blocks<3, false>(nb, brow_.data(), bcol_.data(), bval_.data(), nullptr, wp, u, v, a_.data(), b_.data(), dt_, un, vn);
    else if (dual)
      step_rows<true>(ni, row_.data(), col_.data(), val_.data(), val_beta_.data(), wp, u, v, a_.data(), b_.data(), dt_, un,
                      vn);
    else
      step_rows<false>(ni, row_.data(), col_.data(), val_.data(), nullptr, wp, u, v, a_.data(), b_.data(), dt_, un, vn);
    if (pulse) {
      // u⁰ at t_n; v⁰ at t_n − Δt/2, where the scheme takes the velocity of its damping term
      // (only a stiffness-proportional damping term has one on the DRM layer).
      const bool damped = drm_beta_.nonZeros() > 0;
      double tmp[3];
      for (std::size_t k = 0; k < drm_nodes_.size(); ++k) {
        free_field(drm_nodes_[k], t, &gu[static_cast<Eigen::Index>(k * d)], tmp);
        if (damped) free_field(drm_nodes_[k], t - 0.5 * dt_, tmp, &gv[static_cast<Eigen::Index>(k * d)]);
      }
      fd.noalias() = drm_k_ * gu;
      if (damped) fd.noalias() += drm_beta_ * gv;
      for (Eigen::Index k = 0; k < fd.size(); ++k) {
        const auto i = static_cast<std::size_t>(drm_rows_[static_cast<std::size_t>(k)]);
        const double g = b_[i] * fd[k];
        vn[i] += g;
        un[i] += dt_ * g;
      }
    }
    const double f = pulse ? 0.0 : p.source.wavelet(t);
    for (std::size_t j = 0; j < d; ++j)
      if (src[j] >= 0) {
        const double g = b_[static_cast<std::size_t>(src[j])] * f * dir[j];
        vn[src[j]] += g;
        un[src[j]] += dt_ * g;
      }
    if (sample && p.record_energy) {
      multiply(std::span<const double>(u, n), scratch);
      double pot = 0, kin = 0, kin_plain = 0;
#pragma omp parallel for schedule(static) reduction(+ : pot, kin, kin_plain)
      for (std::int64_t i = 0; i < ni; ++i) {
        const double m = mass_[static_cast<std::size_t>(i)];
        pot += u[i] * scratch[static_cast<std::size_t>(i)];
        kin += m * v[i] * vn[i];
        const double vb = 0.5 * (v[i] + vn[i]);
        kin_plain += m * vb * vb;
      }
      const std::size_t s = static_cast<std::size_t>(step / every);
      out.energy[s] = 0.5 * (pot + kin);
      out.energy_plain[s] = 0.5 * (pot + kin_plain);
    }
    std::swap(u, un);
    std::swap(v, vn);
    if (cb.progress && ((step + 1) % progress_every == 0 || step + 1 == n_steps)) cb.progress(voided_ ? "with voids" : "without voids", static_cast<double>(step + 1) / n_steps);
  }
  out.loop_seconds = seconds_since(t0);
  return out;
}

std::array<double, 2> stable_time_step(const TransientProblem& p, bool voided, double beta_max) {
  check_problem(p);
  const auto& m = *p.mesh;
  const Kinematics kin = p.kinematics;
  const int nd = m.npc() * dofs_per_node(kin);
  const auto active = active_cells(m, voided);
  const auto nc = static_cast<std::int64_t>(m.n_cells());
  double lam_max = 0;
  std::exception_ptr error;
#pragma omp parallel reduction(max : lam_max)
  {
    std::vector<double> ke(static_cast<std::size_t>(nd * nd)), me(static_cast<std::size_t>(nd));
    Eigen::MatrixXd a(nd, nd);
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(nd);
#pragma omp for schedule(dynamic, 256)
    for (std::int64_t c = 0; c < nc; ++c) {
      const auto cu = static_cast<std::size_t>(c);
      if (!active[cu]) continue;
      try {
        const auto& e = p.layers[static_cast<std::size_t>(m.layer[cu])].elastic;
        stiffness(m, cu, e, kin, ke);
        lumped_mass(m, cu, e.density, kin, me);
        // Element eigenvalue inequality: λ_max(M⁻¹K) ≤ max_e λ_max(M_e⁻¹K_e) for assembled K, M.
        for (int i = 0; i < nd; ++i)
          for (int j = 0; j < nd; ++j)
            a(i, j) = ke[static_cast<std::size_t>(i * nd + j)] / std::sqrt(me[static_cast<std::size_t>(i)] * me[static_cast<std::size_t>(j)]);
        eig.compute(a, Eigen::EigenvaluesOnly);
        lam_max = std::max(lam_max, eig.eigenvalues()[nd - 1]);
      } catch (...) {
#pragma omp critical(voidsign_transient_error)
        if (!error) error = std::current_exception();
      }
    }
  }
  if (error) std::rethrow_exception(error);
  const double w = std::sqrt(lam_max);
  const double xi = 0.5 * beta_max * w;
  return {2 / w * (std::sqrt(1 + xi * xi) - xi), w};
}

double power_iteration_omega_max(const ExplicitModel& model, int iterations) {
  const std::size_t n = model.n_free();
  const auto& mass = model.mass();
  std::vector<double> x(n), y(n);
  for (std::size_t i = 0; i < n; ++i) x[i] = 1 + 0.5 * std::sin(1.7 * static_cast<double>(i));  // not orthogonal to the top mode
  double lam = 0;
  for (int it = 0; it < iterations; ++it) {
    double nx = 0;
    for (double v : x) nx += v * v;
    nx = std::sqrt(nx);
    for (std::size_t i = 0; i < n; ++i) x[i] /= nx * std::sqrt(mass[i]);  // M^{-½} x̂
    model.multiply(x, y);
    lam = 0;
    for (std::size_t i = 0; i < n; ++i) {
      y[i] /= std::sqrt(mass[i]);
      lam += y[i] * x[i] * std::sqrt(mass[i]);  // Rayleigh quotient x̂ᵀ A x̂
    }
    std::swap(x, y);
  }
  return std::sqrt(lam);
}

TransientEstimate estimate_transient(std::size_t n_dofs, std::size_t n_nonzeros, std::size_t n_steps, bool stiffness_damping,
                                     std::size_t n_recorded, int n_models, int block) {
  // Stored: CSR (8 B value + 4 B column per entry, or per block² entries when blocked, a second
  // value array for layer-wise β, 8 B per row pointer) and ~8 vectors of n (u, v twice each, w, mass, a, b); streamed per step: the
  // matrix once and ~7 vectors. The step is memory bound; kEffectiveBandwidth is what the loop
  // sustained on the 2-core development machine (tests/bench/transient/transient_bench.cpp).
  constexpr double kEffectiveBandwidth = 15.0e9;  // B/s (measured 18 GB/s with node blocks, 14 GB/s scalar CSR)
  const double nnz = static_cast<double>(n_nonzeros), n = static_cast<double>(n_dofs);
  const double index = 4.0 / (block * block);
  const double matrix = nnz * ((stiffness_damping ? 16.0 : 8.0) + index) + 8.0 * (n / block + 1);
  TransientEstimate e;
  e.bytes = matrix + 8.0 * 8.0 * n + 8.0 * static_cast<double>(n_recorded);
  e.seconds_per_step = (matrix + 7.0 * 8.0 * n) / kEffectiveBandwidth;
  e.seconds_total = e.seconds_per_step * static_cast<double>(n_steps) * n_models;
  return e;
}

TransientResult solve_transient(const TransientProblem& p, const TransientCallbacks& callbacks) {
  check_problem(p);
  TransientResult r;
  r.damping = layer_damping(p);
  r.receivers = p.receivers;
  double beta_max = 0;
  for (const auto& dmp : r.damping) beta_max = std::max(beta_max, dmp.beta);
  // The model with voids has a subset of the cells, so the reference bound holds for both and
  // both run on the same steps.
  const auto [dt_stable, w_bound] = stable_time_step(p, false, beta_max);
  r.stable_step_s = dt_stable;
  r.omega_max_bound = w_bound;
  if (p.time_step_s > dt_stable)
    throw std::invalid_argument("transient: time step " + std::to_string(p.time_step_s) + " s exceeds the stable step " +
                                std::to_string(dt_stable) + " s");
  r.time_step_s = p.time_step_s > 0 ? p.time_step_s : p.safety * dt_stable;
  r.n_steps = static_cast<int>(std::ceil(p.duration_s / r.time_step_s)) + 1;

  const ExplicitModel ref(p, false, r.time_step_s);
  std::optional<ExplicitModel> vd;
  if (p.with_voids) vd.emplace(p, true, r.time_step_s);
  const auto& m = *p.mesh;

  if (p.wave) {
    const auto t_wave = std::chrono::steady_clock::now();
    PlaneWavePulse::Spec spec;
    for (std::size_t l = 0; l < p.layers.size(); ++l)
      spec.layers.push_back({p.layers[l].elastic, r.damping[l].alpha, r.damping[l].beta, p.layers[l].thickness});
    spec.kind = wave_kind(p.wave->wave);
    spec.incidence = p.wave->wave.incidence;
    spec.azimuth = p.wave->wave.azimuth;
    spec.three_d = m.dim() == 3;
    spec.amplitude = p.wave->wave.amplitude;
    spec.peak_hz = p.wave->peak_hz;
    spec.delay_s = p.wave->delay_s;
    const PlaneWavePulse pulse(spec, r.n_steps * r.time_step_s, m.z_max - m.z_min, {m.x_min, m.x_max, m.y_min, m.y_max});
    r.wave_delay_s = pulse.delay();
    r.wave_earliest_s = pulse.earliest_arrival();
    r.wave_bytes = pulse.bytes();
    r.wave_seconds = seconds_since(t_wave);
    r.drm_box = ref.drm_box();
    r.drm_cells = ref.drm_cells();
    r.reference = ref.run(r.n_steps, -1, callbacks, &pulse);
    if (vd) {
      r.voided = vd->run(r.n_steps, -1, callbacks, &pulse);
      r.difference.resize(r.reference.u.size());
      for (std::size_t i = 0; i < r.difference.size(); ++i) r.difference[i] = r.voided.u[i] - r.reference.u[i];
    }
    return r;
  }

  // The source node: nearest to the point among those whose dofs along the force are free in
  // both models (on the axis of an axisymmetric model u_r is held, u_z free).
  const std::size_t d = static_cast<std::size_t>(dofs_per_node(p.kinematics));
  const auto& sd = p.source.direction;
  const std::array<double, 3> comp = d == 3 ? sd : std::array<double, 3>{sd[0], sd[2], 0.0};
  auto moves = [&](const ExplicitModel& em, std::size_t node) {
    const auto& fd = em.free_dofs();
    for (std::size_t j = 0; j < d; ++j)
      if (comp[j] != 0 && !std::binary_search(fd.begin(), fd.end(), static_cast<int>(node * d + j))) return false;
    return true;
  };
  double best = INFINITY;
  for (std::size_t i = 0; i < m.n_nodes(); ++i) {
    const auto& x = m.nodes[i];
    const auto& s = p.source.point;
    const double dist = std::hypot(x[0] - s[0], x[1] - s[1], x[2] - s[2]);
    if (dist < best && moves(ref, i) && (!vd || moves(*vd, i))) {
      best = dist;
      r.source_node = static_cast<int>(i);
    }
  }
  if (r.source_node < 0) throw std::invalid_argument("transient: no free node for the source");
  r.source_offset_m = best;

  r.reference = ref.run(r.n_steps, r.source_node, callbacks);
  if (vd) {
    r.voided = vd->run(r.n_steps, r.source_node, callbacks);
    r.difference.resize(r.reference.u.size());
    for (std::size_t i = 0; i < r.difference.size(); ++i) r.difference[i] = r.voided.u[i] - r.reference.u[i];
  }
  return r;
}

}  // namespace voidsign::solver
