// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/verify/verify.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/signature.hpp"
#include "solver/analysis/static.hpp"
#include "solver/analytic/analytic.hpp"
#include "solver/la/cholesky.hpp"

namespace voidsign::cli {

namespace an = solver::analytic;
using solver::Sym6;

namespace {

constexpr const char* src_kirsch =
    "Kirsch (1898); Brady & Brown (2004) eq. 6.18 - verified from the textbook";
constexpr const char* src_vb =
    "Verruijt & Booker (1996) surface formula - form from memory, checked mathematically";
constexpr const char* src_mogi = "Mogi (1958) with McTigue (1987) correction - verified against independent implementations";
constexpr const char* src_bous = "Boussinesq (1885); Timoshenko & Goodier (1970): w0 = 2qa(1-nu^2)/E";
constexpr const char* src_litho = "lithostatic column: szz = -rho g |z|, sxx = k0 szz (equilibrium)";

mesh::VoidOutline circle(double cx, double cz, double r) {
  mesh::VoidOutline v;
  v.kind = mesh::VoidOutline::Kind::circle;
  v.cx = cx;
  v.cz = cz;
  v.radius = r;
  return v;
}

solver::LayerProps layer(double young, double nu, double rho, double k0 = 0.5) {
  solver::LayerProps lp;
  lp.elastic = {young, nu, rho};
  lp.k0 = k0;
  return lp;
}

// Node of the void wall nearest to angle theta (from +x toward +z) about (cx, cz).
int wall_node_at(const mesh::Mesh& m, double cx, double cz, double a, double theta, double* theta_node) {
  int best = -1;
  double best_d = 1e300;
  for (std::size_t n = 0; n < m.n_nodes(); ++n) {
    const double dx = m.nodes[n][0] - cx, dz = m.nodes[n][2] - cz;
    if (std::abs(std::hypot(dx, dz) - a) > 1e-6 * a) continue;
    const double d = std::abs(std::remainder(std::atan2(dz, dx) - theta, 2 * std::numbers::pi));
    if (d < best_d) {
      best_d = d;
      best = static_cast<int>(n);
      *theta_node = std::atan2(dz, dx);
    }
  }
  return best;
}

// Hoop stress at a wall node from Cartesian total stress (x–z plane).
double hoop(const Sym6& s, double theta) {
  const double c = std::cos(theta), sn = std::sin(theta);
  return s[0] * sn * sn + s[2] * c * c - 2 * s[5] * sn * c;
}

struct KirschModel {
  mesh::Mesh mesh;
  solver::StaticProblem problem;
  solver::StaticResult result;
};

// A hole of radius a at the centre of a square block 200 a wide, all sides on rollers, loaded by a
// uniform in-situ stress (sxx, szz) released at the hole.
void solve_kirsch(KirschModel& k, double a, double sxx, double szz, double young, double nu) {
  const double w = 200 * a;
  mesh::Geometry2D g;
  g.width = w;
  g.depth = w;
  g.voids = {circle(0, -w / 2, a)};
  g.sizing = {w / 20, a / 40, w / 20, 2, 0.2};
  k.mesh = mesh::build_mesh_2d(g);
  k.problem.mesh = &k.mesh;
  k.problem.layers = {layer(young, nu, 0)};
  k.problem.voids = {solver::VoidLoad{}};
  k.problem.voids[0].cz = -w / 2;
  k.problem.initial_stress = [sxx, szz, nu](double, double, double, int) { return Sym6{sxx, nu * (sxx + szz), szz, 0, 0, 0}; };
  k.problem.boundaries = {solver::Support::roller, solver::Support::roller, solver::Support::roller};
  k.result = solver::solve_static(k.problem);
}

std::vector<VerifyRow> kirsch_uniaxial() {
  const double a = 1, S = -10e6, E = 20e9, nu = 0.25;
  KirschModel k;
  solve_kirsch(k, a, S, 0, E, nu);
  const auto ns = solver::nodal_stress(k.problem, k.result.voided);
  const an::KirschCase kc{a, S, 0, an::shear_modulus(E, nu), nu, 0};
  std::vector<VerifyRow> rows;
  for (double deg : {90.0, 0.0}) {
    double th = 0;
    const int n = wall_node_at(k.mesh, 0, -100 * a, a, deg * std::numbers::pi / 180, &th);
    Sym6 total = ns[static_cast<std::size_t>(n)];
    total[0] += S;
    rows.push_back(compare("kirsch-uniaxial", "hoop stress at wall, theta=" + std::to_string(int(deg)) + " deg [Pa]",
                           hoop(total, th), an::kirsch_at(kc, a, th).stt_pa, 0.01, src_kirsch));
  }
  return rows;
}

std::vector<VerifyRow> kirsch_hydrostatic() {
  const double a = 1, p = -10e6, E = 20e9, nu = 0.25;
  KirschModel k;
  solve_kirsch(k, a, p, p, E, nu);
  const auto ns = solver::nodal_stress(k.problem, k.result.voided);
  const an::KirschCase kc{a, p, p, an::shear_modulus(E, nu), nu, 0};
  double th = 0;
  const int n = wall_node_at(k.mesh, 0, -100 * a, a, std::numbers::pi / 4, &th);
  Sym6 total = ns[static_cast<std::size_t>(n)];
  total[0] += p;
  total[2] += p;
  const double ux = k.result.voided.u[2 * n], uz = k.result.voided.u[2 * n + 1];
  const double ur = ux * std::cos(th) + uz * std::sin(th);
  return {compare("kirsch-hydrostatic", "hoop stress at wall [Pa]", hoop(total, th), an::kirsch_at(kc, a, th).stt_pa, 0.01,
                  src_kirsch),
          compare("kirsch-hydrostatic", "radial wall displacement [m]", ur, an::kirsch_at(kc, a, th).ur_m, 0.01, src_kirsch)};
}

std::vector<VerifyRow> mogi_mctigue() {
  const double a = 2.5, d = 10, dp = 10e6, E = 10e9, nu = 0.25;
  const double w = 80 * d;  // radius 40 d
  mesh::Geometry2D g;
  g.axisymmetric = true;
  g.width = w;
  g.depth = 40 * d;
  g.voids = {circle(0, -d, a)};
  g.sizing = {d, a / 25, d / 20, 2, 0.2};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::StaticProblem p;
  p.mesh = &m;
  p.kinematics = solver::Kinematics::axisymmetric;
  p.layers = {layer(E, nu, 0)};
  solver::VoidLoad vl;
  vl.contents = solver::VoidLoad::Contents::pressure;
  vl.pressure = dp;
  vl.cz = -d;
  p.voids = {vl};
  const auto r = solver::solve_static(p);
  const auto prof = solver::surface_profile(m, r);
  const an::SphereSource src{a, d, dp, an::shear_modulus(E, nu), nu, true};
  std::vector<VerifyRow> rows;
  for (double x : {0.0, d, 2 * d}) {
    const auto it = std::min_element(prof.begin(), prof.end(), [&](auto& l, auto& rr) { return std::abs(l.x - x) < std::abs(rr.x - x); });
    rows.push_back(compare("mogi-mctigue", "surface uz at r=" + std::to_string(int(x)) + " m (a/d=0.25) [m]", it->duz,
                           an::mogi_surface(src, it->x).uz_m, 0.02, src_mogi));
  }
  return rows;
}

std::vector<VerifyRow> boussinesq_circle() {
  const double q = 100e3, a = 1, E = 10e6, nu = 0.3;
  mesh::Geometry2D g;
  g.axisymmetric = true;
  g.width = 400 * a;
  g.depth = 200 * a;
  g.sizing = {10 * a, a / 20, a / 20, 2, 0.2};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::StaticProblem p;
  p.mesh = &m;
  p.kinematics = solver::Kinematics::axisymmetric;
  p.layers = {layer(E, nu, 0)};
  p.surface = {{.from = 0, .to = a, .pressure = q}};
  const auto r = solver::solve_static(p);
  const double uz0 = r.reference.u[2 * m.surface_nodes.front() + 1];
  return {compare("boussinesq-circle", "centre settlement under uniform circular load [m]", uz0,
                  an::circular_load_surface_uz(q, a, E, nu, 0), 0.02, src_bous)};
}

std::vector<VerifyRow> lithostatic() {
  const double w = 20, depth = 60;
  mesh::Geometry2D g;
  g.width = w;
  g.depth = depth;
  g.layer_thickness = {5, 20, 35};
  g.sizing = {4, 1, 1, 2, 0.2};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  std::vector<VerifyRow> rows;
  for (int in_situ = 0; in_situ < 2; ++in_situ) {
    std::vector<an::ColumnLayer> ref;
    const solver::StaticProblem p = lithostatic_column_problem(m, in_situ != 0, &ref);
    const auto r = solver::solve_static(p);
    for (std::size_t L = 0; L < ref.size(); ++L) {
      double err_zz = 0, err_xx = 0, worst_zz = 0, worst_ref_zz = 1, worst_xx = 0, worst_ref_xx = 1;
      for (std::size_t c = 0; c < m.n_cells(); ++c) {
        if (m.layer[c] != static_cast<int>(L)) continue;
        const auto sh = solver::shape_at(m, c, 1.0 / 3, 1.0 / 3);
        const auto e = an::lithostatic_stress(ref, sh.z);
        const Sym6& s = r.reference.stress_total[c];
        const double ezz = std::abs(s[2] - e.szz_pa) / std::abs(e.szz_pa);
        const double exx = std::abs(s[0] - e.sxx_pa) / std::abs(e.sxx_pa);
        if (ezz > err_zz) { err_zz = ezz; worst_zz = s[2]; worst_ref_zz = e.szz_pa; }
        if (exx > err_xx) { err_xx = exx; worst_xx = s[0]; worst_ref_xx = e.sxx_pa; }
      }
      const std::string tag = in_situ ? "in-situ k0=0.8" : "gravity switched on, k0=nu/(1-nu)";
      rows.push_back(compare(in_situ ? "lithostatic-insitu" : "lithostatic", "worst szz in layer " + std::to_string(L) + ", " + tag + " [Pa]",
                             worst_zz, worst_ref_zz, 1e-3, src_litho));
      rows.push_back(compare(in_situ ? "lithostatic-insitu" : "lithostatic", "worst sxx in layer " + std::to_string(L) + ", " + tag + " [Pa]",
                             worst_xx, worst_ref_xx, 1e-3, src_litho));
    }
  }
  return rows;
}

std::vector<VerifyRow> convergence() {
  std::vector<VerifyRow> rows;
  for (int order : {1, 2}) {
    const double h1 = 0.2, h2 = 0.1;
    const auto [ha, ea] = kirsch_l2_error(order, h1);
    const auto [hb, eb] = kirsch_l2_error(order, h2);
    const double rate = std::log(ea / eb) / std::log(ha / hb);
    VerifyRow row;
    row.case_name = "convergence-kirsch";
    row.quantity = std::string("L2 displacement error order, ") + (order == 1 ? "linear" : "quadratic") + " elements";
    row.computed = rate;
    row.reference = order + 1;
    row.rel_error = std::abs(rate - row.reference) / row.reference;
    row.tolerance = order == 1 ? 1.8 : 2.5;
    row.is_minimum = true;
    row.source = "Kirsch (1898) hydrostatic field, exact displacements on the outer boundary; a priori rate p+1";
    rows.push_back(row);
  }
  return rows;
}

}  // namespace

VerifyRow compare(std::string case_name, std::string quantity, double computed, double reference, double tol,
                  std::string source) {
  VerifyRow r;
  r.case_name = std::move(case_name);
  r.quantity = std::move(quantity);
  r.computed = computed;
  r.reference = reference;
  r.rel_error = std::abs(computed - reference) / std::abs(reference);
  r.tolerance = tol;
  r.source = std::move(source);
  return r;
}

solver::StaticProblem lithostatic_column_problem(const mesh::Mesh& m, bool in_situ, std::vector<an::ColumnLayer>* ref) {
  const std::vector<double> nus{0.3, 0.25, 0.2};
  *ref = {{5, 1700, 0}, {20, 2100, 0}, {0, 2600, 0}};
  solver::StaticProblem p;
  p.mesh = &m;
  p.kinematics = m.dim() == 3 ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
  for (std::size_t i = 0; i < ref->size(); ++i) {
    const double k0 = in_situ ? 0.8 : nus[i] / (1 - nus[i]);
    (*ref)[i].k0 = k0;
    p.layers.push_back(layer(1e8 * static_cast<double>(i + 1), nus[i], (*ref)[i].density_kg_m3, k0));
  }
  p.body_force = true;
  // A prescribed in-situ state with k0 = 0.8 must stay in equilibrium untouched.
  if (in_situ) p.initial_stress = solver::geostatic_stress({-5, -25, -60}, {1700, 2100, 2600}, {0.8, 0.8, 0.8});
  return p;
}

std::vector<VerifyRow> verruijt_booker_rows(double width_over_h) {
  const double R = 1, h = 10, nu = 0.25, E = 50e6, eps = 0.005;
  mesh::Geometry2D g;
  g.width = width_over_h * h;
  g.depth = std::max(0.5 * width_over_h, 5.0) * h;
  g.voids = {circle(0, -h, R)};
  g.sizing = {std::min(g.width / 40, 40.0), R / 15, h / 20, 2, 0.2};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::StaticProblem p;
  p.mesh = &m;
  p.layers = {layer(E, nu, 0)};
  solver::VoidLoad vl;
  vl.cz = -h;
  vl.volume_loss = 1 - (1 - eps) * (1 - eps);  // wall moves in by exactly eps R
  p.voids = {vl};
  const auto r = solver::solve_static(p);
  const auto prof = solver::surface_profile(m, r);
  const an::TunnelCase tc{R, h, nu, eps, 0};
  std::vector<VerifyRow> rows;
  for (double x : {0.0, h}) {
    const auto it = std::min_element(prof.begin(), prof.end(), [&](auto& l, auto& rr) { return std::abs(l.x - x) < std::abs(rr.x - x); });
    rows.push_back(compare("verruijt-booker", "surface uz at x=" + std::to_string(int(x)) + " m, block " +
                                                  std::to_string(int(width_over_h)) + " h wide (R/h=0.1) [m]",
                           it->duz, an::verruijt_booker_surface(tc, it->x).uz_m, 0.05, src_vb));
  }
  return rows;
}

std::pair<double, double> kirsch_l2_error(int order, double h) {
  const double a = 1, w = 8, p0 = -10e6, E = 20e9, nu = 0.25, G = E / (2 * (1 + nu));
  mesh::Geometry2D g;
  g.width = w;
  g.depth = w;
  g.voids = {circle(0, -w / 2, a)};
  g.sizing = {h, h, h, order, 0.2};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::StaticProblem p;
  p.mesh = &m;
  p.layers = {layer(E, nu, 0)};
  p.voids = {solver::VoidLoad{}};
  const double cz = -w / 2;
  auto exact = [&](double x, double z) {
    // Excavation in a hydrostatic field σ0 = p0 I (tension positive): u_r = p0 a² / (2 G r).
    const double dx = x, dz = z - cz, r2 = dx * dx + dz * dz;
    const double f = p0 * a * a / (2 * G * r2);
    return std::array<double, 2>{f * dx, f * dz};
  };
  std::vector<char> active(m.n_cells());
  for (std::size_t c = 0; c < m.n_cells(); ++c) active[c] = m.void_id[c] < 0;
  solver::SparseMatrix k0 = solver::stiffness_pattern(m);
  const solver::Elastic mat{E, nu, 0};
  solver::assemble_stiffness(m, solver::Kinematics::plane_strain, active, [&](std::size_t) -> const solver::Elastic& { return mat; }, k0);
  const auto nd = static_cast<Eigen::Index>(2 * m.n_nodes());
  solver::Vector f = solver::Vector::Zero(nd), gval = solver::Vector::Zero(nd);
  std::vector<char> fixed(static_cast<std::size_t>(nd), 0), touched(m.n_nodes(), 0);
  const auto sigma0 = [](double, double, double, const void* ctx) {
    const double s = *static_cast<const double*>(ctx);
    return Sym6{s, s, s, 0, 0, 0};
  };
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (!active[c]) continue;
    std::vector<double> fe(static_cast<std::size_t>(2 * m.npc()), 0.0);
    solver::add_stress_divergence(m, c, solver::Kinematics::plane_strain, sigma0, &p0, fe);
    for (int q = 0; q < m.npc(); ++q) {
      const int n = m.cell(c)[q];
      touched[static_cast<std::size_t>(n)] = 1;
      f[2 * n] -= fe[2 * static_cast<std::size_t>(q)];
      f[2 * n + 1] -= fe[2 * static_cast<std::size_t>(q) + 1];
    }
  }
  for (const mesh::Facet& fc : m.facets) {
    if (fc.kind == mesh::FacetKind::void_wall) continue;
    for (int q = 0; q < mesh::nodes_per_facet(m.type); ++q) {
      const int n = fc.nodes[static_cast<std::size_t>(q)];
      const auto u = exact(m.nodes[n][0], m.nodes[n][2]);
      fixed[2 * n] = fixed[2 * n + 1] = 1;
      gval[2 * n] = u[0];
      gval[2 * n + 1] = u[1];
    }
  }
  for (std::size_t n = 0; n < m.n_nodes(); ++n)
    if (!touched[n]) fixed[2 * n] = fixed[2 * n + 1] = 1;
  solver::SparseMatrix kc = k0;
  solver::constrain_matrix(kc, fixed);
  const solver::Vector rhs = solver::constrained_rhs(k0, kc, fixed, f, gval);
  solver::Cholesky chol;
  chol.analyze(kc);
  if (chol.factorize(kc) != solver::Status::ok) throw solver::SolveFailure("convergence case: factorisation failed");
  const solver::Vector u = chol.solve(rhs);
  // L2 error of the interpolant over the solid, Dunavant degree-4 rule.
  double err2 = 0, area = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (!active[c]) continue;
    for (const auto& qp : solver::accurate_quadrature(m.type)) {
      const auto sh = solver::shape_at(m, c, qp.r, qp.s);
      double ux = 0, uz = 0;
      for (int q = 0; q < sh.n; ++q) {
        const int n = m.cell(c)[q];
        ux += sh.N[static_cast<std::size_t>(q)] * u[2 * n];
        uz += sh.N[static_cast<std::size_t>(q)] * u[2 * n + 1];
      }
      const auto ue = exact(sh.x, sh.z);
      const double wq = qp.w * sh.detj;
      err2 += wq * ((ux - ue[0]) * (ux - ue[0]) + (uz - ue[1]) * (uz - ue[1]));
      area += wq;
    }
  }
  const double h_eff = std::sqrt(area / static_cast<double>(std::count(active.begin(), active.end(), 1)));
  return {h_eff, std::sqrt(err2)};
}

const std::vector<VerifyCase>& verification_cases() {
  static const std::vector<VerifyCase> cases = [] {
    std::vector<VerifyCase> all{
      {"kirsch-uniaxial", kirsch_uniaxial},
      {"kirsch-hydrostatic", kirsch_hydrostatic},
      {"verruijt-booker", [] { return verruijt_booker_rows(100); }},
      {"mogi-mctigue", mogi_mctigue},
      {"boussinesq-circle", boussinesq_circle},
      {"lithostatic", lithostatic},
      {"convergence-kirsch", convergence},
    };
    for (VerifyCase& c : verification_cases_3d()) all.push_back(std::move(c));
    for (VerifyCase& c : verification_cases_dynamic()) all.push_back(std::move(c));
    return all;
  }();
  return cases;
}

}  // namespace voidsign::cli
