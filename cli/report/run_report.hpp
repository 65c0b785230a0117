// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// DIR/report.html of a run, and every plot of it as DIR/plots/*.svg: the verdict first, then
/// the ground section to scale, the static signature with each sensor's noise band, the dynamic
/// signature against the noise models and the sensors' self-noise, the stability screen, the
/// threshold search, the provenance and the cautions (docs/report.md).
#include <filesystem>
#include <string>
#include <vector>

#include "cli/commands/ambient_run.hpp"
#include "cli/commands/dynamic_run.hpp"
#include "cli/commands/static_run.hpp"
#include "cli/commands/threshold.hpp"
#include "cli/commands/transient_run.hpp"
#include "cli/commands/verdict.hpp"
#include "cli/scenario/scenario.hpp"

namespace voidsign::cli {

/// Everything a report can show; null pointers for analyses that did not run.
struct ReportInputs {
  const Scenario* scenario = nullptr;
  const StaticRun* base = nullptr;  ///< holds the mesh and its quality; its static parts only if static ran
  bool static_ran = false;
  const ModalRun* modal = nullptr;
  const HarmonicRun* harmonic = nullptr;
  const TransientRun* transient = nullptr;
  const AmbientRun* ambient = nullptr;
  const Detectability* detectability = nullptr;
  const std::vector<ThresholdResult>* thresholds = nullptr;
  std::vector<std::string> warnings;
  std::string date_utc;
};

/// Writes dir/report.html and dir/plots/*.svg (dir is the run's staging folder).
void write_report(const ReportInputs& in, const std::filesystem::path& dir);

}  // namespace voidsign::cli
