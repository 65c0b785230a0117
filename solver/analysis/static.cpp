// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/static.hpp"

#include <omp.h>

#include <Eigen/Dense>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>
#include <future>
#include <limits>
#include <mutex>
#include <sstream>

#include "solver/la/memory.hpp"
#include "solver/la/spd_solver.hpp"

namespace voidsign::solver {

namespace {

using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

constexpr double gauss3_x[3] = {-0.774596669241483, 0.0, 0.774596669241483};
constexpr double gauss3_w[3] = {5.0 / 9, 8.0 / 9, 5.0 / 9};

// A quadrature sample on a boundary facet: position, outward normal of the solid, weight
// (length or area, times r in axisymmetry) and the facet's shape values.
struct FacetSample {
  double x = 0, y = 0, z = 0, nx = 0, ny = 0, nz = 0, w = 0;
  double N[6] = {};
};

std::array<double, 3> cell_centroid(const mesh::Mesh& m, std::size_t c) {
  const int* v = m.cell(c);
  const int nc = m.dim() == 3 ? 4 : 3;
  std::array<double, 3> g{0, 0, 0};
  for (int a = 0; a < nc; ++a)
    for (int i = 0; i < 3; ++i) g[i] += m.nodes[v[a]][i] / nc;
  return g;
}

// Edge samples (2D): n_sub pieces of [t0, t1] × 3 Gauss points.
void edge_samples(const mesh::Mesh& m, const mesh::Facet& f, Kinematics kin, double t0, double t1, int n_sub,
                  std::vector<FacetSample>& out) {
  const bool quad = m.type == mesh::CellType::tri6;
  const auto g = cell_centroid(m, static_cast<std::size_t>(f.cell));
  for (int sub = 0; sub < n_sub; ++sub) {
    const double a0 = t0 + (t1 - t0) * sub / n_sub, a1 = t0 + (t1 - t0) * (sub + 1) / n_sub;
    for (int q = 0; q < 3; ++q) {
      const double t = 0.5 * (a0 + a1) + 0.5 * (a1 - a0) * gauss3_x[q];
      FacetSample s;
      double dN[3];
      if (quad) {
        s.N[0] = 0.5 * t * (t - 1); s.N[1] = 0.5 * t * (t + 1); s.N[2] = 1 - t * t;
        dN[0] = t - 0.5; dN[1] = t + 0.5; dN[2] = -2 * t;
      } else {
        s.N[0] = 0.5 * (1 - t); s.N[1] = 0.5 * (1 + t);
        dN[0] = -0.5; dN[1] = 0.5; dN[2] = 0;
      }
      double tx = 0, tz = 0;
      for (int a = 0; a < (quad ? 3 : 2); ++a) {
        const auto& p = m.nodes[f.nodes[a]];
        s.x += s.N[a] * p[0];
        s.z += s.N[a] * p[2];
        tx += dN[a] * p[0];
        tz += dN[a] * p[2];
      }
      const double len = std::hypot(tx, tz);
      s.nx = tz / len;
      s.nz = -tx / len;
      if (s.nx * (s.x - g[0]) + s.nz * (s.z - g[2]) < 0) { s.nx = -s.nx; s.nz = -s.nz; }
      s.w = gauss3_w[q] * 0.5 * (a1 - a0) * len;
      if (kin == Kinematics::axisymmetric) s.w *= s.x;
      out.push_back(s);
    }
  }
}

// Triangle samples (3D): the reference triangle split into `level`² sub-triangles, each with the
// degree-4 rule of Dunavant (1985).
void triangle_samples(const mesh::Mesh& m, const mesh::Facet& f, int level, std::vector<FacetSample>& out) {
  const bool quad = m.type == mesh::CellType::tet10;
  static constexpr double a6 = 0.445948490915965, b6 = 0.091576213509771;
  static constexpr double wa = 0.223381589678011 / 2, wb = 0.109951743655322 / 2;
  static constexpr double pts[6][3] = {{a6, a6, wa}, {1 - 2 * a6, a6, wa}, {a6, 1 - 2 * a6, wa},
                                       {b6, b6, wb}, {1 - 2 * b6, b6, wb}, {b6, 1 - 2 * b6, wb}};
  const auto g = cell_centroid(m, static_cast<std::size_t>(f.cell));
  const double h = 1.0 / level;
  auto sample = [&](double r, double s, double w) {
    FacetSample fs;
    const double u = 1 - r - s;
    double dr[6], ds[6];
    if (quad) {
      fs.N[0] = u * (2 * u - 1); fs.N[1] = r * (2 * r - 1); fs.N[2] = s * (2 * s - 1);
      fs.N[3] = 4 * r * u; fs.N[4] = 4 * r * s; fs.N[5] = 4 * s * u;
      dr[0] = 1 - 4 * u; dr[1] = 4 * r - 1; dr[2] = 0; dr[3] = 4 * (u - r); dr[4] = 4 * s; dr[5] = -4 * s;
      ds[0] = 1 - 4 * u; ds[1] = 0; ds[2] = 4 * s - 1; ds[3] = -4 * r; ds[4] = 4 * r; ds[5] = 4 * (u - s);
    } else {
      fs.N[0] = u; fs.N[1] = r; fs.N[2] = s;
      dr[0] = -1; dr[1] = 1; dr[2] = 0;
      ds[0] = -1; ds[1] = 0; ds[2] = 1;
    }
    double tr[3] = {0, 0, 0}, ts[3] = {0, 0, 0}, x[3] = {0, 0, 0};
    for (int a = 0; a < (quad ? 6 : 3); ++a) {
      const auto& p = m.nodes[f.nodes[a]];
      for (int i = 0; i < 3; ++i) {
        x[i] += fs.N[a] * p[i];
        tr[i] += dr[a] * p[i];
        ts[i] += ds[a] * p[i];
      }
    }
    double n[3] = {tr[1] * ts[2] - tr[2] * ts[1], tr[2] * ts[0] - tr[0] * ts[2], tr[0] * ts[1] - tr[1] * ts[0]};
    const double area = std::sqrt(n[0] * n[0] + n[1] * n[1] + n[2] * n[2]);
    for (double& c : n) c /= area;
    if (n[0] * (x[0] - g[0]) + n[1] * (x[1] - g[1]) + n[2] * (x[2] - g[2]) < 0)
      for (double& c : n) c = -c;
    fs.x = x[0]; fs.y = x[1]; fs.z = x[2];
    fs.nx = n[0]; fs.ny = n[1]; fs.nz = n[2];
    fs.w = w * area;
    out.push_back(fs);
  };
  for (int i = 0; i < level; ++i)
    for (int j = 0; i + j < level; ++j) {
      // Upright sub-triangle (i, j), (i+1, j), (i, j+1) and, where it fits, the inverted one.
      for (const auto& p : pts) sample((i + p[0]) * h, (j + p[1]) * h, p[2] * h * h);
      if (i + j + 1 < level)
        for (const auto& p : pts) sample((i + 1 - p[0]) * h, (j + 1 - p[1]) * h, p[2] * h * h);
    }
}

void add_samples(const mesh::Mesh& m, const mesh::Facet& f, int d, const std::vector<FacetSample>& samples,
                 const std::function<std::array<double, 3>(const FacetSample&)>& traction, Vector& rhs) {
  const int nn = mesh::nodes_per_facet(m.type);
  for (const FacetSample& s : samples) {
    const auto t = traction(s);
    const double comp[3] = {t[0], d == 3 ? t[1] : t[2], t[2]};
    for (int a = 0; a < nn; ++a)
      for (int j = 0; j < d; ++j) rhs[d * f.nodes[a] + j] += s.w * s.N[a] * comp[j];
  }
}

// Fixed dofs from the outer boundary conditions.
}  // namespace

std::vector<char> outer_constraints(const StaticProblem& p) {
  const mesh::Mesh& m = *p.mesh;
  const int d = dofs_per_node(p.kinematics);
  const int vz = vertical_dof(p.kinematics);
  std::vector<char> fixed(static_cast<std::size_t>(d) * m.n_nodes(), 0);
  auto apply = [&](int node, Support s, int normal_dof) {
    if (s == Support::free) return;
    if (s == Support::fixed)
      for (int j = 0; j < d; ++j) fixed[static_cast<std::size_t>(d * node + j)] = 1;
    else
      fixed[static_cast<std::size_t>(d * node + normal_dof)] = 1;
  };
  const int nn = mesh::nodes_per_facet(m.type);
  for (const mesh::Facet& f : m.facets)
    for (int a = 0; a < nn; ++a) {
      const int node = f.nodes[a];
      switch (f.kind) {
        case mesh::FacetKind::left:
          // In an axisymmetric model the left edge is the axis: u_r = 0 there, always.
          apply(node, p.kinematics == Kinematics::axisymmetric ? Support::roller : p.boundaries.sides, 0);
          break;
        case mesh::FacetKind::right: apply(node, p.boundaries.sides, 0); break;
        case mesh::FacetKind::front:
        case mesh::FacetKind::back: apply(node, p.boundaries.sides, 1); break;
        case mesh::FacetKind::bottom: apply(node, p.boundaries.bottom, vz); break;
        case mesh::FacetKind::surface: apply(node, p.boundaries.top, vz); break;
        case mesh::FacetKind::void_wall: break;
      }
    }
  return fixed;
}

namespace {

struct InitialCtx {
  const InitialStress* fn;
  int layer;
};

Sym6 initial_at(double x, double y, double z, const void* ctx) {
  const auto* c = static_cast<const InitialCtx*>(ctx);
  return (*c->fn)(x, y, z, c->layer);
}

bool inside_load(const SurfacePressure& s, const FacetSample& fs, bool three_d) {
  return fs.x >= s.from && fs.x <= s.to && (!three_d || (fs.y >= s.y_from && fs.y <= s.y_to));
}

void add_surface_pressure(const StaticProblem& p, const mesh::Facet& fc, Vector& f) {
  const mesh::Mesh& m = *p.mesh;
  const int d = dofs_per_node(p.kinematics);
  const int nc = m.dim() == 3 ? 3 : 2;
  double lo[2] = {1e300, 1e300}, hi[2] = {-1e300, -1e300};
  for (int a = 0; a < nc; ++a) {
    const auto& q = m.nodes[fc.nodes[a]];
    lo[0] = std::min(lo[0], q[0]); hi[0] = std::max(hi[0], q[0]);
    lo[1] = std::min(lo[1], q[1]); hi[1] = std::max(hi[1], q[1]);
  }
  for (const SurfacePressure& s : p.surface) {
    auto down = [&](const FacetSample&) { return std::array<double, 3>{0, 0, -s.pressure}; };
    std::vector<FacetSample> samples;
    if (m.dim() == 2) {
      // The surface is straight, so x is linear along the edge: clip it to the loaded range.
      const double xa = m.nodes[fc.nodes[0]][0], xb = m.nodes[fc.nodes[1]][0];
      const double l = std::max(s.from, lo[0]), h = std::min(s.to, hi[0]);
      if (h <= l) continue;
      double t0 = -1 + 2 * (l - xa) / (xb - xa), t1 = -1 + 2 * (h - xa) / (xb - xa);
      if (t0 > t1) std::swap(t0, t1);
      edge_samples(m, fc, p.kinematics, t0, t1, 1, samples);
      add_samples(m, fc, d, samples, down, f);
      continue;
    }
    if (hi[0] <= s.from || lo[0] >= s.to || hi[1] <= s.y_from || lo[1] >= s.y_to) continue;
    const bool whole = lo[0] >= s.from && hi[0] <= s.to && lo[1] >= s.y_from && hi[1] <= s.y_to;
    // A facet cut by the rectangle's edge is sampled finely and the points outside dropped.
    triangle_samples(m, fc, whole ? 1 : 8, samples);
    if (!whole)
      samples.erase(std::remove_if(samples.begin(), samples.end(), [&](const FacetSample& fs) { return !inside_load(s, fs, true); }),
                    samples.end());
    add_samples(m, fc, d, samples, down, f);
  }
}

void add_contents(const StaticProblem& p, const mesh::Facet& fc, Vector& f) {
  const VoidLoad& vl = p.voids[static_cast<std::size_t>(fc.void_id)];
  if (vl.contents == VoidLoad::Contents::empty) return;
  const mesh::Mesh& m = *p.mesh;
  const bool water = vl.contents == VoidLoad::Contents::water;
  std::vector<FacetSample> samples;
  if (m.dim() == 2)
    edge_samples(m, fc, p.kinematics, -1, 1, water ? 4 : 1, samples);
  else
    triangle_samples(m, fc, water ? 3 : 1, samples);
  // Pressure p acts on the solid as traction −p n (n: outward normal of the solid).
  add_samples(m, fc, dofs_per_node(p.kinematics), samples,
              [&](const FacetSample& s) {
                const double pr = water ? (s.z < vl.water_table_z ? water_density * p.gravity * (vl.water_table_z - s.z) : 0.0)
                                        : vl.pressure;
                return std::array<double, 3>{-pr * s.nx, -pr * s.ny, -pr * s.nz};
              },
              f);
}

// Loads acting on the cells and boundary of one model.
Vector model_load(const StaticProblem& p, const std::vector<char>& active, bool with_voids) {
  const mesh::Mesh& m = *p.mesh;
  const int npc = m.npc();
  const int d = dofs_per_node(p.kinematics);
  const long nc = static_cast<long>(m.n_cells());
  Vector f = Vector::Zero(d * static_cast<Eigen::Index>(m.n_nodes()));
  const int n_threads = omp_get_max_threads();
  std::vector<Vector> partial(static_cast<std::size_t>(n_threads), Vector::Zero(f.size()));
#pragma omp parallel
  {
    Vector& mine = partial[static_cast<std::size_t>(omp_get_thread_num())];
    std::vector<double> fe(static_cast<std::size_t>(d * npc)), fs(fe.size());
#pragma omp for schedule(static)
    for (long c = 0; c < nc; ++c) {
      if (!active[c]) continue;
      const auto cu = static_cast<std::size_t>(c);
      std::fill(fe.begin(), fe.end(), 0.0);
      const LayerProps& lp = p.layers[static_cast<std::size_t>(m.layer[cu])];
      if (p.body_force) add_body_force(m, cu, p.kinematics, {0.0, 0.0, -lp.elastic.density * p.gravity}, fe);
      if (p.initial_stress) {
        // Internal force of the in-situ stress enters with a minus sign (K u = F − ∫Bᵀσ₀).
        std::fill(fs.begin(), fs.end(), 0.0);
        InitialCtx ctx{&p.initial_stress, m.layer[cu]};
        add_stress_divergence(m, cu, p.kinematics, initial_at, &ctx, fs);
        for (std::size_t i = 0; i < fe.size(); ++i) fe[i] -= fs[i];
      }
      const int* v = m.cell(cu);
      for (int a = 0; a < npc; ++a)
        for (int j = 0; j < d; ++j) mine[d * v[a] + j] += fe[static_cast<std::size_t>(d * a + j)];
    }
  }
  for (const Vector& part : partial) f += part;
  for (const mesh::Facet& fc : m.facets) {
    if (!active[static_cast<std::size_t>(fc.cell)]) continue;  // a void cell's side: no ground to load
    if (fc.kind == mesh::FacetKind::surface)
      add_surface_pressure(p, fc, f);
    else if (fc.kind == mesh::FacetKind::void_wall && with_voids)
      add_contents(p, fc, f);
  }
  return f;
}

std::vector<int> wall_nodes_of(const mesh::Mesh& m, int void_id) {
  std::vector<int> nodes;
  const int nn = mesh::nodes_per_facet(m.type);
  for (const mesh::Facet& f : m.facets)
    if (f.kind == mesh::FacetKind::void_wall && f.void_id == void_id)
      for (int a = 0; a < nn; ++a) nodes.push_back(f.nodes[a]);
  std::sort(nodes.begin(), nodes.end());
  nodes.erase(std::unique(nodes.begin(), nodes.end()), nodes.end());
  return nodes;
}

std::vector<double> cell_unknowns(const StaticProblem& p, const Vector& u, std::size_t c) {
  const mesh::Mesh& m = *p.mesh;
  const int d = dofs_per_node(p.kinematics);
  std::vector<double> ue(static_cast<std::size_t>(d * m.npc()));
  const int* v = m.cell(c);
  for (int a = 0; a < m.npc(); ++a)
    for (int j = 0; j < d; ++j) ue[static_cast<std::size_t>(d * a + j)] = u[d * v[a] + j];
  return ue;
}

void centroid_fields(const StaticProblem& p, ModelSolution& s) {
  const mesh::Mesh& m = *p.mesh;
  const std::size_t nc = m.n_cells();
  s.strain.assign(nc, Sym6{});
  s.stress.assign(nc, Sym6{});
  s.stress_total.assign(nc, Sym6{});
  const auto rc = reference_centroid(m.type);
#pragma omp parallel for schedule(static)
  for (long cl = 0; cl < static_cast<long>(nc); ++cl) {
    const auto c = static_cast<std::size_t>(cl);
    if (!s.active[c]) {
      constexpr double nan = std::numeric_limits<double>::quiet_NaN();
      s.strain[c] = s.stress[c] = s.stress_total[c] = Sym6{nan, nan, nan, nan, nan, nan};
      continue;
    }
    const ShapeAt sh = shape_at(m, c, rc[0], rc[1], rc[2]);
    const Sym6 s0 = p.initial_stress ? p.initial_stress(sh.x, sh.y, sh.z, m.layer[c]) : Sym6{};
    const auto ue = cell_unknowns(p, s.u, c);
    s.strain[c] = strain_at(sh, ue.data(), p.kinematics);
    s.stress[c] = hooke(p.layers[static_cast<std::size_t>(m.layer[c])].elastic, s.strain[c]);
    for (int i = 0; i < 6; ++i) s.stress_total[c][i] = s0[i] + s.stress[c][i];
  }
}

std::string residual_message(const char* model, double r) {
  std::ostringstream os;
  os << "the " << model << " solve has relative residual " << r << " (limit " << max_relative_residual
     << "): the model is singular or badly conditioned (check for rigid parts or extreme stiffness contrasts)";
  return os.str();
}

}  // namespace

InitialStress geostatic_stress(std::vector<double> layer_bottom_z, std::vector<double> density, std::vector<double> k0,
                               double gravity) {
  return [bottom = std::move(layer_bottom_z), rho = std::move(density), k = std::move(k0), gravity](
             double, double, double z, int layer) -> Sym6 {
    // σ_zz(z) = −g Σ ρ_i × (thickness of layer i above z).
    double szz = 0, top = 0;
    for (std::size_t i = 0; i < rho.size(); ++i) {
      const bool last = i + 1 == rho.size();
      const double bot = last ? -1e300 : bottom[i];
      const double lo = std::max(bot, z);
      if (top > lo) szz -= gravity * rho[i] * (top - lo);
      if (z >= bot) break;
      top = bot;
    }
    const double kk = k[static_cast<std::size_t>(layer)];
    return {kk * szz, kk * szz, szz, 0.0, 0.0, 0.0};
  };
}

std::array<double, 3> node_displacement(const StaticProblem& p, const Vector& u, std::size_t n) {
  const auto i = static_cast<Eigen::Index>(n);
  if (p.kinematics == Kinematics::solid) return {u[3 * i], u[3 * i + 1], u[3 * i + 2]};
  return {u[2 * i], 0.0, u[2 * i + 1]};
}

StaticResult solve_static(const StaticProblem& p, const Progress& progress) {
  const mesh::Mesh& m = *p.mesh;
  const std::size_t nc = m.n_cells();
  const int d = dofs_per_node(p.kinematics);
  const Eigen::Index nd = d * static_cast<Eigen::Index>(m.n_nodes());
  if ((m.dim() == 3) != (p.kinematics == Kinematics::solid))
    throw std::invalid_argument("solve_static: mesh dimension and kinematics disagree");
  std::mutex report_lock;  // the two models may report from two threads
  auto report = [&](std::string_view step, double frac) {
    const std::lock_guard<std::mutex> held(report_lock);
    if (progress) progress(step, frac);
  };
  StaticResult res;
  res.reference.active.assign(nc, 1);
  res.voided.active.resize(nc);
  for (std::size_t c = 0; c < nc; ++c) res.voided.active[c] = m.void_id[c] < 0;
  auto material_of = [&](std::size_t c) -> const Elastic& {
    return p.layers[static_cast<std::size_t>(m.layer[c])].elastic;
  };

  auto t0 = Clock::now();
  report("pattern", 0);
  SparseMatrix k_ref = stiffness_pattern(m);
  assemble_stiffness(m, p.kinematics, res.reference.active, material_of, k_ref);
  report("assemble", 0.5);
  // Same pattern, so one symbolic analysis serves both models; the void cells taken out again.
  SparseMatrix k_void = k_ref;
  {
    std::vector<std::size_t> void_cells;
    for (std::size_t c = 0; c < nc; ++c)
      if (!res.voided.active[c]) void_cells.push_back(c);
    subtract_stiffness(m, p.kinematics, void_cells, material_of, k_void);
  }
  const Vector f_ref = model_load(p, res.reference.active, false);
  const Vector f_void = model_load(p, res.voided.active, true);
  res.timings.assemble = seconds_since(t0);
  report("assemble", 1);

  const std::vector<char> outer = outer_constraints(p);
  std::vector<char> fixed_void = outer;
  // Nodes that touch no active cell (void interiors) are pinned: same pattern, no singularity.
  {
    std::vector<char> touched(m.n_nodes(), 0);
    for (std::size_t c = 0; c < nc; ++c)
      if (res.voided.active[c])
        for (int a = 0; a < m.npc(); ++a) touched[static_cast<std::size_t>(m.cell(c)[a])] = 1;
    for (std::size_t i = 0; i < m.n_nodes(); ++i)
      if (!touched[i])
        for (int j = 0; j < d; ++j) {
          fixed_void[d * i + j] = 1;
          // What the subtraction of the void cells left on the diagonal is round-off: let
          // constrain_matrix give these pins the mean diagonal instead.
          k_void.valuePtr()[k_void.outerIndexPtr()[d * i + j]] = 0;
        }
  }
  // Ground loss: the wall of void k moves by −ε (x − c)⊥ + t_k, with t_k set by zero net force.
  struct Loss { int void_id; std::vector<int> nodes; double eps; };
  std::vector<Loss> losses;
  for (int k = 0; k < m.n_voids; ++k) {
    const VoidLoad& vl = p.voids[static_cast<std::size_t>(k)];
    if (vl.volume_loss <= 0) continue;
    const bool line = vl.axis[0] != 0 || vl.axis[1] != 0 || vl.axis[2] != 0;
    // Area (2D, tunnels) or volume (axisymmetric, 3D bodies) shrinks by (1 − ε)^dim.
    const double dim = line || p.kinematics == Kinematics::plane_strain ? 2.0 : 3.0;
    Loss l{k, wall_nodes_of(m, k), 1.0 - std::pow(1.0 - vl.volume_loss, 1.0 / dim)};
    for (int n : l.nodes)
      for (int j = 0; j < d; ++j) fixed_void[static_cast<std::size_t>(d * n + j)] = 1;
    losses.push_back(std::move(l));
  }

  SparseMatrix k_void0;
  if (!losses.empty()) k_void0 = k_void;
  constrain_matrix(k_ref, outer);
  constrain_matrix(k_void, fixed_void);

  t0 = Clock::now();
  report("analyse", 0);
  // The two models at the same time, one per core, where the solver allows it and the second
  // model's working set fits: for the iterative solver a copy of the matrix and its multigrid
  // hierarchy, measured at 22 bytes per nonzero of the full pattern (docs/benchmarks.md);
  // 30 are asked for.
  const double n_dofs = static_cast<double>(nd);
  const double second_model_bytes = 30.0 * (2.0 * static_cast<double>(k_void.nonZeros()) - n_dofs);
  const bool in_parallel = p.models_in_parallel && solvers_run_concurrently(p.solver, n_dofs, d) &&
                           second_model_bytes < 0.8 * available_memory_bytes();
  const SolverSlot first_slot{0, in_parallel ? 1 : 0}, second_slot{1, 1};
  const auto solver = make_spd_solver(p.solver, n_dofs, d, &m.nodes, first_slot);
  const auto second = in_parallel ? make_spd_solver(p.solver, n_dofs, d, &m.nodes, second_slot) : nullptr;
  SpdSolver& void_solver = second ? *second : *solver;
  {
    // The two matrices differ only on the nodes of void cells: wall nodes (shared with the
    // ground around) and inner ones.
    std::vector<char> in_void(m.n_nodes(), 0), in_host(m.n_nodes(), 0);
    for (std::size_t c = 0; c < nc; ++c)
      for (int a = 0; a < m.npc(); ++a)
        (res.voided.active[c] ? in_host : in_void)[static_cast<std::size_t>(m.cell(c)[a])] = 1;
    std::vector<int> wall, inner;
    for (std::size_t i = 0; i < m.n_nodes(); ++i)
      if (in_void[i]) (in_host[i] ? wall : inner).push_back(static_cast<int>(i));
    solver->set_variable_nodes(wall, inner);
  }
  solver->analyze(k_ref);
  if (second) second->analyze(k_void);
  res.timings.analyse = seconds_since(t0);

  // Each model keeps its own clock.
  StaticTimings ref_time, void_time;
  auto factor = [&](SpdSolver& s, const SparseMatrix& k, const char* name, bool variant, StaticTimings& time) {
    auto tf = Clock::now();
    report(std::string("factorise ") + name, 0);
    try {
      if (variant)
        s.factorize_variant(k);
      else
        s.factorize(k);
    } catch (const std::runtime_error&) {
      throw SolveFailure(std::string("the ") + name +
                         " stiffness matrix is not positive definite: part of the model is free to move"
                         " (a detached block of ground, or a void cutting the model in two?)");
    }
    time.factorize += seconds_since(tf);
  };
  auto solve_with = [](SpdSolver& s, const Vector& b, const char* model) {
    try {
      return s.solve(b);
    } catch (const std::runtime_error& e) {
      throw SolveFailure(std::string(model) + ": " + e.what());
    }
  };

  auto solve_reference = [&] {
    factor(*solver, k_ref, "reference", false, ref_time);
    const auto ts = Clock::now();
    const Vector zero;
    const Vector rhs_ref = constrained_rhs(k_ref, k_ref, outer, f_ref, zero);
    res.reference.u = solve_with(*solver, rhs_ref, "model without voids");
    res.reference.residual = relative_residual(k_ref, res.reference.u, rhs_ref);
    res.reference.load_norm = rhs_ref.norm();
    ref_time.solve += seconds_since(ts);
    if (!(res.reference.residual < max_relative_residual))
      throw SolveFailure(residual_message("model without voids", res.reference.residual));
  };

  auto solve_voided = [&] {
    factor(void_solver, k_void, "with voids", !second, void_time);
    const auto ts = Clock::now();
    auto solve = [&](const Vector& b) { return solve_with(void_solver, b, "model with voids"); };
    Vector g = Vector::Zero(nd);
    for (const Loss& l : losses) {
      const VoidLoad& vl = p.voids[static_cast<std::size_t>(l.void_id)];
      for (int n : l.nodes) {
        std::array<double, 3> r{m.nodes[n][0] - vl.cx, m.nodes[n][1] - vl.cy, m.nodes[n][2] - vl.cz};
        const double along = r[0] * vl.axis[0] + r[1] * vl.axis[1] + r[2] * vl.axis[2];
        for (int i = 0; i < 3; ++i) r[i] -= along * vl.axis[i];  // toward the axis line, if any
        if (d == 2) {
          g[2 * n] = -l.eps * r[0];
          g[2 * n + 1] = -l.eps * r[2];
        } else {
          for (int j = 0; j < 3; ++j) g[3 * n + j] = -l.eps * r[static_cast<std::size_t>(j)];
        }
      }
    }
    Vector rhs = constrained_rhs(k_void0.size() ? k_void0 : k_void, k_void, fixed_void, f_void, g);
    Vector u = solve(rhs);
    res.voided.wall_translation.assign(static_cast<std::size_t>(m.n_voids), {0.0, 0.0, 0.0});
    const bool any_free = std::any_of(losses.begin(), losses.end(), [&](const Loss& l) {
      return p.voids[static_cast<std::size_t>(l.void_id)].wall_free;
    });
    if (any_free) {
      // Superpose unit wall translations so that each wall carries no net force (the void is
      // free to move, as in Verruijt & Booker 1996).
      const bool axi = p.kinematics == Kinematics::axisymmetric;
      std::vector<std::pair<std::size_t, int>> modes;  // (loss index, dof direction)
      for (std::size_t i = 0; i < losses.size(); ++i)
        if (p.voids[static_cast<std::size_t>(losses[i].void_id)].wall_free)
          for (int j = axi ? 1 : 0; j < d; ++j) modes.push_back({i, j});
      auto net_force = [&](const Vector& uu, const Vector& ff) {
        const Vector r = k_void0.selfadjointView<Eigen::Lower>() * uu - ff;
        Vector out(static_cast<Eigen::Index>(modes.size()));
        for (std::size_t q = 0; q < modes.size(); ++q) {
          double s = 0;
          for (int n : losses[modes[q].first].nodes) s += r[d * n + modes[q].second];
          out[static_cast<Eigen::Index>(q)] = s;
        }
        return out;
      };
      const auto nq = static_cast<Eigen::Index>(modes.size());
      Eigen::MatrixXd a(nq, nq);
      std::vector<Vector> unit_u, unit_rhs;
      for (std::size_t q = 0; q < modes.size(); ++q) {
        Vector gq = Vector::Zero(nd);
        for (int n : losses[modes[q].first].nodes) gq[d * n + modes[q].second] = 1.0;
        unit_rhs.push_back(constrained_rhs(k_void0, k_void, fixed_void, Vector::Zero(nd), gq));
        unit_u.push_back(solve(unit_rhs.back()));
        a.col(static_cast<Eigen::Index>(q)) = net_force(unit_u.back(), Vector::Zero(nd));
      }
      const Vector t = a.fullPivLu().solve(-net_force(u, f_void));
      for (std::size_t q = 0; q < modes.size(); ++q) {
        const double tq = t[static_cast<Eigen::Index>(q)];
        u += tq * unit_u[q];
        rhs += tq * unit_rhs[q];
        const int dir = d == 2 && modes[q].second == 1 ? 2 : modes[q].second;  // 2D dof 1 is z
        res.voided.wall_translation[static_cast<std::size_t>(losses[modes[q].first].void_id)][static_cast<std::size_t>(dir)] = tq;
      }
    }
    res.voided.u = std::move(u);
    res.voided.residual = relative_residual(k_void, res.voided.u, rhs);
    res.voided.load_norm = rhs.norm();
    void_time.solve += seconds_since(ts);
    if (!(res.voided.residual < max_relative_residual))
      throw SolveFailure(residual_message("model with voids", res.voided.residual));
  };

  if (second) {
    // The model with voids on a second thread; the first error (the reference's first) wins.
    const auto both = Clock::now();
    auto job = std::async(std::launch::async, solve_voided);
    std::exception_ptr reference_error;
    try {
      solve_reference();
    } catch (...) {
      reference_error = std::current_exception();
    }
    job.wait();
    if (reference_error) std::rethrow_exception(reference_error);
    job.get();
    // The phases overlap: the longer set-up, and the rest of the time the two took.
    res.timings.factorize = std::max(ref_time.factorize, void_time.factorize);
    res.timings.solve = seconds_since(both) - res.timings.factorize;
  } else {
    solve_reference();
    solve_voided();
    res.timings.factorize = ref_time.factorize + void_time.factorize;
    res.timings.solve = ref_time.solve + void_time.solve;
  }
  res.models_in_parallel = second != nullptr;
  res.factor_nonzeros = std::max(solver->factor_nonzeros(), void_solver.factor_nonzeros());
  res.iterations = solver->total_iterations + (second ? second->total_iterations : 0);
  // Named after the set-up: the iterative solver knows its method only then.
  res.solver = solver->name();
  if (!solver->variant_method.empty()) res.solver += "; model with voids: " + solver->variant_method;
  if (second) res.solver += "; the two models at once, one per core";
  report("stresses", 0);
  centroid_fields(p, res.reference);
  centroid_fields(p, res.voided);
  report("stresses", 1);
  return res;
}

std::vector<Sym6> nodal_stress(const StaticProblem& p, const ModelSolution& s) {
  const mesh::Mesh& m = *p.mesh;
  const int npc = m.npc();
  std::vector<Sym6> sum(m.n_nodes(), Sym6{});
  std::vector<int> count(m.n_nodes(), 0);
  const auto refs = node_reference_points(m.type);
  const auto rc = reference_centroid(m.type);
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (!s.active[c]) continue;
    const int* v = m.cell(c);
    const auto ue = cell_unknowns(p, s.u, c);
    const Elastic& mat = p.layers[static_cast<std::size_t>(m.layer[c])].elastic;
    for (int a = 0; a < npc; ++a) {
      ShapeAt sh = shape_at(m, c, refs[a][0], refs[a][1], refs[a][2]);
      // On the axis u_r/r → ∂u_r/∂r; evaluate the hoop strain just off it.
      if (p.kinematics == Kinematics::axisymmetric && sh.x <= 0) {
        const double w = 1e-3;
        sh = shape_at(m, c, (1 - w) * refs[a][0] + w * rc[0], (1 - w) * refs[a][1] + w * rc[1], 0);
      }
      const Sym6 sg = hooke(mat, strain_at(sh, ue.data(), p.kinematics));
      for (int i = 0; i < 6; ++i) sum[v[a]][i] += sg[i];
      ++count[v[a]];
    }
  }
  for (std::size_t n = 0; n < sum.size(); ++n)
    if (count[n])
      for (int i = 0; i < 6; ++i) sum[n][i] /= count[n];
  return sum;
}

}  // namespace voidsign::solver
