// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/spd_solver.hpp"

#include <Eigen/Dense>
#include <sstream>
#include <utility>
#include <stdexcept>

#include "solver/la/cholesky.hpp"
#include "solver/la/iterative.hpp"

namespace voidsign::solver {

namespace {

// The direct solver. Two matrices that differ only among the unknowns of a few "variable"
// nodes (the model with and without voids) share one factorisation: with the inner nodes I
// eliminated first, the rest of the model (1) next and the wall nodes W last, the factor of the
// first matrix A holds everything the second, A', needs outside W. For the free wall unknowns F
// of A' (inner unknowns of A' are decoupled):
//   S' = A'_FF − L_F1 L_F1ᵀ = (L_WW L_WWᵀ + A_WI A_II⁻¹ A_IW + A'_WW − A_WW)_FF,
// a small dense Schur complement; a solve is then one forward and one backward pass with the
// shared factor around a dense solve with S' (docs/solvers.md).
class DirectSolver final : public SpdSolver {
 public:
  explicit DirectSolver(int dofs_per_node) : d_(dofs_per_node), chol_(dofs_per_node) {}

  void set_variable_nodes(const std::vector<int>& wall, const std::vector<int>& inner) override {
    wall_nodes_ = wall;
    inner_nodes_ = inner;
  }

  void analyze(const SparseMatrix& k) override {
    const std::size_t nn = static_cast<std::size_t>(k.rows() / d_);
    grouped_ = !wall_nodes_.empty() && k.rows() >= metis_min_unknowns &&
               static_cast<long>(wall_nodes_.size()) * d_ <= max_schur_unknowns;
    if (!grouped_) {
      chol_.analyze(k);
      return;
    }
    std::vector<int> group(nn, 1);
    for (int v : inner_nodes_) group[static_cast<std::size_t>(v)] = 0;
    for (int v : wall_nodes_) group[static_cast<std::size_t>(v)] = 2;
    chol_.analyze_grouped(k, group);
    const std::vector<int>& pos = chol_.positions();
    wall_dofs_.assign(wall_nodes_.size() * static_cast<std::size_t>(d_), -1);
    const int first_wall = static_cast<int>(k.rows()) - static_cast<int>(wall_dofs_.size());
    for (std::size_t i = 0; i < static_cast<std::size_t>(k.rows()); ++i)
      if (pos[i] >= first_wall) wall_dofs_[static_cast<std::size_t>(pos[i] - first_wall)] = static_cast<int>(i);
    inner_dofs_.clear();
    for (int v : inner_nodes_)
      for (int c = 0; c < d_; ++c) inner_dofs_.push_back(d_ * v + c);
  }

  void factorize(const SparseMatrix& k) override {
    variant_ = false;
    if (chol_.factorize(k) != Status::ok) throw std::runtime_error("the stiffness matrix is not positive definite");
    if (grouped_) prepare_wall_terms(k);
  }

  void factorize_variant(const SparseMatrix& k) override {
    variant_ = false;
    variant_method.clear();
    if (!grouped_) {
      factorize(k);
      return;
    }
    // Free wall unknowns of the variant, and the diagonal of every decoupled variable unknown.
    const std::vector<char> coupled = coupled_unknowns(k);
    const int nw = static_cast<int>(wall_dofs_.size());
    free_.clear();
    for (int i = 0; i < nw; ++i)
      if (coupled[static_cast<std::size_t>(wall_dofs_[static_cast<std::size_t>(i)])]) free_.push_back(i);
    decoupled_.clear();
    for (const auto* set : {&wall_dofs_, &inner_dofs_})
      for (int dof : *set)
        if (!coupled[static_cast<std::size_t>(dof)]) decoupled_.push_back({dof, k.coeff(dof, dof)});
    const Eigen::MatrixXd s_full = wall_gram_ + wall_inner_ + dense_block(k, wall_dofs_) - wall_ref_;
    const auto nf = static_cast<Eigen::Index>(free_.size());
    Eigen::MatrixXd s(nf, nf);
    for (Eigen::Index a = 0; a < nf; ++a)
      for (Eigen::Index b = 0; b < nf; ++b) s(a, b) = s_full(free_[static_cast<std::size_t>(a)], free_[static_cast<std::size_t>(b)]);
    schur_.compute(s);
    if (schur_.info() != Eigen::Success) throw std::runtime_error("the stiffness matrix is not positive definite");
    variant_ = true;
    variant_method = "shared factor, Schur complement on " + std::to_string(nf) + " wall unknowns";
  }

