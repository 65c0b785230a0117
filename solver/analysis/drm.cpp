// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/drm.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace voidsign::solver {

namespace {

int corners(const mesh::Mesh& m) { return m.dim() == 3 ? 4 : 3; }

std::array<double, 3> corner_centroid(const mesh::Mesh& m, std::size_t c) {
  const int* v = m.cell(c);
  std::array<double, 3> g{0, 0, 0};
  for (int a = 0; a < corners(m); ++a)
    for (std::size_t i = 0; i < 3; ++i) g[i] += m.nodes[static_cast<std::size_t>(v[a])][i] / corners(m);
  return g;
}

double largest_edge(const mesh::Mesh& m, std::size_t c) {
  const int* v = m.cell(c);
  double h = 0;
  for (int a = 0; a < corners(m); ++a)
    for (int b = a + 1; b < corners(m); ++b) {
      const auto& p = m.nodes[static_cast<std::size_t>(v[a])];
      const auto& q = m.nodes[static_cast<std::size_t>(v[b])];
      h = std::max(h, std::hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]));
    }
  return h;
}

DrmBox default_box(const mesh::Mesh& m, DrmBox box, const DrmLimits& limits, const std::vector<char>& excluded) {
  double reach_x = -1, reach_y = -1, reach_z = -1, h = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (excluded.empty() || !excluded[c]) h = std::max(h, largest_edge(m, c));
    if (m.void_id[c] < 0) continue;
    for (int a = 0; a < m.npc(); ++a) {
      const auto& q = m.nodes[static_cast<std::size_t>(m.cell(c)[a])];
      reach_x = std::max(reach_x, std::abs(q[0]));
      reach_y = std::max(reach_y, std::abs(q[1]));
      reach_z = std::max(reach_z, m.z_max - q[2]);
    }
  }
  const double edge_x = std::min(-limits.x_lo, limits.x_hi);
  const double edge_y = std::min(-limits.y_lo, limits.y_hi);
  const double edge_z = m.z_max - limits.z_lo;
  auto between = [&](double reach, double edge) { return reach >= 0 ? 0.5 * (reach + edge) : edge - 2 * h; };
  if (box.half_width <= 0) box.half_width = between(reach_x, edge_x);
  if (m.dim() == 3 && box.half_length <= 0) box.half_length = between(reach_y, edge_y);
  if (box.depth <= 0) box.depth = between(reach_z, edge_z);
  return box;
}

}  // namespace

DrmLayer drm_layer(const mesh::Mesh& m, const DrmBox& requested, const DrmLimits& limits,
                   const std::vector<char>& excluded, const std::vector<double>& layer_thickness, const std::string& who) {
  const std::size_t nc = m.n_cells(), nn = m.n_nodes();
  const bool three_d = m.dim() == 3;
  DrmLayer out;
  out.box = requested;
  if (out.box.half_width <= 0 || out.box.depth <= 0 || (three_d && out.box.half_length <= 0))
    out.box = default_box(m, out.box, limits, excluded);
  const DrmBox& box = out.box;
  std::vector<char> cell_in(nc, 0), node_in(nn, 0), node_out(nn, 0);
  for (std::size_t c = 0; c < nc; ++c) {
    const auto g = corner_centroid(m, c);
    cell_in[c] = std::abs(g[0]) < box.half_width && (!three_d || std::abs(g[1]) < box.half_length) &&
                 m.z_max - g[2] < box.depth;
    const int* v = m.cell(c);
    for (int a = 0; a < m.npc(); ++a) (cell_in[c] ? node_in : node_out)[static_cast<std::size_t>(v[a])] = 1;
  }
  out.inside = node_in;
  // Layer tops, for the check of the tags.
  const std::size_t n_layers = std::max<std::size_t>(layer_thickness.size(), 1);
  std::vector<double> top(n_layers + 1, 0);
  for (std::size_t j = 0; j < n_layers; ++j)
    top[j + 1] = j + 1 < n_layers ? top[j] + layer_thickness[j] : std::numeric_limits<double>::infinity();
  const double tol = 1e-6 * (m.z_max - m.z_min);
  for (std::size_t c = 0; c < nc; ++c) {
    const int* v = m.cell(c);
    bool touches = false;
    for (int a = 0; a < m.npc(); ++a)
      touches |= node_in[static_cast<std::size_t>(v[a])] && node_out[static_cast<std::size_t>(v[a])];
    if (m.void_id[c] >= 0 && (!cell_in[c] || touches))
      throw std::invalid_argument(who + ": void " + std::to_string(m.void_id[c]) +
                                  " reaches the boundary of the DRM box: enlarge the box or the block");
    if (cell_in[c] || !touches) continue;
    if (!excluded.empty() && excluded[c])
      throw std::invalid_argument(who + ": the DRM box touches the absorbing band: make the box smaller");
    const double depth = m.z_max - corner_centroid(m, c)[2];
    const auto lj = static_cast<std::size_t>(m.layer[c]);
    if (lj >= n_layers || depth < top[lj] - tol || depth > top[lj + 1] + tol)
      throw std::invalid_argument(who + ": the layer thicknesses do not match the mesh's layer tags (cell " +
                                  std::to_string(c) + ")");
    DrmLayer::Cell lc{c, {}};
    for (int a = 0; a < m.npc(); ++a) lc.on_boundary.push_back(node_in[static_cast<std::size_t>(v[a])]);
    out.cells.push_back(std::move(lc));
  }
  if (out.cells.empty()) throw std::invalid_argument(who + ": the DRM box is empty or covers the whole block");
  return out;
}

}  // namespace voidsign::solver
