// SPDX-License-Identifier: GPL-3.0-or-later
// Iterative solver (CG + BoomerAMG) on 3D elasticity, and the tetrahedra of the benchmark block.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>
#include <thread>

#include "solver/la/cholesky.hpp"
#include "solver/la/iterative.hpp"
#include "tests/bench/elastic_block.hpp"

using namespace voidsign;

namespace {

bench::BlockModel solved_block(bool quadratic, int nz, double cavity) {
  bench::BlockSpec s;
  s.quadratic = quadratic;
  s.nz = nz;
  s.nx = s.ny = 2 * nz;
  s.cavity_radius = cavity;
  s.cavity_depth = 16;
  bench::BlockModel m = bench::build_block(s);
  bench::constrain_block(m);
  return m;
}

Eigen::VectorXd cholmod_solution(const bench::BlockModel& m) {
  solver::Cholesky chol;
  chol.analyze(m.lower);
  REQUIRE(chol.factorize(m.lower) == solver::Status::ok);
  return chol.solve(m.load);
}

double relative_difference(const Eigen::VectorXd& a, const Eigen::VectorXd& b) { return (a - b).norm() / b.norm(); }

}  // namespace

TEST_CASE("tetrahedra pass the patch test on a distorted block (tet4 and tet10)") {
  for (bool quadratic : {false, true}) {
    CAPTURE(quadratic);
    bench::BlockSpec s;
    s.quadratic = quadratic;
    s.nx = 3;
    s.ny = 3;
    s.nz = 3;
    s.lx = 3;
    s.ly = 2;
    s.lz = 2.5;
    const double e = 50e6, nu = 0.3;
    s.layers = {{1e9, e, nu}};
    s.distortion = 0.15;
    s.pressure = 0;
    const bench::BlockModel m = bench::build_block(s);
    CHECK(m.volume == doctest::Approx(s.lx * s.ly * s.lz).epsilon(1e-12));

    // u = G x + c with a full (non-symmetric) gradient.
    Eigen::Matrix3d g;
    g << 1.0e-3, 2.0e-4, -3.0e-4, -1.0e-4, -2.0e-3, 5.0e-4, 4.0e-4, 1.5e-4, 7.0e-4;
    const Eigen::Vector3d c(0.01, -0.02, 0.03);
    Eigen::VectorXd u(static_cast<Eigen::Index>(m.dofs())), rot(u.size());
    for (std::size_t i = 0; i < m.nodes.size(); ++i) {
      const Eigen::Vector3d x(m.nodes[i][0], m.nodes[i][1], m.nodes[i][2]);
      u.segment<3>(3 * static_cast<Eigen::Index>(i)) = g * x + c;
      rot.segment<3>(3 * static_cast<Eigen::Index>(i)) = Eigen::Vector3d(0.3, -0.2, 0.5).cross(x);
    }
    const Eigen::VectorXd f = bench::symmetric_product(m.lower, u);
    // Constant stress: no force on nodes inside the block.
    double interior = 0;
    int inside = 0;
    for (std::size_t i = 0; i < m.nodes.size(); ++i) {
      const auto& p = m.nodes[i];
      const double tol = 1e-9;
      if (p[0] > tol && p[0] < s.lx - tol && p[1] > tol && p[1] < s.ly - tol && p[2] > tol && p[2] < s.lz - tol) {
        ++inside;
        interior = std::max(interior, f.segment<3>(3 * static_cast<Eigen::Index>(i)).cwiseAbs().maxCoeff());
      }
    }
    CHECK(inside > 0);
    CHECK(interior <= 1e-9 * f.cwiseAbs().maxCoeff());
    // Strain energy of the constant strain, and none for a rigid motion.
    const Eigen::Matrix3d eps = (g + g.transpose()) / 2;
    bench::Matrix6 d = bench::isotropic_elasticity(e, nu);
    Eigen::Matrix<double, 6, 1> ev;
    ev << eps(0, 0), eps(1, 1), eps(2, 2), 2 * eps(1, 2), 2 * eps(0, 2), 2 * eps(0, 1);
    const double energy = ev.dot(d * ev) * s.lx * s.ly * s.lz;
    CHECK(u.dot(f) == doctest::Approx(energy).epsilon(1e-10));
    const Eigen::VectorXd fr = bench::symmetric_product(m.lower, rot);
    const double kmax = m.lower.coeffs().cwiseAbs().maxCoeff();
    CHECK(fr.cwiseAbs().maxCoeff() <= 1e-12 * kmax * rot.cwiseAbs().maxCoeff());
  }
}

