// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/iterative.hpp"

#include <_hypre_parcsr_ls.h>  // the vectors' and the matrix's arrays
#include <omp.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdlib>
#include <cstring>
#include <mutex>
#include <stdexcept>
#include <type_traits>

#include "solver/la/hypre_library.hpp"

namespace voidsign::solver {

namespace {

static_assert(std::is_same_v<HYPRE_Int, int>, "hypre built with 64-bit local indices");
static_assert(std::is_same_v<HYPRE_Real, double>, "hypre not built in double precision");

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

/// Row-compressed view of the full symmetric matrix, from our arrays or hypre's.
struct CsrView {
  int n = 0;
  const int* ptr = nullptr;
  const int* col = nullptr;
  const double* val = nullptr;
};

/// Below some size the fork/join of a parallel loop costs more than the loop.
int thread_count(int requested, int n) {
  if (n < 20000) return 1;
  return requested > 0 ? requested : omp_get_max_threads();
}

void multiply(const CsrView& a, const double* x, double* y, int threads) {
#pragma omp parallel for num_threads(threads) schedule(static)
  for (int i = 0; i < a.n; ++i) {
    double s = 0;
    for (int p = a.ptr[i]; p < a.ptr[i + 1]; ++p) s += a.val[p] * x[a.col[p]];
    y[i] = s;
  }
}

double dot(const Vector& a, const Vector& b, int threads) {
  const Eigen::Index n = a.size();
  const double* pa = a.data();
  const double* pb = b.data();
  double s = 0;
#pragma omp parallel for num_threads(threads) schedule(static) reduction(+ : s)
  for (Eigen::Index i = 0; i < n; ++i) s += pa[i] * pb[i];
  return s;
}

}  // namespace

struct IterativeSolver::Impl {
  IterativeOptions opt;
  int n = 0;
  int block = 1;
  // Our copy of the full matrix; released once hypre holds it (then `a` views hypre's arrays).
  std::vector<int> ptr, col;
  std::vector<double> val;
  CsrView a;
  Vector inv_diag;
  bool ready = false;
  bool use_amg = false;
  double setup_s = 0;
  std::string method;
  std::string failure;  ///< hypre's message when the AMG set-up failed

  HypreLibrary* lib = nullptr;  ///< the copy of hypre that holds the objects below
  HYPRE_IJMatrix ij_a = nullptr;
  HYPRE_ParCSRMatrix par_a = nullptr;
  HYPRE_Solver amg = nullptr;
  HYPRE_IJVector ij_r = nullptr, ij_z = nullptr;
  HYPRE_ParVector par_r = nullptr, par_z = nullptr;
  std::vector<HYPRE_IJVector> ij_modes;
  std::vector<HYPRE_ParVector> par_modes;

  ~Impl() {
    const auto held = hold();
    release_hypre();
  }

  /// The lock of this solver's copy of hypre (none before the first AMG set-up).
  std::unique_lock<std::mutex> hold() const {
    return lib ? std::unique_lock<std::mutex>(lib->lock) : std::unique_lock<std::mutex>();
  }

  /// With hold().
  void release_hypre() {
    if (!lib) return;
    if (amg) lib->HYPRE_BoomerAMGDestroy(amg);  // before the modes it points to
    amg = nullptr;
    for (auto v : ij_modes) lib->HYPRE_IJVectorDestroy(v);
    ij_modes.clear();
    par_modes.clear();
    if (ij_r) lib->HYPRE_IJVectorDestroy(ij_r);
    if (ij_z) lib->HYPRE_IJVectorDestroy(ij_z);
    if (ij_a) lib->HYPRE_IJMatrixDestroy(ij_a);
    ij_r = ij_z = nullptr;
    par_r = par_z = nullptr;
    ij_a = nullptr;
    par_a = nullptr;
  }

  HYPRE_IJVector new_vector(HYPRE_ParVector* par) const {
    HYPRE_IJVector v = nullptr;
    lib->HYPRE_IJVectorCreate(lib->comm, 0, n - 1, &v);
    lib->HYPRE_IJVectorSetObjectType(v, HYPRE_PARCSR);
    lib->HYPRE_IJVectorInitialize(v);
    lib->HYPRE_IJVectorAssemble(v);
    lib->HYPRE_IJVectorGetObject(v, reinterpret_cast<void**>(par));
    return v;
  }

