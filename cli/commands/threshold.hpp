// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// `voidsign run --find-threshold`: per verdict row, the smallest size of void 0 (at its depth,
/// its shape kept) that the sensor would detect, found by re-running the model at scaled sizes.
/// The scenario is re-read from its YAML with void 0's size keys scaled, so every validation of
/// the scenario (void inside the ground, no overlaps) applies to every size tried.
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

#include "cli/commands/progress.hpp"
#include "cli/commands/verdict.hpp"
#include "cli/scenario/scenario.hpp"

namespace voidsign::cli {

struct ThresholdResult {
  std::string analysis, sensor;
  std::string parameter;  ///< "radius" (circle, sphere, tunnel), else "scale" (all dimensions of void 0)
  double base = 0;        ///< the parameter's value in the scenario (radius in m, or 1)
  /// found: the smallest detectable value; below_range: detectable at the smallest size tried;
  /// above_range: not detectable by the largest void that fits (or the largest tried).
  enum class Status { found, below_range, above_range } status = Status::found;
  double value = 0;       ///< the parameter at the threshold (or at the end of the range tried)
  double snr = 0;         ///< the re-run SNR there
  int runs = 0;           ///< model runs this row needed (shared runs counted once per row)
};

/// Searches each row of `d` (the verdicts at the scenario's own size). SNR is taken to grow
/// with the size; the search brackets the threshold by doubling or halving the size, then
/// narrows the bracket by regula falsi on ln SNR against ln size (Illinois variant) until the
/// SNR is within 1 % of the threshold. Sizes from 1/64 of the scenario's up to the largest the
/// scenario accepts. Each row re-runs only the analysis it comes from.
std::vector<ThresholdResult> find_thresholds(const Scenario& s, const Detectability& d, ProgressLine* progress);

/// The scenario text with void 0 scaled by `k` (and an explicit mesh.near-void scaled down with
/// it), keeping only `analysis` ("static", "ambient", "harmonic" or "transient") under `analyses`. Throws InputError when
/// the file cannot be read.
std::string scaled_scenario_text(const Scenario& s, double k, const std::string& analysis);

nlohmann::json thresholds_json(const std::vector<ThresholdResult>& t);
void print_thresholds(const std::vector<ThresholdResult>& t, double threshold);

}  // namespace voidsign::cli
