// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Physical constants used across the solver.

namespace voidsign::solver {

/// Standard gravity, m/s² (3rd CGPM, 1901).
inline constexpr double standard_gravity = 9.80665;
/// Density of fresh water, kg/m³ (common practice).
inline constexpr double water_density = 1000.0;

}  // namespace voidsign::solver
