// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The static analysis: the same mesh solved twice, without voids (every cell active) and with
/// them (void cells left out), under the same loads. Formulation (docs/theory.md):
///   K u = F_body + F_surface + F_contents − ∫_active Bᵀ σ₀ dV,
/// with σ₀ the in-situ (initial) stress. For the model without voids σ₀ is in equilibrium with
/// gravity and the last two terms cancel; with voids the difference is exactly the traction the
/// excavated material exerted on the wall (excavation by stress release).
#include <functional>
#include <string_view>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/assembly/system.hpp"
#include "solver/fe/constants.hpp"
#include "solver/fe/element.hpp"
#include "solver/la/spd_solver.hpp"

namespace voidsign::solver {

/// Per-layer properties used by the static analysis.
struct LayerProps {
  Elastic elastic;
  double ucs = 0;      ///< Pa (0 = not given: no strength ratio)
  double tensile = 0;  ///< Pa
  double k0 = 0.5;     ///< horizontal/vertical in-situ stress ratio
};

/// What a void holds and how its wall is loaded.
struct VoidLoad {
  enum class Contents { empty, water, pressure } contents = Contents::empty;
  double pressure = 0;        ///< Pa, Contents::pressure (positive pushes the wall outward)
  double water_table_z = 0;   ///< z of the void's own water surface, Contents::water
  double volume_loss = 0;     ///< ground loss as a fraction (0.01 = 1 %); 0 = none
  /// Ground loss: the wall may translate so that it carries no net force (true, the physical
  /// case), or its centre is held (false: only for demonstrating the difference).
  bool wall_free = true;
  double cx = 0, cy = 0, cz = 0;  ///< centre the wall contracts about [m]
  /// Unit axis of a tunnel: ground loss then contracts the wall toward the axis line, not
  /// toward the centre point. Zero = contraction toward the point (2D, spheres, boxes).
  std::array<double, 3> axis{0, 0, 0};
};

struct SurfacePressure {
  double from = 0, to = 0;      ///< x (or r) range [m]
  double y_from = 0, y_to = 0;  ///< y range [m], 3D only
  double pressure = 0;          ///< Pa, positive pushing down
};

enum class Support { free, roller, fixed };

struct Boundaries {
  Support sides = Support::roller;   ///< vertical faces (2D: x = x_max, and x = x_min in plane strain)
  Support bottom = Support::fixed;
  Support top = Support::free;       ///< the ground surface; roller only for plate benchmarks
};

/// Initial (in-situ) stress at a point of a cell of layer `layer` [Pa, tension positive].
using InitialStress = std::function<Sym6(double x, double y, double z, int layer)>;

struct StaticProblem {
  const mesh::Mesh* mesh = nullptr;
  Kinematics kinematics = Kinematics::plane_strain;
  std::vector<LayerProps> layers;     ///< indexed by mesh.layer
  bool body_force = false;            ///< self-weight ρg acts as a load
  InitialStress initial_stress;       ///< empty = none
  std::vector<VoidLoad> voids;        ///< indexed by mesh.void_id (size mesh.n_voids)
  std::vector<SurfacePressure> surface;
  Boundaries boundaries;
  double gravity = standard_gravity;
  SolverChoice solver = SolverChoice::automatic;
  /// Solve the two models at the same time, one per core, where the solver allows it (the
  /// iterative solver with two copies of hypre) and memory suffices.
  bool models_in_parallel = true;
};

/// Geostatic in-situ stress of a layered half-space: σ_zz = −g ∫ρ dz, σ_xx = σ_yy = k0 σ_zz.
/// `layer_bottom_z` gives each layer's bottom (top down; the last is ignored).
InitialStress geostatic_stress(std::vector<double> layer_bottom_z, std::vector<double> density,
                               std::vector<double> k0, double gravity = standard_gravity);

/// One solved model.
struct ModelSolution {
  Vector u;                            ///< nodal displacements, m: [ux0, uz0, ux1, …] (3D: ux, uy, uz)
  double residual = 0;                 ///< ‖Ku − f‖/‖f‖
  double load_norm = 0;                ///< ‖f‖ (N, or N/rad axisymmetric)
  std::vector<char> active;            ///< per cell: part of this model
  std::vector<Sym6> strain;            ///< per cell, at the centroid
  std::vector<Sym6> stress;            ///< induced, per cell, Pa
  std::vector<Sym6> stress_total;      ///< in-situ + induced, per cell, Pa
  std::vector<std::array<double, 3>> wall_translation;  ///< per void with ground loss (x, y, z) [m]
};

struct StaticTimings {
  double assemble = 0, analyse = 0, factorize = 0, solve = 0;
};

struct StaticResult {
  ModelSolution reference;  ///< without voids
  ModelSolution voided;     ///< with voids
  StaticTimings timings;
  double factor_nonzeros = 0;
  std::string solver;   ///< the linear solver used
  int iterations = 0;   ///< conjugate-gradient iterations over all solves (0 for direct)
  bool models_in_parallel = false;  ///< the two models were solved at the same time
};

/// Progress: step name and fraction done in [0, 1].
using Progress = std::function<void(std::string_view step, double fraction)>;

/// Residual above which a solve is rejected.
inline constexpr double max_relative_residual = 1e-8;

/// Thrown when a model cannot be solved (singular matrix, residual too large).
struct SolveFailure : std::runtime_error {
  using std::runtime_error::runtime_error;
};

/// Solves both models. Throws SolveFailure if a factorisation fails or a residual exceeds
/// max_relative_residual.
StaticResult solve_static(const StaticProblem& p, const Progress& progress = {});

/// Stresses at the nodes [Pa], averaged over the active cells that share each node (each cell's
/// field evaluated at the node itself). Induced stress; add σ₀ for the total.
std::vector<Sym6> nodal_stress(const StaticProblem& p, const ModelSolution& s);

/// Per dof (non-zero = held at zero): the supports of `p.boundaries` on the block's outer faces
/// (in axisymmetry u_r = 0 on the axis, always). Void interiors are not included.
std::vector<char> outer_constraints(const StaticProblem& p);

/// Displacement (x, y, z) of node n from a solution vector in the problem's dof layout.
std::array<double, 3> node_displacement(const StaticProblem& p, const Vector& u, std::size_t n);

}  // namespace voidsign::solver
