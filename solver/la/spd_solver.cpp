// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/spd_solver.hpp"

#include <sstream>
#include <stdexcept>

#include "solver/la/cholesky.hpp"
#include "solver/la/iterative.hpp"

namespace voidsign::solver {

namespace {

class DirectSolver final : public SpdSolver {
 public:
  void analyze(const SparseMatrix& k) override { chol_.analyze(k); }
  void factorize(const SparseMatrix& k) override {
    if (chol_.factorize(k) != Status::ok) throw std::runtime_error("the stiffness matrix is not positive definite");
  }
  Vector solve(const Vector& b) override { return chol_.solve(b); }
  std::string name() const override { return "CHOLMOD supernodal Cholesky (AMD ordering)"; }
  double factor_nonzeros() const override { return chol_.factor_nonzeros(); }

 private:
  Cholesky chol_;
};

class AmgCgSolver final : public SpdSolver {
 public:
  AmgCgSolver(int dofs_per_node, const std::vector<std::array<double, 3>>* coords)
      : dofs_per_node_(dofs_per_node), coords_(coords), cg_(options()) {}
  void analyze(const SparseMatrix&) override {}
  void factorize(const SparseMatrix& k) override {
    cg_.setup(k, dofs_per_node_, coords_);
    x_prev_.resize(0);
  }
  Vector solve(const Vector& b) override {
    IterativeResult r = cg_.solve(b);
    last_iterations = r.iterations;
    total_iterations += r.iterations;
    if (!r.converged) {
      std::ostringstream os;
      os << "conjugate gradients (" << r.method << ") did not converge: relative residual " << r.rel_residual << " after "
         << r.iterations << " iterations (tolerance " << cg_.options().rel_tol
         << "); try mesh.order 1, a gentler stiffness contrast, or a smaller model for the direct solver";
      throw std::runtime_error(os.str());
    }
    return std::move(r.x);
  }
  std::string name() const override { return cg_.method(); }

 private:
  static IterativeOptions options() {
    IterativeOptions o;
    // The static analysis accepts residuals below 1e-8 (static.hpp); iterate a little further.
    o.rel_tol = 1e-10;
    o.max_iterations = 3000;
    return o;
  }
  int dofs_per_node_;
  const std::vector<std::array<double, 3>>* coords_;
  IterativeSolver cg_;
  Vector x_prev_;
};

}  // namespace

std::unique_ptr<SpdSolver> make_spd_solver(SolverChoice choice, double n_dofs, int dofs_per_node,
                                           const std::vector<std::array<double, 3>>* coords) {
  const bool iterative = choice == SolverChoice::iterative ||
                         (choice == SolverChoice::automatic && dofs_per_node == 3 && n_dofs > direct_solver_max_dofs_3d);
  if (iterative) return std::make_unique<AmgCgSolver>(dofs_per_node, coords);
  return std::make_unique<DirectSolver>();
}

}  // namespace voidsign::solver
