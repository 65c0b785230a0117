// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Triangle elements for 2D small-strain elasticity, plane strain or axisymmetric.
///
/// One four-component Voigt layout serves both kinematics: strain
/// [ε_xx, ε_zz, γ_xz, ε_out] and stress [σ_xx, σ_zz, σ_xz, σ_out], where "out" is the
/// out-of-plane direction: y (plane strain, ε_yy = 0) or the hoop direction θ (axisymmetric,
/// ε_θθ = u_r / r). Tension positive. Axisymmetric integrals are per radian (no 2π factor).
#include <array>
#include <span>

#include "mesh/core/mesh.hpp"

namespace voidsign::solver {

enum class Kinematics { plane_strain, axisymmetric };

/// Isotropic linear elastic material.
struct Elastic {
  double young = 0;    ///< Pa
  double poisson = 0;  ///< -
  double density = 0;  ///< kg/m^3
};

using Voigt4 = std::array<double, 4>;

/// σ = D ε for the four-component layout.
Voigt4 hooke(const Elastic& m, const Voigt4& strain);

/// A quadrature point on the reference triangle (r, s) with weight (reference area 1/2).
struct QuadPoint {
  double r, s, w;
};

/// Rule used for stiffness and load integrals of a cell type under the given kinematics:
/// tri3: 1 point (plane strain) or 3; tri6: 3 points (degree 2) or 6 (degree 4, axisymmetric).
std::span<const QuadPoint> quadrature(mesh::CellType t, Kinematics k);

/// Shape functions and their x–z derivatives at one point of a cell.
struct ShapeAt {
  int n = 0;                    ///< nodes (3 or 6)
  std::array<double, 6> N{};    ///< values
  std::array<double, 6> dx{};   ///< dN/dx
  std::array<double, 6> dz{};   ///< dN/dz
  double x = 0, z = 0;          ///< physical point [m]
  double detj = 0;              ///< det of the reference-to-physical Jacobian
};

/// Evaluates shapes at reference point (r, s) of cell `c`. Throws if det J <= 0.
ShapeAt shape_at(const mesh::Mesh& m, std::size_t c, double r, double s);

/// Integration weight at a point: w·detJ, times r (= x) for axisymmetric.
double volume_weight(const ShapeAt& sh, double w, Kinematics k);

/// Strain at a point from the cell's nodal displacements u (2 per node: ux, uz).
Voigt4 strain_at(const ShapeAt& sh, const double* u_cell, Kinematics k);

/// Element stiffness: ke (2n × 2n, row-major, dofs ux0, uz0, ux1, …) overwritten.
void stiffness(const mesh::Mesh& m, std::size_t c, const Elastic& mat, Kinematics k,
               std::span<double> ke);

/// Stress field for element load integrals: σ(x, z) [Pa, tension positive].
using StressField = Voigt4 (*)(double x, double z, const void* ctx);

/// f += ∫ Bᵀ σ(x) dV over cell c, f has 2n entries.
void add_stress_divergence(const mesh::Mesh& m, std::size_t c, Kinematics k, StressField sigma,
                           const void* ctx, std::span<double> f);

/// f += ∫ Nᵀ b dV over cell c for a uniform body force b = (bx, bz) [N/m^3].
void add_body_force(const mesh::Mesh& m, std::size_t c, Kinematics k, double bx, double bz,
                    std::span<double> f);

/// Reference coordinates of the cell's nodes (for evaluating at nodes).
std::span<const std::array<double, 2>> node_reference_points(mesh::CellType t);

}  // namespace voidsign::solver
