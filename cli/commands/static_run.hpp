// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A scenario's static analysis from mesh to signature, in memory; the writers and the summary
/// are separate so that `run`, `verify` and the benchmark share one path.
#include <filesystem>
#include <memory>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli/commands/progress.hpp"
#include "cli/scenario/scenario.hpp"
#include "mesh/core/mesh.hpp"
#include "solver/analysis/signature.hpp"
#include "solver/analysis/stability.hpp"
#include "solver/analysis/static.hpp"
#include "solver/analysis/surface_map.hpp"

namespace voidsign::cli {

struct StaticRun {
  std::unique_ptr<mesh::Mesh> mesh;
  mesh::Quality quality;
  solver::StaticProblem problem;  ///< points into *mesh
  solver::StaticResult result;
  std::vector<solver::SurfaceRow> profile;  ///< 2D models
  solver::SurfaceMap map;                   ///< 3D models
  solver::Anomaly anomaly;
  solver::Stability stability;
  solver::FarField far_field;  ///< where duz_rel is measured from
  double mesh_seconds = 0;
  std::vector<std::string> warnings;
};

/// Builds and checks the mesh (SolveError on inverted cells) for scenario `s`.
std::unique_ptr<mesh::Mesh> build_checked_mesh(const Scenario& s, mesh::Quality* quality, ProgressLine* progress);

/// Meshes, solves both models, extracts the signature and screens stability.
StaticRun run_static(const Scenario& s, ProgressLine* progress);

/// Warnings about the model itself (block size, roof stability, soft roofs); appended to run.warnings.
std::vector<std::string> model_warnings(const Scenario& s);

/// Writes static/surface.csv, static/field.vtu, static/field_ref.vtu and mesh.vtu under `dir`
/// (3D adds static/surface.vtu, the ground surface with the anomaly fields).
void write_static_outputs(const StaticRun& run, const Scenario& s, const std::filesystem::path& dir);

/// The "static" block of summary.json.
nlohmann::json static_summary(const StaticRun& run);

/// Estimated cells, unknowns, peak memory [bytes] and wall time [s] before meshing.
struct RunEstimate {
  double cells = 0, dofs = 0, memory_bytes = 0, seconds = 0;
};
RunEstimate estimate_run(const Scenario& s);
/// The same from known counts (after meshing), for a 3D model or a 2D one.
RunEstimate estimate_for(double cells, double dofs, bool three_d);

}  // namespace voidsign::cli
