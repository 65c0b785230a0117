// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// One interface over the two ways the static analysis solves K u = f: CHOLMOD's supernodal
/// Cholesky factorisation (2D, and 3D below a measured size) and conjugate gradients with an
/// algebraic-multigrid preconditioner (large 3D models). See docs/solvers.md for the figures.
#include <array>
#include <memory>
#include <string>
#include <vector>

#include "solver/assembly/system.hpp"

namespace voidsign::solver {

enum class SolverChoice { automatic, direct, iterative };

/// Unknowns above which `automatic` picks the iterative solver for 3D models (measured:
/// docs/solvers.md). 2D models always use the direct solver.
inline constexpr double direct_solver_max_dofs_3d = 50e3;

class SpdSolver {
 public:
  virtual ~SpdSolver() = default;
  /// Symbolic work for a pattern (direct: ordering and supernodes; iterative: nothing).
  virtual void analyze(const SparseMatrix& lower) = 0;
  /// Numeric set-up for this matrix (factor, or multigrid hierarchy). Throws std::runtime_error
  /// when the matrix is not positive definite.
  virtual void factorize(const SparseMatrix& lower) = 0;
  /// Solves with the current set-up. Throws std::runtime_error if an iteration does not converge.
  virtual Vector solve(const Vector& b) = 0;
  /// Human-readable method, e.g. "CHOLMOD supernodal Cholesky (AMD)".
  virtual std::string name() const = 0;
  /// Iterations of the last solve (0 for the direct solver) and their sum over all solves.
  int last_iterations = 0, total_iterations = 0;
  /// Nonzeros of the factor (direct solver only).
  virtual double factor_nonzeros() const { return 0; }

  /// Declares the nodes whose unknowns may differ between the first matrix factorised and a
  /// later variant of it: `wall` nodes (shared with the rest of the model) and `inner` nodes
  /// (coupled only to wall and inner nodes). Call before analyze. The direct solver then orders
  /// inner nodes first and wall nodes last, so that factorize_variant reuses the first factor.
  virtual void set_variable_nodes(const std::vector<int>& /*wall*/, const std::vector<int>& /*inner*/) {}
  /// Numeric set-up for a matrix equal to the last one factorised except among the unknowns of
  /// the variable nodes (where unknowns may also be decoupled, i.e. constrained). Default:
  /// factorize(k). Later solve() calls use this matrix.
  virtual void factorize_variant(const SparseMatrix& k) { factorize(k); }
  /// How the last factorize_variant was done, for the summary (empty: a factorisation of its own).
  std::string variant_method;
};

/// Where a solver works: the copy of the library behind it (0 or 1, see
/// solver/la/hypre_library.hpp) and the threads of its own loops (0: OpenMP's default).
struct SolverSlot {
  int library_copy = 0;
  int threads = 0;
};

/// Whether two solvers for such a model, on library copies 0 and 1, can work at the same time:
/// the iterative solver, with a private copy of hypre loaded. (The direct solver gains more by
/// reusing the first factor for the second model.)
bool solvers_run_concurrently(SolverChoice choice, double n_dofs, int dofs_per_node);

/// The solver for a model of n_dofs unknowns with dofs_per_node per node. `coords` (node
/// coordinates) lets the multigrid preconditioner build rigid-body modes.
std::unique_ptr<SpdSolver> make_spd_solver(SolverChoice choice, double n_dofs, int dofs_per_node,
                                           const std::vector<std::array<double, 3>>* coords,
                                           SolverSlot slot = {});

}  // namespace voidsign::solver
