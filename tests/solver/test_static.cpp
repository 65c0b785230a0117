// SPDX-License-Identifier: GPL-3.0-or-later
// Static analysis: patch tests, the zero-anomaly test, ground loss, stability, block size.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/signature.hpp"
#include "solver/analysis/stability.hpp"
#include "solver/analysis/static.hpp"

using namespace voidsign;
using solver::Sym6;

namespace {

mesh::VoidOutline circle(double cz, double r) {
  mesh::VoidOutline v;
  v.cz = cz;
  v.radius = r;
  return v;
}

solver::LayerProps props(double e, double nu, double rho, double k0 = 0.5, double ucs = 0, double t = 0) {
  solver::LayerProps p;
  p.elastic = {e, nu, rho};
  p.k0 = k0;
  p.ucs = ucs;
  p.tensile = t;
  return p;
}

mesh::Mesh gallery_mesh(double width, double depth, int order, double d = 8, double r = 1.5) {
  mesh::Geometry2D g;
  g.width = width;
  g.depth = depth;
  g.layer_thickness = {3, depth - 3};
  g.voids = {circle(-d, r)};
  g.sizing = {width / 30, r / 10, 0.5, order, 0.25};
  return mesh::build_mesh_2d(g);
}

solver::StaticProblem gravity_problem(const mesh::Mesh& m, double k0) {
  solver::StaticProblem p;
  p.mesh = &m;
  p.layers = {props(20e6, 0.3, 1700, k0), props(2e9, 0.25, 1900, k0, 5e6, 0.3e6)};
  p.body_force = true;
  p.initial_stress = solver::geostatic_stress({-3, -1e9}, {1700, 1900}, {k0, k0});
  solver::VoidLoad vl;
  vl.cz = -8;
  p.voids = {vl};
  return p;
}

}  // namespace

TEST_CASE("patch test: a linear displacement field gives its constant strain exactly (both orders, both kinematics)") {
  for (int order : {1, 2})
    for (auto kin : {solver::Kinematics::plane_strain, solver::Kinematics::axisymmetric}) {
      mesh::Geometry2D g;
      g.axisymmetric = kin == solver::Kinematics::axisymmetric;
      g.width = 10;
      g.depth = 5;
      g.voids = {circle(-2.5, 1)};
      g.sizing = {1, 0.3, 1, order, 0.3};
      const mesh::Mesh m = mesh::build_mesh_2d(g);
      const double a = 1e-3, b = -2e-3, c = 5e-4;
      for (std::size_t cell = 0; cell < m.n_cells(); cell += 7) {
        double u[12];
        for (int k = 0; k < m.npc(); ++k) {
          const auto& p = m.nodes[m.cell(cell)[k]];
          u[2 * k] = a * p[0] + c * p[2];
          u[2 * k + 1] = b * p[2];
        }
        const auto sh = solver::shape_at(m, cell, 0.2, 0.3);
        const Sym6 e = solver::strain_at(sh, u, kin);
        CHECK(e[0] == doctest::Approx(a).epsilon(1e-9).scale(0));
        CHECK(e[2] == doctest::Approx(b).epsilon(1e-9).scale(0));
        CHECK(e[5] == doctest::Approx(c).epsilon(1e-9).scale(0));
        if (kin == solver::Kinematics::axisymmetric) CHECK(e[1] == doctest::Approx(a + c * sh.z / sh.x).epsilon(1e-9).scale(0));
      }
    }
}

TEST_CASE("a void region given the host material leaves no anomaly (same mesh, no mesh noise)") {
  mesh::Mesh m = gallery_mesh(200, 60, 2);
  for (int& v : m.void_id) v = -1;  // the outline is still meshed, but nothing is excavated
  m.n_voids = 0;
  mesh::finish_topology(m, 1e-6);
  auto p = gravity_problem(m, 0.6);
  p.voids.clear();
  p.surface = {{.from = -4, .to = 4, .pressure = 50e3}};
  const auto r = solver::solve_static(p);
  const auto prof = solver::surface_profile(m, r);
  double peak = 0, scale = 0;
  for (const auto& row : prof) {
    peak = std::max(peak, std::abs(row.duz) + std::abs(row.dux));
    scale = std::max(scale, std::abs(row.uz_ref));
  }
  std::printf("host-filled void: largest |anomaly| %.3e m against a response of %.3e m\n", peak, scale);
  CHECK(scale > 1e-5);
  CHECK(peak <= 1e-12 * scale);
}