  Vector solve(const Vector& b) override { return variant_ ? solve_variant(b) : chol_.solve(b); }
  std::string name() const override { return "CHOLMOD supernodal Cholesky (" + chol_.ordering() + " ordering)"; }
  double factor_nonzeros() const override { return chol_.factor_nonzeros(); }

 private:
  // Beyond this many wall unknowns the dense Schur complement costs more than a factorisation.
  static constexpr long max_schur_unknowns = 5000;

  // Unknowns with at least one nonzero off-diagonal coefficient.
  static std::vector<char> coupled_unknowns(const SparseMatrix& k) {
    std::vector<char> out(static_cast<std::size_t>(k.rows()), 0);
    for (Eigen::Index j = 0; j < k.outerSize(); ++j)
      for (SparseMatrix::InnerIterator it(k, j); it; ++it)
        if (it.row() != j && it.value() != 0) out[static_cast<std::size_t>(it.row())] = out[static_cast<std::size_t>(j)] = 1;
    return out;
  }

  // The symmetric block of k (lower triangle stored) on the unknowns `set`, dense.
  static Eigen::MatrixXd dense_block(const SparseMatrix& k, const std::vector<int>& set) {
    std::vector<int> local(static_cast<std::size_t>(k.rows()), -1);
    for (std::size_t i = 0; i < set.size(); ++i) local[static_cast<std::size_t>(set[i])] = static_cast<int>(i);
    const auto n = static_cast<Eigen::Index>(set.size());
    Eigen::MatrixXd out = Eigen::MatrixXd::Zero(n, n);
    for (int j : set)
      for (SparseMatrix::InnerIterator it(k, j); it; ++it) {
        const int i = local[static_cast<std::size_t>(it.row())];
        if (i < 0) continue;
        out(i, local[static_cast<std::size_t>(j)]) = it.value();
        out(local[static_cast<std::size_t>(j)], i) = it.value();
      }
    return out;
  }

  // The first matrix's terms of S': L_WW L_WWᵀ, A_WI A_II⁻¹ A_IW and A_WW.
  void prepare_wall_terms(const SparseMatrix& k) {
    const int nw = static_cast<int>(wall_dofs_.size());
    const Eigen::MatrixXd lww = chol_.trailing_block(nw);
    wall_gram_ = lww * lww.transpose();
    wall_factor_ = lww;
    wall_ref_ = dense_block(k, wall_dofs_);
    wall_inner_ = Eigen::MatrixXd::Zero(nw, nw);
    if (inner_dofs_.empty()) return;
    // A_II and A_IW from the lower triangle of k.
    const std::size_t n = static_cast<std::size_t>(k.rows());
    std::vector<int> in_inner(n, -1), in_wall(n, -1);
    for (std::size_t i = 0; i < inner_dofs_.size(); ++i) in_inner[static_cast<std::size_t>(inner_dofs_[i])] = static_cast<int>(i);
    for (int i = 0; i < nw; ++i) in_wall[static_cast<std::size_t>(wall_dofs_[static_cast<std::size_t>(i)])] = i;
    const auto ni = static_cast<Eigen::Index>(inner_dofs_.size());
    std::vector<Eigen::Triplet<double>> aii, aiw;
    for (Eigen::Index j = 0; j < k.outerSize(); ++j)
      for (SparseMatrix::InnerIterator it(k, j); it; ++it) {
        const int ri = in_inner[static_cast<std::size_t>(it.row())], ci = in_inner[static_cast<std::size_t>(j)];
        const int rw = in_wall[static_cast<std::size_t>(it.row())], cw = in_wall[static_cast<std::size_t>(j)];
        if (ri >= 0 && ci >= 0) aii.emplace_back(ri, ci, it.value());      // row ≥ column: lower
        if (ri >= 0 && cw >= 0) aiw.emplace_back(ri, cw, it.value());
        if (rw >= 0 && ci >= 0) aiw.emplace_back(ci, rw, it.value());
      }
    SparseMatrix a_ii(ni, ni), a_iw(ni, nw);
    a_ii.setFromTriplets(aii.begin(), aii.end());
    a_iw.setFromTriplets(aiw.begin(), aiw.end());
    a_ii.makeCompressed();
    Cholesky inner(d_, Ordering::amd);
    if (inner.factorize(a_ii) != Status::ok) throw std::runtime_error("the stiffness matrix is not positive definite");
    const SparseMatrix a_wi = a_iw.transpose();
    for (int w = 0; w < nw; ++w) {
      const Vector col = a_iw.col(w);
      if (col.squaredNorm() == 0) continue;
      wall_inner_.col(w) = a_wi * inner.solve(col);
    }
  }

