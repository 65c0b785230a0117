// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Mass matrices for the dynamic analyses: the element consistent mass ∫ ρ Nᵀ N dV, its
/// HRZ-lumped diagonal, and their assembly into the stiffness pattern.
///
/// Units: kg (plane strain: kg per metre of out-of-plane length; axisymmetric: kg per radian,
/// with the weight r as in volume_weight, no 2π). Unknowns are interleaved as in
/// solver/assembly/system.hpp (2D: u_x, u_z; 3D: u_x, u_y, u_z); the mass couples each
/// direction only with itself, M_(a i)(b j) = δ_ij ∫ ρ N_a N_b dV.
///
/// Constraints. The spectrum of K φ = ω² M φ must not contain the fixed dofs. constrain_mass
/// zeroes their rows and columns of M (diagonal included), while constrain_matrix gives K a
/// positive diagonal there: such a dof then behaves as an eigenvalue at infinity, which the
/// shift-invert transformation (K − σM)⁻¹M maps to zero, i.e. it is never found among the
/// lowest modes. The same holds for dofs that carry no mass at all (nodes inside voids).
#include <exception>
#include <functional>
#include <span>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/assembly/system.hpp"
#include "solver/fe/element.hpp"

namespace voidsign::solver {

/// Density of cell c [kg/m³].
using DensityOf = std::function<double(std::size_t)>;

/// The rule used for mass integrals, exact for N_a N_b (times r in axisymmetry) on cells with
/// straight sides: tri3 3 points (degree 2) or 7 (degree 5, axisymmetric); tri6 7 points
/// (degree 5); tet4 4 points (degree 2); tet10 a 48-point conical product rule (degree 5).
/// Weights sum to the reference measure (1/2, 1/6).
std::span<const QuadPoint> mass_quadrature(mesh::CellType t, Kinematics k);

/// Scalar consistent mass of cell c: me[a·n + b] = ∫ ρ N_a N_b dV, n = npc() entries per row,
/// row-major, n² entries overwritten. Throws if det J <= 0.
void scalar_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> me);

/// Element consistent mass, row-major, (n·d)² entries with d = dofs_per_node(k), overwritten.
void consistent_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> me);

/// Element lumped mass by HRZ diagonal scaling (Hinton, Rock & Zienkiewicz 1976): the
/// diagonal of the consistent mass, scaled so that it sums to the element's mass in each
/// direction. n·d entries, overwritten; all positive for every supported cell.
void lumped_mass(const mesh::Mesh& m, std::size_t c, double density, Kinematics k, std::span<double> diag);

/// Assembles the consistent mass of the cells with active[c] true into `mm`, which must have
/// the pattern of stiffness_pattern(m) (values overwritten), so that K − σM shares K's
/// pattern and its symbolic factorisation. Parallel over cells (OpenMP).
void assemble_mass(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active, const DensityOf& density_of,
                   SparseMatrix& mm);

/// The HRZ-lumped mass of the active cells, one entry per dof [kg].
Vector assemble_lumped_mass(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                            const DensityOf& density_of);

namespace detail {
/// scalar_mass for use inside parallel loops: false (and the first exception kept in `error`,
/// to be rethrown after the loop) instead of throwing.
bool cell_mass(const mesh::Mesh& m, std::size_t c, const DensityOf& density_of, Kinematics k, std::span<double> s,
               std::exception_ptr& error);
}  // namespace detail

/// Zeroes the rows and columns of the fixed dofs of a lower-triangle mass matrix in place,
/// diagonal included, keeping the pattern (see the file comment).
void constrain_mass(SparseMatrix& mm, const std::vector<char>& fixed);

/// Zeroes the entries of the fixed dofs of a lumped mass.
void constrain_lumped_mass(Vector& mass, const std::vector<char>& fixed);

}  // namespace voidsign::solver