TEST_CASE("every solve reports a small residual, and the model without voids stays at rest under its own in-situ stress") {
  const mesh::Mesh m = gallery_mesh(200, 60, 2);
  const auto p = gravity_problem(m, 0.8);
  const auto r = solver::solve_static(p);
  CHECK(r.reference.residual < 1e-10);
  CHECK(r.voided.residual < 1e-10);
  // At rest up to quadrature error on the curved cells of the void outline.
  CHECK(r.reference.u.lpNorm<Eigen::Infinity>() < 1e-5 * r.voided.u.lpNorm<Eigen::Infinity>());
  const auto a = solver::summarize(solver::surface_profile(m, r), false);
  CHECK(a.rel_uz_min < 0);  // a trough relative to the far field
  CHECK(a.tilt_absmax > 0);
}

TEST_CASE("ground loss: the free wall translates and the trough halves at x = h") {
  // Verruijt & Booker (1996), surface formula (form from memory, checked mathematically): the
  // ε trough falls to half its central value at x = h.
  const double R = 1, h = 10, nu = 0.25, loss = 0.01;
  mesh::Geometry2D g;
  g.width = 1000;
  g.depth = 500;
  g.voids = {circle(-h, R)};
  g.sizing = {25, R / 15, 0.5, 2, 0.2};
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::StaticProblem p;
  p.mesh = &m;
  p.layers = {props(50e6, nu, 0)};
  solver::VoidLoad vl;
  vl.cz = -h;
  vl.volume_loss = loss;
  p.voids = {vl};
  const auto r = solver::solve_static(p);
  const auto prof = solver::surface_profile(m, r);
  auto at = [&](double x) {
    return std::min_element(prof.begin(), prof.end(), [&](auto& a, auto& b) { return std::abs(a.x - x) < std::abs(b.x - x); })->duz;
  };
  std::printf("ground loss: uz(h)/uz(0) = %.4f (0.5 expected); wall translation %.3e m\n", at(h) / at(0),
              r.voided.wall_translation[0][2]);
  CHECK(at(h) / at(0) == doctest::Approx(0.5).epsilon(0.05).scale(0));
  CHECK(std::abs(r.voided.wall_translation[0][2]) > 1e-3 * loss * R);
  // Holding the centre instead carries a spurious force on the wall and a much shallower trough.
  p.voids[0].wall_free = false;
  const auto pinned = solver::solve_static(p);
  const auto prof_pinned = solver::surface_profile(m, pinned);
  const double uz_pinned = std::min_element(prof_pinned.begin(), prof_pinned.end(), [](auto& a, auto& b) {
                             return std::abs(a.x) < std::abs(b.x);
                           })->duz;
  std::printf("ground loss: centre held, uz(0) = %.4e m; free, %.4e m; ratio %.3f\n", uz_pinned, at(0), uz_pinned / at(0));
  CHECK(uz_pinned / at(0) < 0.75);
}

