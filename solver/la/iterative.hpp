// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Preconditioned conjugate gradients for the large symmetric positive definite stiffness
/// matrices of the 3D models, where a sparse Cholesky factor no longer fits in time or memory
/// (see docs/solvers.md for the measurements behind the defaults).
///
/// The preconditioner is one V-cycle of hypre's BoomerAMG in its unknown-based systems form:
/// the dofs of each node are separate functions (interleaved), coarsened and interpolated
/// apart, with HMIS coarsening and extended+i interpolation. Nodal coarsening and the
/// rigid-body rotations (from the node coordinates) can be switched on; on the layered 3D
/// blocks measured they cost more than they saved. Diagonal (Jacobi) scaling is the fallback
/// when AMG is not wanted or its set-up fails.
///
/// The CG iteration, its matrix products and the final residual check are ours and use OpenMP;
/// the V-cycle runs in hypre, whose Debian build is serial. hypre is an MPI library: the first
/// set-up initialises MPI as a singleton process when the host program has not done so (without
/// a helper daemon), and every hypre object lives on a single-process communicator. hypre is not
/// thread-safe; a second, private copy of it (solver/la/hypre_library.hpp) lets two solvers
/// work at the same time, each on its own copy.
#include <array>
#include <memory>
#include <string>
#include <vector>

#include "solver/assembly/system.hpp"

namespace voidsign::solver {

enum class Preconditioner {
  amg,     ///< BoomerAMG V-cycle (falls back to jacobi if its set-up fails)
  jacobi,  ///< inverse diagonal
};

struct IterativeOptions {
  double rel_tol = 1e-10;      ///< on ‖b − A x‖ / ‖b‖
  int max_iterations = 2000;
  int threads = 0;             ///< for our products; 0 = OpenMP's default
  int library_copy = 0;        ///< which copy of hypre builds and applies the V-cycle (0 or 1):
                               ///< solvers on different copies may run at the same time
  Preconditioner preconditioner = Preconditioner::amg;
  int block_size = 0;          ///< dofs per node for AMG; 0 = the dofs_per_node given to setup
  // BoomerAMG settings (HMIS coarsening and extended+i interpolation are fixed).
  double strong_threshold = 0.5;  ///< strength of connection
  int aggressive_levels = 0;      ///< levels of aggressive coarsening
  int interp_max_elements = 4;    ///< truncation of interpolation rows
  bool nodal_coarsening = false;  ///< coarsen nodes (blocks), not single unknowns
  bool rigid_body_modes = false;  ///< with nodal coarsening: rotations in the interpolation
                                  ///< (needs coords and 3 dofs per node)
};

struct IterativeResult {
  Vector x;
  int iterations = 0;
  double rel_residual = 0;  ///< ‖b − A x‖ / ‖b‖, recomputed from x after the iteration
  bool converged = false;   ///< rel_residual ≤ rel_tol
  double setup_s = 0;       ///< of the setup() this solve used
  double solve_s = 0;
  std::string method;       ///< e.g. "CG + BoomerAMG (nodal, 3 rotations)"
};

class IterativeSolver {
 public:
  explicit IterativeSolver(IterativeOptions options = {});
  ~IterativeSolver();
  IterativeSolver(const IterativeSolver&) = delete;
  IterativeSolver& operator=(const IterativeSolver&) = delete;

  /// Copies the symmetric matrix given by its lower triangle (explicit zeros dropped) and builds
  /// the preconditioner. coords (one point per node, n / dofs_per_node of them, unknowns
  /// interleaved per node) feed the rigid-body modes; without them AMG runs without. Throws
  /// std::invalid_argument on inconsistent sizes.
  void setup(const SparseMatrix& lower, int dofs_per_node,
             const std::vector<std::array<double, 3>>* coords = nullptr);

  /// Solves A x = b from x0 (zero when null). Never throws for lack of convergence: check
  /// `converged`. Throws std::logic_error before setup, std::invalid_argument on a size mismatch.
  /// One object serves one solve at a time (the V-cycle works in buffers of its own).
  IterativeResult solve(const Vector& b, const Vector* x0 = nullptr) const;

  const IterativeOptions& options() const;
  /// What setup() built, as in IterativeResult::method.
  std::string method() const;

  /// Whether two solvers with library_copy 0 and 1 run independently (a private copy of hypre
  /// could be loaded). Where not, copy 1 is copy 0 and they take turns.
  static bool independent_copies();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace voidsign::solver
