// SPDX-License-Identifier: GPL-3.0-or-later
// The direct solver: METIS node-graph ordering, and the shared factor for two matrices that
// differ only on the nodes of void cells.
#include <doctest/doctest.h>

#include <vector>

#include "mesh/build/mesher.hpp"
#include "solver/assembly/system.hpp"
#include "solver/la/cholesky.hpp"
#include "solver/la/spd_solver.hpp"

using namespace voidsign;

namespace {

// A 2D grid Laplacian-like SPD matrix with two unknowns per node and full 2×2 blocks.
solver::SparseMatrix grid_matrix(int m) {
  const int d = 2, n = d * m * m;
  std::vector<Eigen::Triplet<double>> t;
  auto id = [m](int i, int j) { return i * m + j; };
  for (int i = 0; i < m; ++i)
    for (int j = 0; j < m; ++j) {
      const int p = id(i, j);
      for (int a = 0; a < d; ++a)
        for (int b = 0; b <= a; ++b) t.emplace_back(d * p + a, d * p + b, a == b ? 9.0 : 0.1);
      for (int di = -1; di <= 1; ++di)
        for (int dj = -1; dj <= 1; ++dj) {
          const int ii = i + di, jj = j + dj;
          if (ii < 0 || jj < 0 || ii >= m || jj >= m || id(ii, jj) <= p) continue;
          for (int a = 0; a < d; ++a)
            for (int b = 0; b < d; ++b) t.emplace_back(d * id(ii, jj) + a, d * p + b, a == b ? -1.0 : 0.0);
        }
    }
  solver::SparseMatrix k(n, n);
  k.setFromTriplets(t.begin(), t.end());
  k.makeCompressed();
  return k;
}

double rel_error(const solver::Vector& a, const solver::Vector& b) { return (a - b).norm() / b.norm(); }

// Layered block with a circular gallery, large enough for the METIS path.
struct Model {
  mesh::Mesh mesh;
  solver::SparseMatrix k_ref, k_void;
  std::vector<char> fixed_ref, fixed_void;
  std::vector<int> wall, inner;
};

Model gallery_model() {
  mesh::Geometry2D g;
  g.width = 60;
  g.depth = 30;
  g.layer_thickness = {3, 27};
  mesh::VoidOutline v;
  v.cz = -8;
  v.radius = 2;
  g.voids = {v};
  g.sizing = {1.0, 0.12, 0.4, 2, 0.25};
  Model md{mesh::build_mesh_2d(g), {}, {}, {}, {}, {}, {}};
  const mesh::Mesh& m = md.mesh;
  const std::size_t nc = m.n_cells();
  std::vector<char> all(nc, 1), host(nc);
  for (std::size_t c = 0; c < nc; ++c) host[c] = m.void_id[c] < 0;
  const std::vector<solver::Elastic> mats = {{20e6, 0.3, 1700}, {2e9, 0.25, 1900}};
  auto material_of = [&](std::size_t c) -> const solver::Elastic& { return mats[static_cast<std::size_t>(m.layer[c])]; };
  md.k_ref = solver::stiffness_pattern(m);
  md.k_void = md.k_ref;
  solver::assemble_stiffness(m, solver::Kinematics::plane_strain, all, material_of, md.k_ref);
  solver::assemble_stiffness(m, solver::Kinematics::plane_strain, host, material_of, md.k_void);
  // Bottom fixed, sides on rollers.
  const std::size_t nd = 2 * m.n_nodes();
  md.fixed_ref.assign(nd, 0);
  for (std::size_t i = 0; i < m.n_nodes(); ++i) {
    if (m.nodes[i][2] < -g.depth + 1e-9) md.fixed_ref[2 * i] = md.fixed_ref[2 * i + 1] = 1;
    if (std::abs(std::abs(m.nodes[i][0]) - g.width / 2) < 1e-9) md.fixed_ref[2 * i] = 1;
  }
  std::vector<char> in_void(m.n_nodes(), 0), in_host(m.n_nodes(), 0);
  for (std::size_t c = 0; c < nc; ++c)
    for (int a = 0; a < m.npc(); ++a) (host[c] ? in_host : in_void)[static_cast<std::size_t>(m.cell(c)[a])] = 1;
  md.fixed_void = md.fixed_ref;
  for (std::size_t i = 0; i < m.n_nodes(); ++i) {
    if (!in_void[i]) continue;
    if (in_host[i]) {
      md.wall.push_back(static_cast<int>(i));
    } else {
      md.inner.push_back(static_cast<int>(i));
      md.fixed_void[2 * i] = md.fixed_void[2 * i + 1] = 1;
    }
  }
  solver::constrain_matrix(md.k_ref, md.fixed_ref);
  return md;
}

}  // namespace