TEST_CASE("stability: strength ratio of simple stress states (Mohr-Coulomb through UCS and T)") {
  const double ucs = 10e6, t = 1e6;
  CHECK(solver::strength_ratio({-5e6, 0, 0, 0, 0, 0}, ucs, t) == doctest::Approx(2.0));    // uniaxial, half the UCS
  CHECK(solver::strength_ratio({0.5e6, 0, 0, 0, 0, 0}, ucs, t) == doctest::Approx(2.0));   // tension, half of T
  CHECK(solver::strength_ratio({2e6, 0, 0, 0, 0, 0}, ucs, t) == doctest::Approx(0.5));     // tension beyond T
  CHECK(solver::strength_ratio({0, 0, 0, 0, 0, 0}, ucs, t) == solver::strength_ratio_cap);
  CHECK(std::isnan(solver::strength_ratio({-1e6, 0, 0, 0, 0, 0}, 0, 0)));
  // Confinement raises capacity: σ3 = 1 MPa → σ1 capacity = UCS + q σ3 = 10 + 10 × 1 MPa.
  CHECK(solver::strength_ratio({-1e6, -1e6, -10e6, 0, 0, 0}, ucs, t) == doctest::Approx(2.0));
  // A pure shear of 0.5 MPa in the xz plane: principal ±0.5 MPa; the tension cut-off governs (T/0.5).
  CHECK(solver::strength_ratio({0, 0, 0, 0, 0, 0.5e6}, ucs, t) == doctest::Approx(2.0));
}

TEST_CASE("stability: a low k0 puts the crown of a circular opening in tension (Kirsch: K < 1/3)") {
  const mesh::Mesh m = gallery_mesh(200, 60, 2, 20, 2);
  auto p = gravity_problem(m, 0.1);
  p.voids[0].cz = -20;
  p.layers[1].tensile = 1e3;  // a nearly cohesionless roof
  const auto r = solver::solve_static(p);
  const auto s = solver::screen_stability(p, r);
  CHECK(s.voids[0].tension_in_roof);
  CHECK(s.tension_in_roof);
  p.initial_stress = solver::geostatic_stress({-3, -1e9}, {1700, 1900}, {1.0, 1.0});
  const auto r2 = solver::solve_static(p);
  CHECK_FALSE(solver::screen_stability(p, r2).voids[0].tension_in_roof);
}

TEST_CASE("block-size study: plane-strain excavation under gravity (printed for docs/theory.md)") {
  // The removed weight is a net upward line load: absolute Δu_z drifts with ln(block size)
  // (Flamant), while tilt and strain settle.
  std::printf("block-size study | width/d | depth/d | uz_min [m] | far-field uz [m] | uz_rel_min [m] | tilt_max [rad] | strain_max [-]\n");
  double prev_tilt = 0, prev_strain = 0;
  std::vector<double> uz, rel;
  for (double f : {5.0, 10.0, 20.0, 40.0}) {
    const double d = 8;
    mesh::Geometry2D g;
    g.width = f * d;
    g.depth = 0.5 * f * d;
    g.layer_thickness = {3, g.depth - 3};
    g.voids = {circle(-d, 1.5)};
    g.sizing = {f * d / 30, 0.15, 0.5, 2, 0.25};
    const mesh::Mesh m = mesh::build_mesh_2d(g);
    const auto p = gravity_problem(m, 0.5);
    const auto a = solver::summarize(solver::surface_profile(m, solver::solve_static(p), {0.0, 5 * d}), false);
    std::printf("block-size study | %5.0f | %5.1f | %.4e | %.4e | %.4e | %.4e | %.4e\n", f, 0.5 * f, a.uz_min, a.far_field_uz,
                a.rel_uz_min, a.tilt_absmax, a.strain_absmax);
    if (f >= 20) {
      CHECK(a.tilt_absmax == doctest::Approx(prev_tilt).epsilon(0.05).scale(0));
      CHECK(a.strain_absmax == doctest::Approx(prev_strain).epsilon(0.05).scale(0));
    }
    prev_tilt = a.tilt_absmax;
    prev_strain = a.strain_absmax;
    uz.push_back(a.uz_min);
    rel.push_back(a.rel_uz_min);
  }
  // The absolute settlement keeps drifting with the block; the settlement relative to fixed
  // far-field points drifts less (it settles only once the block is much deeper than the offset).
  CHECK(std::abs(rel[3] - rel[2]) < std::abs(uz[3] - uz[2]));
}

