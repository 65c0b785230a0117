// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/stability.hpp"

#include <Eigen/Eigenvalues>
#include <algorithm>
#include <cmath>
#include <limits>

namespace voidsign::solver {

std::array<double, 3> principal_stresses(const Sym6& s) {
  // VTK order [xx, yy, zz, xy, yz, xz].
  Eigen::Matrix3d t;
  t << s[0], s[3], s[5], s[3], s[1], s[4], s[5], s[4], s[2];
  const Eigen::Vector3d ev = Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d>(t, Eigen::EigenvaluesOnly).eigenvalues();
  return {ev[2], ev[1], ev[0]};
}

double max_principal(const Sym6& s) { return principal_stresses(s)[0]; }

double strength_ratio(const Sym6& st, double ucs, double tensile) {
  if (!(ucs > 0) || std::isnan(st[0])) return std::numeric_limits<double>::quiet_NaN();
  const auto p = principal_stresses(st);
  const double s1 = -p[2], s3 = -p[0];  // compression positive, σ1 ≥ σ3
  double ratio = strength_ratio_cap;
  if (s3 < 0) {
    ratio = tensile > 0 ? std::min(ratio, tensile / -s3) : 0.0;
  }
  if (tensile > 0 && s1 > 0) {
    const double q = ucs / tensile;
    const double capacity = std::max(ucs + q * s3, 0.0);
    ratio = std::min(ratio, capacity / s1);
  } else if (s1 > 0 && s3 >= 0) {
    ratio = std::min(ratio, ucs / s1);
  }
  return std::clamp(ratio, 0.0, strength_ratio_cap);
}

Stability screen_stability(const StaticProblem& p, const StaticResult& r) {
  const mesh::Mesh& m = *p.mesh;
  Stability out;
  out.strength_ratio.assign(m.n_cells(), std::numeric_limits<double>::quiet_NaN());
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (!r.voided.active[c]) continue;
    const LayerProps& lp = p.layers[static_cast<std::size_t>(m.layer[c])];
    out.strength_ratio[c] = strength_ratio(r.voided.stress_total[c], lp.ucs, lp.tensile);
    if (!std::isnan(out.strength_ratio[c])) out.min_strength_ratio = std::min(out.min_strength_ratio, out.strength_ratio[c]);
  }
  out.voids.assign(static_cast<std::size_t>(m.n_voids), VoidStability{});
  for (const mesh::Facet& f : m.facets) {
    if (f.kind != mesh::FacetKind::void_wall) continue;
    const VoidLoad& vl = p.voids[static_cast<std::size_t>(f.void_id)];
    const int nc = m.dim() == 3 ? 3 : 2;
    double zmid = 0;
    for (int a = 0; a < nc; ++a) zmid += m.nodes[f.nodes[a]][2] / nc;
    if (zmid <= vl.cz) continue;
    VoidStability& vs = out.voids[static_cast<std::size_t>(f.void_id)];
    const auto c = static_cast<std::size_t>(f.cell);
    const LayerProps& lp = p.layers[static_cast<std::size_t>(m.layer[c])];
    const double tension = std::max(0.0, max_principal(r.voided.stress_total[c]));
    vs.max_roof_tension = std::max(vs.max_roof_tension, tension);
    if (tension > lp.tensile) vs.tension_in_roof = true;
    const double sr = out.strength_ratio[c];
    if (!std::isnan(sr)) {
      vs.evaluated = true;
      vs.min_strength_ratio = std::min(vs.min_strength_ratio, sr);
    }
  }
  for (const VoidStability& vs : out.voids) out.tension_in_roof = out.tension_in_roof || vs.tension_in_roof;
  return out;
}

}  // namespace voidsign::solver
