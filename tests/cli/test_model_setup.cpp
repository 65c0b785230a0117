// SPDX-License-Identifier: GPL-3.0-or-later
// Scenario → geometry and problem: units, signs and every load carried across.
#include <doctest/doctest.h>

#include "cli/commands/model_setup.hpp"
#include "mesh/build/mesher.hpp"

using namespace voidsign;

TEST_CASE("model setup: layers, k0, surface loads, contents and ground loss reach the problem") {
  const cli::Scenario s = cli::parse_scenario(R"(format: 1
model: plane-strain
domain: {width: 100, depth: 40}
layers:
  - {material: loess, thickness: 3}
  - {material: chalk}
voids:
  - {shape: circle, x: 5, depth: 10, radius: 1.5, contents: water}
  - {shape: rectangle, x: -20, depth: 12, width: 4, height: 2, contents: {pressure: 2.0e5}}
loads:
  gravity: {k0: auto}
  surface:
    - {from: -5, to: 5, pressure: 50.0e3}
  ground-loss:
    - {void: 0, percent: 1.5}
analyses: {static: {}}
mesh: {size: 5, near-void: 0.3, surface: 1}
)",
                                              "setup.yaml");
  const mesh::Geometry2D g = cli::geometry_of(s);
  CHECK(g.voids.size() == 2);
  CHECK(g.voids[0].cz == doctest::Approx(-10));
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  const solver::StaticProblem p = cli::static_problem_of(s, m);
  REQUIRE(p.surface.size() == 1);
  CHECK(p.surface[0].from == doctest::Approx(-5));
  CHECK(p.surface[0].to == doctest::Approx(5));
  CHECK(p.surface[0].pressure == doctest::Approx(50e3));
  REQUIRE(p.layers.size() == 2);
  const double nu = s.materials.at("chalk").poisson;
  CHECK(p.layers[1].k0 == doctest::Approx(nu / (1 - nu)));
  CHECK(p.body_force);
  CHECK(static_cast<bool>(p.initial_stress));
  REQUIRE(p.voids.size() == 2);
  CHECK(p.voids[0].contents == solver::VoidLoad::Contents::water);
  CHECK(p.voids[0].water_table_z == doctest::Approx(-8.5));  // the crown, by default
  CHECK(p.voids[0].volume_loss == doctest::Approx(0.015));
  CHECK(p.voids[1].contents == solver::VoidLoad::Contents::pressure);
  CHECK(p.voids[1].pressure == doctest::Approx(2e5));
  CHECK(p.voids[1].volume_loss == 0);
  // The in-situ stress at 10 m: 3 m of loess over 7 m of chalk.
  const auto s0 = p.initial_stress(0, 0, -10, 1);
  const double expect = -solver::standard_gravity *
                        (3 * s.materials.at("loess").density + 7 * s.materials.at("chalk").density);
  CHECK(s0[2] == doctest::Approx(expect).scale(0));
  CHECK(s0[0] == doctest::Approx(p.layers[1].k0 * expect).scale(0));
}
