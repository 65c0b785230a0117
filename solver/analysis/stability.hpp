// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Roof stability screen from the total (in-situ + induced) stress of the model with voids.
///
/// Criterion: Mohr–Coulomb with a tension cut-off, its envelope σ1 = C0 + q σ3 drawn through
/// the uniaxial compressive strength C0 and the uniaxial tensile strength T (q = C0/T, so the
/// line passes through (σ3, σ1) = (0, C0) and (−T, 0)), compression positive
/// (Jaeger, Cook & Zimmerman 2007, Fundamentals of Rock Mechanics, ch. 4 — from memory).
/// The strength ratio is capacity over demand; below 1 the element fails.
#include <vector>

#include "solver/analysis/static.hpp"

namespace voidsign::solver {

/// Largest strength ratio reported (an unloaded element is "very safe", not infinite).
inline constexpr double strength_ratio_cap = 100.0;

/// Strength ratio for one stress state [Pa, tension positive]; NaN when
/// the material has no UCS.
double strength_ratio(const Sym6& stress_total, double ucs, double tensile);

/// Principal stresses, descending (tension positive) [Pa].
std::array<double, 3> principal_stresses(const Sym6& s);
/// Largest principal stress (tension positive) [Pa].
double max_principal(const Sym6& s);

struct VoidStability {
  double min_strength_ratio = strength_ratio_cap;  ///< over the void's roof cells
  double max_roof_tension = 0;  ///< largest tensile principal stress in the roof, Pa (0 if none)
  bool tension_in_roof = false;  ///< roof tension exceeds the tensile strength
  bool evaluated = false;        ///< false when the roof material has no strength data
};

struct Stability {
  std::vector<double> strength_ratio;  ///< per cell (NaN for void cells or no data)
  double min_strength_ratio = strength_ratio_cap;  ///< over all solid cells with data
  bool tension_in_roof = false;
  std::vector<VoidStability> voids;
};

/// Screens the model with voids. The roof of a void is the solid cells that touch its upper
/// wall (wall facets above the void's centre).
Stability screen_stability(const StaticProblem& p, const StaticResult& r);

}  // namespace voidsign::solver
