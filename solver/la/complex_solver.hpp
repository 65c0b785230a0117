// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Sparse LU for the complex symmetric (not Hermitian) systems of the frequency domain, through
/// UMFPACK (SuiteSparse) behind Eigen's UmfPackSupport, 64-bit index interface (umfpack_zl_*).
/// The symbolic analysis (fill-reducing ordering, frontal tree) is done once per pattern and
/// reused for every matrix with that pattern (every frequency, both models); the numeric
/// factorisation is redone per matrix. Matrices are stored in full (both triangles).
#include <Eigen/SparseCore>
#include <complex>
#include <memory>
#include <stdexcept>

namespace voidsign::solver {

/// Full-storage complex sparse matrix, column-major, 64-bit indices (UMFPACK's long interface).
using ComplexMatrix = Eigen::SparseMatrix<std::complex<double>, Eigen::ColMajor, long>;
using ComplexVector = Eigen::VectorXcd;

/// Thrown when the factorisation fails (singular matrix, out of memory) or a residual is too large.
struct ComplexSolveError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// Fill-reducing ordering handed to UMFPACK. `automatic`: AMD below metis_threshold unknowns,
/// METIS (nested dissection) above. Measured on a 214 k-unknown tri6 plane-strain system
/// (docs/theory.md): METIS cut the factorisation from 9.4 s to 5.4 s (35 % fewer entries in
/// L + U) for an analysis of 7 s instead of 1 s, which the sweep pays once per thread.
enum class ComplexOrdering { automatic, amd, metis };

/// Unknowns from which `automatic` chooses METIS.
inline constexpr long metis_threshold = 100000;

/// A solution and its relative residual ‖A x − b‖ / ‖b‖.
struct ComplexSolution {
  ComplexVector x;
  double residual = 0;
};

/// ‖A x − b‖ / ‖b‖ (‖A x‖ as the scale when b = 0).
double complex_relative_residual(const ComplexMatrix& a, const ComplexVector& x, const ComplexVector& b);

class ComplexLu {
 public:
  explicit ComplexLu(ComplexOrdering ordering = ComplexOrdering::automatic);
  ~ComplexLu();
  ComplexLu(const ComplexLu&) = delete;
  ComplexLu& operator=(const ComplexLu&) = delete;

  /// Symbolic analysis of the pattern of `a` (values ignored). Throws ComplexSolveError.
  void analyze(const ComplexMatrix& a);
  /// Numeric factorisation of `a`, which must have the analysed pattern and stay alive and
  /// unchanged until the next factorize (UMFPACK's iterative refinement reads it during solve).
  /// Throws ComplexSolveError when the matrix is singular or memory runs out.
  void factorize(const ComplexMatrix& a);
  /// x = A⁻¹ b with the current factor (no iterative refinement).
  ComplexVector solve(const ComplexVector& b) const;
  /// Solves and checks the residual; when it exceeds `max_residual`, solves again with UMFPACK's
  /// iterative refinement, and throws ComplexSolveError if it still does.
  ComplexSolution solve_checked(const ComplexVector& b, double max_residual) const;

  /// Whether analyze has run.
  bool analysed() const;
  /// Nonzeros of L + U (after factorize).
  double factor_nonzeros() const;
  /// Floating-point operations of the last numeric factorisation, as UMFPACK counts them.
  double flops() const;
  /// Peak memory of the last symbolic + numeric phase [bytes], as UMFPACK estimates it.
  double peak_bytes() const;
  /// Seconds spent in the last analyze / factorize.
  double analyse_seconds() const;
  double factorize_seconds() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

/// Sets the number of threads of the BLAS (OpenBLAS) UMFPACK calls, where that BLAS is loaded;
/// returns the previous count, or 0 when the BLAS offers no such control.
int set_blas_threads(int n);

}  // namespace voidsign::solver
