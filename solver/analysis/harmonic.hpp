// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Harmonic (steady-state, frequency-domain) response of the layered block, solved on the same
/// mesh without voids (every cell active) and with them (void cells inactive, the nodes they
/// alone hold fixed), over a list of frequencies. Formulation (docs/theory.md, "Harmonic
/// response"):
///   S(ω) u = f(ω),   S = K* − ω² M   (solver/fe/pml.hpp: hysteretic damping, PML band),
/// time factor e^{iωt}, displacements complex amplitudes [m], SI units, z up, surface z = z_max.
///
/// Sources:
/// - a point force (plane strain: a line force per metre of the out-of-plane direction [N/m];
///   3D: [N]) at the node nearest a given point, in a given direction;
/// - a plane P, SV or SH (3D) wave entering from the half-space below, vertically or at an angle,
///   brought in by the domain reduction method (Bielak,
///   Loukakis, Hisada & Yoshimura 2003, Bull. Seismol. Soc. Am. 93(2), 817–824; from memory).
///   The free field u⁰ is the exact response of the layered ground (LayeredPlaneWave). Effective
///   forces act on the single layer of cells just outside the "DRM box" (the interior region,
///   which must contain every void): with b the nodes on the box boundary Γ and e the other
///   nodes of those cells, f_b = −S_be u⁰_e and f_e = +S_eb u⁰_b. The solution is then the total
///   field inside the box and on Γ, and the scattered field u − u⁰ outside it; the scattered
///   field is what the PML absorbs.
///
/// Amplitude of the plane wave: `amplitude` is the bedrock *outcrop* motion, i.e. the motion
/// the incident wave would give at a free surface on the half-space: twice the up-going
/// incident wave's amplitude, phase zero at the top of the half-space. A surface/outcrop
/// transfer function is then the surface displacement divided by `amplitude`.
#include <array>
#include <complex>
#include <string>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/analysis/drm.hpp"
#include "solver/analysis/static.hpp"
#include "solver/fe/element.hpp"
#include "solver/fe/pml.hpp"
#include "solver/la/complex_ldlt.hpp"
#include "solver/la/complex_solver.hpp"

namespace voidsign::solver {

/// One layer of the model (and of the 1D column for the incident wave), indexed by mesh.layer.
struct HarmonicLayer {
  Elastic elastic;
  double damping = 0;    ///< hysteretic damping ratio ξ [-] (0.05 = 5 %)
  double thickness = 0;  ///< m, top down; ignored for the last layer (the half-space)
};

enum class IncidentWave { s, p };

/// Exact steady-state response of a horizontally layered column over a half-space to a vertically
/// incident plane wave (Thomson 1950, Haskell 1953: the layer recursion for up- and down-going
/// waves with complex moduli, as in Kramer 1996, §7.2.1.5; checked mathematically). Layer j
/// carries u = A_j e^{i k*_j ζ} + B_j e^{−i k*_j ζ} (ζ depth below its top, A up-going), with
/// k* = ω / v*, v* = √(G*/ρ) for S (G* the complex shear modulus) or √(M*/ρ) for P (M* = λ* + 2μ*,
/// the constrained modulus). The surface is traction free (A₁ = B₁) and `amplitude` is the
/// outcrop motion 2 A_N of the half-space.
class VerticalColumn {
 public:
  VerticalColumn(const std::vector<HarmonicLayer>& layers, IncidentWave type, double omega, double amplitude);
  /// Displacement [m] along the wave's motion at `depth` [m] below the surface.
  Complex displacement(double depth) const;
  /// Surface displacement / outcrop motion (the transfer function).
  Complex surface_to_outcrop() const { return displacement(0) / amplitude_; }

