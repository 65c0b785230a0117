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


std::vector<VerifyRow> lithostatic_3d() {
  mesh::Geometry3D g;
  g.width = g.length = 20;
  g.depth = 60;
  g.layer_thickness = {5, 20, 35};
  g.sizing = {5, 2, 2, 2, 0.3};
  const mesh::Mesh m = mesh::build_mesh_3d(g);
  std::vector<VerifyRow> rows;
  for (int in_situ = 0; in_situ < 2; ++in_situ) {
    std::vector<an::ColumnLayer> ref;
    const solver::StaticProblem p = lithostatic_column_problem(m, in_situ != 0, &ref);
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