namespace {

// A 30 × 20 × 20 m block of one layer holding one void centred 8 m deep.
mesh::Mesh block_with(const mesh::VoidSolid& v, const mesh::Sizing& sizing) {
  mesh::Geometry3D g;
  g.width = 30;
  g.length = 20;
  g.depth = 20;
  g.voids = {v};
  g.sizing = sizing;
  return mesh::build_mesh_3d(g);
}

// Its ground under its own weight.
solver::StaticProblem weighted_block(const mesh::Mesh& m) {
  solver::StaticProblem p;
  p.mesh = &m;
  p.kinematics = solver::Kinematics::solid;
  p.layers = {props(2e9, 0.25, 2000, 0.5)};
  p.body_force = true;
  p.voids = {solver::VoidLoad{}};
  p.voids[0].cz = -8;
  return p;
}

}  // namespace

TEST_CASE("a tunnel through the block: the model without voids keeps its supports inside the tunnel's mouth") {
  // Regression: faces of void cells on the block's sides carry the supports of the model
  // without voids; without them the in-situ stress pushed the mouth open (spurious anomaly).
  mesh::VoidSolid t;
  t.kind = mesh::VoidSolid::Kind::tunnel;
  t.from = {0, -15, -8};
  t.to = {0, 15, -8};
  t.radius = 2;
  const mesh::Mesh m = block_with(t, {4, 0.8, 2, 2, 0.3});
  solver::StaticProblem p = weighted_block(m);
  p.initial_stress = solver::geostatic_stress({-1e9}, {2000}, {0.5});
  const auto r = solver::solve_static(p);
  // At rest up to the quadrature imbalance of curved cells (~1e-8 m); the anomaly is ~1e-4 m.
  CHECK(r.reference.u.cwiseAbs().maxCoeff() < 1e-7);
  CHECK((r.voided.u - r.reference.u).cwiseAbs().maxCoeff() > 1e-6);
  CHECK(r.solver.find("CHOLMOD") != std::string::npos);
  // The iterative solver gives the same anomaly, and names itself (after its set-up).
  p.solver = solver::SolverChoice::iterative;
  const auto it = solver::solve_static(p);
  CHECK(!it.solver.empty());
  CHECK(it.iterations > 0);
  const solver::Vector da = r.voided.u - r.reference.u, db = it.voided.u - it.reference.u;
  CHECK((da - db).norm() < 1e-6 * da.norm());
  // By default the two models ran at the same time (two copies of hypre); one after the other
  // they give the same fields to the solver's tolerance.
  CHECK(it.models_in_parallel);
  CHECK(it.solver.find("at once") != std::string::npos);
  p.models_in_parallel = false;
  const auto one_by_one = solver::solve_static(p);
  CHECK_FALSE(one_by_one.models_in_parallel);
  CHECK(one_by_one.iterations == it.iterations);
  CHECK((one_by_one.reference.u - it.reference.u).norm() < 1e-8 * it.reference.u.norm() + 1e-15);
  CHECK((one_by_one.voided.u - it.voided.u).norm() < 1e-8 * it.voided.u.norm());
}

TEST_CASE("models solved at once: when both fail, the error reported is the model without voids' and both copies of hypre are free again") {
  mesh::VoidSolid sphere;
  sphere.cz = -8;
  sphere.radius = 2;
  const mesh::Mesh m = block_with(sphere, {4, 1, 3, 2, 0.3});
  solver::StaticProblem p = weighted_block(m);
  p.solver = solver::SolverChoice::iterative;
  // No support anywhere: both models are free to fall under their own weight.
  p.boundaries = {solver::Support::free, solver::Support::free, solver::Support::free};
  try {
    (void)solver::solve_static(p);
    FAIL("an unsupported model was solved");
  } catch (const solver::SolveFailure& e) {
    const std::string message = e.what();
    CAPTURE(message);
    CHECK(message.rfind("model without voids: conjugate gradients", 0) == 0);
  }
  // Both copies of hypre are free again: the same problem, supported, solves at once.
  p.boundaries = {};
  const auto r = solver::solve_static(p);
  CHECK(r.models_in_parallel);
  CHECK(r.voided.residual < solver::max_relative_residual);
}
