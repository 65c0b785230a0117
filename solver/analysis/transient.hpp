// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Transient (time-domain) wave propagation by explicit central differences with the HRZ-lumped
/// mass, on the same mesh without voids (every cell active) and with them (void cells inactive,
/// the nodes they alone hold massless and left out of the update). Formulation
/// (docs/theory-transient-draft.md):
///
///   M ü + (αM + C_b) u̇ + K (u + β u̇) = f(t),
///
/// M the lumped mass, K the stiffness, α and β per material (Rayleigh damping fitted over a
/// band), C_b the Lysmer–Kuhlemeyer dashpots on the absorbing faces (diagonal). With velocities
/// at half steps, the diagonal damping centred and the stiffness-proportional term lagged:
///
///   v_{n+½} = [(M/Δt − D/2) v_{n−½} − K (u_n + β v_{n−½}) + f_n] / (M/Δt + D/2),
///   u_{n+1} = u_n + Δt v_{n+½},        D = αM + C_b,
///
/// i.e. one sparse matrix–vector product per step. Stable for
///   Δt ≤ (2/ω_max)(√(1 + ξ²) − ξ),  ξ = β ω_max / 2,
/// where ω_max is bounded from above by the largest element eigenvalue of M_e⁻¹K_e (see
/// stable_time_step).
///
/// SI units, z up, surface z = z_max. Plane strain: forces per metre out of plane [N/m], masses
/// per metre; axisymmetric: per radian (the axis x = 0 holds u_r = 0 and never gets dashpots);
/// 3D: [N].
#include <array>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <string_view>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/analysis/plane_wave.hpp"
#include "solver/analysis/static.hpp"
#include "solver/assembly/system.hpp"
#include "solver/fe/element.hpp"

namespace voidsign::solver {

/// One material of the transient model, indexed by mesh.layer.
struct TransientLayer {
  Elastic elastic;
  double damping = 0;    ///< damping ratio ξ [-] (0.02 = 2 %), matched at both ends of the band
  double thickness = 0;  ///< m, top down (the plane wave's free field); ignored for the last layer
};

/// Rayleigh coefficients ξ(ω) = α/(2ω) + βω/2 through ξ at ω₁ and ω₂ = 2π f₁, 2π f₂:
/// α = 2ξ ω₁ω₂/(ω₁ + ω₂) [1/s], β = 2ξ/(ω₁ + ω₂) [s]. Between f₁ and f₂ the ratio dips to
/// ξ·2√(ω₁ω₂)/(ω₁ + ω₂) at √(f₁f₂). Requires 0 < f₁ ≤ f₂.
struct RayleighDamping {
  double alpha = 0;  ///< 1/s
  double beta = 0;   ///< s
};
RayleighDamping fit_rayleigh(double damping, double f1_hz, double f2_hz);

/// The Ricker wavelet A (1 − 2π²f²τ²) exp(−π²f²τ²), τ = t − delay.
struct Ricker {
  double peak_hz = 10;  ///< f, the peak of its amplitude spectrum [Hz]
  double delay_s = 0;   ///< time of the central peak [s]; 0 = 1.5/f (the wavelet then starts at ~1e-8 A)
  double amplitude = 1; ///< A: N (3D) or N/m (plane strain) or N/rad (axisymmetric)
  /// Value at time t [s].
  double operator()(double t) const;
  /// The delay actually used [s].
  double delay() const;
};

/// A point force (2D: line force) with a Ricker time history.
struct TransientSource {
  std::array<double, 3> point{0, 0, 0};       ///< m; applied at the nearest node that moves in both models
  std::array<double, 3> direction{0, 0, -1};  ///< unit vector (x, y, z); 2D uses x and z
  Ricker wavelet;
};

/// A plane-wave pulse entering from the half-space below the last layer, brought in by the domain
/// reduction method (solver/analysis/drm.hpp) on the layer of cells outside the DRM box: twice the
/// incident displacement at the top of the half-space (on x = y = 0) is amplitude × the unit
/// Ricker wavelet; the free field is solver::PlaneWavePulse with the model's Rayleigh damping.
/// Inside the box the model carries the total field, outside it the scattered field (the
/// dashpots absorb that); recorded traces and snapshots get the free field added back outside.
struct TransientWave {
  PlaneWave wave;         ///< type, polarization, incidence, azimuth; amplitude [m]
  double peak_hz = 5;     ///< the wavelet's peak frequency [Hz]
  double delay_s = 0;     ///< the peak's time at the half-space's top on x = y = 0 [s]; 0 = chosen
  DrmBox box;             ///< zero entries: chosen (drm_layer), limited by the block's faces
};

/// What holds the sides and bottom (front and back in 3D). The ground surface is always free.
enum class OuterBoundary {
  absorbing,  ///< Lysmer–Kuhlemeyer dashpots: ρV_p normal, ρV_s tangential
  fixed,      ///< u = 0
  free        ///< traction free
};

struct TransientProblem {
  const mesh::Mesh* mesh = nullptr;
  Kinematics kinematics = Kinematics::plane_strain;
  std::vector<TransientLayer> layers;  ///< indexed by mesh.layer
  TransientSource source;
  std::optional<TransientWave> wave;  ///< instead of the source, when set
  OuterBoundary boundary = OuterBoundary::absorbing;

