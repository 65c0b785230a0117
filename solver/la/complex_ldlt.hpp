// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Sparse LDLᵀ for the complex symmetric (not Hermitian) systems of the frequency domain, through
/// MUMPS (Amestoy, Duff, Koster & L'Excellent 2001, SIAM J. Matrix Anal. Appl. 23(1), 15–41), its
/// general-symmetric mode (SYM = 2: 1×1 and 2×2 pivots), one process on MPI_COMM_SELF. Only the
/// lower triangle is factorised and stored: about half UMFPACK's L + U and 30 % less time on the
/// harmonic systems measured (docs/theory.md, "The two models, the pattern and the solver").
///
/// Optionally a set of unknowns (the Schur set Γ) is eliminated last and *not* factorised:
/// MUMPS returns the dense Schur complement S = A_ΓΓ − A_ΓO A_OO⁻¹ A_OΓ, and a solve then runs in
/// two halves around a system on Γ that the caller solves itself:
///   reduce(B)  → y = B_Γ − A_ΓO A_OO⁻¹ B_O              (forward elimination)
///   expand(x_Γ) → x_O = A_OO⁻¹ (B_O − A_OΓ x_Γ), x = (x_O, x_Γ)  (back substitution)
/// MUMPS is not re-entrant: calls into one copy of the library run one at a time, whatever the
/// instance. Instances in slot 1 use a second, private copy (Debian's sequential build, where
/// installed), so one instance in each slot can factorise at the same time.
/// The harmonic analysis uses it to factorise the part the models with and without voids share
/// once per frequency (solver/analysis/harmonic.cpp).
#include <memory>
#include <vector>

#include "solver/la/complex_solver.hpp"

namespace voidsign::solver {

/// Fill-reducing orderings. `metis`: nested dissection of the node graph by METIS (Karypis &
/// Kumar 1998), computed here and handed to MUMPS, with the Schur set appended last; the others
/// are MUMPS's own. With a Schur set MUMPS's own orderings fell back to one ordering of about 17 %
/// more factor entries on the harmonic systems measured (docs/theory.md). `automatic` = metis.
enum class LdltOrdering { automatic, metis, amd, scotch, pord };

class ComplexLdlt {
 public:
  explicit ComplexLdlt(LdltOrdering ordering = LdltOrdering::automatic, int slot = 0);
  /// Whether slots 0 and 1 are independent copies of MUMPS (calls in both may run at once).
  static bool concurrent_slots();
  ~ComplexLdlt();
  ComplexLdlt(const ComplexLdlt&) = delete;
  ComplexLdlt& operator=(const ComplexLdlt&) = delete;

  /// Symbolic analysis of the pattern of `a` (full storage, symmetric pattern; values ignored),
  /// with `schur` (0-based unknowns, distinct; may be empty) eliminated last. `dofs_per_node`
  /// groups consecutive unknowns into the nodes the METIS ordering works on (the Schur set must
  /// then hold whole nodes). Throws ComplexSolveError.
  void analyze(const ComplexMatrix& a, const std::vector<long>& schur = {}, int dofs_per_node = 1);
  /// Numeric factorisation of `a` (the analysed pattern; its lower triangle is read). Retries
  /// with more working space when MUMPS's estimate proves short. Throws ComplexSolveError when
  /// the matrix is singular or memory runs out.
  void factorize(const ComplexMatrix& a);

  /// Without a Schur set: X = A⁻¹ B, one column per right-hand side.
  Eigen::MatrixXcd solve(const Eigen::MatrixXcd& b);
  /// With a Schur set: the dense Schur complement of the last factorisation (symmetric, full).
  const Eigen::MatrixXcd& schur() const;
  /// First half of a solve with a Schur set: the reduced right-hand sides on Γ (one column per
  /// column of b). Keeps the forward-eliminated b for the expand that must follow.
  Eigen::MatrixXcd reduce(const Eigen::MatrixXcd& b);
  /// Second half: the full solutions given the solutions x_Γ on Γ of the caller's Schur systems
  /// (same column count as the reduce before it).
  Eigen::MatrixXcd expand(const Eigen::MatrixXcd& x_schur);

  bool analysed() const;
  long schur_size() const;
  /// Entries of the factor (L and D).
  double factor_nonzeros() const;
  /// Floating-point operations of the last factorisation, as MUMPS counts them.
  double flops() const;
  /// MUMPS's estimate after the analysis of the memory a factorisation needs [bytes], the Schur
  /// complement included.
  double estimated_bytes() const;
  /// MUMPS's estimates after the analysis of the factor's entries and the factorisation's flops.
  double estimated_entries() const;
  double estimated_flops() const;
  /// Memory MUMPS used in the last factorisation [bytes], the Schur complement included.
  double peak_bytes() const;
  double analyse_seconds() const;
  double factorize_seconds() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace voidsign::solver
