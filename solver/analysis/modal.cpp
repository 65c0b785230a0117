// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/modal.hpp"

#include <omp.h>

#include <Spectra/SymGEigsShiftSolver.h>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <random>
#include <sstream>
#include <string>

namespace voidsign::solver {

namespace {

using Clock = std::chrono::steady_clock;

double since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

// y = (K − σM)⁻¹ x with the factor computed before the eigensolver is built. Spectra calls
// set_shift once, from the solver's constructor, with the same σ.
class ShiftSolveOp {
 public:
  using Scalar = double;
  ShiftSolveOp(const Cholesky& chol, Eigen::Index n, double sigma) : chol_(chol), n_(n), sigma_(sigma), b_(n) {}
  Eigen::Index rows() const { return n_; }
  Eigen::Index cols() const { return n_; }
  void set_shift(double sigma) {
    if (sigma != sigma_) throw std::logic_error("modal: the shift differs from the factorised one");
  }
  void perform_op(const double* x, double* y) const {
    b_ = Eigen::Map<const Vector>(x, n_);
    Eigen::Map<Vector>(y, n_) = chol_.solve(b_);
  }

 private:
  const Cholesky& chol_;
  Eigen::Index n_;
  double sigma_;
  mutable Vector b_;
};

// y = P M P x, with P the projection that zeroes the dofs outside the spectrum. Lanczos calls
// it three to eight times per step (operator, inner products, reorthogonalisation), so P M P is
// stored once as a full row-major matrix without the zero couplings between directions, which
// multiplies row by row in parallel, unlike the lower triangle.
constexpr long parallel_min_nonzeros = 1'000'000;

class MaskedMassOp {
 public:
  using Scalar = double;
  using RowMatrix = Eigen::SparseMatrix<double, Eigen::RowMajor, int>;
  MaskedMassOp(const SparseMatrix& m, const std::vector<char>& skip) : skip_(skip) {
    SparseMatrix lower = m;
    const int* outer = lower.outerIndexPtr();
    const int* rows = lower.innerIndexPtr();
    double* vals = lower.valuePtr();
    for (Eigen::Index j = 0; j < lower.cols(); ++j)
      for (int p = outer[j]; p < outer[j + 1]; ++p)
        if (skip[static_cast<std::size_t>(j)] || skip[static_cast<std::size_t>(rows[p])]) vals[p] = 0;
    lower.prune(0.0, 0.0);
    full_ = lower.selfadjointView<Eigen::Lower>();
    full_.makeCompressed();
  }
  Eigen::Index rows() const { return full_.rows(); }
  Eigen::Index cols() const { return full_.cols(); }
  void perform_op(const double* x, double* y) const {
    const long n = static_cast<long>(full_.rows());
    const int* outer = full_.outerIndexPtr();
    const int* cols = full_.innerIndexPtr();
    const double* vals = full_.valuePtr();
    // Threads only pay off on large matrices: a parallel region costs more than a small product,
    // and much more when the machine is oversubscribed.
#pragma omp parallel for schedule(static) if (full_.nonZeros() > parallel_min_nonzeros)
    for (long i = 0; i < n; ++i) {
      double sum = 0;
      for (int p = outer[i]; p < outer[i + 1]; ++p) sum += vals[p] * x[cols[p]];
      y[i] = sum;
    }
  }
  template <class V>
  void mask(V& v) const {
    for (Eigen::Index j = 0; j < v.size(); ++j)
      if (skip_[static_cast<std::size_t>(j)]) v[j] = 0;
  }

