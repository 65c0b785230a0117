// SPDX-License-Identifier: GPL-3.0-or-later
// The voidsign program: subcommands run, check, verify, materials, sensors.
#include <CLI/CLI.hpp>
#include <cstdio>
#include <exception>

#include "cli/commands/commands.hpp"
#include "cli/commands/model_setup.hpp"
#include "cli/errors.hpp"

using namespace voidsign::cli;

int main(int argc, char** argv) {
  CLI::App app{std::string("voidsign ") + VOIDSIGN_VERSION +
               ": would this buried cavity leave a measurable signature at the ground surface?\n"
               "Solves layered elastic ground with and without the voids on one mesh and reports the difference.\n\n"
               "CAUTION: " + caution_text};
  app.require_subcommand(1);
  app.set_version_flag("--version", VOIDSIGN_VERSION);

  RunOptions run;
  std::string out;
  auto* run_cmd = app.add_subcommand("run", "Solve a scenario and write the void's surface signature");
  run_cmd->add_option("FILE", run.scenario, "Scenario file (YAML, format 1)")->required();
  run_cmd->add_option("--out", out, "Output folder (default: output.dir of the scenario, else results/<name>)");
  run_cmd->add_flag("--force", run.force, "Replace an existing, non-empty output folder");
  run_cmd->add_option("--snr", run.snr, "Signal-to-noise ratio at and above which a sensor counts as detecting the void")
      ->default_val(3.0)
      ->check(CLI::PositiveNumber);
  run_cmd->add_flag("--find-threshold", run.find_threshold,
                    "Also find, per sensor, the smallest radius of void 0 at its depth that the sensor would detect (re-runs the model)");
  run_cmd->footer(std::string("CAUTION: ") + caution_text);

  std::filesystem::path check_file;
  auto* check_cmd = app.add_subcommand("check", "Validate a scenario, build its mesh, print sizes and estimates; solve nothing");
  check_cmd->add_option("FILE", check_file, "Scenario file")->required();

  std::string verify_json, verify_only;
  auto* verify_cmd = app.add_subcommand("verify", "Run the verification cases against published solutions");
  verify_cmd->add_option("--json", verify_json, "Also write the rows to this JSON file");
  verify_cmd->add_option("--case", verify_only, "Only cases whose name contains this text");

  auto* materials_cmd = app.add_subcommand("materials", "List the built-in material catalogue");
  auto* sensors_cmd = app.add_subcommand("sensors", "List the built-in sensor catalogue with the source of each value");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int rc = app.exit(e);
    return rc == 0 ? exit_ok : exit_bad_input;
  }
  try {
    if (run_cmd->parsed()) {
      if (!out.empty()) run.out = out;
      return run_command(run);
    }
    if (check_cmd->parsed()) return check_command(check_file);
    if (verify_cmd->parsed())
      return verify_command(verify_json.empty() ? std::nullopt : std::optional<std::filesystem::path>(verify_json), verify_only);
    if (materials_cmd->parsed()) return materials_command();
    if (sensors_cmd->parsed()) return sensors_command();
  } catch (const InputError& e) {
    std::fprintf(stderr, "error: %s\n", e.what());
    return exit_bad_input;
  } catch (const SolveError& e) {
    std::fprintf(stderr, "error: cannot solve: %s\n", e.what());
    return exit_unsolvable;
  } catch (const WriteError& e) {
    std::fprintf(stderr, "error: cannot write: %s\n", e.what());
    return exit_write;
  } catch (const std::bad_alloc&) {
    std::fprintf(stderr, "error: cannot solve: out of memory\n");
    return exit_unsolvable;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "error: cannot solve: %s\n", e.what());
    return exit_unsolvable;
  }
  return exit_ok;
}