TEST_CASE("layered column under uniform pressure settles as the oedometric closed form") {
  for (bool quadratic : {false, true}) {
    CAPTURE(quadratic);
    bench::BlockSpec s;
    s.quadratic = quadratic;
    s.nx = s.ny = 4;
    s.nz = 6;  // cells 5 m deep: the 10 m soft layer ends on a grid plane
    s.patch_half_width = 1e9;
    bench::BlockModel m = bench::build_block(s);
    bench::constrain_block(m);
    solver::IterativeOptions opt;
    opt.rel_tol = 1e-12;
    solver::IterativeSolver cg(opt);
    cg.setup(m.lower, 3, &m.nodes);
    const solver::IterativeResult r = cg.solve(m.load);
    REQUIRE(r.converged);
    double settlement = 0;  // p Σ h / M with M = E(1 − ν)/((1 + ν)(1 − 2ν))
    double top = s.lz;
    for (const auto& l : s.layers) {
      const double h = std::min(l.thickness, top);
      top -= h;
      settlement += s.pressure * h * (1 + l.poisson) * (1 - 2 * l.poisson) / (l.young * (1 - l.poisson));
    }
    for (std::size_t i = 0; i < m.nodes.size(); ++i)
      if (m.nodes[i][2] == s.lz) {
        CHECK(r.x[3 * static_cast<Eigen::Index>(i) + 2] == doctest::Approx(-settlement).epsilon(1e-8));
        CHECK(std::abs(r.x[3 * static_cast<Eigen::Index>(i)]) <= 1e-8 * settlement);
      }
  }
}

TEST_CASE("CG with BoomerAMG matches CHOLMOD on a layered tet10 block with a cavity") {
  const bench::BlockModel m = solved_block(true, 4, 4);
  const Eigen::VectorXd reference = cholmod_solution(m);
  solver::IterativeOptions opt;
  opt.rel_tol = 1e-12;
  solver::IterativeSolver cg(opt);
  cg.setup(m.lower, 3, &m.nodes);
  const solver::IterativeResult r = cg.solve(m.load);
  CHECK(r.converged);
  CHECK(r.iterations > 0);
  CHECK(r.iterations < 60);
  CHECK(r.rel_residual <= 1e-12);
  CHECK(r.method.find("BoomerAMG") != std::string::npos);
  CHECK(relative_difference(r.x, reference) < 1e-8);
  // The residual reported is the true one.
  const double check = (bench::symmetric_product(m.lower, r.x) - m.load).norm() / m.load.norm();
  CHECK(r.rel_residual == doctest::Approx(check).epsilon(1e-6));

  // A second solve with the same set-up, from the first solution: nothing left to do.
  const solver::IterativeResult again = cg.solve(m.load, &r.x);
  CHECK(again.converged);
  CHECK(again.iterations == 0);
}

