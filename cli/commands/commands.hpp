// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The subcommands of the voidsign program. Each returns an exit code or throws InputError,
/// SolveError or WriteError (mapped to exit codes by main).
#include <filesystem>
#include <optional>

namespace voidsign::cli {

struct RunOptions {
  std::filesystem::path scenario;
  std::optional<std::filesystem::path> out;  ///< overrides output.dir
  bool force = false;                        ///< replace an existing, non-empty output folder
  double snr = 3.0;                          ///< SNR at and above which a sensor detects the void
  bool find_threshold = false;               ///< also search the smallest detectable void radius per sensor
};

/// `voidsign run FILE`: solve, write DIR/summary.json, DIR/mesh.vtu, DIR/static/*, print the peaks.
int run_command(const RunOptions& opt);

/// `voidsign check FILE`: validate, mesh, print sizes and estimates; solves nothing.
int check_command(const std::filesystem::path& scenario);

/// `voidsign materials`: the built-in catalogue.
int materials_command();

/// `voidsign sensors`: the built-in sensor catalogue with each value's source.
int sensors_command();

/// `voidsign verify`: every verification case, one row each; `json` also writes them there.
/// `only` restricts to case names containing that text.
int verify_command(const std::optional<std::filesystem::path>& json, const std::string& only);

/// Output folder for a scenario: --out, else output.dir, else results/<file stem> beside the file.
std::filesystem::path output_dir_for(const RunOptions& opt, const std::filesystem::path& scenario_dir,
                                     const std::filesystem::path& from_file);

}  // namespace voidsign::cli
