// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Natural modes: the lowest eigenpairs of K φ = ω² M φ with some dofs fixed, and the measures
/// computed from them (modal participation, the share of a mode's kinetic energy in a set of
/// cells).
///
/// Algorithm: the spectral transformation (T. Ericsson & A. Ruhe 1980, Math. Comp. 35,
/// 1251–1268; details from memory). For a shift σ below the wanted
/// eigenvalues, the largest eigenvalues θ of (K − σM)⁻¹M are θ = 1/(ω² − σ), i.e. the ω²
/// nearest σ from above. Spectra's SymGEigsShiftSolver runs implicitly restarted Lanczos on
/// that operator in the M-inner product; every product costs one multiplication by M and one
/// forward/back substitution with a CHOLMOD factor of K − σM (solver/la/cholesky.hpp), which
/// is SPD because σ lies below the spectrum. Fixed dofs and dofs without mass (nodes inside
/// voids) are removed from the spectrum by masking: the mass operator ignores and zeroes them,
/// the Lanczos start vector is zero there, and K − σM gets constrain_matrix's positive
/// diagonal there (see solver/fe/mass.hpp).
///
/// Units: ω in rad/s, f = ω/(2π) in Hz; K and M as assembled (plane strain per metre,
/// axisymmetric per radian), so mode shapes are M-normalised in those units: φᵀMφ = 1.
#include <Eigen/Dense>
#include <array>
#include <cstdint>
#include <memory>
#include <stdexcept>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/assembly/system.hpp"
#include "solver/fe/element.hpp"
#include "solver/fe/mass.hpp"
#include "solver/la/cholesky.hpp"

namespace voidsign::solver {

struct ModalOptions {
  int n_modes = 12;  ///< eigenpairs wanted, 1 ≤ n_modes < number of free dofs
  /// Lowest frequency of interest [Hz]. 0: the shift sits slightly below zero (so rigid-body
  /// modes of an unsupported model are found too); > 0: σ = (2π shift_hz)², and the modes
  /// returned are the lowest ones above shift_hz (an error if any lies below it).
  double shift_hz = 0;
  double tolerance = 1e-10;  ///< Spectra's relative tolerance on the Ritz values
  int max_iterations = 1000;  ///< Spectra's restart limit
  int subspace = 0;           ///< Lanczos basis size; 0 = max(3 n_modes, 20)
  double max_residual = 1e-6;  ///< largest accepted relative residual of a mode
  /// Unknowns per node (dofs_per_node(kinematics)), for the node-graph fill-reducing ordering
  /// of the factor; 1 treats every unknown as its own node.
  int dofs_per_node = 1;
};

/// The lowest modes, in ascending order of frequency.
struct ModalResult {
  std::vector<double> eigenvalue;  ///< ω² [rad²/s²] (may be slightly negative for rigid modes)
  std::vector<double> freq_hz;     ///< √max(ω², 0) / 2π [Hz]
  /// n_dofs × n_modes; column j is mode j, M-normalised, zero at fixed and massless dofs, with
  /// its largest component positive.
  Eigen::MatrixXd shapes;
  /// Per mode: ‖Kφ − ω²Mφ‖ / max(‖Kφ‖, |σ|‖Mφ‖) over the free dofs (the |σ| term only keeps
  /// rigid-body modes, where Kφ ≈ 0, measurable).
  std::vector<double> residual;
  int iterations = 0;   ///< Spectra restarts
  int operations = 0;   ///< products with (K − σM)⁻¹M
  double shift = 0;     ///< σ used [rad²/s²]
  std::size_t n_free = 0;  ///< dofs in the spectrum (not fixed, with mass)
  double factor_nonzeros = 0;
  double seconds = 0;            ///< wall time of the whole solve [s]
  double seconds_factorize = 0;  ///< of which the symbolic analysis and the factorisation [s]
};

/// Thrown when the modes cannot be computed or fail their checks: K − σM not positive definite,
/// Lanczos not converged, a residual above ModalOptions::max_residual.
struct ModalFailure : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// A modal solver that keeps the symbolic analysis of K − σM between solves with the same
/// pattern (the models with and without voids share it).
class ModalSolver {
 public:
  /// Lowest modes of K φ = ω² M φ. `k` and `m` are lower triangles with the pattern of
  /// stiffness_pattern() (diagonal first in each column), as assembled (not constrained).
  /// `fixed` has one entry per dof (non-zero = held at zero). Throws ModalFailure (see above)
  /// or std::invalid_argument for inconsistent inputs.
  ModalResult solve(const SparseMatrix& k, const SparseMatrix& m, const std::vector<char>& fixed,
                    const ModalOptions& opt = {});

 private:
  std::unique_ptr<Cholesky> chol_;  ///< made on first use, for ModalOptions::dofs_per_node
  int chol_dofs_per_node_ = 0;
  std::uint64_t pattern_hash_ = 0;  ///< 0 = nothing analysed yet
};

/// One-off form of ModalSolver::solve.
ModalResult solve_modal(const SparseMatrix& k, const SparseMatrix& m, const std::vector<char>& fixed,
                        const ModalOptions& opt = {});

/// Modal participation in rigid translation along x, y and z (2D models: y stays zero).
/// With r_d the unit translation along d, Γ_d = φᵀ M r_d / φᵀMφ and the effective mass is
/// (φᵀ M r_d)² / φᵀMφ; over all modes the effective masses sum to rᵀ M r (common practice in
/// structural dynamics; the sum rule is checked in the tests). In axisymmetry only z is a
/// rigid motion.
struct Participation {
  std::vector<std::array<double, 3>> factor;          ///< Γ per mode [kg^½ for M-normalised φ]
  std::vector<std::array<double, 3>> effective_mass;  ///< per mode [kg]
  std::array<double, 3> total_mass{0, 0, 0};          ///< rᵀ M r over the free dofs [kg]
};

/// Participation of the modes `shapes` (n_dofs × n_modes). Fixed dofs are left out of M.
Participation participation(const SparseMatrix& m, const std::vector<char>& fixed, const Eigen::MatrixXd& shapes,
                            Kinematics kin);

/// Per mode, the fraction of its kinetic energy φᵀMφ (summed cell by cell over the active
/// cells) that lies in the cells with inside[c] true: near 1 for a mode localised there
/// (for example a thin roof slab ringing over a void), about the cells' mass fraction for a
/// mode spread over the model. 0 for a mode without energy.
std::vector<double> energy_fraction_in(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                                       const DensityOf& density_of, const Eigen::MatrixXd& shapes,
                                       const std::vector<char>& inside);

}  // namespace voidsign::solver