TEST_CASE("METIS node-graph ordering: same solution as AMD, and no more fill on a 2D grid") {
  const solver::SparseMatrix k = grid_matrix(160);
  const solver::Vector b = solver::Vector::LinSpaced(k.rows(), -1.0, 2.0);
  solver::Cholesky amd(2, solver::Ordering::amd), metis(2, solver::Ordering::metis_nodes);
  amd.analyze(k);
  metis.analyze(k);
  REQUIRE(amd.factorize(k) == solver::Status::ok);
  REQUIRE(metis.factorize(k) == solver::Status::ok);
  CHECK(metis.ordering() == "METIS (node graph)");
  CHECK(rel_error(metis.solve(b), amd.solve(b)) < 1e-12);
  // A swapped permutation/inverse pair fills about ten times more than AMD here.
  CHECK(metis.factor_nonzeros() < 1.1 * amd.factor_nonzeros());
  MESSAGE("factor nonzeros: AMD " << amd.factor_nonzeros() << ", METIS " << metis.factor_nonzeros());
}

TEST_CASE("grouped elimination order: forward and backward passes compose to a solve") {
  const solver::SparseMatrix k = grid_matrix(120);
  const int nn = static_cast<int>(k.rows() / 2);
  std::vector<int> group(static_cast<std::size_t>(nn), 1);
  for (int v = 0; v < 200; ++v) group[static_cast<std::size_t>(v)] = 0;
  for (int v = nn - 150; v < nn; ++v) group[static_cast<std::size_t>(v)] = 2;
  solver::Cholesky c(2);
  c.analyze_grouped(k, group);
  REQUIRE(c.factorize(k) == solver::Status::ok);
  const auto& pos = c.positions();
  CHECK(pos[0] < 400);                                  // group 0 first
  CHECK(pos[static_cast<std::size_t>(k.rows() - 1)] >= k.rows() - 300);  // group 2 last
  const solver::Vector b = solver::Vector::LinSpaced(k.rows(), 1.0, 3.0);
  CHECK(rel_error(c.backward(c.forward(b)), c.solve(b)) < 1e-13);
  // The trailing block of L reproduces the trailing rows of L Lᵀ = P A Pᵀ, which for group 2 is
  // not the plain A block (the earlier columns contribute): check one diagonal entry instead.
  const Eigen::MatrixXd l = c.trailing_block(300);
  CHECK(l(299, 299) > 0);
  CHECK(l(0, 299) == 0);
}

TEST_CASE("shared factor: the model with voids solved from the factor without voids matches its own factorisation") {
  Model md = gallery_model();
  REQUIRE(md.k_ref.rows() >= solver::metis_min_unknowns);
  const auto n = md.k_ref.rows();
  // Two variants: void interior pinned (excavation), and the wall pinned too (ground loss).
  for (bool wall_pinned : {false, true}) {
    CAPTURE(wall_pinned);
    std::vector<char> fixed = md.fixed_void;
    if (wall_pinned)
      for (int v : md.wall) fixed[2 * static_cast<std::size_t>(v)] = fixed[2 * static_cast<std::size_t>(v) + 1] = 1;
    solver::SparseMatrix kv = md.k_void;
    solver::constrain_matrix(kv, fixed);
    auto s = solver::make_spd_solver(solver::SolverChoice::direct, static_cast<double>(n), 2, &md.mesh.nodes);
    s->set_variable_nodes(md.wall, md.inner);
    s->analyze(md.k_ref);
    s->factorize(md.k_ref);
    const solver::Vector b = solver::Vector::LinSpaced(n, -1.0, 1.0);
    solver::Cholesky own(2);
    own.analyze(md.k_ref);
    REQUIRE(own.factorize(md.k_ref) == solver::Status::ok);
    CHECK(rel_error(s->solve(b), own.solve(b)) < 1e-11);

    s->factorize_variant(kv);
    CHECK(s->variant_method.find("Schur complement") != std::string::npos);
    REQUIRE(own.factorize(kv) == solver::Status::ok);
    const solver::Vector x = s->solve(b);
    CHECK(rel_error(x, own.solve(b)) < 1e-9);
    CHECK(solver::relative_residual(kv, x, b) < 1e-11);
  }
}
