// SPDX-License-Identifier: GPL-3.0-or-later
// Three-dimensional verification cases (tetrahedra).
#include <algorithm>
#include <cmath>

#include "cli/verify/verify.hpp"
#include "mesh/build/mesher.hpp"
#include "solver/analysis/static.hpp"
#include "solver/analytic/analytic.hpp"

namespace voidsign::cli {

namespace an = solver::analytic;

namespace {

constexpr const char* src_litho = "lithostatic column: szz = -rho g |z|, sxx = syy = k0 szz (equilibrium)";

solver::LayerProps layer(double young, double nu, double rho, double k0 = 0.5) {
  solver::LayerProps lp;
  lp.elastic = {young, nu, rho};
  lp.k0 = k0;
  return lp;
}

std::vector<VerifyRow> lithostatic_3d() {
  const std::vector<an::ColumnLayer> col{{5, 1700, 0}, {20, 2100, 0}, {0, 2600, 0}};
  const std::vector<double> nus{0.3, 0.25, 0.2};
  mesh::Geometry3D g;
  g.width = g.length = 20;
  g.depth = 60;
  g.layer_thickness = {5, 20, 35};
  g.sizing = {5, 2, 2, 2, 0.3};
  const mesh::Mesh m = mesh::build_mesh_3d(g);
  std::vector<VerifyRow> rows;
  for (int in_situ = 0; in_situ < 2; ++in_situ) {
    solver::StaticProblem p;
    p.mesh = &m;
    p.kinematics = solver::Kinematics::solid;
    std::vector<an::ColumnLayer> ref = col;
    for (std::size_t i = 0; i < col.size(); ++i) {
      const double k0 = in_situ ? 0.8 : nus[i] / (1 - nus[i]);
      ref[i].k0 = k0;
      p.layers.push_back(layer(1e8 * static_cast<double>(i + 1), nus[i], col[i].density_kg_m3, k0));
    }
    p.body_force = true;
    if (in_situ) p.initial_stress = solver::geostatic_stress({-5, -25, -60}, {1700, 2100, 2600}, {0.8, 0.8, 0.8});
    const auto r = solver::solve_static(p);
    double worst[3] = {0, 0, 0}, got[3] = {0, 0, 0}, want[3] = {1, 1, 1};
    const auto rc = solver::reference_centroid(m.type);
    for (std::size_t c = 0; c < m.n_cells(); ++c) {
      const auto sh = solver::shape_at(m, c, rc[0], rc[1], rc[2]);
      const auto e = an::lithostatic_stress(ref, sh.z);
      const solver::Sym6& s = r.reference.stress_total[c];
      const double vals[3] = {s[2], s[0], s[1]}, refs[3] = {e.szz_pa, e.sxx_pa, e.sxx_pa};
      for (int k = 0; k < 3; ++k) {
        const double err = std::abs(vals[k] - refs[k]) / std::abs(refs[k]);
        if (err > worst[k]) {
          worst[k] = err;
          got[k] = vals[k];
          want[k] = refs[k];
        }
      }
    }
    const std::string tag = in_situ ? "in-situ k0=0.8" : "gravity switched on, k0=nu/(1-nu)";
    const char* names[3] = {"szz", "sxx", "syy"};
    for (int k = 0; k < 3; ++k)
      rows.push_back(compare("lithostatic-3d", std::string("worst ") + names[k] + " over all cells, " + tag + " [Pa]", got[k],
                             want[k], 1e-3, src_litho));
  }
  return rows;
}

}  // namespace

std::vector<VerifyCase> verification_cases_3d() {
  return {{"lithostatic-3d", lithostatic_3d}};
}

}  // namespace voidsign::cli
