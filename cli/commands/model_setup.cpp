// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/model_setup.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>

namespace voidsign::cli {

namespace {

mesh::VoidOutline outline_of(const Void& v) {
  mesh::VoidOutline o;
  o.cx = v.x;
  o.cz = -v.depth;
  o.angle_deg = v.angle;
  switch (v.shape) {
    case Void::Shape::circle:
      o.kind = mesh::VoidOutline::Kind::circle;
      o.radius = v.radius;
      break;
    case Void::Shape::ellipse:
      o.kind = mesh::VoidOutline::Kind::ellipse;
      o.a = v.axes[0];
      o.b = v.axes[1];
      break;
    case Void::Shape::rectangle:
      o.kind = mesh::VoidOutline::Kind::rectangle;
      o.width = v.width;
      o.height = v.height;
      break;
    case Void::Shape::polygon:
      o.kind = mesh::VoidOutline::Kind::polygon;
      for (const auto& p : v.points) o.points.push_back({p[0], -p[1]});
      break;
    case Void::Shape::sphere:
    case Void::Shape::box:
    case Void::Shape::tunnel:
      throw std::logic_error("a 3D void in a 2D model (the reader should have refused it)");
  }
  return o;
}

// Points on the outline, for extents (polygons exactly, curves sampled).
std::vector<std::array<double, 2>> outline_points(const Void& v) {
  std::vector<std::array<double, 2>> pts;
  const double c = std::cos(v.angle * std::numbers::pi / 180), s = std::sin(v.angle * std::numbers::pi / 180);
  auto add = [&](double lx, double lz) { pts.push_back({v.x + c * lx - s * lz, -v.depth + s * lx + c * lz}); };
  switch (v.shape) {
    case Void::Shape::circle:
    case Void::Shape::ellipse: {
      const double a = v.shape == Void::Shape::circle ? v.radius : v.axes[0];
      const double b = v.shape == Void::Shape::circle ? v.radius : v.axes[1];
      for (int i = 0; i < 720; ++i) {
        const double t = 2 * std::numbers::pi * i / 720;
        add(a * std::cos(t), b * std::sin(t));
      }
      break;
    }
    case Void::Shape::rectangle:
      for (int sx : {-1, 1})
        for (int sz : {-1, 1}) add(sx * v.width / 2, sz * v.height / 2);
      break;
    case Void::Shape::polygon:
      for (const auto& p : v.points) pts.push_back({p[0], -p[1]});
      break;
    case Void::Shape::sphere:
    case Void::Shape::box:
    case Void::Shape::tunnel:
      break;  // 3D bodies: see extent_3d
  }
  return pts;
}

}  // namespace

// Extent of a 3D body in x and z (y is not needed by the callers).
VoidExtent extent_3d(const Void& v) {
  VoidExtent e;
  e.cx = v.x;
  e.cz = -v.depth;
  switch (v.shape) {
    case Void::Shape::sphere:
      e.x_left = v.x - v.radius; e.x_right = v.x + v.radius;
      e.z_top = -v.depth + v.radius; e.z_bottom = -v.depth - v.radius;
      break;
    case Void::Shape::box: {
      const double c = std::abs(std::cos(v.yaw * std::numbers::pi / 180)), sn = std::abs(std::sin(v.yaw * std::numbers::pi / 180));
      const double hx = 0.5 * (c * v.size[0] + sn * v.size[1]);
      e.x_left = v.x - hx; e.x_right = v.x + hx;
      e.z_top = -v.depth + v.size[2] / 2; e.z_bottom = -v.depth - v.size[2] / 2;
      break;
    }
    default: {  // tunnel: the axis ends, widened by the radius
      e.x_left = std::min(v.from[0], v.to[0]) - v.radius; e.x_right = std::max(v.from[0], v.to[0]) + v.radius;
      e.z_top = -std::min(v.from[2], v.to[2]) + v.radius; e.z_bottom = -std::max(v.from[2], v.to[2]) - v.radius;
      break;
    }
  }
  return e;
}

bool is_3d(const Void& v) {
  return v.shape == Void::Shape::sphere || v.shape == Void::Shape::box || v.shape == Void::Shape::tunnel;
}

VoidExtent extent_of(const Void& v) {
  if (is_3d(v)) return extent_3d(v);
  const auto pts = outline_points(v);
  VoidExtent e;
  e.z_top = e.x_right = -1e300;
  e.z_bottom = e.x_left = 1e300;
  for (const auto& p : pts) {
    e.x_left = std::min(e.x_left, p[0]);
    e.x_right = std::max(e.x_right, p[0]);
    e.z_bottom = std::min(e.z_bottom, p[1]);
    e.z_top = std::max(e.z_top, p[1]);
  }
  // The reader sets a polygon's x and depth to its area centroid.
  e.cx = v.x;
  e.cz = -v.depth;
  return e;
}

solver::FarField far_field_of(const Scenario& s) {
  solver::FarField f;
  double d_max = 0, x_sum = 0;
  for (const Void& v : s.voids) {
    const VoidExtent e = extent_of(v);
    d_max = std::max(d_max, -e.z_bottom);
    x_sum += e.cx;
  }
  if (s.voids.empty()) return f;
  f.x_centre = s.model == Model::axisymmetric ? 0.0 : x_sum / static_cast<double>(s.voids.size());
  f.offset = 5 * d_max;
  return f;
}

mesh::Geometry2D geometry_of(const Scenario& s) {
  mesh::Geometry2D g;
  g.axisymmetric = s.model == Model::axisymmetric;
  g.width = s.domain.width;
  g.depth = s.domain.depth;
  for (const Layer& l : s.layers) g.layer_thickness.push_back(l.thickness > 0 ? l.thickness : s.domain.depth);
  for (const Void& v : s.voids) g.voids.push_back(outline_of(v));
  g.sizing.order = s.mesh.order;
  g.sizing.far = s.mesh.size;
  g.sizing.near_void = s.mesh.near_void;
  g.sizing.surface = s.mesh.surface;
  return g;
}

mesh::Geometry3D geometry3d_of(const Scenario& s) {
  mesh::Geometry3D g;
  g.width = s.domain.width;
  g.length = s.domain.length;
  g.depth = s.domain.depth;
  for (const Layer& l : s.layers) g.layer_thickness.push_back(l.thickness > 0 ? l.thickness : s.domain.depth);
  for (const Void& v : s.voids) {
    mesh::VoidSolid b;
    b.cx = v.x;
    b.cy = v.y;
    b.cz = -v.depth;
    b.radius = v.radius;
    b.size = v.size;
    b.yaw_deg = v.yaw;
    b.from = {v.from[0], v.from[1], -v.from[2]};
    b.to = {v.to[0], v.to[1], -v.to[2]};
    b.kind = v.shape == Void::Shape::sphere ? mesh::VoidSolid::Kind::sphere
             : v.shape == Void::Shape::box  ? mesh::VoidSolid::Kind::box
                                            : mesh::VoidSolid::Kind::tunnel;
    g.voids.push_back(b);
  }
  g.sizing.order = s.mesh.order;
  g.sizing.far = s.mesh.size;
  g.sizing.near_void = s.mesh.near_void;
  g.sizing.surface = s.mesh.surface;
  return g;
}

double y_centre_of(const Scenario& s) {
  double sum = 0;
  for (const Void& v : s.voids) sum += v.y;
  return s.voids.empty() ? 0.0 : sum / static_cast<double>(s.voids.size());
}

std::vector<double> layer_k0(const Scenario& s) {
  std::vector<double> k;
  for (const Layer& l : s.layers) {
    const double nu = s.materials.at(l.material).poisson;
    k.push_back(s.loads.k0 ? *s.loads.k0 : nu / (1 - nu));
  }
  return k;
}

solver::PlaneWave plane_wave_of(const WaveSpec& w, double amplitude) {
  constexpr double deg = std::numbers::pi / 180;
  solver::PlaneWave out;
  out.type = w.p_wave ? solver::IncidentWave::p : solver::IncidentWave::s;
  out.amplitude = amplitude;
  out.polarization = w.polarization;
  out.incidence = w.incidence_deg * deg;
  out.azimuth = w.azimuth_deg * deg;
  return out;
}

solver::Kinematics kinematics_of(const Scenario& s) {
  return s.model == Model::axisymmetric ? solver::Kinematics::axisymmetric
         : s.model == Model::three_d    ? solver::Kinematics::solid
                                        : solver::Kinematics::plane_strain;
}

solver::StaticProblem static_problem_of(const Scenario& s, const mesh::Mesh& m) {
  solver::StaticProblem p;
  p.mesh = &m;
  p.kinematics = s.model == Model::axisymmetric ? solver::Kinematics::axisymmetric
                 : s.model == Model::three_d    ? solver::Kinematics::solid
                                                : solver::Kinematics::plane_strain;
  const auto k0 = layer_k0(s);
  std::vector<double> bottoms, density;
  double z = 0;
  for (std::size_t i = 0; i < s.layers.size(); ++i) {
    const Material& mat = s.materials.at(s.layers[i].material);
    solver::LayerProps lp;
    lp.elastic = {mat.young, mat.poisson, mat.density};
    lp.ucs = mat.ucs;
    lp.tensile = mat.tensile;
    lp.k0 = k0[i];
    p.layers.push_back(lp);
    z -= s.layers[i].thickness > 0 ? s.layers[i].thickness : s.domain.depth;
    bottoms.push_back(std::max(z, -s.domain.depth));
    density.push_back(mat.density);
  }
  if (s.loads.gravity) {
    // In-situ stress in equilibrium with self-weight: the ground has long settled under it, so
    // displacements count from that state; excavating a void releases the wall traction.
    p.body_force = true;
    p.initial_stress = solver::geostatic_stress(bottoms, density, k0);
  }
  for (const Void& v : s.voids) {
    solver::VoidLoad vl;
    const VoidExtent e = extent_of(v);
    vl.cx = e.cx;
    vl.cy = v.y;
    vl.cz = e.cz;
    if (v.shape == Void::Shape::tunnel) {
      const std::array<double, 3> d{v.to[0] - v.from[0], v.to[1] - v.from[1], -(v.to[2] - v.from[2])};
      const double len = std::sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2]);
      vl.axis = {d[0] / len, d[1] / len, d[2] / len};
    }
    switch (v.contents) {
      case Contents::empty: vl.contents = solver::VoidLoad::Contents::empty; break;
      case Contents::pressure:
        vl.contents = solver::VoidLoad::Contents::pressure;
        vl.pressure = v.pressure;
        break;
      case Contents::water:
        vl.contents = solver::VoidLoad::Contents::water;
        vl.water_table_z = v.water_table_depth ? -*v.water_table_depth : e.z_top;
        break;
    }
    p.voids.push_back(vl);
  }
  for (const GroundLoss& gl : s.loads.ground_loss) p.voids[static_cast<std::size_t>(gl.void_index)].volume_loss = gl.percent / 100;
  for (const SurfaceLoad& sl : s.loads.surface)
    p.surface.push_back({.from = sl.from, .to = sl.to, .y_from = sl.y_from, .y_to = sl.y_to, .pressure = sl.pressure});
  p.boundaries.sides = s.domain.sides == Boundary::fixed ? solver::Support::fixed : solver::Support::roller;
  p.boundaries.bottom = s.domain.bottom == Boundary::fixed ? solver::Support::fixed : solver::Support::roller;
  return p;
}

}  // namespace voidsign::cli