  double duration_s = 1;  ///< simulated time [s]; n_steps = ceil(duration / Δt)
  double time_step_s = 0; ///< Δt [s]; 0 = safety · stable_time_step
  double safety = 0.9;    ///< fraction of the stable step used when time_step_s = 0
  /// Band over which each layer's damping ratio is matched (fit_rayleigh); ignored when every
  /// layer has ξ = 0. Both 0 = [f/3, 3f] around the source's (or the wave's) peak frequency f.
  double damping_f1_hz = 0, damping_f2_hz = 0;
  /// Rayleigh (mass and stiffness proportional, ξ matched at f₁ and f₂), or mass proportional
  /// only (α = 2ξω_c at the band's centre ω_c = 2π√(f₁f₂), β = 0: ξ falls as 1/f across the
  /// band, but the stiffness term no longer shortens the stable step).
  enum class DampingFit { rayleigh, mass_proportional } damping_fit = DampingFit::rayleigh;

  std::vector<int> receivers;  ///< nodes whose displacements are recorded
  int receiver_every = 1;      ///< record every k-th step (step 0 included)
  bool with_voids = true;      ///< also run the model with voids
  bool record_energy = false;  ///< record the discrete energy at the receiver steps (undamped check)
};

/// Callbacks of the time loop (each optional). solve_transient runs the model without voids
/// first, then the model with voids.
struct TransientCallbacks {
  /// Called at steps 0, m, 2m, … with the step, its time [s] and the displacement of every dof
  /// (d per node, zero at fixed or massless dofs; valid during the call only).
  std::function<void(int step, double time_s, std::span<const double> u)> snapshot;
  int snapshot_every = 0;  ///< m; 0 = no snapshots
  /// Fraction done in [0, 1] of the current model ("without voids" or "with voids"), about
  /// every 1 % of the steps.
  Progress progress;
};

/// The recorded history of one model.
struct TransientTraces {
  std::vector<double> time_s;  ///< per sample
  /// Displacements [m]: sample-major, then receiver, then component (d = dofs_per_node):
  /// u[(s · n_receivers + r) · d + j].
  std::vector<double> u;
  /// With record_energy, per sample: E_n = ½ v_{n−½}ᵀ M v_{n+½} + ½ u_nᵀ K u_n [J, per metre in
  /// plane strain], the quantity the undamped, unforced scheme conserves exactly.
  std::vector<double> energy;
  /// The usual ½ v̄ᵀ M v̄ + ½ uᵀ K u with v̄ = (v_{n−½} + v_{n+½})/2, for comparison.
  std::vector<double> energy_plain;
  std::vector<char> active;  ///< per cell
  std::size_t n_free = 0;    ///< dofs in the update
  std::size_t n_nonzeros = 0;  ///< stored entries of the reduced stiffness (full storage)
  double setup_seconds = 0;  ///< assembly and operator set-up
  double loop_seconds = 0;   ///< time loop, wall
};

struct TransientResult {
  TransientTraces reference;  ///< without voids
  TransientTraces voided;     ///< with voids (empty when with_voids is false)
  std::vector<double> difference;  ///< voided − reference, laid out like TransientTraces::u
  std::vector<int> receivers;
  double time_step_s = 0;
  double stable_step_s = 0;     ///< the bound of stable_time_step for the reference model
  double omega_max_bound = 0;   ///< its element-eigenvalue bound on ω_max [rad/s]
  int n_steps = 0;
  int source_node = -1;
  double source_offset_m = 0;   ///< distance of source_node from the requested point
  std::vector<RayleighDamping> damping;      ///< per layer
  // Plane wave only:
  DrmBox drm_box;               ///< as used
  std::size_t drm_cells = 0;    ///< cells in the DRM layer
  double wave_delay_s = 0;      ///< the pulse's delay as used
  double wave_earliest_s = 0;   ///< earliest time the pulse reaches a node of the model [s]
  double wave_bytes = 0;        ///< memory of the free-field histories
  double wave_seconds = 0;      ///< time to synthesise them
};

/// Runs both models over the same steps. Throws std::invalid_argument for inconsistent input
/// (no mesh, layers not matching the tags, a non-positive duration or step, a receiver out of
/// range, a step above the stable limit).
TransientResult solve_transient(const TransientProblem& p, const TransientCallbacks& callbacks = {});

/// The explicit operator of one model, everything the time loop needs precomputed. Built by
/// solve_transient; public for tests, benchmarks and estimates.
class ExplicitModel {
 public:
  /// voided: void cells inactive. dt: the time step [s] (> 0).
  ExplicitModel(const TransientProblem& p, bool voided, double dt);

