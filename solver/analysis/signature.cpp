// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/signature.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <numbers>

namespace voidsign::solver {

std::vector<double> derivative(const std::vector<double>& x, const std::vector<double>& y) {
  const std::size_t n = x.size();
  std::vector<double> d(n, 0.0);
  if (n < 2) return d;
  if (n == 2) {
    d[0] = d[1] = (y[1] - y[0]) / (x[1] - x[0]);
    return d;
  }
  for (std::size_t i = 1; i + 1 < n; ++i) {
    const double hl = x[i] - x[i - 1], hr = x[i + 1] - x[i];
    d[i] = (hl * hl * y[i + 1] - hr * hr * y[i - 1] + (hr * hr - hl * hl) * y[i]) / (hl * hr * (hl + hr));
  }
  auto one_sided = [&](std::size_t a, std::size_t b, std::size_t c) {
    // Derivative at x[a] of the parabola through a, b, c.
    const double h1 = x[b] - x[a], h2 = x[c] - x[a];
    return (-(h1 + h2) / (h1 * h2)) * y[a] + (h2 / (h1 * (h2 - h1))) * y[b] - (h1 / (h2 * (h2 - h1))) * y[c];
  };
  d[0] = one_sided(0, 1, 2);
  d[n - 1] = one_sided(n - 1, n - 2, n - 3);
  return d;
}

std::vector<double> second_derivative(const std::vector<double>& x, const std::vector<double>& y) {
  const std::size_t n = x.size();
  std::vector<double> d(n, 0.0);
  if (n < 3) return d;
  for (std::size_t i = 1; i + 1 < n; ++i) {
    const double hl = x[i] - x[i - 1], hr = x[i + 1] - x[i];
    d[i] = 2 * (hl * y[i + 1] - (hl + hr) * y[i] + hr * y[i - 1]) / (hl * hr * (hl + hr));
  }
  d[0] = d[1];
  d[n - 1] = d[n - 2];
  return d;
}

namespace {

// Linear interpolation of y(x) at xq, clamped to the ends.
double interpolate(const std::vector<double>& x, const std::vector<double>& y, double xq) {
  if (xq <= x.front()) return y.front();
  if (xq >= x.back()) return y.back();
  const auto i = static_cast<std::size_t>(std::upper_bound(x.begin(), x.end(), xq) - x.begin());
  const double t = (xq - x[i - 1]) / (x[i] - x[i - 1]);
  return y[i - 1] + t * (y[i] - y[i - 1]);
}

}  // namespace

std::vector<SurfaceRow> surface_profile(const mesh::Mesh& m, const StaticResult& r, const FarField& ff) {
  if (m.dim() != 2) throw std::invalid_argument("surface_profile: 2D meshes only (3D: surface_map)");
  std::vector<SurfaceRow> rows;
  rows.reserve(m.surface_nodes.size());
  for (int n : m.surface_nodes) {
    SurfaceRow row;
    row.x = m.nodes[n][0];
    row.ux = r.voided.u[2 * n];
    row.uz = r.voided.u[2 * n + 1];
    row.ux_ref = r.reference.u[2 * n];
    row.uz_ref = r.reference.u[2 * n + 1];
    row.dux = row.ux - row.ux_ref;
    row.duz = row.uz - row.uz_ref;
    rows.push_back(row);
  }
  if (rows.empty()) return rows;
  std::vector<double> x, dux, duz;
  for (const auto& row : rows) {
    x.push_back(row.x);
    dux.push_back(row.dux);
    duz.push_back(row.duz);
  }
  const auto tilt = derivative(x, duz), strain = derivative(x, dux), curv = second_derivative(x, duz);
  const bool axis_at_left = std::abs(x.front()) < 1e-9 * (std::abs(x.back()) + 1);
  double far = 0;
  if (axis_at_left)
    far = ff.offset > 0 ? interpolate(x, duz, ff.offset) : duz.back();
  else if (ff.offset > 0)
    far = 0.5 * (interpolate(x, duz, ff.x_centre - ff.offset) + interpolate(x, duz, ff.x_centre + ff.offset));
  else
    far = 0.5 * (duz.front() + duz.back());
  for (std::size_t i = 0; i < rows.size(); ++i) {
    rows[i].tilt = tilt[i];
    rows[i].strain = strain[i];
    rows[i].curvature = curv[i];
    rows[i].duz_rel = duz[i] - far;
  }
  return rows;
}

Anomaly summarize(const std::vector<SurfaceRow>& rows, bool axisymmetric) {
  Anomaly a;
  if (rows.empty()) return a;
  a.uz_min = a.uz_max = rows[0].duz;
  a.x_uz_min = a.x_uz_max = rows[0].x;
  std::size_t i_min_rel = 0;
  for (std::size_t i = 0; i < rows.size(); ++i) {
    const SurfaceRow& r = rows[i];
    if (r.duz < a.uz_min) { a.uz_min = r.duz; a.x_uz_min = r.x; }
    if (r.duz > a.uz_max) { a.uz_max = r.duz; a.x_uz_max = r.x; }
    if (std::abs(r.dux) > a.ux_absmax) { a.ux_absmax = std::abs(r.dux); a.x_ux_absmax = r.x; }
    if (std::abs(r.tilt) > a.tilt_absmax) { a.tilt_absmax = std::abs(r.tilt); a.x_tilt_absmax = r.x; }
    if (std::abs(r.strain) > a.strain_absmax) { a.strain_absmax = std::abs(r.strain); a.x_strain_absmax = r.x; }
    a.strain_min = std::min(a.strain_min, r.strain);
    a.strain_max = std::max(a.strain_max, r.strain);
    a.curvature_absmax = std::max(a.curvature_absmax, std::abs(r.curvature));
    if (r.duz_rel < rows[i_min_rel].duz_rel) i_min_rel = i;
  }
  a.rel_uz_min = rows[i_min_rel].duz_rel;
  a.far_field_uz = rows[i_min_rel].duz - rows[i_min_rel].duz_rel;
  // Trough volume: the settled part of the relative profile, trapezoidal rule.
  for (std::size_t i = 0; i + 1 < rows.size(); ++i) {
    const double s0 = std::min(rows[i].duz_rel, 0.0), s1 = std::min(rows[i + 1].duz_rel, 0.0);
    const double dx = rows[i + 1].x - rows[i].x;
    if (axisymmetric)
      a.trough_volume -= std::numbers::pi * dx * (rows[i].x * s0 + rows[i + 1].x * s1);
    else
      a.trough_volume -= 0.5 * dx * (s0 + s1);
  }
  // Inflexion: where the curvature of the trough first changes sign, walking out from its
  // deepest point; the mean of both sides when both exist.
  if (a.rel_uz_min < 0) {
    auto walk = [&](int step) -> double {
      const double c0 = rows[i_min_rel].curvature;
      for (long i = static_cast<long>(i_min_rel) + step; i >= 1 && i < static_cast<long>(rows.size()); i += step) {
        const SurfaceRow& r = rows[static_cast<std::size_t>(i)];
        const SurfaceRow& q = rows[static_cast<std::size_t>(i - step)];
        if ((r.curvature > 0) != (c0 > 0)) {
          const double t = q.curvature / (q.curvature - r.curvature);
          return std::abs(q.x + t * (r.x - q.x) - rows[i_min_rel].x);
        }
      }
      return -1;
    };
    const double right = walk(+1), left = walk(-1);
    if (right >= 0 && left >= 0) a.inflexion_offset = 0.5 * (right + left);
    else a.inflexion_offset = std::max(right, left);
    if (a.inflexion_offset < 0) a.inflexion_offset = 0;
  }
  return a;
}

}  // namespace voidsign::solver
