// SPDX-License-Identifier: GPL-3.0-or-later
// Dynamic verification cases: natural frequencies of a clamped strip (Blevins 1979), the 1D site
// response of a damped layer on rock (Kramer 1996) and of a three-layer column (Thomson 1950,
// Haskell 1953) and the surface motion of an inclined P wave (Wiechert 1907), each through the same solvers `voidsign run` uses (solver/analysis/modal.hpp,
// harmonic.hpp) on meshes from the scenario mesher.
#include <algorithm>
#include <cmath>
#include <complex>
#include <limits>
#include <numbers>

#include "cli/verify/verify.hpp"
#include "mesh/build/mesher.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/analysis/modal.hpp"
#include "solver/analytic/dynamics.hpp"
#include "solver/fe/mass.hpp"

namespace voidsign::cli {

namespace {

namespace an = solver::analytic;

solver::HarmonicLayer layer_of(double vs, double nu, double rho, double xi, double thickness = 0) {
  const double g = rho * vs * vs;
  return {{2 * g * (1 + nu), nu, rho}, xi, thickness};
}

std::vector<VerifyRow> blevins_strip() {
  // Span/thickness 50: shear deformation and rotary inertia stay well inside the tolerance.
  const solver::Elastic mat{20e9, 0.25, 2500};
  const double span = 20, t = 0.4, h = t / 4;
  mesh::Geometry2D g;
  g.width = span;
  g.depth = t;
  g.layer_thickness = {t};
  g.sizing = {h, h / 2, h, 2, 0.3};
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  const std::vector<char> all(m.n_cells(), 1);
  solver::SparseMatrix k = solver::stiffness_pattern(m);
  solver::assemble_stiffness(m, solver::Kinematics::plane_strain, all, [&](std::size_t) -> const solver::Elastic& { return mat; }, k);
  solver::SparseMatrix mm = k;
  solver::assemble_mass(m, solver::Kinematics::plane_strain, all, [&](std::size_t) { return mat.density; }, mm);
  std::vector<char> fixed(static_cast<std::size_t>(k.rows()), 0);
  for (std::size_t n = 0; n < m.n_nodes(); ++n)
    if (std::abs(m.nodes[n][0] - m.x_min) < 1e-9 || std::abs(m.nodes[n][0] - m.x_max) < 1e-9) fixed[2 * n] = fixed[2 * n + 1] = 1;
  solver::ModalOptions opt;
  opt.n_modes = 4;
  opt.dofs_per_node = 2;
  const auto res = solver::solve_modal(k, mm, fixed, opt);
  // Bending modes move mostly vertically; the first axial mode lies far above them.
  std::vector<double> bending;
  for (Eigen::Index j = 0; j < res.shapes.cols(); ++j) {
    double ex = 0, ez = 0;
    for (Eigen::Index i = 0; i < res.shapes.rows(); i += 2) {
      ex += res.shapes(i, j) * res.shapes(i, j);
      ez += res.shapes(i + 1, j) * res.shapes(i + 1, j);
    }
    if (ez > ex) bending.push_back(res.freq_hz[static_cast<std::size_t>(j)]);
  }
  std::vector<VerifyRow> rows;
  const std::string src = "Blevins (1979), clamped-clamped Euler-Bernoulli beam, plate-strip modulus E/(1-nu^2)";
  for (int n = 1; n <= 2; ++n) {
    const double f = bending.size() >= static_cast<std::size_t>(n) ? bending[static_cast<std::size_t>(n - 1)]
                                                                   : std::numeric_limits<double>::quiet_NaN();
    rows.push_back(compare("blevins-strip", "bending mode " + std::to_string(n) + " frequency [Hz], L/t = 50", f,
                           an::strip_clamped_clamped_hz(n, span, t, mat.young, mat.poisson, mat.density), 0.02, src));
  }
  return rows;
}

// A narrow plane-strain column from the scenario mesher: absorbing band two rock cells thick
// on the sides and bottom, the DRM box 1.5 cells either side of x = 0 and half way into the
// rock. Returns surface / outcrop at the surface node nearest x = 0, per frequency.
std::vector<std::complex<double>> column(const std::vector<solver::HarmonicLayer>& layers, double h_top, double gradient,
                                         double h_rock, const std::vector<double>& freqs) {
  double soil = 0;
  for (std::size_t j = 0; j + 1 < layers.size(); ++j) soil += layers[j].thickness;
  const double rock = 20, pml = 2 * h_rock, half = 4 * h_rock + pml;
  mesh::Geometry2D g;
  g.width = 2 * half;
  g.depth = soil + rock + pml;
  for (std::size_t j = 0; j + 1 < layers.size(); ++j) g.layer_thickness.push_back(layers[j].thickness);
  g.layer_thickness.push_back(g.depth);
  g.sizing = {h_rock, h_top, h_top, 2, gradient};
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.layers = layers;
  p.frequencies_hz = freqs;
  p.wave.type = solver::IncidentWave::s;
  p.pml_thickness = pml;
  p.box = {1.5 * h_rock, 0, soil + 0.5 * rock};
  p.with_voids = false;
  int top = m.surface_nodes.front();
  for (int n : m.surface_nodes)
    if (std::abs(m.nodes[static_cast<std::size_t>(n)][0]) < std::abs(m.nodes[static_cast<std::size_t>(top)][0])) top = n;
  p.output_nodes = {top};
  const auto r = solver::solve_harmonic(p);
  std::vector<std::complex<double>> out;
  for (const auto& u : r.reference.u) out.push_back(u[0] / p.wave.amplitude);
  return out;
}

std::vector<VerifyRow> kramer_layer() {
  const double H = 20, vs = 200, rho = 1800, xi = 0.03, vr = 1000, rho_r = 2200;
  const std::vector<solver::HarmonicLayer> layers = {layer_of(vs, 0.3, rho, xi, H), layer_of(vr, 0.25, rho_r, 0.0)};
  const double f0 = vs / (4 * H), df = 0.02;
  std::vector<double> freqs;
  for (int k = -10; k <= 10; ++k) freqs.push_back(f0 + k * df);
  const auto h = column(layers, 1.0, 0.1, 2.0, freqs);
  std::size_t best = 1;
  for (std::size_t k = 1; k + 1 < h.size(); ++k)
    if (std::abs(h[k]) > std::abs(h[best])) best = k;
  // Parabola through the peak and its neighbours.
  const double y0 = std::abs(h[best - 1]), y1 = std::abs(h[best]), y2 = std::abs(h[best + 1]);
  const double den = y0 - 2 * y1 + y2;
  const double tp = den != 0 ? 0.5 * (y0 - y2) / den : 0.0;
  const double f_fe = freqs[best] + tp * df, a_fe = y1 - 0.25 * (y0 - y2) * tp;
  const an::ShLayer sl{H, vs, rho, xi};
  const an::ShHalfSpace sr{vr, rho_r, 0};
  double a_cf = 0;
  for (double f = 0.9 * f0; f < 1.1 * f0; f += 1e-5) a_cf = std::max(a_cf, std::abs(an::sh_layer_transfer(f, sl, sr)));
  const std::string src = "Kramer (1996) Sec. 7.2, damped layer on elastic rock, vertical S";
  return {compare("site-response-kramer", "fundamental frequency [Hz] vs Vs/(4H)", f_fe, an::sh_layer_fundamental_hz(sl), 0.01, src),
          compare("site-response-kramer", "surface/outcrop amplification at resonance", a_fe, a_cf, 0.03, src)};
}

std::vector<VerifyRow> haskell_column() {
  const std::vector<solver::HarmonicLayer> layers = {layer_of(150, 0.35, 1800, 0.04, 4), layer_of(300, 0.3, 1900, 0.03, 8),
                                                     layer_of(500, 0.3, 2000, 0.02, 12), layer_of(1000, 0.25, 2200, 0.01)};
  std::vector<double> freqs;
  for (int k = 0; k <= 24; ++k) freqs.push_back(0.1 * std::pow(200.0, k / 24.0));
  const auto h = column(layers, 0.5, 0.1, 3.0, freqs);
  const std::vector<an::ShLayer> sl = {{4, 150, 1800, 0.04}, {8, 300, 1900, 0.03}, {12, 500, 2000, 0.02}};
  const auto ref = an::sh_column_transfer(sl, {1000, 2200, 0.01}, freqs);
  double worst = 0;
  std::size_t at = 0;
  for (std::size_t k = 0; k < freqs.size(); ++k) {
    const double e = std::abs(h[k] - ref[k]) / std::abs(ref[k]);
    if (e > worst) {
      worst = e;
      at = k;
    }
  }
  VerifyRow r;
  r.case_name = "haskell-thomson-column";
  r.quantity = "largest |F_fe - F|/|F| over 25 frequencies 0.1-20 Hz (worst at " + std::to_string(freqs[at]).substr(0, 5) + " Hz)";
  r.computed = worst;
  r.reference = 0;
  r.rel_error = worst;
  r.tolerance = 0.03;
  r.source = "Thomson (1950), Haskell (1953) SH transfer matrix, three layers over rock";
  return {r};
}

std::vector<VerifyRow> inclined_p() {
  // An inclined P wave on an undamped homogeneous half-space: the surface moves along the
  // apparent angle of incidence ī with sin(ī/2) = V_s sin(i) / V_p, i.e. u_x/u_z = tan 2j with
  // j the reflected S wave's angle (Wiechert 1907, as quoted in seismology texts; from memory;
  // checked here against the exact free-surface solution to 1e-12).
  const double vs = 300, nu = 0.25, rho = 2000, deg = 30, h = 2, pml = 16;
  const std::vector<solver::HarmonicLayer> layers = {layer_of(vs, nu, rho, 0.0)};
  mesh::Geometry2D g;
  g.width = 160;
  g.depth = 60;
  g.layer_thickness = {g.depth};
  g.sizing = {h, h, h, 2, 0.3};
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.layers = layers;
  p.frequencies_hz = {5.0};
  p.wave.type = solver::IncidentWave::p;
  p.wave.incidence = deg * std::numbers::pi / 180;
  p.pml_thickness = pml;
  p.with_voids = false;
  for (int n : m.surface_nodes)
    if (std::abs(m.nodes[static_cast<std::size_t>(n)][0]) < 40) p.output_nodes.push_back(n);
  const auto r = solver::solve_harmonic(p);
  double ratio = 0;
  for (std::size_t k = 0; k < p.output_nodes.size(); ++k)
    ratio += std::abs(r.reference.u[0][static_cast<long>(2 * k)] / r.reference.u[0][static_cast<long>(2 * k + 1)]);
  ratio /= static_cast<double>(p.output_nodes.size());
  const double vp = vs * std::sqrt(2 * (1 - nu) / (1 - 2 * nu));
  const double j = std::asin(vs * std::sin(p.wave.incidence) / vp);
  return {compare("inclined-p-free-surface", "surface |u_x/u_z| for a P wave at 30 deg, nu = 1/4", ratio, std::tan(2 * j), 0.01,
                  "Wiechert (1907) apparent angle of incidence, sin(i_app/2) = (Vs/Vp) sin i (from memory)")};
}

}  // namespace

std::vector<VerifyCase> verification_cases_dynamic() {
  return {{"blevins-strip", blevins_strip},
          {"site-response-kramer", kramer_layer},
          {"haskell-thomson-column", haskell_column},
          {"inclined-p-free-surface", inclined_p}};
}

}  // namespace voidsign::cli
