// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A scenario's ambient analysis: the noise spectrum (Peterson 1993 or a user table) carried
/// through the harmonic transfer functions of both models under two wavefield assumptions
/// (docs/theory.md, "Ambient noise"), giving displacement PSDs and band RMS amplitudes on the
/// ground surface with and without the voids and of their difference.
#include <complex>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli/commands/progress.hpp"
#include "cli/scenario/scenario.hpp"
#include "mesh/core/mesh.hpp"
#include "solver/analysis/ambient.hpp"
#include "solver/signals/noise_model.hpp"

namespace voidsign::cli {

/// RMS amplitudes [m] over one band, per surface point and component ([q · d + j]).
struct AmbientBandRms {
  double lo_hz = 0, hi_hz = 0;
  std::vector<double> model, reference, anomaly;
};

/// One wavefield assumption: its load cases, their weights and what they give.
struct AmbientWavefield {
  std::string name;                     ///< "body-waves" or "surface-waves"
  std::vector<std::string> case_names;  ///< e.g. "S wave (x)", "force at x = -60 m"
  solver::CaseResponses voided, reference;  ///< [case][f][q · d + j], per unit case amplitude
  std::vector<std::vector<double>> weights;  ///< [case][f], m²/Hz per unit amplitude² (or N²)
  solver::AmbientPsd psd;                    ///< [f][q · d + j], m²/Hz
  std::vector<AmbientBandRms> bands;         ///< the analysis band first, then its octave bands
  std::size_t peak_point = 0;   ///< surface point of the largest vertical anomaly RMS over the band
  std::size_t peak_point_h = 0; ///< the same for the horizontal (x) anomaly
};

struct AmbientRun {
  std::vector<double> frequencies_hz;
  std::vector<double> target_z;  ///< the noise as a vertical displacement PSD [m²/Hz] per frequency
  std::vector<double> target_h;  ///< the horizontal one assumed for body waves (equal to target_z)
  std::string noise_name;        ///< "Peterson (1993) NHNM", or the table's file
  std::vector<int> points;       ///< surface nodes outside the absorbing band, by x (then y)
  std::size_t scale_point = 0;   ///< the point (index into points) where the void-free PSD is matched
  int d = 2;
  std::vector<AmbientWavefield> fields;
  double pml_thickness = 0;
  double residual = 0;           ///< worst harmonic residual over every case, frequency and model
  std::vector<std::string> warnings;
  double seconds = 0;
};

/// Runs `analyses.ambient` of `s` on `m`. Throws InputError or SolveError.
AmbientRun run_ambient(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress);
/// ambient/surface.csv, ambient/psd.csv and ambient/spectra.csv under `dir`.
void write_ambient_outputs(const AmbientRun& run, const Scenario& s, const mesh::Mesh& m, const std::filesystem::path& dir);
/// The "ambient" block of summary.json.
nlohmann::json ambient_summary(const AmbientRun& run, const Scenario& s, const mesh::Mesh& m);

/// The scenario's noise as a vertical displacement PSD [m²/Hz] at `f_hz` (Peterson above 10 Hz:
/// the shortest-period segment extended).
double ambient_noise_displacement_psd(const AmbientAnalysis& a, double f_hz);

}  // namespace voidsign::cli