  static double* data_of(HYPRE_ParVector v) {
    return hypre_VectorData(hypre_ParVectorLocalVector(reinterpret_cast<hypre_ParVector*>(v)));
  }

  /// Builds BoomerAMG on a copy of the matrix; on success our own copy is released.
  /// Returns false (and leaves nothing behind) when hypre reports an error.
  bool setup_amg(const std::vector<std::array<double, 3>>* coords, const std::vector<char>& isolated) {
    lib = &hypre_library(opt.library_copy);
    const auto held = hold();
    lib->HYPRE_ClearAllErrors();
    lib->HYPRE_IJMatrixCreate(lib->comm, 0, n - 1, 0, n - 1, &ij_a);
    lib->HYPRE_IJMatrixSetObjectType(ij_a, HYPRE_PARCSR);
    std::vector<HYPRE_Int> sizes(n), zeros(n, 0);
    for (int i = 0; i < n; ++i) sizes[i] = ptr[i + 1] - ptr[i];
    lib->HYPRE_IJMatrixSetDiagOffdSizes(ij_a, sizes.data(), zeros.data());
    lib->HYPRE_IJMatrixInitialize(ij_a);
    {
      std::vector<HYPRE_BigInt> rows(n);
      for (int i = 0; i < n; ++i) rows[i] = i;
      if constexpr (std::is_same_v<HYPRE_BigInt, int>) {
        lib->HYPRE_IJMatrixSetValues(ij_a, n, sizes.data(), rows.data(), col.data(), val.data());
      } else {
        std::vector<HYPRE_BigInt> cols(col.begin(), col.end());
        lib->HYPRE_IJMatrixSetValues(ij_a, n, sizes.data(), rows.data(), cols.data(), val.data());
      }
    }
    lib->HYPRE_IJMatrixAssemble(ij_a);
    lib->HYPRE_IJMatrixGetObject(ij_a, reinterpret_cast<void**>(&par_a));
    ij_r = new_vector(&par_r);
    ij_z = new_vector(&par_z);
    if (const HYPRE_Int code = lib->HYPRE_GetError()) return fail("matrix", code);
    // Our products now read hypre's copy (one rank: everything is in the diagonal part); ours
    // goes before the hierarchy is built, so that the two are never held at once.
    hypre_CSRMatrix* d = hypre_ParCSRMatrixDiag(reinterpret_cast<hypre_ParCSRMatrix*>(par_a));
    a = {n, hypre_CSRMatrixI(d), hypre_CSRMatrixJ(d), hypre_CSRMatrixData(d)};
    std::vector<int>().swap(ptr);
    std::vector<int>().swap(col);
    std::vector<double>().swap(val);

    lib->HYPRE_BoomerAMGCreate(&amg);
    lib->HYPRE_BoomerAMGSetPrintLevel(amg, 0);
    lib->HYPRE_BoomerAMGSetMaxIter(amg, 1);  // one V-cycle per application, no convergence test
    lib->HYPRE_BoomerAMGSetTol(amg, 0.0);
    lib->HYPRE_BoomerAMGSetCoarsenType(amg, 10);  // HMIS
    lib->HYPRE_BoomerAMGSetInterpType(amg, 6);    // extended+i
    lib->HYPRE_BoomerAMGSetPMaxElmts(amg, opt.interp_max_elements);
    lib->HYPRE_BoomerAMGSetStrongThreshold(amg, opt.strong_threshold);
    lib->HYPRE_BoomerAMGSetAggNumLevels(amg, opt.aggressive_levels);
    // Symmetric V(1,1): l1 Gauss–Seidel forward going down, backward going up; Gaussian
    // elimination on the coarsest level.
    lib->HYPRE_BoomerAMGSetCycleRelaxType(amg, 13, 1);
    lib->HYPRE_BoomerAMGSetCycleRelaxType(amg, 14, 2);
    lib->HYPRE_BoomerAMGSetCycleRelaxType(amg, 9, 3);
    method = "CG + BoomerAMG";
    std::string detail;
    if (block > 1) {
      lib->HYPRE_BoomerAMGSetNumFunctions(amg, block);  // dof i belongs to function i % block
      detail = std::to_string(block) + " functions";
      if (opt.nodal_coarsening) {
        lib->HYPRE_BoomerAMGSetNodal(amg, 4);      // strength from the row-sum norm of node blocks
        lib->HYPRE_BoomerAMGSetNodalDiag(amg, 1);  // ... with the diagonal set to −Σ off-diagonal
        detail += ", nodal";
        if (opt.rigid_body_modes && coords && block == 3) {
          add_rotations(*coords, isolated);
          detail += ", 3 rotations";
        }
      }
    }
    if (!detail.empty()) method += " (" + detail + ")";
    lib->HYPRE_BoomerAMGSetup(amg, par_a, par_r, par_z);
    if (const HYPRE_Int code = lib->HYPRE_GetError()) {
      // The matrix back into our arrays, for the Jacobi fallback.
      ptr.assign(a.ptr, a.ptr + n + 1);
      col.assign(a.col, a.col + ptr[n]);
      val.assign(a.val, a.val + ptr[n]);
      a = {n, ptr.data(), col.data(), val.data()};
      return fail("multigrid set-up", code);
    }
    return true;
  }

