// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
// Peak resident memory of this process so far (VmHWM), for the benchmark programs.
#include <cstdlib>
#include <fstream>
#include <string>

namespace voidsign::bench {

inline double peak_rss_gib() {
  std::ifstream in("/proc/self/status");
  std::string line;
  while (std::getline(in, line))
    if (line.rfind("VmHWM:", 0) == 0) return std::strtod(line.c_str() + 6, nullptr) / (1024.0 * 1024.0);
  return 0;
}

}  // namespace voidsign::bench
