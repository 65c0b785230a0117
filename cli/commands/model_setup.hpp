// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// From a validated scenario to the mesher's geometry and the solver's problem: the only place
/// where scenario conventions (depth positive down, percent, catalogue names) become model
/// conventions (z up, fractions, per-layer properties).
#include "cli/scenario/scenario.hpp"
#include "mesh/build/geometry.hpp"
#include "mesh/build/geometry3d.hpp"
#include "mesh/core/mesh.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/analysis/signature.hpp"
#include "solver/analysis/static.hpp"

namespace voidsign::cli {

/// Mesh sizes actually used (scenario values, or the defaults the parser filled in).
mesh::Geometry2D geometry_of(const Scenario& s);
/// The same for `model: 3d`.
mesh::Geometry3D geometry3d_of(const Scenario& s);
/// Mean y of the voids (3D far-field ring centre), m.
double y_centre_of(const Scenario& s);

/// The solver's plane wave for a scenario's wave keys; amplitude [m].
solver::PlaneWave plane_wave_of(const WaveSpec& w, double amplitude);

/// The element kinematics of the scenario's model.
solver::Kinematics kinematics_of(const Scenario& s);

/// The static problem on mesh `m` (which must have been built from geometry_of(s)).
solver::StaticProblem static_problem_of(const Scenario& s, const mesh::Mesh& m);

/// k0 used for each layer (the scenario's, or ν/(1−ν)).
std::vector<double> layer_k0(const Scenario& s);

/// The void's centre in model coordinates (x, z) and its top (crown) z and span [m].
struct VoidExtent {
  double cx = 0, cz = 0;
  double z_top = 0, z_bottom = 0;
  double x_left = 0, x_right = 0;
};
VoidExtent extent_of(const Void& v);

/// Far-field points for the relative settlement: 5 × the deepest void's depth either side of
/// the voids' mean x (common practice: beyond the trough, whose half-width is about one depth).
solver::FarField far_field_of(const Scenario& s);

/// Caution printed in --help, the run summary and the README.
inline constexpr const char* caution_text =
    "voidsign is an elastic screening model, not a design: it cannot show whether ground or structures are "
    "safe. Defer to site investigation, local codes and a licensed geotechnical engineer.";

}  // namespace voidsign::cli
