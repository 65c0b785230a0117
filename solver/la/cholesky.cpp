// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/cholesky.hpp"

#include <Eigen/CholmodSupport>

namespace voidsign::solver {

struct Cholesky::Impl {
  Eigen::CholmodSupernodalLLT<SparseMatrix, Eigen::Lower> llt;
};

Cholesky::Cholesky() : impl_(std::make_unique<Impl>()) {
  auto& cm = impl_->llt.cholmod();
  // CHOLMOD's default tries METIS on large 2D meshes and spends seconds analysing; AMD alone
  // is faster here at every size measured (toolchain notes).
  cm.nmethods = 1;
  cm.method[0].ordering = CHOLMOD_AMD;
  cm.postorder = 1;
}

Cholesky::~Cholesky() = default;

void Cholesky::analyze(const SparseMatrix& k) { impl_->llt.analyzePattern(k); }

Status Cholesky::factorize(const SparseMatrix& k) {
  impl_->llt.factorize(k);
  return impl_->llt.info() == Eigen::Success ? Status::ok : Status::singular;
}

Vector Cholesky::solve(const Vector& b) const { return impl_->llt.solve(b); }

double Cholesky::factor_nonzeros() const {
  auto& cm = const_cast<Eigen::CholmodSupernodalLLT<SparseMatrix, Eigen::Lower>&>(impl_->llt).cholmod();
  return cm.lnz;
}

}  // namespace voidsign::solver
