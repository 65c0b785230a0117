// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/progress.hpp"

#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <string>

namespace voidsign::cli {

bool ProgressLine::stderr_is_terminal() { return isatty(STDERR_FILENO) != 0; }

ProgressLine::ProgressLine(bool enabled) : enabled_(enabled) {}

ProgressLine::~ProgressLine() { done(); }

void ProgressLine::step(std::string_view name, double fraction) {
  if (name != current_) {
    done();
    current_ = name;
    started_ = std::chrono::steady_clock::now();
  }
  if (!enabled_) return;
  const double t = std::chrono::duration<double>(std::chrono::steady_clock::now() - started_).count();
  if (fraction >= 0) {
    constexpr int width = 20;
    const int filled = static_cast<int>(std::clamp(fraction, 0.0, 1.0) * width);
    const std::string bar = std::string(static_cast<std::size_t>(filled), '#') + std::string(static_cast<std::size_t>(width - filled), '.');
    // The remaining time is extrapolated once the step is 2 % done and 1 s old.
    if (fraction >= 0.02 && fraction < 1 && t > 1)
      std::fprintf(stderr, "\r\033[K  %s [%s] %3.0f %%  %.1f s, about %.0f s left", current_.c_str(), bar.c_str(), 100 * fraction, t,
                   t * (1 - fraction) / fraction);
    else
      std::fprintf(stderr, "\r\033[K  %s [%s] %3.0f %%  %.1f s", current_.c_str(), bar.c_str(), 100 * fraction, t);
  }
  else
    std::fprintf(stderr, "\r\033[K  %s …  %.1f s", current_.c_str(), t);
  std::fflush(stderr);
}

void ProgressLine::done() {
  if (current_.empty()) return;
  const double t = std::chrono::duration<double>(std::chrono::steady_clock::now() - started_).count();
  if (enabled_) {
    if (t > 1.0)
      std::fprintf(stderr, "\r\033[K  %s done in %.1f s\n", current_.c_str(), t);
    else
      std::fprintf(stderr, "\r\033[K");
    std::fflush(stderr);
  }
  current_.clear();
}

}  // namespace voidsign::cli