  /// Records hypre's message for `code` and releases everything hypre holds (with hold()).
  bool fail(const char* phase, HYPRE_Int code) {
    char text[256] = {0};
    lib->HYPRE_DescribeError(code, text);
    failure = std::string(phase) + ": " + text;
    lib->HYPRE_ClearAllErrors();
    release_hypre();
    return false;
  }

  /// Rotations about the centroid of the nodes, zero at isolated (constrained) unknowns; the
  /// translations need no vectors in unknown-based systems AMG.
  void add_rotations(const std::vector<std::array<double, 3>>& coords, const std::vector<char>& isolated) {
    double c[3] = {0, 0, 0};
    for (const auto& p : coords)
      for (int k = 0; k < 3; ++k) c[k] += p[k] / static_cast<double>(coords.size());
    // Scaled to at most 1: vectors in metres next to unit translations made the coarse
    // interpolation weights blow up (measured, docs/solvers.md).
    double extent = 0;
    for (const auto& p : coords)
      for (int k = 0; k < 3; ++k) extent = std::max(extent, std::abs(p[k] - c[k]));
    const double scale = extent > 0 ? 1 / extent : 1;
    for (int m = 0; m < 3; ++m) {
      HYPRE_ParVector par = nullptr;
      ij_modes.push_back(new_vector(&par));
      par_modes.push_back(par);
      double* v = data_of(par);
      const int i1 = (m + 1) % 3, i2 = (m + 2) % 3;  // rotation about axis m: (x_i1, x_i2) → (−x_i2, x_i1)
      for (std::size_t node = 0; node < coords.size(); ++node) {
        double* u = v + 3 * node;
        u[0] = u[1] = u[2] = 0;
        u[i1] = -(coords[node][i2] - c[i2]) * scale;
        u[i2] = (coords[node][i1] - c[i1]) * scale;
        for (int k = 0; k < 3; ++k)
          if (isolated[3 * node + k]) u[k] = 0;
      }
    }
    lib->HYPRE_BoomerAMGSetInterpVecVariant(amg, 2);  // GM approach 2
    lib->HYPRE_BoomerAMGSetInterpVecQMax(amg, 4);
    lib->HYPRE_BoomerAMGSetSmoothInterpVectors(amg, 1);
    lib->HYPRE_BoomerAMGSetInterpRefine(amg, 1);
    // The coarse levels then hold rows of zeros, which the l1 smoothers refuse; hybrid
    // symmetric Gauss–Seidel skips them.
    lib->HYPRE_BoomerAMGSetRelaxType(amg, 6);
    lib->HYPRE_BoomerAMGSetCycleRelaxType(amg, 9, 3);
    lib->HYPRE_BoomerAMGSetInterpVectors(amg, static_cast<int>(par_modes.size()), par_modes.data());
  }

