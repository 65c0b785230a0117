// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/memory.hpp"

#include <fstream>
#include <string>

namespace voidsign::solver {

double available_memory_bytes() {
  std::ifstream in("/proc/meminfo");
  std::string key, unit;
  double value = 0;
  while (in >> key >> value >> unit)
    if (key == "MemAvailable:") return value * 1024;
  return 0;
}

}  // namespace voidsign::solver
