// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Sparse assembly into a fixed pattern, and constraints that keep that pattern.
///
/// d unknowns per node, interleaved: d = 2 in 2D (u_x, u_z), 3 in 3D (u_x, u_y, u_z). The stiffness is stored as its lower
/// triangle (column-major), the layout CHOLMOD factorises. The pattern is built once from
/// *all* cells, void interiors included, so the models with and without voids share it (and
/// the symbolic factorisation); a cell left out of an assembly simply contributes zeros.
#include <Eigen/SparseCore>
#include <functional>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/fe/element.hpp"

namespace voidsign::solver {

using SparseMatrix = Eigen::SparseMatrix<double, Eigen::ColMajor, int>;
using Vector = Eigen::VectorXd;

/// Lower-triangle pattern of the d-dof-per-node stiffness over every cell of `m`,
/// with explicit zeros as values.
SparseMatrix stiffness_pattern(const mesh::Mesh& m);

/// Assembles the stiffness of the cells with active[c] true, material material_of(c), into
/// `k` (pattern from stiffness_pattern; values overwritten). Parallel over cells (OpenMP).
void assemble_stiffness(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                        const std::function<const Elastic&(std::size_t)>& material_of, SparseMatrix& k);

/// Subtracts the stiffness of `cells` from an assembled `k` (same pattern): the model with voids
/// from the model without them, at the cost of the void cells alone. Entries no listed cell
/// touches are left bit for bit as they were; entries only the listed cells filled become exact
/// zeros (cancellation to 1e-12 of their value).
void subtract_stiffness(const mesh::Mesh& m, Kinematics kin, const std::vector<std::size_t>& cells,
                        const std::function<const Elastic&(std::size_t)>& material_of, SparseMatrix& k);

/// Zeroes the rows and columns of the fixed dofs in place, keeping the pattern, and gives each a
/// positive diagonal (its own, or the mean diagonal when it had none, as inside a void).
void constrain_matrix(SparseMatrix& k, const std::vector<char>& fixed);

/// Right-hand side for prescribed values g at the fixed dofs: f − K₀g at free dofs and
/// K_jj g_j at fixed ones, where K₀ is the matrix before constrain_matrix and `kc` after.
/// When g is zero K₀ is not touched (it may then be kc itself).
Vector constrained_rhs(const SparseMatrix& k0, const SparseMatrix& kc, const std::vector<char>& fixed,
                       const Vector& f, const Vector& g);

/// ‖K u − f‖ / ‖f‖ with K the symmetric matrix stored as its lower triangle; ‖K u‖ scale
/// used when f = 0.
double relative_residual(const SparseMatrix& k_lower, const Vector& u, const Vector& f);

}  // namespace voidsign::solver
