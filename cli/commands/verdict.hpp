// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The detectability verdict: for every analysis that ran and every sensor of the scenario, the
/// void's signal as that sensor would record it (projected on what it measures, averaged over
/// its footprint and time window, sampled at its spacing), its noise, their ratio and whether
/// the ratio reaches the threshold. docs/detectability.md states each rule.
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

#include "cli/commands/ambient_run.hpp"
#include "cli/commands/dynamic_run.hpp"
#include "cli/commands/transient_run.hpp"
#include "cli/commands/static_run.hpp"
#include "cli/scenario/scenario.hpp"

namespace voidsign::cli {

/// Default signal-to-noise ratio at and above which a signal counts as detectable.
inline constexpr double default_snr_threshold = 3.0;

struct Verdict {
  std::string analysis;  ///< "static", "ambient, body waves", "ambient, surface waves"
  std::string sensor;    ///< the sensor's label
  std::string quantity;  ///< solver::quantity_name of what it measures
  std::string unit;      ///< SI unit of signal and noise
  double signal = 0;     ///< the largest recorded anomaly (static: magnitude; dynamic: RMS over the band)
  double noise = 0;      ///< one sigma (static); dynamic: √(instrument_noise² + ambient²)
  double snr = 0;
  bool detectable = false;
  double factor = 0;     ///< detectable: snr / threshold (margin); else threshold / snr (miss)
  double x = 0, y = 0;   ///< where the signal is largest, m
  std::string how;       ///< one line: projection, footprint, window, band, sampling
  std::optional<double> ambient_ratio;  ///< dynamic: anomaly over the ambient motion in the same quantity
  double ambient = 0;           ///< dynamic: the ambient motion (without voids) there, same quantity and band
  double instrument_noise = 0;  ///< dynamic: the sensor's own noise (self-noise RMS, or precision)
  double snr_instrument = 0;    ///< dynamic: signal / instrument_noise, the ratio if the ambient motion were known exactly
};

/// A sensor–analysis pair with no verdict, and why.
struct NoVerdict {
  std::string analysis, sensor, reason;
};

struct Detectability {
  double threshold = default_snr_threshold;
  std::vector<Verdict> rows;
  std::vector<NoVerdict> skipped;
};

/// The verdicts of the static analysis (run must hold a solved static analysis).
void add_static_verdicts(const Scenario& s, const StaticRun& run, Detectability& d);
/// The verdicts of the ambient analysis, one per wavefield assumption and sensor.
void add_ambient_verdicts(const Scenario& s, const AmbientRun& run, const mesh::Mesh& m, Detectability& d);

/// The verdicts of the harmonic analysis: seismic sensors and radar against the steady response
/// to the scenario's excitation, at the frequency and point where each does best.
void add_harmonic_verdicts(const Scenario& s, const HarmonicRun& run, const mesh::Mesh& m, Detectability& d);
/// The verdicts of the transient analysis: seismic sensors (peak velocity anomaly) and radar
/// (line-of-sight anomaly averaged over its window) against the recorded seismograms.
void add_transient_verdicts(const Scenario& s, const TransientRun& run, const mesh::Mesh& m, Detectability& d);

/// summary.json's "detectability" array (rows, then the skipped pairs with a reason).
nlohmann::json detectability_json(const Detectability& d);
/// The table printed at the end of a run.
void print_detectability(const Detectability& d);

}  // namespace voidsign::cli