  Vector solve_variant(const Vector& b) {
    Vector rhs = b;
    for (int dof : inner_dofs_) rhs[dof] = 0;  // so that the forward pass carries no inner terms
    Vector y = chol_.forward(rhs);
    const Eigen::Index nw = static_cast<Eigen::Index>(wall_dofs_.size());
    const Vector z = wall_factor_.triangularView<Eigen::Lower>() * y.tail(nw);
    Vector zf(static_cast<Eigen::Index>(free_.size()));
    for (std::size_t a = 0; a < free_.size(); ++a) zf[static_cast<Eigen::Index>(a)] = z[free_[a]];
    const Vector uf = schur_.solve(zf);
    Vector uw = Vector::Zero(nw);
    for (std::size_t a = 0; a < free_.size(); ++a) uw[free_[a]] = uf[static_cast<Eigen::Index>(a)];
    y.tail(nw) = wall_factor_.transpose().triangularView<Eigen::Upper>() * uw;
    y.head(static_cast<Eigen::Index>(inner_dofs_.size())).setZero();
    Vector x = chol_.backward(y);
    for (const auto& [dof, diag] : decoupled_) x[dof] = b[dof] / diag;
    return x;
  }

  int d_;
  Cholesky chol_;
  std::vector<int> wall_nodes_, inner_nodes_;
  bool grouped_ = false, variant_ = false;
  std::vector<int> wall_dofs_;   // in elimination order: the last wall_dofs_.size() positions
  std::vector<int> inner_dofs_;  // the first positions
  Eigen::MatrixXd wall_factor_, wall_gram_, wall_inner_, wall_ref_;
  std::vector<int> free_;                               // local wall indices free in the variant
  std::vector<std::pair<int, double>> decoupled_;       // decoupled variable unknowns, diagonal
  Eigen::LLT<Eigen::MatrixXd> schur_;
};

class AmgCgSolver final : public SpdSolver {
 public:
  AmgCgSolver(int dofs_per_node, const std::vector<std::array<double, 3>>* coords, SolverSlot slot)
      : dofs_per_node_(dofs_per_node), coords_(coords), cg_(options(slot)) {}
  void analyze(const SparseMatrix&) override {}
  void factorize(const SparseMatrix& k) override {
    cg_.setup(k, dofs_per_node_, coords_);
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
  static IterativeOptions options(SolverSlot slot) {
    IterativeOptions o;
    // The static analysis accepts residuals below 1e-8 (static.hpp); iterate a little further.
    o.rel_tol = 1e-10;
    o.max_iterations = 3000;
    o.library_copy = slot.library_copy;
    o.threads = slot.threads;
    return o;
  }
  int dofs_per_node_;
  const std::vector<std::array<double, 3>>* coords_;
  IterativeSolver cg_;
};

/// Whether make_spd_solver picks the iterative solver for such a model.
bool picks_iterative(SolverChoice choice, double n_dofs, int dofs_per_node) {
  return choice == SolverChoice::iterative ||
         (choice == SolverChoice::automatic && dofs_per_node == 3 && n_dofs > direct_solver_max_dofs_3d);
}

}  // namespace

bool solvers_run_concurrently(SolverChoice choice, double n_dofs, int dofs_per_node) {
  return picks_iterative(choice, n_dofs, dofs_per_node) && IterativeSolver::independent_copies();
}

std::unique_ptr<SpdSolver> make_spd_solver(SolverChoice choice, double n_dofs, int dofs_per_node,
                                           const std::vector<std::array<double, 3>>* coords, SolverSlot slot) {
  if (picks_iterative(choice, n_dofs, dofs_per_node)) return std::make_unique<AmgCgSolver>(dofs_per_node, coords, slot);
  return std::make_unique<DirectSolver>(dofs_per_node);
}

}  // namespace voidsign::solver
