// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A scenario's transient analysis on the static analysis's mesh: the same Ricker-wavelet force or
/// plane-wave pulse in the model without voids and in the model with them, surface seismograms of both and their
/// difference, snapshots of the whole field. Writers and summary block as for the other analyses.
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli/commands/progress.hpp"
#include "cli/scenario/scenario.hpp"
#include "mesh/core/mesh.hpp"
#include "solver/analysis/transient.hpp"

namespace voidsign::cli {

/// What a transient run will cost, computed from the mesh before any operator is built.
struct TransientPlan {
  double stable_step_s = 0;   ///< from the element eigenvalue bound (solver::stable_time_step)
  double time_step_s = 0;     ///< the step that will be used
  double undamped_step_s = 0; ///< the stable step without the stiffness-proportional damping
  std::vector<std::string> warnings;  ///< e.g. the damping cutting the step
  int n_steps = 0;
  int record_every = 1;       ///< seismogram sample every k-th step
  int snapshot_every = 0;     ///< 0 = none
  std::size_t n_snapshots = 0;  ///< per model
  std::vector<int> receivers;   ///< surface nodes, in surface order
  double wave_delay_s = 0;      ///< plane wave: the pulse's delay (given or chosen)
  solver::TransientEstimate estimate;  ///< both models, including recorded traces and snapshots
};

/// The plan for `analyses.transient` of `s` on `m`. Throws InputError for a time step above the
/// stable one, a duration that ends before a plane wave's peak reaches the rock, or a run that
/// would need more than 80 % of this machine's memory.
TransientPlan plan_transient(const Scenario& s, const mesh::Mesh& m);

struct TransientRun {
  TransientPlan plan;
  solver::TransientResult result;
  /// Per snapshot: the time [s] and the displacement of every dof (d per node) of each model.
  std::vector<double> snapshot_times;
  std::vector<std::vector<double>> snapshots_ref, snapshots_voided;
  std::vector<std::string> warnings;
  double seconds = 0;
};

/// Runs `analyses.transient` of `s` on mesh `m`. Throws InputError or SolveError.
TransientRun run_transient(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress);
/// transient/seismograms.csv, transient/snapshots.pvd and one transient/snapshot_NNN.vtu each.
void write_transient_outputs(const TransientRun& run, const Scenario& s, const mesh::Mesh& m,
                             const std::filesystem::path& dir);
/// The "transient" block of summary.json.
nlohmann::json transient_summary(const TransientRun& run, const Scenario& s, const mesh::Mesh& m);

/// The largest surface anomaly |Δu| over all receivers and samples [m], where and when.
struct TransientPeak {
  double anomaly = 0, reference = 0, x = 0, y = 0, t = 0;
};
TransientPeak transient_peak(const TransientRun& run, const mesh::Mesh& m);

}  // namespace voidsign::cli