TEST_CASE("two solvers on the two copies of hypre run at the same time and agree with one alone") {
  // The private copy is what lets the two models of a static run work in parallel; Debian's
  // hypre package makes it possible, so its absence here is a failure, not a skip.
  REQUIRE(solver::IterativeSolver::independent_copies());
  const bench::BlockModel with_cavity = solved_block(true, 4, 4);
  const bench::BlockModel without = solved_block(true, 4, 0);
  auto alone = [](const bench::BlockModel& m, int copy) {
    solver::IterativeOptions opt;
    opt.rel_tol = 1e-12;
    opt.threads = 1;
    opt.library_copy = copy;
    solver::IterativeSolver cg(opt);
    cg.setup(m.lower, 3, &m.nodes);
    return cg.solve(m.load);
  };
  const solver::IterativeResult first = alone(with_cavity, 0);
  const solver::IterativeResult second = alone(without, 0);
  // Several rounds, so that set-ups and V-cycles of the two copies overlap in every phase.
  for (int round = 0; round < 3; ++round) {
    solver::IterativeResult a, b;
    std::thread other([&] { b = alone(without, 1); });
    a = alone(with_cavity, 0);
    other.join();
    CHECK(a.converged);
    CHECK(b.converged);
    // The same arithmetic in the same order: the same digits.
    CHECK(a.iterations == first.iterations);
    CHECK(b.iterations == second.iterations);
    CHECK((a.x - first.x).norm() == 0);
    CHECK((b.x - second.x).norm() == 0);
  }
}

TEST_CASE("the other preconditioners reach the same solution") {
  const bench::BlockModel m = solved_block(false, 6, 4);
  const Eigen::VectorXd reference = cholmod_solution(m);
  solver::IterativeOptions jacobi;
  jacobi.rel_tol = 1e-12;
  jacobi.preconditioner = solver::Preconditioner::jacobi;
  solver::IterativeOptions rotations;
  rotations.rel_tol = 1e-12;
  rotations.nodal_coarsening = true;
  rotations.rigid_body_modes = true;
  for (const auto& opt : {jacobi, rotations}) {
    solver::IterativeSolver cg(opt);
    cg.setup(m.lower, 3, &m.nodes);
    const solver::IterativeResult r = cg.solve(m.load);
    CAPTURE(r.method);
    CHECK(r.converged);
    CHECK(relative_difference(r.x, reference) < 1e-8);
  }
}

TEST_CASE("too few iterations are reported as not converged") {
  const bench::BlockModel m = solved_block(false, 4, 0);
  solver::IterativeOptions opt;
  opt.max_iterations = 2;
  solver::IterativeSolver cg(opt);
  cg.setup(m.lower, 3, &m.nodes);
  const solver::IterativeResult r = cg.solve(m.load);
  CHECK_FALSE(r.converged);
  CHECK(r.iterations == 2);
  CHECK(std::isfinite(r.rel_residual));
  CHECK(r.rel_residual > opt.rel_tol);
  CHECK(r.x.size() == m.load.size());
}

TEST_CASE("a zero load gives a zero displacement without iterating") {
  const bench::BlockModel m = solved_block(false, 2, 0);
  solver::IterativeSolver cg;
  cg.setup(m.lower, 3, nullptr);
  const solver::IterativeResult r = cg.solve(Eigen::VectorXd::Zero(m.load.size()));
  CHECK(r.converged);
  CHECK(r.iterations == 0);
  CHECK(r.x.norm() == 0);
}

TEST_CASE("inconsistent input is refused") {
  const bench::BlockModel m = solved_block(false, 2, 0);
  solver::IterativeSolver cg;
  CHECK_THROWS_AS(cg.solve(m.load), std::logic_error);
  CHECK_THROWS_AS(cg.setup(m.lower, 2, nullptr), std::invalid_argument);  // 3 × nodes is odd
  std::vector<std::array<double, 3>> few(m.nodes.begin(), m.nodes.end() - 1);
  CHECK_THROWS_AS(cg.setup(m.lower, 3, &few), std::invalid_argument);
  bench::SparseMatrix zero_diagonal = m.lower;
  zero_diagonal.coeffRef(0, 0) = 0;
  CHECK_THROWS_AS(cg.setup(zero_diagonal, 3, nullptr), std::invalid_argument);
  cg.setup(m.lower, 3, nullptr);
  CHECK_THROWS_AS(cg.solve(Eigen::VectorXd::Zero(5)), std::invalid_argument);
}
