// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Isoparametric elements for small-strain elasticity: triangles (plane strain or axisymmetric,
/// x–z section) and tetrahedra (3D).
///
/// One six-component layout serves every kinematics, in VTK's tensor order:
/// [xx, yy, zz, xy, yz, xz], strains with engineering shears (γ = 2ε), tension positive.
/// In 2D the unknowns per node are (u_x, u_z): yy is the out-of-plane direction, ε_yy = 0 in
/// plane strain and the hoop strain u_r/r in axisymmetry (integrals per radian, no 2π);
/// xy and yz vanish. In 3D the unknowns are (u_x, u_y, u_z).
#include <array>
#include <span>

#include "mesh/core/mesh.hpp"

namespace voidsign::solver {

enum class Kinematics { plane_strain, axisymmetric, solid };

/// Unknowns per node: 2 in 2D, 3 in 3D.
inline int dofs_per_node(Kinematics k) { return k == Kinematics::solid ? 3 : 2; }
/// Index of the vertical unknown within a node's block.
inline int vertical_dof(Kinematics k) { return k == Kinematics::solid ? 2 : 1; }

/// Isotropic linear elastic material.
struct Elastic {
  double young = 0;    ///< Pa
  double poisson = 0;  ///< -
  double density = 0;  ///< kg/m^3
};

/// Symmetric tensor in VTK order [xx, yy, zz, xy, yz, xz].
using Sym6 = std::array<double, 6>;

/// σ = D ε (isotropic; ε with engineering shears).
Sym6 hooke(const Elastic& m, const Sym6& strain);

/// A quadrature point on the reference cell (triangle: r, s; tetrahedron: r, s, t) with weight
/// (reference area 1/2, volume 1/6).
struct QuadPoint {
  double r, s, t, w;
};

/// Rule for stiffness and load integrals: tri3 1 point (plane strain) or 3; tri6 3 points
/// (degree 2) or 6 (degree 4, axisymmetric); tet4 1 point; tet10 4 points (degree 2).
std::span<const QuadPoint> quadrature(mesh::CellType t, Kinematics k);

/// A richer rule (degree 4 on triangles, degree 3 on tetrahedra) for error norms.
std::span<const QuadPoint> accurate_quadrature(mesh::CellType t);

inline constexpr int max_cell_nodes = 10;

/// Shape functions and their physical derivatives at one point of a cell.
struct ShapeAt {
  int n = 0;
  std::array<double, max_cell_nodes> N{}, dx{}, dy{}, dz{};
  double x = 0, y = 0, z = 0;  ///< physical point [m]
  double detj = 0;             ///< det of the reference-to-physical Jacobian
};

/// Evaluates shapes at reference point (r, s, t) of cell `c` (t ignored for triangles).
/// Throws if det J <= 0.
ShapeAt shape_at(const mesh::Mesh& m, std::size_t c, double r, double s, double t = 0);

/// Integration weight at a point: w·detJ, times r (= x) for axisymmetric.
double volume_weight(const ShapeAt& sh, double w, Kinematics k);

/// Strain at a point from the cell's nodal unknowns (dofs_per_node(k) per node).
Sym6 strain_at(const ShapeAt& sh, const double* u_cell, Kinematics k);

/// Element stiffness, row-major, (n·d)² entries with d = dofs_per_node(k), overwritten.
void stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k, std::span<double> ke);

/// Stress field for element load integrals: σ(x, y, z) [Pa, tension positive].
using StressField = Sym6 (*)(double x, double y, double z, const void* ctx);

/// f += ∫ Bᵀ σ dV over cell c (n·d entries).
void add_stress_divergence(const mesh::Mesh& m, std::size_t c, Kinematics k, StressField sigma, const void* ctx,
                           std::span<double> f);

/// f += ∫ Nᵀ b dV over cell c for a uniform body force b = (bx, by, bz) [N/m^3]
/// (2D uses bx and bz).
void add_body_force(const mesh::Mesh& m, std::size_t c, Kinematics k, const std::array<double, 3>& b,
                    std::span<double> f);

/// Reference coordinates of the cell's nodes.
std::span<const std::array<double, 3>> node_reference_points(mesh::CellType t);

/// Reference coordinates of the cell's centroid.
std::array<double, 3> reference_centroid(mesh::CellType t);

}  // namespace voidsign::solver