  /// Runs n_steps steps from rest with the problem's source at node source_node (or, with a
  /// plane wave, its free field `pulse`), recording as TransientTraces says. No allocation
  /// inside the loop.
  TransientTraces run(int n_steps, int source_node, const TransientCallbacks& callbacks,
                      const PlaneWavePulse* pulse = nullptr) const;

  std::size_t n_free() const { return free_.size(); }
  /// Stored stiffness entries (blocked: blocks × d²).
  std::size_t n_nonzeros() const { return block_ > 1 ? bcol_.size() * static_cast<std::size_t>(block_ * block_) : col_.size(); }
  /// d when the operator is stored in node blocks (block-row CSR), 1 for scalar CSR.
  int block_size() const { return block_; }
  /// The dof (node · d + j) of each free unknown, ascending.
  const std::vector<int>& free_dofs() const { return free_; }
  /// Reduced lumped mass [kg] and stiffness (full CSR) over the free unknowns.
  const std::vector<double>& mass() const { return mass_; }
  /// y = K x over the free unknowns (OpenMP over rows).
  void multiply(std::span<const double> x, std::span<double> y) const;
  /// Row pointer, columns and values of the reduced full-storage stiffness in scalar CSR (empty
  /// when block_size() > 1).
  const std::vector<std::int64_t>& row_pointer() const { return row_; }
  const std::vector<int>& columns() const { return col_; }
  const std::vector<double>& values() const { return val_; }
  double setup_seconds() const { return setup_seconds_; }
  /// Plane wave: the DRM box as used and the cells of its layer.
  const DrmBox& drm_box() const { return drm_box_; }
  std::size_t drm_cells() const { return drm_cells_; }
  /// Per node: inside the DRM box (plane wave; empty otherwise).
  const std::vector<char>& drm_inside() const { return inside_; }

 private:
  void build_drm(const TransientProblem& p, const std::vector<RayleighDamping>& damping);
  void block_rows();

  const TransientProblem* p_;
  double dt_;
  bool voided_;
  int d_;
  std::vector<char> active_;
  std::vector<int> free_;       // reduced → dof
  std::vector<int> reduced_;    // dof → reduced or −1
  std::vector<std::int64_t> row_;
  std::vector<int> col_;
  std::vector<double> val_;     // K
  std::vector<double> val_beta_;  // Σ β_e K_e, when β differs between layers
  double beta_ = 0;             // uniform β
  int block_ = 1;               // d when blocked (then the CSR arrays are empty)
  std::vector<std::int64_t> brow_;
  std::vector<int> bcol_;       // block column (node of the reduced numbering / d)
  std::vector<double> bval_, bvalb_;  // d × d per block, row-major (bvalb_: Σ β_e K_e)
  std::vector<double> mass_, a_, b_;
  double setup_seconds_ = 0;
  // The DRM (plane wave): its nodes and the effective-force operators f = G u⁰ + G_β v⁰ over the
  // reduced rows, columns d · (index in drm_nodes_) + j.
  std::vector<int> drm_nodes_;
  std::vector<char> inside_;  // per node: inside the DRM box
  Eigen::SparseMatrix<double, Eigen::RowMajor, int> drm_k_, drm_beta_;
  std::vector<int> drm_rows_;  // reduced row of each row of the operators
  DrmBox drm_box_;
  std::size_t drm_cells_ = 0;
};

/// The stable step of one model: ω̂ ≥ ω_max from the element eigenvalue inequality
/// (max over active cells of the largest eigenvalue of M_e^{-½} K_e M_e^{-½}, M_e the cell's
/// HRZ-lumped mass; Irons 1970, Hughes 1987 §9.3), then Δt = (2/ω̂)(√(1 + ξ²) − ξ) with
/// ξ = β_max ω̂ / 2. Returns {Δt [s], ω̂ [rad/s]}. Throws on a cell with det J ≤ 0.
std::array<double, 2> stable_time_step(const TransientProblem& p, bool voided, double beta_max);

/// An estimate of ω_max = √λ_max(M⁻¹K) of a model by power iteration on M^{-½}KM^{-½} (a lower
/// bound that converges from below; for checks of the element bound, not for choosing Δt).
double power_iteration_omega_max(const ExplicitModel& model, int iterations);

/// Memory and time needed by a transient run, from the size of the reduced system.
struct TransientEstimate {
  double bytes = 0;             ///< operator and state vectors, one model
  double seconds_per_step = 0;  ///< one model, this machine's memory bandwidth (see the .cpp)
  double seconds_total = 0;     ///< both models (or one), all steps
};
/// n_dofs: free unknowns; n_nonzeros: stored entries of the full-storage stiffness (≈ n_dofs ×
/// 2·(neighbour nodes + 1)); stiffness_damping: whether a second value array is streamed;
/// n_recorded: receiver values kept (samples × receivers × d); block: the node block size the
/// operator is stored in (ExplicitModel::block_size(); one column index per block²).
TransientEstimate estimate_transient(std::size_t n_dofs, std::size_t n_nonzeros, std::size_t n_steps,
                                     bool stiffness_damping, std::size_t n_recorded, int n_models = 2, int block = 1);

}  // namespace voidsign::solver
