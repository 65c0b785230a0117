// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Sparse Cholesky factorisation through CHOLMOD's supernodal solver (SuiteSparse). The
/// symbolic analysis (fill-reducing ordering, supernodes) is computed once per pattern and
/// reused for every matrix with that pattern.
///
/// Ordering: for matrices of at least `metis_min_unknowns` unknowns, METIS nested dissection
/// of the *node* graph (the matrix pattern compressed by the unknowns per node), expanded back
/// to unknowns; below that, AMD. On the 2D benchmark the node-graph ordering gives a factor with
/// fewer nonzeros and flops than AMD at a fraction of the cost of CHOLMOD's own METIS call on the
/// full pattern (docs/solvers.md).
#include <Eigen/Dense>
#include <memory>
#include <string>
#include <vector>

#include "solver/assembly/system.hpp"

namespace voidsign::solver {

enum class Status { ok, singular, not_converged };

/// Unknowns from which the METIS node-graph ordering replaces AMD.
inline constexpr long metis_min_unknowns = 20000;

enum class Ordering { automatic, amd, metis_nodes };

class Cholesky {
 public:
  /// `dofs_per_node`: unknowns per node, interleaved (node k owns unknowns d·k … d·k + d − 1);
  /// 1 treats every unknown as its own node. `automatic`: METIS from metis_min_unknowns on.
  explicit Cholesky(int dofs_per_node = 1, Ordering ordering = Ordering::automatic);
  ~Cholesky();
  Cholesky(const Cholesky&) = delete;
  Cholesky& operator=(const Cholesky&) = delete;

  /// Symbolic analysis of the lower-triangle pattern of `k`.
  void analyze(const SparseMatrix& k);
  /// Symbolic analysis with the nodes in three groups eliminated one group after the other
  /// (group[node] in {0, 1, 2}; each group ordered by METIS on its own subgraph), with the
  /// order kept exactly as given (no postordering): positions are then known to the caller.
  void analyze_grouped(const SparseMatrix& k, const std::vector<int>& group);
  /// Permuted position of each unknown (after analyze): unknown i is eliminated position[i]-th.
  const std::vector<int>& positions() const;
  /// The last `count` rows and columns of the factor L, dense lower triangular (after factorize).
  Eigen::MatrixXd trailing_block(int count) const;
  /// y = L⁻¹ P b (y in elimination order) and x = Pᵀ L⁻ᵀ y: the two halves of solve().
  Vector forward(const Vector& b) const;
  Vector backward(const Vector& y) const;
  /// Numeric factorisation; `k` must have the analysed pattern.
  Status factorize(const SparseMatrix& k);
  /// Solves with the current factor.
  Vector solve(const Vector& b) const;
  /// Nonzeros of the factor L (after analyze).
  double factor_nonzeros() const;
  /// Floating-point operations of the factorisation (after analyze).
  double factor_flops() const;
  /// "METIS (node graph)" or "AMD" (after analyze).
  std::string ordering() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace voidsign::solver
