// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The memory solvers plan with before they commit to a layout (two factorisations at once, two
/// multigrid hierarchies at once).
namespace voidsign::solver {

/// Bytes the kernel reports as available now (MemAvailable in /proc/meminfo); 0 if unknown.
double available_memory_bytes();

}  // namespace voidsign::solver