 private:
  std::vector<double> top_;  // depth of each layer's top [m]
  std::vector<Complex> k_, a_, b_;
  double amplitude_;
};

/// A point force.
struct PointForce {
  std::array<double, 3> point{0, 0, 0};      ///< m; applied at the nearest node outside voids and the PML
  std::array<double, 3> direction{0, 0, -1};  ///< unit vector (x, y, z); 2D uses x and z
  double amplitude = 1;                       ///< N (3D) or N/m (plane strain)
};

/// A plane wave entering from the half-space below the last layer, vertically or at an angle
/// (its free field: solver/analysis/plane_wave.hpp).
struct PlaneWave {
  IncidentWave type = IncidentWave::s;
  double amplitude = 1;  ///< m: twice the incident wave (at vertical incidence the outcrop motion)
  /// S waves: 0 = SV, motion in the vertical plane of travel (at vertical incidence and azimuth 0
  /// along x); 1 = SH, horizontal motion across it (3D only; along y at azimuth 0).
  int polarization = 0;
  /// Angle from the vertical in the half-space [rad], |θ| < π/2. Plane strain: signed, positive
  /// for a wave travelling toward +x.
  double incidence = 0;
  double azimuth = 0;  ///< 3D: horizontal direction of travel [rad], anticlockwise from +x
};


/// How the frequencies are spread over the cores.
enum class FrequencyLoop {
  automatic,   ///< two frequencies at a time where a second copy of MUMPS is installed and two
               ///< factors fit in memory, single-threaded BLAS; else sequential (docs/theory.md)
  sequential,  ///< one frequency at a time, the BLAS under MUMPS using its own threads
  parallel     ///< one worker per thread, single-threaded BLAS, no memory check
};

struct HarmonicProblem {
  const mesh::Mesh* mesh = nullptr;
  Kinematics kinematics = Kinematics::plane_strain;  ///< plane_strain or solid
  std::vector<HarmonicLayer> layers;                 ///< indexed by mesh.layer
  std::vector<double> frequencies_hz;                ///< each > 0

  enum class Source { point_force, plane_wave } source = Source::plane_wave;
  PointForce force;
  PlaneWave wave;
  DrmBox box;  ///< the DRM box; zero entries: chosen (drm_layer), limited by the PML's inner edge

  /// Absorbing band along the sides and bottom, inside the mesh [m]; 0 = none. The outer boundary
  /// (sides, bottom) is fixed either way; the ground surface is free.
  double pml_thickness = 0;
  double pml_reflection = 1e-3;  ///< target theoretical reflection at normal incidence (fastest P wave)
  int pml_order = 2;             ///< polynomial grading m
  double pml_real_stretch = 0;   ///< κ₀

  /// Further load cases solved with the same factorisation at every frequency (e.g. the two
  /// wave types, or sources on both sides, of an ambient-noise wavefield). Each is a point force
  /// or a plane wave as above; results in HarmonicModel::u_extra.
  struct LoadCase {
    Source source = Source::plane_wave;
    PointForce force;
    PlaneWave wave;
  };
  std::vector<LoadCase> extra_cases;

