// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/harmonic.hpp"

#include <omp.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <Eigen/Dense>
#include <Eigen/SparseLU>
#include <exception>
#include <limits>
#include <memory>
#include <numbers>
#include <sstream>
#include <stdexcept>

#include "solver/analysis/plane_wave.hpp"
#include "solver/assembly/system.hpp"
#include "solver/la/complex_ldlt.hpp"
#include "solver/la/memory.hpp"

namespace voidsign::solver {

// ---------------------------------------------------------------------------------------------
// The layered column.

VerticalColumn::VerticalColumn(const std::vector<HarmonicLayer>& layers, IncidentWave type, double omega,
                               double amplitude)
    : amplitude_(amplitude) {
  if (layers.empty()) throw std::invalid_argument("VerticalColumn: no layers");
  const std::size_t n = layers.size();
  top_.resize(n);
  k_.resize(n);
  a_.resize(n);
  b_.resize(n);
  std::vector<Complex> impedance(n);
  double depth = 0;
  for (std::size_t j = 0; j < n; ++j) {
    const Elastic& e = layers[j].elastic;
    const double mu = e.young / (2 * (1 + e.poisson));
    const double lambda = e.young * e.poisson / ((1 + e.poisson) * (1 - 2 * e.poisson));
    const Complex modulus = hysteretic_factor(layers[j].damping) * (type == IncidentWave::s ? mu : lambda + 2 * mu);
    const Complex speed = std::sqrt(modulus / e.density);
    k_[j] = omega / speed;
    impedance[j] = e.density * speed;  // ρ v* = G* k*/ω
    top_[j] = depth;
    if (j + 1 < n) {
      if (!(layers[j].thickness > 0)) throw std::invalid_argument("VerticalColumn: layer thickness must be > 0");
      depth += layers[j].thickness;
    }
  }
  // Free surface: τ = 0 ⇒ A₁ = B₁. Then continuity of u and τ at each interface (Kramer 1996,
  // eq. 7.34): A_{j+1} = ½A_j(1+α_j)e^{ik_j h_j} + ½B_j(1−α_j)e^{−ik_j h_j},
  //            B_{j+1} = ½A_j(1−α_j)e^{ik_j h_j} + ½B_j(1+α_j)e^{−ik_j h_j},  α_j = ρ_j v*_j/(ρ_{j+1} v*_{j+1}).
  a_[0] = b_[0] = 1.0;
  const Complex i(0, 1);
  for (std::size_t j = 0; j + 1 < n; ++j) {
    const Complex alpha = impedance[j] / impedance[j + 1];
    const Complex up = a_[j] * std::exp(i * k_[j] * layers[j].thickness);
    const Complex down = b_[j] * std::exp(-i * k_[j] * layers[j].thickness);
    a_[j + 1] = 0.5 * (up * (1.0 + alpha) + down * (1.0 - alpha));
    b_[j + 1] = 0.5 * (up * (1.0 - alpha) + down * (1.0 + alpha));
  }
  // Outcrop motion of the half-space = 2 A_N; scale so that it equals `amplitude`.
  const Complex scale = amplitude / (2.0 * a_[n - 1]);
  for (std::size_t j = 0; j < n; ++j) {
    a_[j] *= scale;
    b_[j] *= scale;
  }
}

Complex VerticalColumn::displacement(double depth) const {
  std::size_t j = 0;
  while (j + 1 < top_.size() && depth >= top_[j + 1]) ++j;
  const double zeta = depth - top_[j];
  const Complex i(0, 1);
  return a_[j] * std::exp(i * k_[j] * zeta) + b_[j] * std::exp(-i * k_[j] * zeta);
}

double fastest_p_speed(const std::vector<HarmonicLayer>& layers) {
  double c = 0;
  for (const HarmonicLayer& l : layers) {
    const Elastic& e = l.elastic;
    const double m = e.young * (1 - e.poisson) / ((1 + e.poisson) * (1 - 2 * e.poisson));
    c = std::max(c, std::sqrt(m / e.density));
  }
  return c;
}

namespace {

using Clock = std::chrono::steady_clock;
using SparseMatrixC = Eigen::SparseMatrix<Complex>;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

std::array<double, 3> corner_centroid(const mesh::Mesh& m, std::size_t c) {
  const int* v = m.cell(c);
  const int nc = m.dim() == 3 ? 4 : 3;
  std::array<double, 3> g{0, 0, 0};
  for (int a = 0; a < nc; ++a)
    for (int i = 0; i < 3; ++i) g[static_cast<std::size_t>(i)] += m.nodes[v[a]][static_cast<std::size_t>(i)] / nc;
  return g;
}

// The full (both triangles) CSC pattern of the lower-triangle pattern `lower`, zero values.
ComplexMatrix full_pattern(const SparseMatrix& lower) {
  const long n = lower.cols();
  const int* lo = lower.outerIndexPtr();
  const int* li = lower.innerIndexPtr();
  std::vector<long> outer(static_cast<std::size_t>(n) + 1, 0);
  for (long j = 0; j < n; ++j)
    for (int p = lo[j]; p < lo[j + 1]; ++p) {
      ++outer[static_cast<std::size_t>(j) + 1];
      if (li[p] != j) ++outer[static_cast<std::size_t>(li[p]) + 1];
    }
  for (long j = 0; j < n; ++j) outer[static_cast<std::size_t>(j) + 1] += outer[static_cast<std::size_t>(j)];
  ComplexMatrix a(n, n);
  a.resizeNonZeros(outer.back());
  std::copy(outer.begin(), outer.end(), a.outerIndexPtr());
  std::vector<long> fill(outer.begin(), outer.end() - 1);
  long* inner = a.innerIndexPtr();
  // Column j receives its upper entries from columns j' < j (visited first, in increasing j')
  // and then its own lower entries: every column comes out sorted.
  for (long j = 0; j < n; ++j)
    for (int p = lo[j]; p < lo[j + 1]; ++p) {
      const long i = li[p];
      inner[fill[static_cast<std::size_t>(j)]++] = i;
      if (i != j) inner[fill[static_cast<std::size_t>(i)]++] = j;
    }
  std::fill(a.valuePtr(), a.valuePtr() + a.nonZeros(), Complex(0.0));
  return a;
}

// Positions in the CSC arrays of the (n·d)² entries of cell c, row-major (p, q) → (dof_p, dof_q).
void cell_positions(const ComplexMatrix& a, const mesh::Mesh& m, std::size_t c, int d, long* dof, long* pos) {
  const int n = m.npc();
  const int nd = n * d;
  const int* v = m.cell(c);
  for (int k = 0; k < n; ++k)
    for (int j = 0; j < d; ++j) dof[d * k + j] = static_cast<long>(d) * v[k] + j;
  const long* outer = a.outerIndexPtr();
  const long* inner = a.innerIndexPtr();
  for (int q = 0; q < nd; ++q) {
    const long* b = inner + outer[dof[q]];
    const long* e = inner + outer[dof[q] + 1];
    for (int p = 0; p < nd; ++p) pos[p * nd + q] = std::lower_bound(b, e, dof[p]) - inner;
  }
}

inline void atomic_add(Complex* values, long pos, Complex v) {
  double* d = reinterpret_cast<double*>(values + pos);
#pragma omp atomic
  d[0] += v.real();
#pragma omp atomic
  d[1] += v.imag();
}

struct LayerCell {
  std::size_t cell;
  std::vector<double> ke, me;
  std::vector<char> on_boundary;  // per local node: on Γ (b) rather than outside it (e)
  double damping;
};

// Everything shared by every (frequency, model) solve.
struct Setup {
  const HarmonicProblem* p = nullptr;
  const mesh::Mesh* m = nullptr;
  int d = 2;
  long nd = 0;
  PmlLayout pml;
  std::vector<char> pml_cell;
  std::vector<std::size_t> pml_cells, void_cells;
  ComplexMatrix pattern;
  std::vector<long> diag_pos;
  std::vector<Complex> kstar;  // Σ (1 + 2iξ) K_e over the unstretched cells, on the pattern
  std::vector<double> mass;    // Σ M_e over the unstretched cells
  std::vector<char> fixed_ref, fixed_void;
  // Sources: the main load case first, then HarmonicProblem::extra_cases.
  struct Case {
    HarmonicProblem::LoadCase load;
    long force_dof = -1;
    std::array<double, 3> force_dir{0, 0, 0};
  };
  std::vector<Case> cases;
  std::vector<LayerCell> layer_cells;
  std::vector<char> inside;    // per node: in the DRM box (total field)
  std::vector<char> physical;  // per node: belongs to a cell outside the PML
  std::vector<int> outputs;
  // Shared factorisation (setup_shared): void-boundary and void-interior unknowns, and each
  // unknown's index in Γ followed by I (−1 elsewhere). Γ empty: each model factorised alone.
  std::vector<long> gamma, interior;
  std::vector<long> plug_local;
};

const HarmonicLayer& layer_of(const Setup& s, std::size_t c) {
  return s.p->layers[static_cast<std::size_t>(s.m->layer[c])];
}

std::vector<char> outer_fixed(const mesh::Mesh& m, int d) {
  std::vector<char> fixed(static_cast<std::size_t>(d) * m.n_nodes(), 0);
  const int nn = mesh::nodes_per_facet(m.type);
  for (const mesh::Facet& f : m.facets) {
    if (f.kind == mesh::FacetKind::surface || f.kind == mesh::FacetKind::void_wall) continue;
    for (int a = 0; a < nn; ++a)
      for (int j = 0; j < d; ++j) fixed[static_cast<std::size_t>(d * f.nodes[a] + j)] = 1;
  }
  return fixed;
}

void setup_drm(Setup& s) {
  const HarmonicProblem& p = *s.p;
  const mesh::Mesh& m = *s.m;
  DrmLimits limits{m.x_min, m.x_max, m.y_min, m.y_max, m.z_min};
  if (s.pml.thickness > 0) limits = {s.pml.x_lo, s.pml.x_hi, s.pml.y_lo, s.pml.y_hi, s.pml.z_lo};
  std::vector<double> thickness;
  for (const HarmonicLayer& l : p.layers) thickness.push_back(l.thickness);
  DrmLayer layer = drm_layer(m, p.box, limits, s.pml_cell, thickness, "harmonic");
  s.inside = std::move(layer.inside);
  for (DrmLayer::Cell& c : layer.cells) {
    LayerCell lc;
    lc.cell = c.cell;
    const int ndof = m.npc() * s.d;
    lc.ke.resize(static_cast<std::size_t>(ndof * ndof));
    lc.me.resize(lc.ke.size());
    dynamic_parts(m, c.cell, layer_of(s, c.cell).elastic, p.kinematics, lc.ke, lc.me);
    lc.damping = layer_of(s, c.cell).damping;
    const int* v = m.cell(c.cell);
    for (int a = 0; a < m.npc(); ++a)
      for (int j = 0; j < s.d; ++j)
        if (s.fixed_ref[static_cast<std::size_t>(v[a]) * static_cast<std::size_t>(s.d) + static_cast<std::size_t>(j)])
          throw std::invalid_argument("harmonic: the DRM box reaches the fixed outer boundary");
    lc.on_boundary = std::move(c.on_boundary);
    s.layer_cells.push_back(std::move(lc));
  }
}

void setup_wave(const Setup& s, const Setup::Case& c) {
  // Validates the wave (polarization, SH in plane strain, angle) once, before any factorisation.
  const double f0 = *std::min_element(s.p->frequencies_hz.begin(), s.p->frequencies_hz.end());
  (void)IncidentField(s.p->layers, c.load.wave, 2 * std::numbers::pi * f0, s.m->dim() == 3);
}

// (u_x, u_z) or (u_x, u_y, u_z) of the free field at node n into u[0..d).
void free_field_at(const Setup& s, const IncidentField& field, std::size_t n, Complex* u) {
  const auto& x = s.m->nodes[n];
  const auto v = field.at(x[0], x[1], s.m->z_max - x[2]);
  if (s.d == 3) {
    u[0] = v[0];
    u[1] = v[1];
    u[2] = v[2];
  } else {
    u[0] = v[0];
    u[1] = v[2];
  }
}

// The node nearest the case's force point among those of cells outside voids and the PML;
// returns it and its distance.
std::pair<int, double> setup_force(Setup& s, Setup::Case& lc) {
  const PointForce& force = lc.load.force;
  const mesh::Mesh& m = *s.m;
  int node = -1;
  std::vector<char> usable(m.n_nodes(), 0);
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    if (!s.pml_cell[c] && m.void_id[c] < 0)
      for (int a = 0; a < m.npc(); ++a) usable[static_cast<std::size_t>(m.cell(c)[a])] = 1;
  double best = std::numeric_limits<double>::infinity();
  for (std::size_t n = 0; n < m.n_nodes(); ++n) {
    if (!usable[n]) continue;
    const auto& x = m.nodes[n];
    const double dist = std::hypot(x[0] - force.point[0], m.dim() == 3 ? x[1] - force.point[1] : 0.0,
                                   x[2] - force.point[2]);
    if (dist < best) {
      best = dist;
      node = static_cast<int>(n);
    }
  }
  if (node < 0) throw std::invalid_argument("harmonic: no node for the point force");
  const auto& dir = force.direction;
  const double len = m.dim() == 3 ? std::hypot(dir[0], dir[1], dir[2]) : std::hypot(dir[0], dir[2]);
  if (!(len > 0)) throw std::invalid_argument("harmonic: point-force direction is zero");
  lc.force_dir = {dir[0] / len, m.dim() == 3 ? dir[1] / len : 0.0, dir[2] / len};
  lc.force_dof = static_cast<long>(s.d) * node;
  for (int j = 0; j < s.d; ++j)
    if (s.fixed_ref[static_cast<std::size_t>(lc.force_dof + j)])
      throw std::invalid_argument("harmonic: the point force acts on a fixed node");
  return {node, best};
}

// The load vector of one case at ω; `field` is the case's free field (plane waves only).
ComplexVector right_hand_side(const Setup& s, double omega, const Setup::Case& lc_case, const IncidentField* field) {
  const mesh::Mesh& m = *s.m;
  ComplexVector f = ComplexVector::Zero(s.nd);
  if (lc_case.load.source == HarmonicProblem::Source::point_force) {
    const auto& dir = lc_case.force_dir;
    const double comp[3] = {dir[0], s.d == 3 ? dir[1] : dir[2], dir[2]};
    for (int j = 0; j < s.d; ++j) f[lc_case.force_dof + j] = lc_case.load.force.amplitude * comp[j];
    return f;
  }
  // Domain reduction method: f_b = −S_be u⁰_e, f_e = +S_eb u⁰_b on each cell of the layer.
  const int npc = m.npc();
  const int nd = npc * s.d;
  std::vector<Complex> u0(static_cast<std::size_t>(nd)), fe(static_cast<std::size_t>(nd));
  for (const LayerCell& lc : s.layer_cells) {
    const int* v = m.cell(lc.cell);
    for (int a = 0; a < npc; ++a) free_field_at(s, *field, static_cast<std::size_t>(v[a]), &u0[static_cast<std::size_t>(s.d * a)]);
    const Complex fac = hysteretic_factor(lc.damping);
    const double w2 = omega * omega;
    for (int r = 0; r < nd; ++r) {
      const bool rb = lc.on_boundary[static_cast<std::size_t>(r / s.d)];
      Complex sum = 0;
      for (int c = 0; c < nd; ++c) {
        if (lc.on_boundary[static_cast<std::size_t>(c / s.d)] == rb) continue;
        const auto k = static_cast<std::size_t>(r * nd + c);
        sum += (fac * lc.ke[k] - w2 * lc.me[k]) * u0[static_cast<std::size_t>(c)];
      }
      fe[static_cast<std::size_t>(r)] = rb ? -sum : sum;
    }
    for (int a = 0; a < npc; ++a)
      for (int j = 0; j < s.d; ++j) f[static_cast<long>(s.d) * v[a] + j] += fe[static_cast<std::size_t>(s.d * a + j)];
  }
  return f;
}

// S(ω) of one model into `a` (the shared pattern), constrained.
void assemble_model(const Setup& s, double omega, bool voided, ComplexMatrix& a) {
  const mesh::Mesh& m = *s.m;
  const HarmonicProblem& p = *s.p;
  Complex* vals = a.valuePtr();
  const long nnz = a.nonZeros();
  const double w2 = omega * omega;
#pragma omp parallel for schedule(static)
  for (long k = 0; k < nnz; ++k) vals[k] = s.kstar[static_cast<std::size_t>(k)] - w2 * s.mass[static_cast<std::size_t>(k)];
  const int nd = m.npc() * s.d;
  const long n_pml = static_cast<long>(s.pml_cells.size());
#pragma omp parallel
  {
    std::vector<Complex> se(static_cast<std::size_t>(nd * nd));
    std::vector<long> dof(static_cast<std::size_t>(nd)), pos(static_cast<std::size_t>(nd * nd));
#pragma omp for schedule(dynamic, 256)
    for (long i = 0; i < n_pml; ++i) {
      const std::size_t c = s.pml_cells[static_cast<std::size_t>(i)];
      const HarmonicLayer& l = layer_of(s, c);
      dynamic_stiffness(m, c, l.elastic, l.damping, p.kinematics, omega, &s.pml, se);
      cell_positions(a, m, c, s.d, dof.data(), pos.data());
      for (int k = 0; k < nd * nd; ++k) atomic_add(vals, pos[static_cast<std::size_t>(k)], se[static_cast<std::size_t>(k)]);
    }
  }
  if (voided) {
    std::vector<double> ke(static_cast<std::size_t>(nd * nd)), me(ke.size());
    std::vector<long> dof(static_cast<std::size_t>(nd)), pos(ke.size());
    for (std::size_t c : s.void_cells) {
      const HarmonicLayer& l = layer_of(s, c);
      dynamic_parts(m, c, l.elastic, p.kinematics, ke, me);
      cell_positions(a, m, c, s.d, dof.data(), pos.data());
      const Complex fac = hysteretic_factor(l.damping);
      for (std::size_t k = 0; k < ke.size(); ++k) vals[pos[k]] -= fac * ke[k] - w2 * me[k];
    }
  }
  // Constraints that keep the pattern: fixed rows and columns zeroed, a unit-scale diagonal.
  const std::vector<char>& fixed = voided ? s.fixed_void : s.fixed_ref;
  double sum = 0;
  long count = 0;
  for (long j = 0; j < s.nd; ++j)
    if (!fixed[static_cast<std::size_t>(j)]) {
      sum += std::abs(vals[s.diag_pos[static_cast<std::size_t>(j)]]);
      ++count;
    }
  const double scale = count ? sum / static_cast<double>(count) : 1.0;
  const long* outer = a.outerIndexPtr();
  const long* inner = a.innerIndexPtr();
#pragma omp parallel for schedule(static)
  for (long j = 0; j < s.nd; ++j) {
    const bool fj = fixed[static_cast<std::size_t>(j)];
    for (long k = outer[j]; k < outer[j + 1]; ++k)
      if (fj || fixed[static_cast<std::size_t>(inner[k])]) vals[k] = inner[k] == j ? Complex(scale) : Complex(0.0);
  }
}

// The solver state of one thread: a factorisation and the matrix storage it reads.
struct Worker {
  Worker(const Setup& s, int slot) : ldlt(s.p->ordering, slot), a(s.pattern) {}
  ComplexLdlt ldlt;
  ComplexMatrix a;
};

[[noreturn]] void fail(const HarmonicProblem& p, std::size_t freq, const char* model, const std::string& what) {
  std::ostringstream os;
  os << "harmonic " << model << " at " << p.frequencies_hz[freq] << " Hz: " << what;
  throw SolveFailure(os.str());
}

// Each load case's free field at ω (null for point forces): built once per frequency, read by
// its loads and its outputs.
using CaseFields = std::vector<std::unique_ptr<IncidentField>>;
CaseFields case_fields(const Setup& s, double omega) {
  CaseFields out;
  for (const Setup::Case& c : s.cases)
    out.push_back(c.load.source == HarmonicProblem::Source::plane_wave
                      ? std::make_unique<IncidentField>(s.p->layers, c.load.wave, omega, s.m->dim() == 3)
                      : nullptr);
  return out;
}

// The right-hand sides of every load case at ω, one column each (constraints not yet applied).
Eigen::MatrixXcd load_columns(const Setup& s, double omega, const CaseFields& fields) {
  Eigen::MatrixXcd f(s.nd, static_cast<long>(s.cases.size()));
  for (std::size_t c = 0; c < s.cases.size(); ++c)
    f.col(static_cast<long>(c)) = right_hand_side(s, omega, s.cases[c], fields[c].get());
  return f;
}

void zero_fixed(const std::vector<char>& fixed, Eigen::MatrixXcd& f) {
  for (long j = 0; j < f.rows(); ++j)
    if (fixed[static_cast<std::size_t>(j)]) f.row(j).setZero();
}

// Keeps the output nodes of solution x of load case c; outside the DRM box adds the free field
// back to the scattered field.
void store_case(const Setup& s, const CaseFields& fields, std::size_t freq, std::size_t c,
                const Eigen::Ref<const ComplexVector>& x, HarmonicModel& model) {
  const IncidentField* field = fields[c].get();
  ComplexVector out(static_cast<long>(s.outputs.size()) * s.d);
  for (std::size_t k = 0; k < s.outputs.size(); ++k) {
    const auto n = static_cast<std::size_t>(s.outputs[k]);
    for (int j = 0; j < s.d; ++j) out[static_cast<long>(k) * s.d + j] = x[static_cast<long>(n) * s.d + j];
    if (field && !s.inside[n] && s.physical[n]) {
      Complex u0[3];
      free_field_at(s, *field, n, u0);
      for (int j = 0; j < s.d; ++j) out[static_cast<long>(k) * s.d + j] += u0[j];
    }
  }
  (c == 0 ? model.u[freq] : model.u_extra[c - 1][freq]) = std::move(out);
}

// The largest ‖r‖/‖f‖ over the columns of residuals r and loads f (‖r‖ alone where f = 0).
double worst_relative(const Eigen::MatrixXcd& res, const Eigen::MatrixXcd& f) {
  double worst = 0;
  for (long c = 0; c < f.cols(); ++c) {
    const double scale = f.col(c).norm();
    worst = std::max(worst, scale > 0 ? res.col(c).norm() / scale : res.col(c).norm());
  }
  return worst;
}

// One model at one frequency on its own factorisation, every load case, one refinement step
// when a residual is too large.
void solve_separate(const Setup& s, std::size_t freq, bool voided, Worker& w, HarmonicResult& r) {
  const auto t0 = Clock::now();
  const HarmonicProblem& p = *s.p;
  const char* name = voided ? "model with voids" : "model without voids";
  const double omega = 2 * std::numbers::pi * p.frequencies_hz[freq];
  assemble_model(s, omega, voided, w.a);
  const CaseFields fields = case_fields(s, omega);
  Eigen::MatrixXcd f = load_columns(s, omega, fields);
  zero_fixed(voided ? s.fixed_void : s.fixed_ref, f);
  Eigen::MatrixXcd x;
  try {
    if (!w.ldlt.analysed()) w.ldlt.analyze(w.a, s.gamma, s.d);  // Γ empty: each model alone
    w.ldlt.factorize(w.a);
    x = w.ldlt.solve(f);
    if (worst_relative(w.a * x - f, f) > p.max_residual) x += w.ldlt.solve(f - w.a * x);
  } catch (const ComplexSolveError& e) {
    fail(p, freq, name, e.what());
  }
  const double worst = worst_relative(w.a * x - f, f);
  if (!(worst <= p.max_residual))
    fail(p, freq, name, "relative residual " + std::to_string(worst) + " above the limit: the system is singular or badly conditioned");
  HarmonicModel& model = voided ? r.voided : r.reference;
  for (std::size_t c = 0; c < s.cases.size(); ++c) store_case(s, fields, freq, c, x.col(static_cast<long>(c)), model);
  model.residual[freq] = worst;
  model.seconds[freq] = seconds_since(t0);
  model.factor_seconds[freq] = w.ldlt.factorize_seconds();
}

// The void cells' dynamic stiffness at ω on the void unknowns V = Γ ∪ I (local numbering of
// Setup::plug_local), split into its blocks.
struct Plug {
  SparseMatrixC bb, bi, ib, ii;  // ib = biᵀ (the element matrices are symmetric)
  std::unique_ptr<Eigen::SparseLU<SparseMatrixC>> ii_lu;  // null when I is empty
  Eigen::MatrixXcd z;                                     // P_ΓΓ − P_ΓI P_II⁻¹ P_IΓ
};

Plug plug_at(const Setup& s, double omega) {
  const mesh::Mesh& m = *s.m;
  const int nd = m.npc() * s.d;
  const long nb = static_cast<long>(s.gamma.size()), ni = static_cast<long>(s.interior.size());
  std::vector<Eigen::Triplet<Complex>> tbb, tbi, tii;
  std::vector<double> ke(static_cast<std::size_t>(nd * nd)), me(ke.size());
  std::vector<long> loc(static_cast<std::size_t>(nd));
  const double w2 = omega * omega;
  for (std::size_t c : s.void_cells) {
    const HarmonicLayer& l = layer_of(s, c);
    dynamic_parts(m, c, l.elastic, s.p->kinematics, ke, me);
    const int* v = m.cell(c);
    for (int a = 0; a < m.npc(); ++a)
      for (int j = 0; j < s.d; ++j) loc[static_cast<std::size_t>(s.d * a + j)] = s.plug_local[static_cast<std::size_t>(s.d * v[a] + j)];
    const Complex fac = hysteretic_factor(l.damping);
    for (int rr = 0; rr < nd; ++rr)
      for (int cc = 0; cc < nd; ++cc) {
        const long i = loc[static_cast<std::size_t>(rr)], j = loc[static_cast<std::size_t>(cc)];
        const auto k = static_cast<std::size_t>(rr * nd + cc);
        const Complex val = fac * ke[k] - w2 * me[k];
        if (i < nb && j < nb) tbb.emplace_back(static_cast<int>(i), static_cast<int>(j), val);
        else if (i < nb) tbi.emplace_back(static_cast<int>(i), static_cast<int>(j - nb), val);
        else if (j >= nb) tii.emplace_back(static_cast<int>(i - nb), static_cast<int>(j - nb), val);
      }
  }
  Plug pl;
  pl.bb.resize(nb, nb);
  pl.bb.setFromTriplets(tbb.begin(), tbb.end());
  pl.bi.resize(nb, ni);
  pl.bi.setFromTriplets(tbi.begin(), tbi.end());
  pl.ib = pl.bi.transpose();
  pl.ii.resize(ni, ni);
  pl.ii.setFromTriplets(tii.begin(), tii.end());
  pl.z = Eigen::MatrixXcd(pl.bb);
  if (ni > 0) {
    pl.ii_lu = std::make_unique<Eigen::SparseLU<SparseMatrixC>>();
    pl.ii.makeCompressed();
    pl.ii_lu->compute(pl.ii);
    if (pl.ii_lu->info() != Eigen::Success) throw ComplexSolveError("the void interior's dynamic stiffness is singular");
    const Eigen::MatrixXcd w = pl.ii_lu->solve(Eigen::MatrixXcd(pl.ib));
    pl.z -= pl.bi * w;
  }
  return pl;
}

// Both models at one frequency on one factorisation. The model with voids is factorised with its
// void-boundary unknowns Γ left as a dense Schur complement S; the model without voids differs
// from it only by the void cells (on Γ and the void interior I, which the model with voids
// fixes), whose stiffness condensed on Γ is Z (plug_at). So S⁻¹ solves the model with voids and
// (S + Z)⁻¹ the one without, both around the same forward and back substitutions.
void solve_shared(const Setup& s, std::size_t freq, Worker& w, HarmonicResult& r) {
  const auto t0 = Clock::now();
  const HarmonicProblem& p = *s.p;
  const double omega = 2 * std::numbers::pi * p.frequencies_hz[freq];
  assemble_model(s, omega, true, w.a);
  const CaseFields fields = case_fields(s, omega);
  const Eigen::MatrixXcd f = load_columns(s, omega, fields);
  Eigen::MatrixXcd fv = f, fr = f;
  zero_fixed(s.fixed_void, fv);
  zero_fixed(s.fixed_ref, fr);
  const long nb = static_cast<long>(s.gamma.size()), ni = static_cast<long>(s.interior.size());
  const long nc = f.cols();
  Eigen::MatrixXcd xv, xr;
  try {
    if (!w.ldlt.analysed()) w.ldlt.analyze(w.a, s.gamma, s.d);
    w.ldlt.factorize(w.a);
    const Plug pl = plug_at(s, omega);
    const Eigen::PartialPivLU<Eigen::MatrixXcd> lu_void(w.ldlt.schur());
    const Eigen::PartialPivLU<Eigen::MatrixXcd> lu_ref(w.ldlt.schur() + pl.z);
    const auto gather_interior = [&](const Eigen::MatrixXcd& v) {
      Eigen::MatrixXcd out(ni, v.cols());
      for (long k = 0; k < ni; ++k) out.row(k) = v.row(s.interior[static_cast<std::size_t>(k)]);
      return out;
    };
    // Solutions of both models for right-hand sides gv (model with voids) and gr (without).
    const auto solve_both = [&](const Eigen::MatrixXcd& gv, const Eigen::MatrixXcd& gr, Eigen::MatrixXcd& uv, Eigen::MatrixXcd& ur) {
      // The matrix factorised is the model with voids, whose rows on I are unit constraints
      // with zero right-hand sides; the model without voids' own loads on I (if any) enter
      // through the plug instead.
      Eigen::MatrixXcd both(s.nd, 2 * nc);
      both << gv, gr;
      for (long k = 0; k < ni; ++k) both.row(s.interior[static_cast<std::size_t>(k)]).setZero();
      const Eigen::MatrixXcd y = w.ldlt.reduce(both);
      Eigen::MatrixXcd yr = y.rightCols(nc);
      Eigen::MatrixXcd fi, wi;
      if (ni > 0) {
        fi = gather_interior(gr);
        wi = pl.ii_lu->solve(fi);
        yr -= pl.bi * wi;
      }
      Eigen::MatrixXcd xg(nb, 2 * nc);
      xg.leftCols(nc) = lu_void.solve(y.leftCols(nc));
      xg.rightCols(nc) = lu_ref.solve(yr);
      const Eigen::MatrixXcd x = w.ldlt.expand(xg);
      uv = x.leftCols(nc);
      ur = x.rightCols(nc);
      if (ni > 0) {
        const Eigen::MatrixXcd ui = pl.ii_lu->solve(fi - pl.ib * xg.rightCols(nc));
        for (long k = 0; k < ni; ++k) ur.row(s.interior[static_cast<std::size_t>(k)]) = ui.row(k);
      }
    };
    // The model without voids' residual: its matrix is the one factorised plus the plug, less
    // the unit constraints on I.
    const auto residual_ref = [&](const Eigen::MatrixXcd& x) {
      Eigen::MatrixXcd res = w.a * x - fr;
      Eigen::MatrixXcd xb(nb, nc), xi(ni, nc);
      for (long k = 0; k < nb; ++k) xb.row(k) = x.row(s.gamma[static_cast<std::size_t>(k)]);
      for (long k = 0; k < ni; ++k) xi.row(k) = x.row(s.interior[static_cast<std::size_t>(k)]);
      const Eigen::MatrixXcd rb = pl.bb * xb + pl.bi * xi;
      for (long k = 0; k < nb; ++k) res.row(s.gamma[static_cast<std::size_t>(k)]) += rb.row(k);
      if (ni > 0) {
        const Eigen::MatrixXcd ri = pl.ib * xb + pl.ii * xi - gather_interior(fr);
        for (long k = 0; k < ni; ++k) res.row(s.interior[static_cast<std::size_t>(k)]) = ri.row(k);
      }
      return res;
    };
    solve_both(fv, fr, xv, xr);
    Eigen::MatrixXcd res_v = w.a * xv - fv, res_r = residual_ref(xr);
    if (worst_relative(res_v, fv) > p.max_residual || worst_relative(res_r, fr) > p.max_residual) {
      Eigen::MatrixXcd dv, dr;
      solve_both(-res_v, -res_r, dv, dr);
      xv += dv;
      xr += dr;
      res_v = w.a * xv - fv;
      res_r = residual_ref(xr);
    }
    r.voided.residual[freq] = worst_relative(res_v, fv);
    r.reference.residual[freq] = worst_relative(res_r, fr);
  } catch (const ComplexSolveError& e) {
    fail(p, freq, "models with and without voids", e.what());
  }
  for (HarmonicModel* model : {&r.voided, &r.reference})
    if (!(model->residual[freq] <= p.max_residual))
      fail(p, freq, model == &r.voided ? "model with voids" : "model without voids",
           "relative residual " + std::to_string(model->residual[freq]) +
               " above the limit: the system is singular or badly conditioned");
  for (std::size_t c = 0; c < s.cases.size(); ++c) {
    store_case(s, fields, freq, c, xv.col(static_cast<long>(c)), r.voided);
    store_case(s, fields, freq, c, xr.col(static_cast<long>(c)), r.reference);
  }
  r.reference.seconds[freq] = seconds_since(t0);
  r.reference.factor_seconds[freq] = w.ldlt.factorize_seconds();
}

// Γ (void-boundary unknowns) and I (void-interior unknowns) for the shared factorisation, or
// empty when it does not apply: no voids, Γ too large for a dense Schur complement, or void
// unknowns on the fixed outer boundary.
void setup_shared(Setup& s) {
  const HarmonicProblem& p = *s.p;
  const mesh::Mesh& m = *s.m;
  if (!p.with_voids || !p.share_factorisation || s.void_cells.empty()) return;
  std::vector<char> in_void(m.n_nodes(), 0), in_active(m.n_nodes(), 0);
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    for (int a = 0; a < m.npc(); ++a) (m.void_id[c] >= 0 ? in_void : in_active)[static_cast<std::size_t>(m.cell(c)[a])] = 1;
  std::vector<long> gamma, interior;
  for (std::size_t n = 0; n < m.n_nodes(); ++n) {
    if (!in_void[n]) continue;
    for (int j = 0; j < s.d; ++j) {
      const long dof = static_cast<long>(n) * s.d + j;
      if (s.fixed_ref[static_cast<std::size_t>(dof)]) return;
      (in_active[n] ? gamma : interior).push_back(dof);
    }
  }
  if (static_cast<long>(gamma.size()) > p.max_shared_boundary) return;
  s.gamma = std::move(gamma);
  s.interior = std::move(interior);
  s.plug_local.assign(static_cast<std::size_t>(s.nd), -1);
  for (std::size_t k = 0; k < s.gamma.size(); ++k) s.plug_local[static_cast<std::size_t>(s.gamma[k])] = static_cast<long>(k);
  for (std::size_t k = 0; k < s.interior.size(); ++k)
    s.plug_local[static_cast<std::size_t>(s.interior[k])] = static_cast<long>(s.gamma.size() + k);
}

// Validation, band, constraints, sources, pattern and the frequency-independent parts.
void prepare(const HarmonicProblem& p, Setup& s, HarmonicResult& r) {
  if (!p.mesh) throw std::invalid_argument("solve_harmonic: no mesh");
  const mesh::Mesh& m = *p.mesh;
  if (p.kinematics == Kinematics::axisymmetric)
    throw std::invalid_argument("solve_harmonic: axisymmetric models are not supported (plane strain or 3D)");
  if ((m.dim() == 3) != (p.kinematics == Kinematics::solid))
    throw std::invalid_argument("solve_harmonic: mesh dimension and kinematics disagree");
  for (int l : m.layer)
    if (l < 0 || static_cast<std::size_t>(l) >= p.layers.size())
      throw std::invalid_argument("solve_harmonic: a cell's layer has no properties");
  if (p.frequencies_hz.empty()) throw std::invalid_argument("solve_harmonic: no frequencies");
  for (double f : p.frequencies_hz)
    if (!(f > 0)) throw std::invalid_argument("solve_harmonic: frequencies must be > 0");

  s.p = &p;
  s.m = &m;
  s.d = dofs_per_node(p.kinematics);
  s.nd = static_cast<long>(s.d) * static_cast<long>(m.n_nodes());
  const std::size_t nc = m.n_cells();
  r.frequencies_hz = p.frequencies_hz;
  r.n_dofs = static_cast<std::size_t>(s.nd);

  const double c_fast = fastest_p_speed(p.layers);
  const double omega0 = p.pml_thickness > 0 ? pml_attenuation(p.pml_thickness, c_fast, p.pml_reflection, p.pml_order) : 0.0;
  s.pml = pml_layout(m, p.pml_thickness, omega0, p.pml_order, p.pml_real_stretch);
  r.pml = s.pml;
  r.pml_reflection_normal = pml_reflection(s.pml, c_fast, 0);
  r.pml_reflection_45 = pml_reflection(s.pml, c_fast, std::numbers::pi / 4);
  double vs_max = 0;
  for (const HarmonicLayer& l : p.layers)
    vs_max = std::max(vs_max, std::sqrt(l.elastic.young / (2 * (1 + l.elastic.poisson)) / l.elastic.density));
  r.pml_wavelengths = p.pml_thickness * *std::min_element(p.frequencies_hz.begin(), p.frequencies_hz.end()) / vs_max;
  s.pml_cell.assign(nc, 0);
  for (std::size_t c = 0; c < nc; ++c) {
    s.pml_cell[c] = in_pml(s.pml, corner_centroid(m, c));
    if (s.pml_cell[c]) s.pml_cells.push_back(c);
    if (m.void_id[c] >= 0) {
      if (s.pml_cell[c]) throw std::invalid_argument("harmonic: a void lies in the PML band");
      s.void_cells.push_back(c);
    }
  }
  r.pml_cell = s.pml_cell;
  s.physical.assign(m.n_nodes(), 0);
  for (std::size_t c = 0; c < nc; ++c)
    if (!s.pml_cell[c])
      for (int a = 0; a < m.npc(); ++a) s.physical[static_cast<std::size_t>(m.cell(c)[a])] = 1;

  // Constraints: the outer boundary (sides, bottom) fixed; in the model with voids the nodes that
  // touch no active cell (void interiors) fixed as well.
  r.reference.active.assign(nc, 1);
  r.voided.active.resize(nc);
  for (std::size_t c = 0; c < nc; ++c) r.voided.active[c] = m.void_id[c] < 0;
  s.fixed_ref = outer_fixed(m, s.d);
  s.fixed_void = s.fixed_ref;
  {
    std::vector<char> touched(m.n_nodes(), 0);
    for (std::size_t c = 0; c < nc; ++c)
      if (r.voided.active[c])
        for (int a = 0; a < m.npc(); ++a) touched[static_cast<std::size_t>(m.cell(c)[a])] = 1;
    for (std::size_t n = 0; n < m.n_nodes(); ++n)
      if (!touched[n])
        for (int j = 0; j < s.d; ++j) s.fixed_void[n * static_cast<std::size_t>(s.d) + static_cast<std::size_t>(j)] = 1;
  }

  s.cases.push_back({{p.source, p.force, p.wave}});
  for (const auto& lc : p.extra_cases) s.cases.push_back({lc});
  bool any_wave = false;
  for (const auto& c : s.cases) any_wave = any_wave || c.load.source == HarmonicProblem::Source::plane_wave;
  if (any_wave) {
    setup_drm(s);
    r.drm_inside = s.inside;
  }
  for (std::size_t c = 0; c < s.cases.size(); ++c) {
    std::pair<int, double> node{-1, 0.0};
    if (s.cases[c].load.source == HarmonicProblem::Source::plane_wave)
      setup_wave(s, s.cases[c]);
    else
      node = setup_force(s, s.cases[c]);
    if (c == 0) {
      r.force_node = node.first;
      r.force_offset = node.second;
    } else {
      r.extra_force_nodes.push_back(node.first);
      r.extra_force_offsets.push_back(node.second);
    }
  }
  if (p.output_nodes.empty()) {
    s.outputs.resize(m.n_nodes());
    for (std::size_t n = 0; n < m.n_nodes(); ++n) s.outputs[n] = static_cast<int>(n);
  } else {
    s.outputs = p.output_nodes;
    for (int n : s.outputs)
      if (n < 0 || static_cast<std::size_t>(n) >= m.n_nodes()) throw std::invalid_argument("harmonic: bad output node");
  }
  r.output_nodes = s.outputs;
  setup_shared(s);

  // Pattern (shared by every frequency and both models) and the frequency-independent parts.
  const auto t_setup = Clock::now();
  s.pattern = full_pattern(stiffness_pattern(m));
  const long nnz = s.pattern.nonZeros();
  s.diag_pos.resize(static_cast<std::size_t>(s.nd));
  for (long j = 0; j < s.nd; ++j) {
    const long* b = s.pattern.innerIndexPtr() + s.pattern.outerIndexPtr()[j];
    const long* e = s.pattern.innerIndexPtr() + s.pattern.outerIndexPtr()[j + 1];
    s.diag_pos[static_cast<std::size_t>(j)] = std::lower_bound(b, e, j) - s.pattern.innerIndexPtr();
  }
  s.kstar.assign(static_cast<std::size_t>(nnz), Complex(0.0));
  s.mass.assign(static_cast<std::size_t>(nnz), 0.0);
  {
    const int nd = m.npc() * s.d;
    Complex* kv = s.kstar.data();
    double* mv = s.mass.data();
#pragma omp parallel
    {
      std::vector<double> ke(static_cast<std::size_t>(nd * nd)), me(ke.size());
      std::vector<long> dof(static_cast<std::size_t>(nd)), pos(ke.size());
#pragma omp for schedule(dynamic, 512)
      for (long cl = 0; cl < static_cast<long>(nc); ++cl) {
        const auto c = static_cast<std::size_t>(cl);
        if (s.pml_cell[c]) continue;
        const HarmonicLayer& l = layer_of(s, c);
        dynamic_parts(m, c, l.elastic, p.kinematics, ke, me);
        cell_positions(s.pattern, m, c, s.d, dof.data(), pos.data());
        const Complex fac = hysteretic_factor(l.damping);
        for (std::size_t k = 0; k < ke.size(); ++k) {
          atomic_add(kv, pos[k], fac * ke[k]);
#pragma omp atomic
          mv[pos[k]] += me[k];
        }
      }
    }
  }
  r.setup_seconds = seconds_since(t_setup);
}

// The symbolic analysis of worker w on the first frequency's matrix (the model with voids when
// both share a factorisation); returns MUMPS's estimate of one factorisation's memory with the
// worker's matrix storage.
double analyse_first(const Setup& s, Worker& w) {
  assemble_model(s, 2 * std::numbers::pi * s.p->frequencies_hz[0], !s.gamma.empty(), w.a);
  try {
    w.ldlt.analyze(w.a, s.gamma, s.d);
  } catch (const ComplexSolveError& e) {
    fail(*s.p, 0, "symbolic analysis", e.what());
  }
  return w.ldlt.estimated_bytes() + 40.0 * static_cast<double>(s.pattern.nonZeros());
}

}  // namespace

HarmonicResult solve_harmonic(const HarmonicProblem& p, const Progress& progress) {
  const auto t_start = Clock::now();
  auto report = [&](std::string_view step, double frac) {
    if (progress) progress(step, frac);
  };
  Setup s;
  HarmonicResult r;
  report("pattern", 0);
  prepare(p, s, r);
  report("pattern", 1);
  const std::size_t nf = p.frequencies_hz.size();
  for (HarmonicModel* model : {&r.reference, &r.voided}) {
    if (model == &r.voided && !p.with_voids) break;
    model->u.resize(nf);
    model->u_extra.assign(p.extra_cases.size(), std::vector<ComplexVector>(nf));
    model->residual.assign(nf, 0.0);
    model->seconds.assign(nf, 0.0);
    model->factor_seconds.assign(nf, 0.0);
  }
  const bool shared = !s.gamma.empty();
  r.shared_boundary = s.gamma.size();
  // A unit of work: one frequency, both models on one factorisation (shared) or one model.
  struct Unit {
    std::size_t freq;
    bool voided;
  };
  std::vector<Unit> units;
  for (std::size_t f = 0; f < nf; ++f) {
    units.push_back({f, false});
    if (p.with_voids && !shared) units.push_back({f, true});
  }
  const auto run_unit = [&](const Unit& u, Worker& w) {
    if (shared)
      solve_shared(s, u.freq, w, r);
    else
      solve_separate(s, u.freq, u.voided, w, r);
  };

  std::vector<std::unique_ptr<Worker>> workers;
  workers.push_back(std::make_unique<Worker>(s, 0));
  std::size_t done = 0;
  auto tick = [&] {
    ++done;
    report("harmonic", static_cast<double>(done) / static_cast<double>(units.size()));
  };

  // MUMPS runs one call at a time per copy of the library (solver/la/complex_ldlt.hpp). Where a
  // second, private copy is installed, two frequencies are factorised at once, each on a
  // single-threaded BLAS: the faster choice measured on 2 cores (docs/theory.md), taken when one
  // factor per thread fits in 60 % of the available memory by MUMPS's estimate after the first
  // analysis. Otherwise (and for FrequencyLoop::sequential) one frequency at a time, the BLAS
  // using its own threads. FrequencyLoop::parallel skips the checks.
  // Refuse a sweep whose single factorisation would not fit, before it is attempted.
  const double one_factor = analyse_first(s, *workers[0]);
  const double limit = p.memory_limit_bytes > 0 ? p.memory_limit_bytes : 0.9 * available_memory_bytes();
  if (limit > 0 && one_factor > limit) {
    std::ostringstream os;
    os.precision(3);
    os << "harmonic: one factorisation of the " << s.nd << " unknowns needs an estimated " << one_factor / 1e9
       << " GB (MUMPS's analysis), more than the " << limit / 1e9
       << " GB available; coarsen the mesh (mesh.size, mesh.near-void) or reduce the block";
    throw SolveFailure(os.str());
  }
  const int n_threads = std::min<int>(omp_get_max_threads(), static_cast<int>(units.size()));
  bool parallel = n_threads > 1 && p.loop == FrequencyLoop::parallel;
  if (n_threads > 1 && p.loop == FrequencyLoop::automatic && ComplexLdlt::concurrent_slots()) {
    const double need = n_threads * one_factor;
    const double avail = available_memory_bytes();
    parallel = avail <= 0 || need < 0.6 * avail;
  }
  const int blas_before = parallel ? set_blas_threads(1) : 0;
  struct BlasRestore {
    int n;
    ~BlasRestore() {
      if (n > 0) set_blas_threads(n);
    }
  } restore{blas_before};
  if (!parallel) {
    r.loop = "sequential";
    for (std::size_t i = 0; i < units.size(); ++i) {
      run_unit(units[i], *workers[0]);
      tick();
    }
  } else {
    r.loop = "parallel (" + std::to_string(n_threads) + " threads)";
    for (int t = 1; t < n_threads; ++t) workers.push_back(std::make_unique<Worker>(s, t % 2));
    std::exception_ptr error;
    const long n_units = static_cast<long>(units.size());
#pragma omp parallel num_threads(n_threads)
    {
      const auto t = static_cast<std::size_t>(omp_get_thread_num());
#pragma omp for schedule(dynamic, 1)
      for (long i = 0; i < n_units; ++i) {
        try {
          run_unit(units[static_cast<std::size_t>(i)], *workers[t]);
#pragma omp critical(harmonic_progress)
          tick();
        } catch (...) {
#pragma omp critical(harmonic_error)
          if (!error) error = std::current_exception();
        }
      }
    }
    if (error) std::rethrow_exception(error);
  }
  for (const auto& w : workers) {
    r.analyse_seconds += w->ldlt.analyse_seconds();
    r.factor_nonzeros = std::max(r.factor_nonzeros, w->ldlt.factor_nonzeros());
    r.peak_bytes = std::max(r.peak_bytes, w->ldlt.peak_bytes());
  }
  std::ostringstream solver;
  solver << "MUMPS complex symmetric LDLT, symbolic analysis reused over frequencies";
  if (shared)
    solver << "; both models on one factorisation per frequency (dense Schur complement on the " << s.gamma.size()
           << " void-boundary unknowns)";
  r.linear_solver = solver.str();
  r.total_seconds = seconds_since(t_start);
  return r;
}

HarmonicEstimate estimate_harmonic(const HarmonicProblem& p) {
  Setup s;
  HarmonicResult r;
  prepare(p, s, r);
  Worker w(s, 0);
  const bool shared = !s.gamma.empty();
  const double bytes = analyse_first(s, w);
  HarmonicEstimate e;
  e.n_dofs = static_cast<std::size_t>(s.nd);
  e.shared_boundary = s.gamma.size();
  e.factorisations_per_frequency = shared || !p.with_voids ? 1 : 2;
  e.factor_entries = w.ldlt.estimated_entries();
  e.flops = w.ldlt.estimated_flops();
  e.bytes = bytes;
  e.available_bytes = available_memory_bytes();
  // Rates measured with harmonic_bench on the 2-core benchmark machine (docs/benchmarks.md):
  // about 5 Gflop/s per frequency for 2D fronts, 18 Gflop/s for the large fronts of 3D.
  const double rate = s.d == 3 ? 18e9 : 5e9;
  e.seconds_per_frequency = e.factorisations_per_frequency * e.flops / rate;
  return e;
}

HarmonicSystem harmonic_system(const HarmonicProblem& p, double frequency_hz, bool voided) {
  Setup s;
  HarmonicResult r;
  prepare(p, s, r);
  HarmonicSystem sys;
  const double omega = 2 * std::numbers::pi * frequency_hz;
  sys.matrix = s.pattern;
  assemble_model(s, omega, voided, sys.matrix);
  sys.rhs = right_hand_side(s, omega, s.cases.front(), case_fields(s, omega).front().get());
  const std::vector<char>& fixed = voided ? s.fixed_void : s.fixed_ref;
  for (long j = 0; j < s.nd; ++j)
    if (fixed[static_cast<std::size_t>(j)]) sys.rhs[j] = 0;
  return sys;
}

}  // namespace voidsign::solver
