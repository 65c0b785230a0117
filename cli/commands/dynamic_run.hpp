// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A scenario's modal and harmonic analyses on the static analysis's mesh, each on the model with
/// voids (void cells inactive, nodes inside voids fixed) and without; writers and summary blocks
/// are separate, as for the static analysis (cli/commands/static_run.hpp).
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli/commands/progress.hpp"
#include "cli/scenario/scenario.hpp"
#include "mesh/core/mesh.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/analysis/modal.hpp"

namespace voidsign::cli {

/// Both models' lowest modes, matched to each other.
struct ModalRun {
  solver::Kinematics kinematics = solver::Kinematics::plane_strain;
  solver::ModalResult voided, reference;
  std::vector<char> fixed_voided, fixed_reference;  ///< per dof
  /// Per mode of the voided model: the matched reference mode, its MAC on the shared unknowns,
  /// and whether the match is by mode shape (MAC ≥ mac_threshold) or by order.
  std::vector<int> match;
  std::vector<double> mac;
  std::vector<char> by_shape;
  /// Per mode: the share of the kinetic energy within the near-void region (near_void_cell).
  std::vector<double> near_void_energy, near_void_energy_ref;
  double near_void_mass_fraction = 0;  ///< share of the voided model's mass in that region
  std::vector<char> near_void_cell;    ///< per cell: within one void half-size of a void's wall
  std::vector<char> localised;         ///< per voided mode (see docs/theory.md, "Natural modes")
  /// Per mode: largest surface amplitude over the largest amplitude anywhere (0–1).
  std::vector<double> surface_ratio, surface_ratio_ref;
  solver::Participation part_voided, part_reference;
  double seconds = 0;
};

/// MAC above which two modes count as the same shape.
inline constexpr double mac_threshold = 0.6;

/// Runs `analyses.modal` of `s` on mesh `m`. Throws SolveError when the modes cannot be found.
ModalRun run_modal(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress);
/// modal/modes.csv, modal/modes.pvd and one modal/mode_NNN.vtu per mode under `dir`.
void write_modal_outputs(const ModalRun& run, const Scenario& s, const mesh::Mesh& m, const std::filesystem::path& dir);
/// The "modal" block of summary.json.
nlohmann::json modal_summary(const ModalRun& run);

/// Both models' response over the sweep.
struct HarmonicRun {
  solver::HarmonicResult result;
  std::vector<int> surface;  ///< indices into result.output_nodes: surface nodes outside the absorbing band
  double pml_thickness = 0;  ///< m
  std::vector<std::string> warnings;
};

/// Runs `analyses.harmonic` of `s` on mesh `m`. Throws InputError when the block cannot hold the
/// absorbing band and the voids, SolveError when a solve fails.
HarmonicRun run_harmonic(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress);
/// MUMPS's analysis of the first frequency of the scenario's harmonic sweep (`voidsign check`).
solver::HarmonicEstimate estimate_harmonic_run(const Scenario& s, const mesh::Mesh& m);
/// harmonic/surface.csv, harmonic/fields.pvd and one harmonic/fields_NNN.vtu per frequency.
void write_harmonic_outputs(const HarmonicRun& run, const Scenario& s, const mesh::Mesh& m,
                            const std::filesystem::path& dir);
/// The "harmonic" block of summary.json.
nlohmann::json harmonic_summary(const HarmonicRun& run, const Scenario& s, const mesh::Mesh& m);

/// Thickness [m] of the absorbing band for a frequency-domain analysis: `requested` when > 0 and
/// it fits, else max(4 h, min(0.15 W, 0.25 D)) reduced until the voids stay 4 h inside its inner
/// edge. Throws InputError (naming `key`, e.g. "analyses.harmonic") when nothing fits.
double absorbing_band(const Scenario& s, const mesh::Mesh& m, double requested, const std::string& key);

/// A frequency-domain problem on mesh `m` with the scenario's kinematics and layers (materials,
/// damping, thicknesses); sources, frequencies and the absorbing band are left to the caller.
solver::HarmonicProblem harmonic_problem_of(const Scenario& s, const mesh::Mesh& m);

/// Indices into r.output_nodes of the surface nodes outside the absorbing band, in the mesh's
/// surface order (by x, then y).
std::vector<int> surface_points(const solver::HarmonicResult& r, const mesh::Mesh& m);

/// Peak surface anomaly |Δu| (complex vector norm) at one frequency [m] and where.
struct HarmonicPeak {
  double f_hz = 0, anomaly = 0, reference = 0, x = 0, y = 0;
};
std::vector<HarmonicPeak> harmonic_peaks(const HarmonicRun& run, const mesh::Mesh& m);

}  // namespace voidsign::cli