 private:
  const std::vector<char>& skip_;
  RowMatrix full_;
};

std::uint64_t hash_pattern(const SparseMatrix& a) {
  // FNV-1a over the size and the index arrays: a cheap guard against reusing a symbolic
  // analysis with another pattern.
  std::uint64_t h = 1469598103934665603ull;
  auto mix = [&h](std::uint64_t v) {
    h ^= v;
    h *= 1099511628211ull;
  };
  mix(static_cast<std::uint64_t>(a.rows()));
  mix(static_cast<std::uint64_t>(a.nonZeros()));
  for (Eigen::Index j = 0; j <= a.cols(); ++j) mix(static_cast<std::uint64_t>(a.outerIndexPtr()[j]));
  for (Eigen::Index p = 0; p < a.nonZeros(); ++p) mix(static_cast<std::uint64_t>(a.innerIndexPtr()[p]));
  return h == 0 ? 1 : h;
}

void check_inputs(const SparseMatrix& k, const SparseMatrix& m, const std::vector<char>& fixed) {
  const Eigen::Index n = k.rows();
  if (k.cols() != n || m.rows() != n || m.cols() != n || static_cast<Eigen::Index>(fixed.size()) != n)
    throw std::invalid_argument("modal: K, M and the fixed flags must have the same size");
  if (!k.isCompressed() || !m.isCompressed() || k.nonZeros() != m.nonZeros() ||
      !std::equal(k.outerIndexPtr(), k.outerIndexPtr() + n + 1, m.outerIndexPtr()) ||
      !std::equal(k.innerIndexPtr(), k.innerIndexPtr() + k.nonZeros(), m.innerIndexPtr()))
    throw std::invalid_argument("modal: K and M must share the pattern of stiffness_pattern()");
  for (Eigen::Index j = 0; j < n; ++j) {
    const int p = k.outerIndexPtr()[j];
    if (p == k.outerIndexPtr()[j + 1] || k.innerIndexPtr()[p] != j)
      throw std::invalid_argument("modal: every column must start with its diagonal entry");
  }
}

std::string fmt(double v) {
  std::ostringstream s;
  s.precision(4);
  s << v;
  return s.str();
}

}  // namespace

ModalResult ModalSolver::solve(const SparseMatrix& k, const SparseMatrix& m, const std::vector<char>& fixed,
                               const ModalOptions& opt) {
  const auto t0 = Clock::now();
  check_inputs(k, m, fixed);
  const Eigen::Index n = k.rows();
  const int* outer = k.outerIndexPtr();
  const double* kv = k.valuePtr();
  const double* mv = m.valuePtr();

  // Dofs outside the spectrum: fixed, or without mass (no active cell touches them).
  std::vector<char> skip(static_cast<std::size_t>(n), 0);
  std::size_t n_free = 0;
  double k_trace = 0, m_trace = 0;
  for (Eigen::Index j = 0; j < n; ++j) {
    const auto ju = static_cast<std::size_t>(j);
    skip[ju] = fixed[ju] || !(mv[outer[j]] > 0);
    if (skip[ju]) continue;
    ++n_free;
    k_trace += kv[outer[j]];
    m_trace += mv[outer[j]];
  }
  if (opt.n_modes < 1 || static_cast<std::size_t>(opt.n_modes) >= n_free)
    throw std::invalid_argument("modal: " + std::to_string(opt.n_modes) + " modes asked of a model with " +
                                std::to_string(n_free) + " free dofs (at least 1 and fewer than the free dofs)");
  if (!(k_trace > 0)) throw ModalFailure("modal: the stiffness of the free dofs is zero");

  // σ: just below zero, 1e-6 of the typical cell-scale ω² (trace K / trace M), so that K − σM
  // is SPD even for an unsupported model (rigid modes) and is conditioned no worse than about
  // 1e7; the lowest elastic ω² is of order (cell size / model size)² of that scale, so |σ| is
  // usually well below it (convergence slows, but stays correct, when it is not). Or (2π f_low)²
  // when a lower frequency is given.
  const double two_pi = 2 * std::numbers::pi;
  const double sigma = opt.shift_hz > 0 ? std::pow(two_pi * opt.shift_hz, 2) : -1e-6 * k_trace / m_trace;

  ModalResult res;
  res.shift = sigma;
  res.n_free = n_free;

  // A = K − σM on K's pattern, constrained.
  SparseMatrix a = k;
  {
    double* av = a.valuePtr();
    for (Eigen::Index p = 0; p < a.nonZeros(); ++p) av[p] = kv[p] - sigma * mv[p];
  }
  constrain_matrix(a, skip);
  const auto tf = Clock::now();
  const std::uint64_t h = hash_pattern(a);
  if (!chol_ || chol_dofs_per_node_ != opt.dofs_per_node) {
    chol_ = std::make_unique<Cholesky>(std::max(opt.dofs_per_node, 1));
    chol_dofs_per_node_ = opt.dofs_per_node;
    pattern_hash_ = 0;
  }
  if (h != pattern_hash_) {
    chol_->analyze(a);
    pattern_hash_ = h;
  }
  if (chol_->factorize(a) != Status::ok) {
    if (opt.shift_hz > 0)
      throw ModalFailure("modal: K - sigma M is not positive definite at the shift " + fmt(opt.shift_hz) +
                         " Hz: the model has natural frequencies below it (lower the shift or set it to 0)");
    throw ModalFailure(
        "modal: K - sigma M is not positive definite for a shift just below zero: the stiffness is not "
        "positive semi-definite (check the materials and the cells)");
  }
  res.seconds_factorize = since(tf);
  res.factor_nonzeros = chol_->factor_nonzeros();

  ShiftSolveOp op(*chol_, n, sigma);
  MaskedMassOp bop(m, skip);
  const Eigen::Index nev = opt.n_modes;
  // A basis of 3 nev: 20 modes of a 500 k dof model took 61 products and 1 restart against 65
  // and 3 with 2 nev + 1, 29.0 s against 30.8 s (tests/bench/modal/modal_bench.cpp).
  Eigen::Index ncv = opt.subspace > 0 ? opt.subspace : std::max<Eigen::Index>(3 * nev, 20);
  ncv = std::clamp<Eigen::Index>(ncv, nev + 1, static_cast<Eigen::Index>(n_free));
  Spectra::SymGEigsShiftSolver<ShiftSolveOp, MaskedMassOp, Spectra::GEigsMode::ShiftInvert> eig(op, bop, nev, ncv,
                                                                                                 sigma);
  // A start vector inside the free subspace keeps every Lanczos vector there (the operator
  // and the M-inner product only see the free dofs).
  Vector v0(n);
  std::mt19937_64 rng(20240611);
  std::uniform_real_distribution<double> uni(-0.5, 0.5);
  for (Eigen::Index j = 0; j < n; ++j) v0[j] = skip[static_cast<std::size_t>(j)] ? 0.0 : 1.0 + uni(rng);
  eig.init(v0.data());
  const Eigen::Index nconv = eig.compute(Spectra::SortRule::LargestMagn, opt.max_iterations, opt.tolerance,
                                         Spectra::SortRule::SmallestAlge);
  res.iterations = static_cast<int>(eig.num_iterations());
  res.operations = static_cast<int>(eig.num_operations());
  if (eig.info() != Spectra::CompInfo::Successful || nconv < nev)
    throw ModalFailure("modal: the Lanczos iteration converged " + std::to_string(nconv) + " of " +
                       std::to_string(nev) + " modes in " + std::to_string(res.iterations) +
                       " restarts (raise max_iterations or the subspace size)");

  const Vector lambda = eig.eigenvalues();
  res.shapes = eig.eigenvectors();
  const auto nm = static_cast<std::size_t>(nev);
  res.eigenvalue.resize(nm);
  res.freq_hz.resize(nm);
  res.residual.resize(nm);
  for (Eigen::Index j = 0; j < nev; ++j) {
    const auto ju = static_cast<std::size_t>(j);
    auto phi = res.shapes.col(j);
    for (Eigen::Index i = 0; i < n; ++i)
      if (skip[static_cast<std::size_t>(i)]) phi[i] = 0;
    Vector mphi(n);
    bop.perform_op(phi.data(), mphi.data());
    const double mnorm = phi.dot(mphi);
    if (!(mnorm > 0)) throw ModalFailure("modal: mode " + std::to_string(j + 1) + " has no kinetic energy");
    const double s = 1 / std::sqrt(mnorm);
    Eigen::Index imax = 0;
    phi.cwiseAbs().maxCoeff(&imax);
    const double sign = phi[imax] < 0 ? -1.0 : 1.0;
    phi *= s * sign;
    mphi *= s * sign;
    Vector kphi = k.selfadjointView<Eigen::Lower>() * phi;
    bop.mask(kphi);
    const double w2 = lambda[j];
    const double scale = std::max(kphi.norm(), std::abs(sigma) * mphi.norm());
    res.residual[ju] = scale > 0 ? (kphi - w2 * mphi).norm() / scale : 0.0;
    res.eigenvalue[ju] = w2;
    res.freq_hz[ju] = std::sqrt(std::max(w2, 0.0)) / two_pi;
    if (!(res.residual[ju] <= opt.max_residual))
      throw ModalFailure("modal: mode " + std::to_string(j + 1) + " (" + fmt(res.freq_hz[ju]) +
                         " Hz) has a relative residual " + fmt(res.residual[ju]) + " above " +
                         fmt(opt.max_residual));
  }
  res.seconds = since(t0);
  return res;
}

ModalResult solve_modal(const SparseMatrix& k, const SparseMatrix& m, const std::vector<char>& fixed,
                        const ModalOptions& opt) {
  ModalSolver s;
  return s.solve(k, m, fixed, opt);
}

Participation participation(const SparseMatrix& m, const std::vector<char>& fixed, const Eigen::MatrixXd& shapes,
                            Kinematics kin) {
  const Eigen::Index n = m.rows();
  const int d = dofs_per_node(kin);
  const Eigen::Index nm = shapes.cols();
  MaskedMassOp bop(m, fixed);
  Participation p;
  p.factor.assign(static_cast<std::size_t>(nm), {0, 0, 0});
  p.effective_mass.assign(static_cast<std::size_t>(nm), {0, 0, 0});
  // φᵀMφ per mode.
  Eigen::VectorXd mm(nm);
  Vector t(n);
  for (Eigen::Index j = 0; j < nm; ++j) {
    bop.perform_op(shapes.col(j).data(), t.data());
    mm[j] = shapes.col(j).dot(t);
  }
  for (int i = 0; i < d; ++i) {
    // Direction index in (x, y, z): 2D unknowns are (u_x, u_z).
    const std::size_t dir = d == 3 ? static_cast<std::size_t>(i) : (i == 0 ? 0u : 2u);
    Vector r = Vector::Zero(n);
    for (Eigen::Index a = i; a < n; a += d) r[a] = 1;
    Vector mr(n);
    bop.perform_op(r.data(), mr.data());
    p.total_mass[dir] = r.dot(mr);
    const Eigen::VectorXd g = shapes.transpose() * mr;
    for (Eigen::Index j = 0; j < nm; ++j) {
      const auto ju = static_cast<std::size_t>(j);
      p.factor[ju][dir] = mm[j] > 0 ? g[j] / mm[j] : 0.0;
      p.effective_mass[ju][dir] = mm[j] > 0 ? g[j] * g[j] / mm[j] : 0.0;
    }
  }
  return p;
}

std::vector<double> energy_fraction_in(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                                       const DensityOf& density_of, const Eigen::MatrixXd& shapes,
                                       const std::vector<char>& inside) {
  const int n = m.npc();
  const int d = dofs_per_node(kin);
  const auto nm = static_cast<std::size_t>(shapes.cols());
  const long nc = static_cast<long>(m.n_cells());
  std::vector<double> in(nm, 0.0), all(nm, 0.0);
  std::exception_ptr error;
#pragma omp parallel
  {
    std::vector<double> in_t(nm, 0.0), all_t(nm, 0.0);
    std::array<double, max_cell_nodes * max_cell_nodes> s{};
#pragma omp for schedule(dynamic, 512)
    for (long c = 0; c < nc; ++c) {
      const auto cu = static_cast<std::size_t>(c);
      if (!active[cu] || !detail::cell_mass(m, cu, density_of, kin, s, error)) continue;
      const int* v = m.cell(cu);
      for (std::size_t j = 0; j < nm; ++j) {
        const double* phi = shapes.col(static_cast<Eigen::Index>(j)).data();
        double e = 0;
        for (int a = 0; a < n; ++a)
          for (int b = 0; b < n; ++b) {
            double dot = 0;
            for (int i = 0; i < d; ++i) dot += phi[d * v[a] + i] * phi[d * v[b] + i];
            e += s[static_cast<std::size_t>(a * n + b)] * dot;
          }
        all_t[j] += e;
        if (inside[cu]) in_t[j] += e;
      }
    }
#pragma omp critical
    for (std::size_t j = 0; j < nm; ++j) {
      in[j] += in_t[j];
      all[j] += all_t[j];
    }
  }
  if (error) std::rethrow_exception(error);
  std::vector<double> frac(nm, 0.0);
  for (std::size_t j = 0; j < nm; ++j) frac[j] = all[j] > 0 ? in[j] / all[j] : 0.0;
  return frac;
}

}  // namespace voidsign::solver
