// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Progress lines on stderr: one line per step, rewritten in place, and a closing line for any
/// step that took longer than a second. Silent when stderr is not a terminal.
#include <chrono>
#include <string>
#include <string_view>

namespace voidsign::cli {

class ProgressLine {
 public:
  explicit ProgressLine(bool enabled);
  ~ProgressLine();
  /// Starts (or updates) a step; `fraction` in [0, 1], negative when unknown.
  void step(std::string_view name, double fraction = -1);
  /// Ends the current step.
  void done();
  /// True when stderr is a terminal.
  static bool stderr_is_terminal();

 private:
  bool enabled_;
  std::string current_;
  std::chrono::steady_clock::time_point started_;
};

}  // namespace voidsign::cli
