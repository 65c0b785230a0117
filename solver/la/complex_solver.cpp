// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/complex_solver.hpp"

#include <dlfcn.h>

#include <Eigen/UmfPackSupport>
#include <chrono>
#include <sstream>
#include <string>
#include <type_traits>

namespace voidsign::solver {

static_assert(std::is_same_v<long, SuiteSparse_long>, "UMFPACK's long interface must use long indices");

namespace {
using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }
}  // namespace

// Eigen 3.4 keeps UMFPACK's Info array protected; a thin subclass reads it.
struct UmfLu : Eigen::UmfPackLU<ComplexMatrix> {
  double info_at(int i) const { return m_umfpackInfo(i); }
};

struct ComplexLu::Impl {
  UmfLu lu;
  ComplexOrdering ordering = ComplexOrdering::automatic;
  const ComplexMatrix* a = nullptr;  // the factorised matrix, for residuals
  bool analysed = false, factorised = false;
  double analyse_s = 0, factor_s = 0;
};

ComplexLu::ComplexLu(ComplexOrdering ordering) : impl_(std::make_unique<Impl>()) {
  impl_->ordering = ordering;
  auto& control = impl_->lu.umfpackControl();
  // No iterative refinement by default: every solution's residual is checked anyway, and the
  // refinement steps cost as much as the solve itself. solve_checked refines only when needed.
  control(UMFPACK_IRSTEP) = 0;
}

ComplexLu::~ComplexLu() = default;

void ComplexLu::analyze(const ComplexMatrix& a) {
  const bool metis = impl_->ordering == ComplexOrdering::metis ||
                     (impl_->ordering == ComplexOrdering::automatic && a.rows() >= metis_threshold);
  impl_->lu.umfpackControl()(UMFPACK_ORDERING) = metis ? UMFPACK_ORDERING_METIS : UMFPACK_ORDERING_AMD;
  const auto t0 = Clock::now();
  impl_->lu.analyzePattern(a);
  impl_->analyse_s = seconds_since(t0);
  if (impl_->lu.info() != Eigen::Success)
    throw ComplexSolveError("UMFPACK symbolic analysis failed (status " +
                            std::to_string(impl_->lu.info_at(UMFPACK_STATUS)) + ")");
  impl_->analysed = true;
  impl_->factorised = false;
}

void ComplexLu::factorize(const ComplexMatrix& a) {
  if (!impl_->analysed) analyze(a);
  const auto t0 = Clock::now();
  impl_->lu.factorize(a);
  impl_->a = &a;
  impl_->factor_s = seconds_since(t0);
  const double status = impl_->lu.info_at(UMFPACK_STATUS);
  impl_->factorised = impl_->lu.info() == Eigen::Success && status == UMFPACK_OK;
  if (!impl_->factorised) {
    std::ostringstream os;
    os << "UMFPACK numeric factorisation failed (status " << status
       << (status == UMFPACK_WARNING_singular_matrix ? ": singular matrix"
                                                     : status == UMFPACK_ERROR_out_of_memory ? ": out of memory" : "")
       << ")";
    throw ComplexSolveError(os.str());
  }
}

ComplexVector ComplexLu::solve(const ComplexVector& b) const {
  if (!impl_->factorised) throw ComplexSolveError("ComplexLu::solve called before a successful factorize");
  ComplexVector x = impl_->lu.solve(b);
  if (impl_->lu.info() != Eigen::Success) throw ComplexSolveError("UMFPACK solve failed");
  return x;
}

ComplexSolution ComplexLu::solve_checked(const ComplexVector& b, double max_residual) const {
  ComplexSolution s;
  s.x = solve(b);
  s.residual = complex_relative_residual(*impl_->a, s.x, b);
  if (!(s.residual <= max_residual)) {
    // UMFPACK's iterative refinement (up to 2 steps, its default) before giving up.
    auto& control = impl_->lu.umfpackControl();
    control(UMFPACK_IRSTEP) = 2;
    s.x = solve(b);
    control(UMFPACK_IRSTEP) = 0;
    s.residual = complex_relative_residual(*impl_->a, s.x, b);
  }
  if (!(s.residual <= max_residual)) {
    std::ostringstream os;
    os << "complex solve has relative residual " << s.residual << " (limit " << max_residual
       << "): the system is singular or badly conditioned";
    throw ComplexSolveError(os.str());
  }
  return s;
}

bool ComplexLu::analysed() const { return impl_->analysed; }

double ComplexLu::factor_nonzeros() const {
  return impl_->lu.info_at(UMFPACK_LNZ) + impl_->lu.info_at(UMFPACK_UNZ);
}

double ComplexLu::flops() const { return impl_->lu.info_at(UMFPACK_FLOPS); }

double ComplexLu::peak_bytes() const {
  return impl_->lu.info_at(UMFPACK_PEAK_MEMORY) * impl_->lu.info_at(UMFPACK_SIZE_OF_UNIT);
}

double ComplexLu::analyse_seconds() const { return impl_->analyse_s; }
double ComplexLu::factorize_seconds() const { return impl_->factor_s; }

double complex_relative_residual(const ComplexMatrix& a, const ComplexVector& x, const ComplexVector& b) {
  const ComplexVector ax = a * x;
  const double bn = b.norm();
  const double scale = bn > 0 ? bn : ax.norm();
  return scale > 0 ? (ax - b).norm() / scale : 0.0;
}

int set_blas_threads(int n) {
  using Get = int (*)();
  using Set = void (*)(int);
  static const auto get = reinterpret_cast<Get>(dlsym(RTLD_DEFAULT, "openblas_get_num_threads"));
  static const auto set = reinterpret_cast<Set>(dlsym(RTLD_DEFAULT, "openblas_set_num_threads"));
  if (!get || !set) return 0;
  const int before = get();
  set(n);
  return before;
}

}  // namespace voidsign::solver
