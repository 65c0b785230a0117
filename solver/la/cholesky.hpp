// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Sparse Cholesky factorisation through CHOLMOD's supernodal solver (SuiteSparse), behind
/// Eigen's CholmodSupport. The symbolic analysis (AMD ordering, supernodes) is computed once
/// per pattern and reused for every matrix with that pattern.
#include <memory>

#include "solver/assembly/system.hpp"

namespace voidsign::solver {

enum class Status { ok, singular, not_converged };

class Cholesky {
 public:
  Cholesky();
  ~Cholesky();
  Cholesky(const Cholesky&) = delete;
  Cholesky& operator=(const Cholesky&) = delete;

  /// Symbolic analysis of the lower-triangle pattern of `k`.
  void analyze(const SparseMatrix& k);
  /// Numeric factorisation; `k` must have the analysed pattern.
  Status factorize(const SparseMatrix& k);
  /// Solves with the current factor.
  Vector solve(const Vector& b) const;
  /// Nonzeros of the factor L (after factorize).
  double factor_nonzeros() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace voidsign::solver