  void precondition(bool amg_on, const Vector& r, Vector& z, int threads) const {
    if (amg_on) {
      std::memcpy(data_of(par_r), r.data(), sizeof(double) * n);
      std::memset(data_of(par_z), 0, sizeof(double) * n);
      lib->HYPRE_BoomerAMGSolve(amg, par_a, par_r, par_z);
      std::memcpy(z.data(), data_of(par_z), sizeof(double) * n);
    } else {
      const double* pr = r.data();
      const double* pd = inv_diag.data();
      double* pz = z.data();
#pragma omp parallel for num_threads(threads) schedule(static)
      for (int i = 0; i < n; ++i) pz[i] = pd[i] * pr[i];
    }
  }
};

IterativeSolver::IterativeSolver(IterativeOptions options) : impl_(std::make_unique<Impl>()) {
  impl_->opt = options;
}

IterativeSolver::~IterativeSolver() = default;

const IterativeOptions& IterativeSolver::options() const { return impl_->opt; }

std::string IterativeSolver::method() const { return impl_->method; }

bool IterativeSolver::independent_copies() { return hypre_has_private_copy(); }

void IterativeSolver::setup(const SparseMatrix& lower, int dofs_per_node,
                            const std::vector<std::array<double, 3>>* coords) {
  const auto t0 = Clock::now();
  Impl& m = *impl_;
  {
    const auto held = m.hold();
    m.release_hypre();
  }
  m.ready = false;
  if (lower.rows() != lower.cols() || lower.rows() == 0)
    throw std::invalid_argument("IterativeSolver::setup: the matrix must be square and not empty");
  if (dofs_per_node < 1 || lower.rows() % dofs_per_node != 0)
    throw std::invalid_argument("IterativeSolver::setup: size not a multiple of dofs_per_node");
  const int n = static_cast<int>(lower.rows());
  if (coords && static_cast<long>(coords->size()) * dofs_per_node != n)
    throw std::invalid_argument("IterativeSolver::setup: coords do not match the matrix size");
  m.n = n;
  m.block = m.opt.block_size > 0 ? m.opt.block_size : dofs_per_node;
  if (n % m.block != 0) throw std::invalid_argument("IterativeSolver::setup: size not a multiple of block_size");

  // Full symmetric matrix by rows, explicit zeros dropped. Row i: the entries (i, j < i) found
  // in the columns j of the lower triangle, then column i itself; visiting the columns in order
  // leaves every row sorted.
  const SparseMatrix* k = &lower;
  SparseMatrix compressed;
  if (!lower.isCompressed()) {
    compressed = lower;
    compressed.makeCompressed();
    k = &compressed;
  }
  const int* outer = k->outerIndexPtr();
  const int* inner = k->innerIndexPtr();
  const double* value = k->valuePtr();
  std::vector<int> count(n + 1, 0);
  std::vector<char> has_diag(n, 0), isolated(n, 1);
  for (int j = 0; j < n; ++j)
    for (int p = outer[j]; p < outer[j + 1]; ++p) {
      const int i = inner[p];
      if (i < j) throw std::invalid_argument("IterativeSolver::setup: entry above the diagonal");
      if (i == j) {
        has_diag[j] = value[p] > 0;
        ++count[j + 1];
      } else if (value[p] != 0) {
        ++count[i + 1];
        ++count[j + 1];
        isolated[i] = isolated[j] = 0;
      }
    }
  for (int i = 0; i < n; ++i)
    if (!has_diag[i]) throw std::invalid_argument("IterativeSolver::setup: diagonal entry not positive");
  for (int i = 0; i < n; ++i) count[i + 1] += count[i];
  m.ptr.assign(count.begin(), count.end());
  m.col.resize(m.ptr[n]);
  m.val.resize(m.ptr[n]);
  m.inv_diag.resize(n);
  std::vector<int> next(m.ptr.begin(), m.ptr.end() - 1);
  for (int j = 0; j < n; ++j)
    for (int p = outer[j]; p < outer[j + 1]; ++p) {
      const int i = inner[p];
      const double v = value[p];
      if (i == j) {
        m.inv_diag[j] = 1.0 / v;
      } else if (v == 0) {
        continue;
      }
      m.col[next[j]] = i;
      m.val[next[j]++] = v;
      if (i != j) {
        m.col[next[i]] = j;
        m.val[next[i]++] = v;
      }
    }
  m.a = {n, m.ptr.data(), m.col.data(), m.val.data()};

  m.use_amg = false;
  m.method = "CG + Jacobi";
  if (m.opt.preconditioner == Preconditioner::amg) {
    m.use_amg = m.setup_amg(coords, isolated);
    if (!m.use_amg) m.method = "CG + Jacobi (BoomerAMG set-up failed: " + m.failure + ")";
  }
  m.ready = true;
  m.setup_s = since(t0);
}

IterativeResult IterativeSolver::solve(const Vector& b, const Vector* x0) const {
  const Impl& m = *impl_;
  if (!m.ready) throw std::logic_error("IterativeSolver::solve before setup");
  if (b.size() != m.n || (x0 && x0->size() != m.n))
    throw std::invalid_argument("IterativeSolver::solve: vector size does not match the matrix");
  const auto t0 = Clock::now();
  const int threads = thread_count(m.opt.threads, m.n);
  const int n = m.n;
  IterativeResult res;
  res.setup_s = m.setup_s;
  res.method = m.method;
  res.x = x0 ? *x0 : Vector::Zero(n);
  const double bnorm = std::sqrt(dot(b, b, threads));
  if (bnorm == 0) {
    res.x.setZero();
    res.converged = true;
    res.solve_s = since(t0);
    return res;
  }
  const double target = m.opt.rel_tol * bnorm;
  Vector r(n), z(n), p(n), q(n);
  Vector& x = res.x;
  auto true_residual = [&] {
    multiply(m.a, x.data(), q.data(), threads);
#pragma omp parallel for num_threads(threads) schedule(static)
    for (int i = 0; i < n; ++i) r[i] = b[i] - q[i];
    return std::sqrt(dot(r, r, threads));
  };
  bool amg_on = m.use_amg;
  const auto held = amg_on ? m.hold() : std::unique_lock<std::mutex>();
  double rnorm = true_residual();
  int it = 0;
  // CG on the recursively updated residual; when it claims convergence the residual is
  // recomputed from x and, if rounding has let the two drift apart, CG restarts from x.
  for (int restart = 0; rnorm > target && it < m.opt.max_iterations && restart < 4; ++restart) {
    m.precondition(amg_on, r, z, threads);
    double rz = dot(r, z, threads);
    if (!(rz > 0) && amg_on) {  // V-cycle not positive definite here: diagonal scaling instead
      amg_on = false;
      res.method += " -> Jacobi";
      m.precondition(amg_on, r, z, threads);
      rz = dot(r, z, threads);
    }
    p = z;
    bool breakdown = false;
    while (it < m.opt.max_iterations) {
      multiply(m.a, p.data(), q.data(), threads);
      const double pq = dot(p, q, threads);
      if (!(pq > 0) || !(rz > 0)) {
        breakdown = true;
        break;
      }
      const double alpha = rz / pq;
#pragma omp parallel for num_threads(threads) schedule(static)
      for (int i = 0; i < n; ++i) {
        x[i] += alpha * p[i];
        r[i] -= alpha * q[i];
      }
      ++it;
      if (std::sqrt(dot(r, r, threads)) <= target) break;
      m.precondition(amg_on, r, z, threads);
      const double rz_new = dot(r, z, threads);
      const double beta = rz_new / rz;
      rz = rz_new;
#pragma omp parallel for num_threads(threads) schedule(static)
      for (int i = 0; i < n; ++i) p[i] = z[i] + beta * p[i];
    }
    rnorm = true_residual();
    if (breakdown || !std::isfinite(rnorm)) break;
  }
  res.iterations = it;
  res.rel_residual = rnorm / bnorm;
  res.converged = std::isfinite(rnorm) && rnorm <= target;
  res.solve_s = since(t0);
  return res;
}

}  // namespace voidsign::solver
