// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/static.hpp"

#include <omp.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <sstream>

#include <Eigen/Dense>

#include "solver/la/cholesky.hpp"

namespace voidsign::solver {

namespace {

using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

constexpr double gauss3_x[3] = {-0.774596669241483, 0.0, 0.774596669241483};
constexpr double gauss3_w[3] = {5.0 / 9, 8.0 / 9, 5.0 / 9};

// A point on a boundary facet at parameter t ∈ [−1, 1]: position, tangent dx/dt, and shapes.
struct FacetPoint {
  double x, z, tx, tz;
  double N[3];
};

FacetPoint facet_point(const mesh::Mesh& m, const mesh::Facet& f, double t) {
  FacetPoint fp{};
  const bool quad = m.type == mesh::CellType::tri6;
  double dN[3];
  if (quad) {
    fp.N[0] = 0.5 * t * (t - 1); fp.N[1] = 0.5 * t * (t + 1); fp.N[2] = 1 - t * t;
    dN[0] = t - 0.5; dN[1] = t + 0.5; dN[2] = -2 * t;
  } else {
    fp.N[0] = 0.5 * (1 - t); fp.N[1] = 0.5 * (1 + t); fp.N[2] = 0;
    dN[0] = -0.5; dN[1] = 0.5; dN[2] = 0;
  }
  for (int a = 0; a < (quad ? 3 : 2); ++a) {
    const auto& p = m.nodes[f.nodes[a]];
    fp.x += fp.N[a] * p[0];
    fp.z += fp.N[a] * p[2];
    fp.tx += dN[a] * p[0];
    fp.tz += dN[a] * p[2];
  }
  return fp;
}

// Integrates a traction t(x, z, n) over facet parameter range [t0, t1] into f.
template <class Traction>
void add_facet_traction(const mesh::Mesh& m, const mesh::Facet& f, Kinematics kin, double t0, double t1,
                        int n_sub, Traction traction, Vector& rhs) {
  const int nn = m.type == mesh::CellType::tri6 ? 3 : 2;
  // Outward normal of the solid: the one pointing away from its cell's centroid.
  const int* v = m.cell(static_cast<std::size_t>(f.cell));
  double cx = 0, cz = 0;
  for (int a = 0; a < 3; ++a) {
    cx += m.nodes[v[a]][0] / 3;
    cz += m.nodes[v[a]][2] / 3;
  }
  for (int sub = 0; sub < n_sub; ++sub) {
    const double a0 = t0 + (t1 - t0) * sub / n_sub, a1 = t0 + (t1 - t0) * (sub + 1) / n_sub;
    for (int g = 0; g < 3; ++g) {
      const double t = 0.5 * (a0 + a1) + 0.5 * (a1 - a0) * gauss3_x[g];
      const FacetPoint fp = facet_point(m, f, t);
      const double len = std::hypot(fp.tx, fp.tz);
      double nx = fp.tz / len, nz = -fp.tx / len;
      const auto& mid = m.nodes[f.nodes[0]];
      if (nx * (mid[0] - cx) + nz * (mid[2] - cz) < 0) { nx = -nx; nz = -nz; }
      double w = gauss3_w[g] * 0.5 * (a1 - a0) * len;
      if (kin == Kinematics::axisymmetric) w *= fp.x;
      const auto [trx, trz] = traction(fp.x, fp.z, nx, nz);
      for (int a = 0; a < nn; ++a) {
        rhs[2 * f.nodes[a]] += w * fp.N[a] * trx;
        rhs[2 * f.nodes[a] + 1] += w * fp.N[a] * trz;
      }
    }
  }
}

// Fixed dofs from the outer boundary conditions.
std::vector<char> outer_constraints(const StaticProblem& p) {
  const mesh::Mesh& m = *p.mesh;
  std::vector<char> fixed(2 * m.n_nodes(), 0);
  auto apply = [&](int node, Support s, bool normal_is_x) {
    if (s == Support::free) return;
    if (s == Support::fixed) {
      fixed[2 * node] = fixed[2 * node + 1] = 1;
    } else {
      fixed[2 * node + (normal_is_x ? 0 : 1)] = 1;
    }
  };
  const int nn = m.type == mesh::CellType::tri6 ? 3 : 2;
  for (const mesh::Facet& f : m.facets)
    for (int a = 0; a < nn; ++a) {
      const int node = f.nodes[a];
      switch (f.kind) {
        case mesh::FacetKind::left:
          // In an axisymmetric model the left edge is the axis: u_r = 0 there, always.
          apply(node, p.kinematics == Kinematics::axisymmetric ? Support::roller : p.boundaries.sides, true);
          break;
        case mesh::FacetKind::right: apply(node, p.boundaries.sides, true); break;
        case mesh::FacetKind::bottom: apply(node, p.boundaries.bottom, false); break;
        case mesh::FacetKind::surface: apply(node, p.boundaries.top, false); break;
        case mesh::FacetKind::void_wall: break;
      }
    }
  return fixed;
}

struct InitialCtx {
  const InitialStress* fn;
  int layer;
};

Voigt4 initial_at(double x, double z, const void* ctx) {
  const auto* c = static_cast<const InitialCtx*>(ctx);
  return (*c->fn)(x, z, c->layer);
}

// Loads acting on the cells and boundary of one model.
Vector model_load(const StaticProblem& p, const std::vector<char>& active, bool with_voids) {
  const mesh::Mesh& m = *p.mesh;
  const int npc = m.npc();
  const long nc = static_cast<long>(m.n_cells());
  Vector f = Vector::Zero(2 * static_cast<Eigen::Index>(m.n_nodes()));
  const int n_threads = omp_get_max_threads();
  std::vector<Vector> partial(static_cast<std::size_t>(n_threads), Vector::Zero(f.size()));
#pragma omp parallel
  {
    Vector& mine = partial[static_cast<std::size_t>(omp_get_thread_num())];
    std::vector<double> fe(static_cast<std::size_t>(2 * npc));
#pragma omp for schedule(static)
    for (long c = 0; c < nc; ++c) {
      if (!active[c]) continue;
      const auto cu = static_cast<std::size_t>(c);
      std::fill(fe.begin(), fe.end(), 0.0);
      const LayerProps& lp = p.layers[static_cast<std::size_t>(m.layer[cu])];
      if (p.body_force) add_body_force(m, cu, p.kinematics, 0.0, -lp.elastic.density * p.gravity, fe);
      if (p.initial_stress) {
        // Internal force of the in-situ stress enters with a minus sign (K u = F − ∫Bᵀσ₀).
        std::vector<double> fs(fe.size(), 0.0);
        InitialCtx ctx{&p.initial_stress, m.layer[cu]};
        add_stress_divergence(m, cu, p.kinematics, initial_at, &ctx, fs);
        for (std::size_t i = 0; i < fe.size(); ++i) fe[i] -= fs[i];
      }
      const int* v = m.cell(cu);
      for (int a = 0; a < npc; ++a) {
        mine[2 * v[a]] += fe[2 * a];
        mine[2 * v[a] + 1] += fe[2 * a + 1];
      }
    }
  }
  for (const Vector& part : partial) f += part;

  for (const mesh::Facet& fc : m.facets) {
    if (fc.kind == mesh::FacetKind::surface) {
      const double xa = m.nodes[fc.nodes[0]][0], xb = m.nodes[fc.nodes[1]][0];
      for (const SurfacePressure& s : p.surface) {
        // The surface is straight, so x is linear in t: clip the facet to the loaded range.
        const double lo = std::max(s.from, std::min(xa, xb)), hi = std::min(s.to, std::max(xa, xb));
        if (hi <= lo) continue;
        auto t_of = [&](double x) { return -1 + 2 * (x - xa) / (xb - xa); };
        double t0 = t_of(lo), t1 = t_of(hi);
        if (t0 > t1) std::swap(t0, t1);
        add_facet_traction(m, fc, p.kinematics, t0, t1, 1,
                           [&](double, double, double, double) { return std::pair{0.0, -s.pressure}; }, f);
      }
    } else if (fc.kind == mesh::FacetKind::void_wall && with_voids) {
      const VoidLoad& vl = p.voids[static_cast<std::size_t>(fc.void_id)];
      if (vl.contents == VoidLoad::Contents::empty) continue;
      auto pressure_at = [&](double z) {
        if (vl.contents == VoidLoad::Contents::pressure) return vl.pressure;
        return z < vl.water_table_z ? water_density * p.gravity * (vl.water_table_z - z) : 0.0;
      };
      // Pressure p acts on the solid as traction −p n (n: outward normal of the solid).
      add_facet_traction(m, fc, p.kinematics, -1, 1, vl.contents == VoidLoad::Contents::water ? 4 : 1,
                         [&](double, double z, double nx, double nz) {
                           const double pr = pressure_at(z);
                           return std::pair{-pr * nx, -pr * nz};
                         },
                         f);
    }
  }
  return f;
}

std::vector<int> wall_nodes_of(const mesh::Mesh& m, int void_id) {
  std::vector<int> nodes;
  const int nn = m.type == mesh::CellType::tri6 ? 3 : 2;
  for (const mesh::Facet& f : m.facets)
    if (f.kind == mesh::FacetKind::void_wall && f.void_id == void_id)
      for (int a = 0; a < nn; ++a) nodes.push_back(f.nodes[a]);
  std::sort(nodes.begin(), nodes.end());
  nodes.erase(std::unique(nodes.begin(), nodes.end()), nodes.end());
  return nodes;
}

void centroid_fields(const StaticProblem& p, ModelSolution& s) {
  const mesh::Mesh& m = *p.mesh;
  const std::size_t nc = m.n_cells();
  const int npc = m.npc();
  s.strain.assign(nc, Voigt4{});
  s.stress.assign(nc, Voigt4{});
  s.stress_total.assign(nc, Voigt4{});
#pragma omp parallel for schedule(static)
  for (long cl = 0; cl < static_cast<long>(nc); ++cl) {
    const auto c = static_cast<std::size_t>(cl);
    const ShapeAt sh = shape_at(m, c, 1.0 / 3, 1.0 / 3);
    const Voigt4 s0 = p.initial_stress ? p.initial_stress(sh.x, sh.z, m.layer[c]) : Voigt4{};
    if (!s.active[c]) {
      constexpr double nan = std::numeric_limits<double>::quiet_NaN();
      s.strain[c] = s.stress[c] = s.stress_total[c] = Voigt4{nan, nan, nan, nan};
      continue;
    }
    double ue[12];
    const int* v = m.cell(c);
    for (int a = 0; a < npc; ++a) {
      ue[2 * a] = s.u[2 * v[a]];
      ue[2 * a + 1] = s.u[2 * v[a] + 1];
    }
    s.strain[c] = strain_at(sh, ue, p.kinematics);
    s.stress[c] = hooke(p.layers[static_cast<std::size_t>(m.layer[c])].elastic, s.strain[c]);
    for (int i = 0; i < 4; ++i) s.stress_total[c][i] = s0[i] + s.stress[c][i];
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
             double, double z, int layer) -> Voigt4 {
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
    return {kk * szz, szz, 0.0, kk * szz};
  };
}

StaticResult solve_static(const StaticProblem& p, const Progress& progress) {
  const mesh::Mesh& m = *p.mesh;
  const std::size_t nc = m.n_cells();
  const Eigen::Index nd = 2 * static_cast<Eigen::Index>(m.n_nodes());
  auto report = [&](std::string_view step, double frac) {
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
  SparseMatrix k_void = k_ref;  // same pattern: one symbolic analysis serves both models
  assemble_stiffness(m, p.kinematics, res.reference.active, material_of, k_ref);
  report("assemble", 0.5);
  assemble_stiffness(m, p.kinematics, res.voided.active, material_of, k_void);
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
        for (int a = 0; a < m.npc(); ++a) touched[m.cell(c)[a]] = 1;
    for (std::size_t i = 0; i < m.n_nodes(); ++i)
      if (!touched[i]) fixed_void[2 * i] = fixed_void[2 * i + 1] = 1;
  }
  // Ground loss: the wall of void k moves by −ε (x − c) + t_k, with t_k set by zero net force.
  struct Loss { int void_id; std::vector<int> nodes; double eps; };
  std::vector<Loss> losses;
  for (int k = 0; k < m.n_voids; ++k) {
    const VoidLoad& vl = p.voids[static_cast<std::size_t>(k)];
    if (vl.volume_loss <= 0) continue;
    const double dim = p.kinematics == Kinematics::axisymmetric ? 3.0 : 2.0;
    Loss l{k, wall_nodes_of(m, k), 1.0 - std::pow(1.0 - vl.volume_loss, 1.0 / dim)};
    for (int n : l.nodes) fixed_void[2 * n] = fixed_void[2 * n + 1] = 1;
    losses.push_back(std::move(l));
  }
  for (std::size_t i = 0; i < outer.size(); ++i)
    if (outer[i] && !fixed_void[i]) fixed_void[i] = 1;

  SparseMatrix k_void0;
  if (!losses.empty()) k_void0 = k_void;
  constrain_matrix(k_ref, outer);
  constrain_matrix(k_void, fixed_void);

  t0 = Clock::now();
  report("analyse", 0);
  Cholesky chol;
  chol.analyze(k_ref);
  res.timings.analyse = seconds_since(t0);

  auto factor = [&](const SparseMatrix& k, const char* name) {
    auto tf = Clock::now();
    report(std::string("factorise ") + name, 0);
    if (chol.factorize(k) != Status::ok)
      throw SolveFailure(std::string("the ") + name +
                         " stiffness matrix is not positive definite: part of the model is free to move"
                         " (a detached block of ground, or a void cutting the model in two?)");
    res.timings.factorize += seconds_since(tf);
    res.factor_nonzeros = std::max(res.factor_nonzeros, chol.factor_nonzeros());
  };

  // Model without voids.
  factor(k_ref, "reference");
  auto ts = Clock::now();
  const Vector zero;
  const Vector rhs_ref = constrained_rhs(k_ref, k_ref, outer, f_ref, zero);
  res.reference.u = chol.solve(rhs_ref);
  res.reference.residual = relative_residual(k_ref, res.reference.u, rhs_ref);
  res.reference.load_norm = rhs_ref.norm();
  res.timings.solve += seconds_since(ts);
  if (!(res.reference.residual < max_relative_residual))
    throw SolveFailure(residual_message("model without voids", res.reference.residual));

  // Model with voids.
  factor(k_void, "with voids");
  ts = Clock::now();
  Vector g = Vector::Zero(nd);
  for (const Loss& l : losses) {
    const VoidLoad& vl = p.voids[static_cast<std::size_t>(l.void_id)];
    for (int n : l.nodes) {
      g[2 * n] = -l.eps * (m.nodes[n][0] - vl.cx);
      g[2 * n + 1] = -l.eps * (m.nodes[n][2] - vl.cz);
    }
  }
  Vector rhs = constrained_rhs(k_void0.size() ? k_void0 : k_void, k_void, fixed_void, f_void, g);
  Vector u = chol.solve(rhs);
  res.voided.wall_translation.assign(static_cast<std::size_t>(m.n_voids), {0.0, 0.0});
  const bool any_free = std::any_of(losses.begin(), losses.end(), [&](const Loss& l) {
    return p.voids[static_cast<std::size_t>(l.void_id)].wall_free;
  });
  if (any_free) {
    // Superpose unit wall translations so that each wall carries no net force (the void is
    // free to move, as in Verruijt & Booker 1996).
    const bool axi = p.kinematics == Kinematics::axisymmetric;
    std::vector<std::pair<std::size_t, int>> modes;  // (loss index, direction)
    for (std::size_t i = 0; i < losses.size(); ++i)
      if (p.voids[static_cast<std::size_t>(losses[i].void_id)].wall_free)
        for (int d = axi ? 1 : 0; d < 2; ++d) modes.push_back({i, d});
    auto net_force = [&](const Vector& uu, const Vector& ff) {
      const Vector r = k_void0.selfadjointView<Eigen::Lower>() * uu - ff;
      Vector out(static_cast<Eigen::Index>(modes.size()));
      for (std::size_t q = 0; q < modes.size(); ++q) {
        double s = 0;
        for (int n : losses[modes[q].first].nodes) s += r[2 * n + modes[q].second];
        out[static_cast<Eigen::Index>(q)] = s;
      }
      return out;
    };
    const auto nq = static_cast<Eigen::Index>(modes.size());
    Eigen::MatrixXd a(nq, nq);
    std::vector<Vector> unit_u, unit_rhs;
    for (std::size_t q = 0; q < modes.size(); ++q) {
      Vector gq = Vector::Zero(nd);
      for (int n : losses[modes[q].first].nodes) gq[2 * n + modes[q].second] = 1.0;
      unit_rhs.push_back(constrained_rhs(k_void0, k_void, fixed_void, Vector::Zero(nd), gq));
      unit_u.push_back(chol.solve(unit_rhs.back()));
      a.col(static_cast<Eigen::Index>(q)) = net_force(unit_u.back(), Vector::Zero(nd));
    }
    const Vector t = a.fullPivLu().solve(-net_force(u, f_void));
    for (std::size_t q = 0; q < modes.size(); ++q) {
      const double tq = t[static_cast<Eigen::Index>(q)];
      u += tq * unit_u[q];
      rhs += tq * unit_rhs[q];
      res.voided.wall_translation[static_cast<std::size_t>(losses[modes[q].first].void_id)][modes[q].second] = tq;
    }
  }
  res.voided.u = std::move(u);
  res.voided.residual = relative_residual(k_void, res.voided.u, rhs);
  res.voided.load_norm = rhs.norm();
  res.timings.solve += seconds_since(ts);
  if (!(res.voided.residual < max_relative_residual))
    throw SolveFailure(residual_message("model with voids", res.voided.residual));

  report("stresses", 0);
  centroid_fields(p, res.reference);
  centroid_fields(p, res.voided);
  report("stresses", 1);
  return res;
}

std::vector<Voigt4> nodal_stress(const StaticProblem& p, const ModelSolution& s) {
  const mesh::Mesh& m = *p.mesh;
  const int npc = m.npc();
  std::vector<Voigt4> sum(m.n_nodes(), Voigt4{});
  std::vector<int> count(m.n_nodes(), 0);
  const auto refs = node_reference_points(m.type);
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (!s.active[c]) continue;
    const int* v = m.cell(c);
    double ue[12];
    for (int a = 0; a < npc; ++a) {
      ue[2 * a] = s.u[2 * v[a]];
      ue[2 * a + 1] = s.u[2 * v[a] + 1];
    }
    const Elastic& mat = p.layers[static_cast<std::size_t>(m.layer[c])].elastic;
    for (int a = 0; a < npc; ++a) {
      ShapeAt sh = shape_at(m, c, refs[a][0], refs[a][1]);
      // On the axis u_r/r → ∂u_r/∂r; evaluate the hoop strain just off it.
      if (p.kinematics == Kinematics::axisymmetric && sh.x <= 0) {
        const double r = refs[a][0] * 0.999 + 1e-3 / 3, t = refs[a][1] * 0.999 + 1e-3 / 3;
        sh = shape_at(m, c, r, t);
      }
      const Voigt4 sg = hooke(mat, strain_at(sh, ue, p.kinematics));
      for (int i = 0; i < 4; ++i) sum[v[a]][i] += sg[i];
      ++count[v[a]];
    }
  }
  for (std::size_t n = 0; n < sum.size(); ++n)
    if (count[n])
      for (int i = 0; i < 4; ++i) sum[n][i] /= count[n];
  return sum;
}

}  // namespace voidsign::solver