  bool with_voids = true;         ///< also solve the model with voids
  std::vector<int> output_nodes;  ///< nodes whose displacements are kept; empty = all
  FrequencyLoop loop = FrequencyLoop::automatic;
  LdltOrdering ordering = LdltOrdering::automatic;
  /// Solve both models on one factorisation per frequency (solve_harmonic; docs/theory.md) where
  /// the void-boundary unknowns number at most max_shared_boundary (their Schur complement is
  /// dense); otherwise, or when false, each model is factorised on its own.
  bool share_factorisation = true;
  long max_shared_boundary = 3000;
  /// Memory a factorisation may use [bytes]; 0 = 90 % of the memory available. A sweep whose
  /// factorisation MUMPS's analysis estimates above it is refused (SolveFailure) before it starts.
  double memory_limit_bytes = 0;
  double max_residual = 1e-8;  ///< ‖S u − f‖/‖f‖ above which a solve is rejected (SolveFailure)
};

/// One model over the sweep.
struct HarmonicModel {
  /// Per frequency: d complex displacements [m] per output node (d = 2: u_x, u_z; 3: u_x, u_y,
  /// u_z). The total field at every node that belongs to a cell outside the PML (for the plane
  /// wave, the free field is added back outside the DRM box); inside the PML the stretched,
  /// non-physical field.
  std::vector<ComplexVector> u;
  /// The same for each of HarmonicProblem::extra_cases: u_extra[case][frequency].
  std::vector<std::vector<ComplexVector>> u_extra;
  std::vector<double> residual;  ///< per frequency, ‖S u − f‖/‖f‖, worst over the load cases
  /// Per frequency: assembly + factorisation + solve, wall time. With a shared factorisation the
  /// frequency's whole time is on the model without voids and the model with voids shows 0.
  std::vector<double> seconds;
  std::vector<double> factor_seconds;  ///< per frequency: the numeric factorisation alone (likewise)
  std::vector<char> active;      ///< per cell
};

struct HarmonicResult {
  std::vector<double> frequencies_hz;
  HarmonicModel reference;  ///< without voids
  HarmonicModel voided;     ///< with voids (empty when with_voids is false)
  std::vector<int> output_nodes;  ///< the nodes of each u vector, in order
  std::vector<char> pml_cell;     ///< per cell: in the absorbing band
  std::vector<char> drm_inside;   ///< per node: in the DRM box (plane wave only)
  PmlLayout pml;
  double pml_reflection_normal = 1;  ///< theoretical, fastest P wave
  double pml_reflection_45 = 1;      ///< theoretical, fastest P wave at 45°
  /// Band thickness in S wavelengths at the lowest frequency (fastest S wave): the attenuation
  /// does not depend on frequency, but fields that do not propagate as plane waves (near field,
  /// evanescent parts) are absorbed less when the band is thin in wavelengths.
  double pml_wavelengths = 0;
  int force_node = -1;               ///< point force: the node it acts on
  double force_offset = 0;           ///< its distance from the requested point [m]
  /// The same for each extra load case (−1 and 0 for plane waves).
  std::vector<int> extra_force_nodes;
  std::vector<double> extra_force_offsets;
  std::size_t n_dofs = 0;
  double setup_seconds = 0;       ///< pattern and frequency-independent parts
  double analyse_seconds = 0;     ///< symbolic analyses (all solver instances)
  double total_seconds = 0;
  double factor_nonzeros = 0;     ///< L + U
  double peak_bytes = 0;          ///< MUMPS's memory for one factorisation (with the Schur complement)
  std::string loop;               ///< how the sweep ran, e.g. "parallel (2 threads)"
  std::string linear_solver;      ///< what factorised the systems, in words
  std::size_t shared_boundary = 0;  ///< void-boundary unknowns of the shared factorisation (0: none)
};

/// Runs the sweep. Throws std::invalid_argument for inconsistent input (a void outside the DRM
/// box, the box reaching the PML, layers not matching the mesh tags) and SolveFailure when a
/// factorisation would not fit in memory, fails, or a residual exceeds max_residual.
HarmonicResult solve_harmonic(const HarmonicProblem& p, const Progress& progress = {});

/// What one frequency of a sweep will cost, from MUMPS's symbolic analysis of its first system
/// (no factorisation): for `voidsign check`.
struct HarmonicEstimate {
  std::size_t n_dofs = 0;
  std::size_t shared_boundary = 0;  ///< Schur unknowns of the shared factorisation (0: two per frequency)
  int factorisations_per_frequency = 1;
  double factor_entries = 0;
  double flops = 0;              ///< per factorisation
  double bytes = 0;              ///< per factorisation, with the matrix
  double available_bytes = 0;    ///< memory available now
  double seconds_per_frequency = 0;  ///< rough: flops at a rate measured on the benchmark machine
};

/// Validates like solve_harmonic and analyses the first frequency's system.
HarmonicEstimate estimate_harmonic(const HarmonicProblem& p);

/// One assembled, constrained system S(ω) u = f, as solve_harmonic factorises it (for other
/// solvers and benchmarks). For the plane wave, u is the total field inside the DRM box and the
/// scattered field outside it.
struct HarmonicSystem {
  ComplexMatrix matrix;  ///< full storage, complex symmetric
  ComplexVector rhs;
};

/// The system of one model at one frequency [Hz]. Throws like solve_harmonic.
HarmonicSystem harmonic_system(const HarmonicProblem& p, double frequency_hz, bool voided);

/// Largest P-wave speed of the layers (undamped) [m/s].
double fastest_p_speed(const std::vector<HarmonicLayer>& layers);

}  // namespace voidsign::solver
