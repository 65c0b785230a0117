// SPDX-License-Identifier: GPL-3.0-or-later
// Harmonic response: element matrices, the PML's measured reflection, 1D site response against
// closed forms, the domain reduction method, and the zero anomaly of a host-filled void.
#include <doctest/doctest.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <map>
#include <numbers>
#include <tuple>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/analysis/plane_wave.hpp"
#include "solver/fe/pml.hpp"

using namespace voidsign;
using solver::Complex;

namespace {

constexpr double pi = std::numbers::pi;

// A structured block: rectangles (2D, x–z) split into two triangles with alternating diagonals,
// or boxes (3D) split into six tetrahedra about the main diagonal; quadratic cells get midside
// nodes at the chord midpoints. `zs` ascends to the surface z = 0; layer_of(z) tags by centroid.
template <class LayerOf>
mesh::Mesh structured_mesh(const std::vector<double>& xs, const std::vector<double>& ys, const std::vector<double>& zs,
                           int order, LayerOf layer_of) {
  mesh::Mesh m;
  const bool three_d = !ys.empty();
  m.type = three_d ? (order == 2 ? mesh::CellType::tet10 : mesh::CellType::tet4)
                   : (order == 2 ? mesh::CellType::tri6 : mesh::CellType::tri3);
  const std::size_t nx = xs.size(), ny = three_d ? ys.size() : 1, nz = zs.size();
  auto id = [&](std::size_t i, std::size_t j, std::size_t k) { return static_cast<int>((k * ny + j) * nx + i); };
  for (std::size_t k = 0; k < nz; ++k)
    for (std::size_t j = 0; j < ny; ++j)
      for (std::size_t i = 0; i < nx; ++i) m.nodes.push_back({xs[i], three_d ? ys[j] : 0.0, zs[k]});
  std::vector<std::vector<int>> corners;
  if (!three_d) {
    for (std::size_t k = 0; k + 1 < nz; ++k)
      for (std::size_t i = 0; i + 1 < nx; ++i) {
        const int a = id(i, 0, k), b = id(i + 1, 0, k), c = id(i + 1, 0, k + 1), d = id(i, 0, k + 1);
        if ((i + k) % 2 == 0) {
          corners.push_back({a, b, c});
          corners.push_back({a, c, d});
        } else {
          corners.push_back({a, b, d});
          corners.push_back({b, c, d});
        }
      }
  } else {
    static constexpr int perms[6][3] = {{0, 1, 2}, {0, 2, 1}, {1, 0, 2}, {1, 2, 0}, {2, 0, 1}, {2, 1, 0}};
    for (std::size_t k = 0; k + 1 < nz; ++k)
      for (std::size_t j = 0; j + 1 < ny; ++j)
        for (std::size_t i = 0; i + 1 < nx; ++i)
          for (const auto& pm : perms) {
            std::size_t ijk[3] = {i, j, k};
            std::vector<int> t{id(i, j, k)};
            for (int step : pm) {
              ++ijk[step];
              t.push_back(id(ijk[0], ijk[1], ijk[2]));
            }
            corners.push_back(t);
          }
  }
  // Orientation: positive det J.
  for (auto& t : corners) {
    const auto& p0 = m.nodes[t[0]];
    const auto& p1 = m.nodes[t[1]];
    const auto& p2 = m.nodes[t[2]];
    double det;
    if (!three_d) {
      det = (p1[0] - p0[0]) * (p2[2] - p0[2]) - (p2[0] - p0[0]) * (p1[2] - p0[2]);
    } else {
      const auto& p3 = m.nodes[t[3]];
      const double a[3] = {p1[0] - p0[0], p1[1] - p0[1], p1[2] - p0[2]};
      const double b[3] = {p2[0] - p0[0], p2[1] - p0[1], p2[2] - p0[2]};
      const double c[3] = {p3[0] - p0[0], p3[1] - p0[1], p3[2] - p0[2]};
      det = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0]);
    }
    if (det < 0) std::swap(t[1], t[2]);
  }
  std::map<std::pair<int, int>, int> midside;
  auto mid = [&](int a, int b) {
    const auto key = std::minmax(a, b);
    auto it = midside.find(key);
    if (it != midside.end()) return it->second;
    const auto& p = m.nodes[a];
    const auto& q = m.nodes[b];
    m.nodes.push_back({0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1]), 0.5 * (p[2] + q[2])});
    const int n = static_cast<int>(m.nodes.size()) - 1;
    midside[key] = n;
    return n;
  };
  static constexpr int tri_edges[3][2] = {{0, 1}, {1, 2}, {2, 0}};
  static constexpr int tet_edges[6][2] = {{0, 1}, {1, 2}, {2, 0}, {0, 3}, {1, 3}, {2, 3}};
  for (const auto& t : corners) {
    std::vector<int> cell = t;
    if (order == 2) {
      if (!three_d)
        for (const auto& e : tri_edges) cell.push_back(mid(t[e[0]], t[e[1]]));
      else
        for (const auto& e : tet_edges) cell.push_back(mid(t[e[0]], t[e[1]]));
    }
    m.cells.insert(m.cells.end(), cell.begin(), cell.end());
    double zc = 0;
    for (int v : t) zc += m.nodes[v][2] / static_cast<double>(t.size());
    m.layer.push_back(layer_of(zc));
    m.void_id.push_back(-1);
  }
  m.x_min = xs.front();
  m.x_max = xs.back();
  m.y_min = three_d ? ys.front() : 0;
  m.y_max = three_d ? ys.back() : 0;
  m.z_min = zs.front();
  m.z_max = zs.back();
  mesh::finish_topology(m, 1e-6);
  return m;
}

// Evenly spaced coordinates from a to b with spacing close to h (at least one interval).
std::vector<double> spaced(double a, double b, double h) {
  const int n = std::max(1, static_cast<int>(std::lround((b - a) / h)));
  std::vector<double> v;
  for (int i = 0; i <= n; ++i) v.push_back(a + (b - a) * i / n);
  return v;
}

// Concatenated runs (from the bottom up), each [z0, z1] with its own spacing.
std::vector<double> runs(const std::vector<std::tuple<double, double, double>>& parts) {
  std::vector<double> z;
  for (const auto& [a, b, h] : parts) {
    auto s = spaced(a, b, h);
    if (!z.empty()) s.erase(s.begin());
    z.insert(z.end(), s.begin(), s.end());
  }
  return z;
}

solver::HarmonicLayer layer(double vs, double nu, double rho, double xi, double thickness = 0) {
  const double g = rho * vs * vs;
  return {{2 * g * (1 + nu), nu, rho}, xi, thickness};
}

// Kramer (1996), §7.2.1.3, eq. 7.31 (checked mathematically): damped uniform layer on elastic
// rock, surface / rock-outcrop motion F = 1 / (cos k*H + i α* sin k*H), with k* = ω/v*_s and
// α* = ρ_s v*_s / (ρ_r v*_r); v* = v √(1 + 2iξ), the exact form of Kramer's v(1 + iξ).
Complex kramer_layer_on_rock(double f, double h, double vs, double rho, double xi, double vr, double rho_r,
                             double xi_r) {
  const Complex i(0, 1);
  const Complex v = vs * std::sqrt(Complex(1, 2 * xi));
  const Complex v_r = vr * std::sqrt(Complex(1, 2 * xi_r));
  const Complex k = 2 * pi * f / v;
  const Complex alpha = rho * v / (rho_r * v_r);
  return 1.0 / (std::cos(k * h) + i * alpha * std::sin(k * h));
}

// Haskell (1953) / Thomson (1950) transfer matrix for vertical incidence, in displacement–stress
// form (checked mathematically): across a layer of thickness h, [u, τ] at its bottom is
// [[cos kh, sin kh/(kG)], [−kG sin kh, cos kh]] · [u, τ] at its top (τ = G du/dζ, ζ down).
// Starting from the free surface [1, 0], the half-space field splits into up- and down-going
// waves u = A + B, τ = ikG(A − B); the outcrop motion is 2A. G is the complex modulus of the
// wave (shear for S, constrained for P).
Complex haskell_transfer(const std::vector<solver::HarmonicLayer>& layers, bool s_wave, double f) {
  const double w = 2 * pi * f;
  Complex u = 1, tau = 0;
  const Complex i(0, 1);
  for (std::size_t j = 0; j < layers.size(); ++j) {
    const auto& e = layers[j].elastic;
    const double mu = e.young / (2 * (1 + e.poisson));
    const double lam = e.young * e.poisson / ((1 + e.poisson) * (1 - 2 * e.poisson));
    const Complex g = Complex(1, 2 * layers[j].damping) * (s_wave ? mu : lam + 2 * mu);
    const Complex k = w * std::sqrt(e.density / g);
    if (j + 1 == layers.size()) {
      const Complex a = 0.5 * (u + tau / (i * k * g));
      return 1.0 / (2.0 * a);
    }
    const Complex kh = k * layers[j].thickness;
    const Complex u2 = std::cos(kh) * u + std::sin(kh) / (k * g) * tau;
    const Complex t2 = -k * g * std::sin(kh) * u + std::cos(kh) * tau;
    u = u2;
    tau = t2;
  }
  return 0;
}

// Index of the node at (x, y, z), or -1.
int node_at(const mesh::Mesh& m, double x, double y, double z, double tol = 1e-6) {
  for (std::size_t n = 0; n < m.n_nodes(); ++n)
    if (std::abs(m.nodes[n][0] - x) < tol && std::abs(m.nodes[n][1] - y) < tol && std::abs(m.nodes[n][2] - z) < tol)
      return static_cast<int>(n);
  return -1;
}

// Vertex of the parabola through three equally spaced samples (x1 − h, y0), (x1, y1), (x1 + h, y2).
std::pair<double, double> parabola_peak(double x1, double h, double y0, double y1, double y2) {
  const double den = y0 - 2 * y1 + y2;
  const double t = 0.5 * (y0 - y2) / den;
  return {x1 + t * h, y1 - 0.25 * (y0 - y2) * t};
}

// A 1D column model in plane strain (or 3D): narrow block, side and bottom PML, the layered
// column's free field brought in by the DRM; returns surface / outcrop at the surface node x = 0.
std::vector<Complex> column_transfer(const std::vector<solver::HarmonicLayer>& layers,
                                     const std::vector<double>& layer_h, double rock_depth, double h_rock,
                                     const std::vector<double>& freqs, solver::IncidentWave wave, bool three_d,
                                     double* seconds = nullptr, int polarization = 0) {
  // Horizontally: the DRM box one cell wide each side of x = 0 (2D: 1.5), then plain cells, then
  // the PML; the free field fills the column, so the scattered field and the PML hardly matter.
  const double pml = (three_d ? 1 : 2) * h_rock, half = (three_d ? 2 : 4) * h_rock + pml;
  const double box = (three_d ? 1.0 : 1.5) * h_rock;
  std::vector<std::tuple<double, double, double>> parts;
  double z_top = 0;
  for (std::size_t j = 0; j + 1 < layers.size(); ++j) z_top -= layers[j].thickness;
  parts.push_back({z_top - rock_depth - pml, z_top, h_rock});
  double z = z_top;
  for (std::size_t j = layers.size() - 1; j-- > 0;) {
    parts.push_back({z, z + layers[j].thickness, layer_h[j]});
    z += layers[j].thickness;
  }
  std::vector<double> bottoms;
  double acc = 0;
  for (std::size_t j = 0; j + 1 < layers.size(); ++j) bottoms.push_back(acc -= layers[j].thickness);
  auto layer_of = [&](double zc) {
    for (std::size_t j = 0; j < bottoms.size(); ++j)
      if (zc > bottoms[j]) return static_cast<int>(j);
    return static_cast<int>(bottoms.size());
  };
  const auto xs = spaced(-half, half, h_rock);
  const mesh::Mesh m = structured_mesh(xs, three_d ? xs : std::vector<double>{}, runs(parts), 2, layer_of);
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.kinematics = three_d ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
  p.layers = layers;
  p.frequencies_hz = freqs;
  p.wave.type = wave;
  p.pml_thickness = pml;
  p.box = {box, box, -z_top + 0.5 * rock_depth};
  p.wave.polarization = polarization;
  p.with_voids = false;
  const int top = node_at(m, 0, 0, 0);
  REQUIRE(top >= 0);
  p.output_nodes = {top};
  const auto r = solver::solve_harmonic(p);
  if (seconds) *seconds = r.total_seconds;
  std::vector<Complex> h;
  const int d = three_d ? 3 : 2;
  const int comp = wave == solver::IncidentWave::s ? polarization : d - 1;
  for (std::size_t f = 0; f < freqs.size(); ++f) {
    CHECK(r.reference.residual[f] < 1e-8);
    h.push_back(r.reference.u[f][comp] / p.wave.amplitude);
  }
  return h;
}

}  // namespace

TEST_CASE("harmonic elements: the quadrature is exact to its degree and S(omega) is complex symmetric") {
  // ∫ r^a s^b t^c over the unit tetrahedron = a! b! c! / (a + b + c + 3)! (checked mathematically).
  auto fact = [](int n) {
    double f = 1;
    for (int i = 2; i <= n; ++i) f *= i;
    return f;
  };
  for (int a = 0; a <= 5; ++a)
    for (int b = 0; a + b <= 5; ++b)
      for (int c = 0; a + b + c <= 5; ++c) {
        double sum = 0;
        for (const auto& q : solver::dynamic_quadrature(mesh::CellType::tet10))
          sum += q.w * std::pow(q.r, a) * std::pow(q.s, b) * std::pow(q.t, c);
        CHECK(sum == doctest::Approx(fact(a) * fact(b) * fact(c) / fact(a + b + c + 3)).epsilon(1e-12));
      }
  const solver::Elastic mat{5e7, 0.3, 1900};
  for (int three_d = 0; three_d < 2; ++three_d)
    for (int order : {1, 2}) {
      const auto g = spaced(-3, 3, 1);
      const auto m = structured_mesh(g, three_d ? g : std::vector<double>{}, spaced(-6, 0, 1), order, [](double) { return 0; });
      const auto kin = three_d ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
      const auto pml = solver::pml_layout(m, 2.0, 300.0, 2, 0.5);
      const int nd = m.npc() * solver::dofs_per_node(kin);
      std::vector<Complex> se(static_cast<std::size_t>(nd * nd));
      std::vector<double> ke(se.size()), me(se.size());
      const double w = 2 * pi * 7, xi = 0.04;
      double worst_plain = 0, worst_sym = 0;
      for (std::size_t c = 0; c < m.n_cells(); ++c) {
        solver::dynamic_stiffness(m, c, mat, xi, kin, w, nullptr, se);
        solver::dynamic_parts(m, c, mat, kin, ke, me);
        double scale = 0;
        for (std::size_t k = 0; k < se.size(); ++k) scale = std::max(scale, std::abs(se[k]));
        for (std::size_t k = 0; k < se.size(); ++k)
          worst_plain = std::max(worst_plain, std::abs(se[k] - (Complex(1, 2 * xi) * ke[k] - w * w * me[k])) / scale);
        solver::dynamic_stiffness(m, c, mat, xi, kin, w, &pml, se);
        for (int a = 0; a < nd; ++a)
          for (int b = 0; b < nd; ++b)
            worst_sym = std::max(worst_sym, std::abs(se[static_cast<std::size_t>(a * nd + b)] - se[static_cast<std::size_t>(b * nd + a)]) / scale);
      }
      CHECK(worst_plain < 1e-12);
      CHECK(worst_sym < 1e-14);
    }
}

TEST_CASE("harmonic vertical column: the layer recursion agrees with the Kramer closed form and the Haskell transfer matrix") {
  // Sources: Kramer (1996) eq. 7.31 and the Haskell (1953) matrix, both written above.
  const std::vector<solver::HarmonicLayer> two = {layer(200, 0.3, 1800, 0.05, 20), layer(1000, 0.25, 2200, 0.0)};
  const std::vector<solver::HarmonicLayer> four = {layer(150, 0.35, 1800, 0.04, 4), layer(300, 0.3, 1900, 0.03, 8),
                                                   layer(500, 0.3, 2000, 0.02, 12), layer(1000, 0.25, 2200, 0.01)};
  double worst = 0;
  for (double f : {0.1, 0.7, 2.5, 4.0, 11.0, 20.0}) {
    const double w = 2 * pi * f;
    const solver::VerticalColumn c2(two, solver::IncidentWave::s, w, 1.0);
    worst = std::max(worst, std::abs(c2.surface_to_outcrop() - kramer_layer_on_rock(f, 20, 200, 1800, 0.05, 1000, 2200, 0)));
    for (auto wave : {solver::IncidentWave::s, solver::IncidentWave::p}) {
      const solver::VerticalColumn c4(four, wave, w, 1.0);
      worst = std::max(worst, std::abs(c4.surface_to_outcrop() - haskell_transfer(four, wave == solver::IncidentWave::s, f)));
    }
  }
  CHECK(worst < 1e-10);
}

TEST_CASE("harmonic site response: a damped layer on elastic rock peaks at Vs over 4H with the Kramer amplification") {
  // Kramer (1996), §7.2.1.3: fundamental frequency Vs/(4H) and |F| = |1/(cos k*H + i α* sin k*H)|.
  const double H = 20, vs = 200, rho = 1800, xi = 0.03, vr = 1000, rho_r = 2200;
  const std::vector<solver::HarmonicLayer> layers = {layer(vs, 0.3, rho, xi, H), layer(vr, 0.25, rho_r, 0.0)};
  const double f0 = vs / (4 * H);
  const double df = 0.02;
  std::vector<double> freqs;
  for (int k = -10; k <= 10; ++k) freqs.push_back(f0 + k * df);
  double seconds = 0;
  const auto h = column_transfer(layers, {1.0}, 20, 2.0, freqs, solver::IncidentWave::s, false, &seconds);
  std::size_t best = 0;
  for (std::size_t k = 1; k < h.size(); ++k)
    if (std::abs(h[k]) > std::abs(h[best])) best = k;
  REQUIRE(best > 0);
  REQUIRE(best + 1 < h.size());
  const auto [f_fe, a_fe] = parabola_peak(freqs[best], df, std::abs(h[best - 1]), std::abs(h[best]), std::abs(h[best + 1]));
  // The closed form's own peak, by a fine scan.
  double f_cf = 0, a_cf = 0;
  for (double f = f0 * 0.9; f < f0 * 1.1; f += 1e-5) {
    const double a = std::abs(kramer_layer_on_rock(f, H, vs, rho, xi, vr, rho_r, 0));
    if (a > a_cf) {
      a_cf = a;
      f_cf = f;
    }
  }
  std::printf("site response: FE peak %.4f Hz (Vs/4H = %.4f, closed-form peak %.4f), amplification %.4f (closed form %.4f), "
              "%zu frequencies in %.2f s\n", f_fe, f0, f_cf, a_fe, a_cf, freqs.size(), seconds);
  CHECK(std::abs(f_fe / f0 - 1) < 0.01);
  CHECK(std::abs(a_fe / a_cf - 1) < 0.03);
  // Every frequency of the sweep, not only the peak.
  double worst = 0;
  for (std::size_t k = 0; k < h.size(); ++k)
    worst = std::max(worst, std::abs(h[k] - kramer_layer_on_rock(freqs[k], H, vs, rho, xi, vr, rho_r, 0)) /
                                std::abs(kramer_layer_on_rock(freqs[k], H, vs, rho, xi, vr, rho_r, 0)));
  std::printf("site response: largest relative difference over the sweep %.3e\n", worst);
  CHECK(worst < 0.03);
}

TEST_CASE("harmonic three-layer column against the Haskell-Thomson transfer matrix from 0.1 to 20 Hz (S and P)") {
  // Haskell (1953) / Thomson (1950) displacement–stress transfer matrix, written above.
  const std::vector<solver::HarmonicLayer> layers = {layer(150, 0.35, 1800, 0.04, 4), layer(300, 0.3, 1900, 0.03, 8),
                                                     layer(500, 0.3, 2000, 0.02, 12), layer(1000, 0.25, 2200, 0.01)};
  std::vector<double> freqs;
  for (int k = 0; k <= 24; ++k) freqs.push_back(0.1 * std::pow(200.0, k / 24.0));
  for (auto wave : {solver::IncidentWave::s, solver::IncidentWave::p}) {
    double seconds = 0;
    const auto h = column_transfer(layers, {0.5, 1.0, 1.5}, 20, 3.0, freqs, wave, false, &seconds);
    double worst = 0, worst_f = 0;
    for (std::size_t k = 0; k < freqs.size(); ++k) {
      const Complex ref = haskell_transfer(layers, wave == solver::IncidentWave::s, freqs[k]);
      const double e = std::abs(h[k] - ref) / std::abs(ref);
      if (e > worst) {
        worst = e;
        worst_f = freqs[k];
      }
    }
    std::printf("three-layer column (%s): largest relative difference %.3e at %.2f Hz, %zu frequencies in %.2f s\n",
                wave == solver::IncidentWave::s ? "S" : "P", worst, worst_f, freqs.size(), seconds);
    CHECK(worst < 0.03);
  }
}

namespace {

// A homogeneous plane-strain block with a buried vertical line force, absorbing band of
// thickness L, physical part x ∈ [−a, a], z ∈ [−a, 0].
struct PmlRun {
  mesh::Mesh mesh;
  solver::HarmonicResult result;
};

PmlRun pml_run(double a, double L, double h, const std::vector<double>& freqs, double zs) {
  PmlRun run;
  const auto xs = spaced(-a - L, a + L, h);
  run.mesh = structured_mesh(xs, {}, spaced(-a - L, 0, h), 2, [](double) { return 0; });
  solver::HarmonicProblem p;
  p.mesh = &run.mesh;
  p.layers = {layer(100, 0.25, 2000, 0.02)};
  p.frequencies_hz = freqs;
  p.source = solver::HarmonicProblem::Source::point_force;
  p.force.point = {0, 0, zs};
  p.force.direction = {0, 0, -1};
  p.force.amplitude = 1e3;
  p.pml_thickness = L;
  p.with_voids = false;
  run.result = solver::solve_harmonic(p);
  return run;
}

// Only nodes of the physical part (outside the PML) count.
double local_error(const PmlRun& small, const PmlRun& large, std::size_t f, double x, double z, double radius) {
  double num = 0, den = 0;
  const auto& pml = small.result.pml;
  for (std::size_t n = 0; n < small.mesh.n_nodes(); ++n) {
    const auto& q = small.mesh.nodes[n];
    if (std::hypot(q[0] - x, q[2] - z) > radius || solver::in_pml(pml, {q[0], 0, q[2] + 1e-9})) continue;
    if (q[0] < pml.x_lo - 1e-9 || q[0] > pml.x_hi + 1e-9) continue;
    const int k = node_at(large.mesh, q[0], 0, q[2]);
    REQUIRE(k >= 0);
    for (int j = 0; j < 2; ++j) {
      const Complex us = small.result.reference.u[f][static_cast<long>(2 * n + static_cast<std::size_t>(j))];
      const Complex ul = large.result.reference.u[f][2 * k + j];
      num += std::norm(us - ul);
      den += std::norm(ul);
    }
  }
  return std::sqrt(num / den);
}

}  // namespace

TEST_CASE("harmonic PML: measured reflection below 5 percent at normal and 45 degree incidence") {
  // Method: the same structured mesh and source in a small block (PML 10 m from the source's
  // vertical) and a block twice as wide and deep (reference). At a receiver on the PML's inner edge
  // the difference is the wave the small block's band sends back, over the incident amplitude,
  // i.e. the reflection coefficient for the angle of the ray from the source. Vs = 100 m/s,
  // Vp = 173 m/s, ξ = 2 %. Theory: R(θ) = exp(−2 cos θ Ω₀ L / ((m + 1) c)), solver/fe/pml.hpp.
  const double a = 20, L = 10, h = 1, zs = -8;
  const std::vector<double> freqs = {2.5, 5.0, 10.0};
  const PmlRun small = pml_run(a, L, h, freqs, zs);
  const PmlRun large = pml_run(2 * a, L, h, freqs, zs);
  std::printf("PML: theoretical reflection %.1e normal, %.1e at 45 deg (fastest P wave); %zu dofs in %.2f s, reference "
              "%zu dofs in %.2f s (%s)\n", small.result.pml_reflection_normal, small.result.pml_reflection_45,
              small.result.n_dofs, small.result.total_seconds, large.result.n_dofs, large.result.total_seconds,
              large.result.loop.c_str());
  for (std::size_t f = 0; f < freqs.size(); ++f) {
    const double normal = local_error(small, large, f, a, zs, 2.0);       // side, ray horizontal
    const double oblique = local_error(small, large, f, a + zs, -a, 2.0);  // bottom, ray at 45°
    const double bulk = local_error(small, large, f, 0, 0, 1e9);          // the whole physical block
    std::printf("PML %.1f Hz (L = %.2f S wavelengths): measured reflection %.3f %% normal, %.3f %% at 45 deg, %.3f %% over "
                "the block\n", freqs[f], L * freqs[f] / 100, 100 * normal, 100 * oblique, 100 * bulk);
    CHECK(normal < 0.05);
    CHECK(oblique < 0.05);
    CHECK(bulk < 0.05);
  }
}

TEST_CASE("harmonic 3D tet10 column: vertically incident S (both polarizations) and P against the layer recursion") {
  // Kramer (1996) eq. 7.31 for S, and the Haskell (1953) matrix for P, written above.
  const double H = 20, vs = 200, rho = 1800, xi = 0.03, vr = 1000, rho_r = 2200;
  const std::vector<solver::HarmonicLayer> layers = {layer(vs, 0.3, rho, xi, H), layer(vr, 0.25, rho_r, 0.0)};
  const std::vector<double> freqs = {1.5, 2.5, 5.0};
  for (int pol : {0, 1}) {
    double seconds = 0;
    const auto fs = pol == 0 ? freqs : std::vector<double>{2.5};
    const auto h = column_transfer(layers, {4.0}, 8, 4.0, fs, solver::IncidentWave::s, true, &seconds, pol);
    for (std::size_t k = 0; k < fs.size(); ++k) {
      const Complex ref = kramer_layer_on_rock(fs[k], H, vs, rho, xi, vr, rho_r, 0);
      std::printf("3D column S (%c): %.1f Hz |H| %.4f (closed form %.4f)\n", pol ? 'y' : 'x', fs[k], std::abs(h[k]),
                  std::abs(ref));
      CHECK(std::abs(h[k] - ref) / std::abs(ref) < 0.02);
    }
    std::printf("3D column S (%c): %zu frequencies in %.2f s\n", pol ? 'y' : 'x', fs.size(), seconds);
  }
  const auto hp = column_transfer(layers, {4.0}, 8, 4.0, {2.5}, solver::IncidentWave::p, true);
  const Complex ref = haskell_transfer(layers, false, 2.5);
  std::printf("3D column P: 2.5 Hz |H| %.4f (transfer matrix %.4f)\n", std::abs(hp[0]), std::abs(ref));
  CHECK(std::abs(hp[0] - ref) / std::abs(ref) < 0.02);
}

namespace {

mesh::Mesh void_mesh(bool host_filled, double far = 2.0) {
  mesh::Geometry2D g;
  g.width = 100;
  g.depth = 50;
  g.layer_thickness = {5, 45};
  mesh::VoidOutline v;
  v.cz = -10;
  v.radius = 2;
  g.voids = {v};
  g.sizing = {far, 0.3, std::min(far, 1.0), 2, 0.25};
  mesh::Mesh m = mesh::build_mesh_2d(g);
  if (host_filled) {
    for (int& id : m.void_id) id = -1;  // the outline is still meshed, but nothing is excavated
    m.n_voids = 0;
    mesh::finish_topology(m, 1e-6);
  }
  return m;
}

solver::HarmonicProblem void_problem(const mesh::Mesh& m) {
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.layers = {layer(180, 0.3, 1800, 0.04, 5), layer(450, 0.28, 2000, 0.02)};
  p.frequencies_hz = {4.0, 8.0};
  p.pml_thickness = 15;
  p.output_nodes = m.surface_nodes;
  return p;
}

// Largest |voided − reference| over the surface and the largest |reference|, over all frequencies.
std::pair<double, double> surface_anomaly(const solver::HarmonicResult& r) {
  double diff = 0, scale = 0;
  for (std::size_t f = 0; f < r.frequencies_hz.size(); ++f) {
    diff = std::max(diff, (r.voided.u[f] - r.reference.u[f]).lpNorm<Eigen::Infinity>());
    scale = std::max(scale, r.reference.u[f].lpNorm<Eigen::Infinity>());
  }
  return {diff, scale};
}

}  // namespace

TEST_CASE("harmonic void anomaly: zero when the void cells are host-filled, finite when excavated") {
  // Same mesh in both models: the signature of a void is pure physics, not mesh noise (the
  // harmonic counterpart of the static host-filled test).
  for (auto source : {solver::HarmonicProblem::Source::plane_wave, solver::HarmonicProblem::Source::point_force}) {
    const char* name = source == solver::HarmonicProblem::Source::plane_wave ? "S wave" : "surface force";
    const mesh::Mesh filled = void_mesh(true);
    auto p = void_problem(filled);
    p.source = source;
    p.force.point = {-20, 0, 0};
    const auto r0 = solver::solve_harmonic(p);
    const auto [d0, s0] = surface_anomaly(r0);
    const mesh::Mesh open = void_mesh(false);
    auto q = void_problem(open);
    q.source = source;
    q.force.point = {-20, 0, 0};
    const auto r1 = solver::solve_harmonic(q);
    const auto [d1, s1] = surface_anomaly(r1);
    std::printf("void anomaly (%s): host-filled %.2e m, excavated %.2e m, response %.2e m; %zu dofs, %.2f s per model-frequency "
                "(%s), residuals %.1e / %.1e\n",
                name, d0, d1, s1, r1.n_dofs, r1.total_seconds / 4, r1.loop.c_str(), r1.reference.residual[0],
                r1.voided.residual[0]);
    CHECK(s0 > 0);
    CHECK(d0 <= 1e-12 * s0);
    CHECK(d1 > 1e-3 * s1);
  }
}

TEST_CASE("harmonic frequency loops: sequential and parallel give the same answer") {
  const mesh::Mesh m = void_mesh(false, 4.0);
  auto p = void_problem(m);
  p.frequencies_hz = {3.0, 5.0};
  p.loop = solver::FrequencyLoop::sequential;
  const auto a = solver::solve_harmonic(p);
  p.loop = solver::FrequencyLoop::parallel;
  const auto b = solver::solve_harmonic(p);
  std::printf("frequency loops (%zu dofs, 2 frequencies x 2 models): sequential with the BLAS's threads %.2f s, %s %.2f s\n",
              a.n_dofs, a.total_seconds, b.loop.c_str(), b.total_seconds);
  for (std::size_t f = 0; f < p.frequencies_hz.size(); ++f) {
    CHECK((a.voided.u[f] - b.voided.u[f]).norm() <= 1e-10 * a.voided.u[f].norm());
    CHECK((a.reference.u[f] - b.reference.u[f]).norm() <= 1e-10 * a.reference.u[f].norm());
  }
}

// Largest relative difference between two sweeps' fields, over models, cases and frequencies.
double sweep_difference(const solver::HarmonicResult& a, const solver::HarmonicResult& b) {
  double worst = 0;
  for (std::size_t f = 0; f < a.frequencies_hz.size(); ++f)
    for (const auto& pair : {std::pair{&a.reference, &b.reference}, std::pair{&a.voided, &b.voided}}) {
      worst = std::max(worst, (pair.first->u[f] - pair.second->u[f]).norm() / pair.second->u[f].norm());
      for (std::size_t c = 0; c < pair.first->u_extra.size(); ++c)
        worst = std::max(worst, (pair.first->u_extra[c][f] - pair.second->u_extra[c][f]).norm() /
                                    pair.second->u_extra[c][f].norm());
    }
  return worst;
}

TEST_CASE("harmonic shared factorisation: both models on one factorisation equal each on its own") {
  SUBCASE("plane strain: S and P waves and a force on the void's wall, every node") {
    const mesh::Mesh m = void_mesh(false, 4.0);
    auto p = void_problem(m);
    p.frequencies_hz = {3.0, 7.0};
    p.output_nodes.clear();  // all nodes, the void interior of the model without voids included
    solver::HarmonicProblem::LoadCase p_wave, force;
    p_wave.wave.type = solver::IncidentWave::p;
    force.source = solver::HarmonicProblem::Source::point_force;
    force.force.point = {0, 0, -8};  // the void's crown: a node of the void boundary
    force.force.direction = {0.6, 0, -0.8};
    force.force.amplitude = 1e3;
    p.extra_cases = {p_wave, force};
    const auto shared = solver::solve_harmonic(p);
    p.share_factorisation = false;
    const auto separate = solver::solve_harmonic(p);
    CHECK(shared.shared_boundary > 0);
    CHECK(separate.shared_boundary == 0);
    CHECK(shared.extra_force_offsets[1] < 1e-2);  // the crown node of the polygonal outline
    const double diff = sweep_difference(shared, separate);
    std::printf("shared factorisation, plane strain: %zu void-boundary unknowns, %zu unknowns, largest difference %.1e; "
                "residuals %.1e / %.1e\n",
                shared.shared_boundary, shared.n_dofs, diff, shared.reference.residual[0], shared.voided.residual[0]);
    CHECK(diff < 1e-9);
    for (std::size_t f = 0; f < p.frequencies_hz.size(); ++f) {
      CHECK(shared.reference.residual[f] < 1e-10);
      CHECK(shared.voided.residual[f] < 1e-10);
    }
    CHECK(shared.linear_solver.find("Schur") != std::string::npos);
  }
  SUBCASE("3D: a sphere under a surface force; a tunnel through the block falls back to two factorisations") {
    for (bool tunnel : {false, true}) {
      mesh::Geometry3D g;
      g.width = 30;
      g.length = tunnel ? 16 : 30;
      g.depth = 20;
      g.layer_thickness = {6, 14};
      mesh::VoidSolid v;
      if (tunnel) {
        v.kind = mesh::VoidSolid::Kind::tunnel;
        v.from = {0, -8, -8};
        v.to = {0, 8, -8};
        v.radius = 1.5;
      } else {
        v.cz = -8;
        v.radius = 2;
      }
      g.voids = {v};
      g.sizing = {6, 1.5, 3, 2, 0.3};
      const mesh::Mesh m = mesh::build_mesh_3d(g);
      solver::HarmonicProblem p;
      p.mesh = &m;
      p.kinematics = solver::Kinematics::solid;
      p.layers = {layer(180, 0.3, 1800, 0.04, 6), layer(450, 0.28, 2000, 0.02)};
      p.frequencies_hz = {6.0};
      p.source = solver::HarmonicProblem::Source::point_force;
      p.force.point = {5, 3, 0};
      p.force.amplitude = 1e4;
      p.output_nodes = m.surface_nodes;
      const auto shared = solver::solve_harmonic(p);
      p.share_factorisation = false;
      const auto separate = solver::solve_harmonic(p);
      const double diff = sweep_difference(shared, separate);
      std::printf("shared factorisation, 3D %s: %zu void-boundary unknowns of %zu, largest difference %.1e\n",
                  tunnel ? "tunnel through the block" : "sphere", shared.shared_boundary, shared.n_dofs, diff);
      CHECK(diff < 1e-9);
      if (tunnel)
        CHECK(shared.shared_boundary == 0);  // the void reaches the fixed sides
      else
        CHECK(shared.shared_boundary > 0);
    }
  }
}

TEST_CASE("harmonic memory: a factorisation estimated above the limit is refused before it starts") {
  const mesh::Mesh m = void_mesh(false, 4.0);
  auto p = void_problem(m);
  p.memory_limit_bytes = 1e6;
  try {
    (void)solver::solve_harmonic(p);
    FAIL("no SolveFailure");
  } catch (const solver::SolveFailure& e) {
    const std::string what = e.what();
    CHECK(what.find("needs an estimated") != std::string::npos);
    CHECK(what.find("mesh.size") != std::string::npos);
  }
  p.memory_limit_bytes = 0;
  CHECK_NOTHROW((void)solver::solve_harmonic(p));
}

TEST_CASE("harmonic extra load cases: each equals its own sweep, on the same factorisation") {
  const mesh::Mesh m = void_mesh(false, 4.0);
  auto p = void_problem(m);
  p.frequencies_hz = {2.0, 4.0};
  p.source = solver::HarmonicProblem::Source::plane_wave;
  solver::HarmonicProblem::LoadCase p_wave, force;
  p_wave.wave.type = solver::IncidentWave::p;
  force.source = solver::HarmonicProblem::Source::point_force;
  force.force.point = {15, 0, 0};
  force.force.amplitude = 1e3;
  p.extra_cases = {p_wave, force};
  const auto all = solver::solve_harmonic(p);
  REQUIRE(all.reference.u_extra.size() == 2);
  REQUIRE(all.extra_force_nodes.size() == 2);
  CHECK(all.extra_force_nodes[0] == -1);
  CHECK(all.extra_force_nodes[1] >= 0);

  auto one = [&](const solver::HarmonicProblem::LoadCase& c) {
    auto q = void_problem(m);
    q.frequencies_hz = p.frequencies_hz;
    q.source = c.source;
    q.wave = c.wave;
    q.force = c.force;
    return solver::solve_harmonic(q);
  };
  const auto s_alone = one({});
  const auto p_alone = one(p_wave);
  const auto f_alone = one(force);
  for (std::size_t f = 0; f < p.frequencies_hz.size(); ++f)
    for (const auto* pair : {&all.reference, &all.voided}) {
      const bool voided = pair == &all.voided;
      auto pick = [&](const solver::HarmonicResult& r) { return voided ? &r.voided : &r.reference; };
      CHECK((pair->u[f] - pick(s_alone)->u[f]).norm() <= 1e-10 * pair->u[f].norm());
      CHECK((pair->u_extra[0][f] - pick(p_alone)->u[f]).norm() <= 1e-10 * pair->u_extra[0][f].norm());
      CHECK((pair->u_extra[1][f] - pick(f_alone)->u[f]).norm() <= 1e-10 * pair->u_extra[1][f].norm());
      CHECK(pair->residual[f] < 1e-8);
    }
  // The P wave moves the surface vertically, the S wave horizontally, far from the void.
  CHECK(all.reference.u_extra[0][0].norm() > 0);
}

TEST_CASE("harmonic inclined plane waves: the FE surface motion equals the layered free field (P, SV pre- and post-critical)") {
  // No voids: the total field is the free field of solver::LayeredPlaneWave (itself checked in
  // test_plane_wave.cpp against Aki & Richards 2002 and energy conservation) wherever the DRM and
  // the PML work; outside the DRM box it is the scattered field (only discretisation error) plus
  // the free field added back. A soft layer on rock; tri6, 2 m cells, 16+ per S wavelength.
  const std::vector<solver::HarmonicLayer> layers = {layer(200, 0.3, 1800, 0.03, 10), layer(600, 0.25, 2200, 0.01)};
  const auto xs = spaced(-100, 100, 2);
  const auto zs = runs({{-60, -10, 2.0}, {-10, 0, 1.0}});
  const mesh::Mesh m = structured_mesh(xs, {}, zs, 2, [](double z) { return z > -10 ? 0 : 1; });
  struct Case {
    solver::IncidentWave type;
    double degrees;
  };
  for (const Case c : {Case{solver::IncidentWave::p, 30}, Case{solver::IncidentWave::s, 20},
                       Case{solver::IncidentWave::s, -45}, Case{solver::IncidentWave::p, -60}}) {
    solver::HarmonicProblem p;
    p.mesh = &m;
    p.layers = layers;
    p.frequencies_hz = {2.0, 6.0};
    p.wave.type = c.type;
    p.wave.incidence = c.degrees * pi / 180;
    p.pml_thickness = 16;
    p.with_voids = false;
    p.output_nodes = m.surface_nodes;
    const auto r = solver::solve_harmonic(p);
    for (std::size_t f = 0; f < p.frequencies_hz.size(); ++f) {
      const solver::IncidentField exact(layers, p.wave, 2 * pi * p.frequencies_hz[f], false);
      double worst = 0, scale = 0;
      for (std::size_t k = 0; k < r.output_nodes.size(); ++k) {
        const auto& x = m.nodes[static_cast<std::size_t>(r.output_nodes[k])];
        if (std::abs(x[0]) > 80) continue;  // the PML band
        const auto u = exact.at(x[0], 0, 0);
        const Complex ux = r.reference.u[f][static_cast<long>(2 * k)], uz = r.reference.u[f][static_cast<long>(2 * k + 1)];
        worst = std::max(worst, std::hypot(std::abs(ux - u[0]), std::abs(uz - u[2])));
        scale = std::max(scale, std::hypot(std::abs(u[0]), std::abs(u[2])));
      }
      std::printf("inclined %s %+.0f deg, %.0f Hz: surface |u| %.3f x amplitude, FE against the free field %.2f %% (residual %.1e)\n",
                  c.type == solver::IncidentWave::p ? "P" : "SV", c.degrees, p.frequencies_hz[f], scale, 100 * worst / scale,
                  r.reference.residual[f]);
      CHECK(worst < 0.02 * scale);
    }
  }
}

TEST_CASE("harmonic 3D inclined plane waves: SV and SH at an azimuth against the layered free field") {
  // Both waves on one factorisation (the SH wave as an extra load case).
  const std::vector<solver::HarmonicLayer> layers = {layer(200, 0.3, 1800, 0.03, 8), layer(500, 0.25, 2200, 0.01)};
  const auto xs = spaced(-30, 30, 5);
  const auto zs = runs({{-28, -8, 4.0}, {-8, 0, 4.0}});
  const mesh::Mesh m = structured_mesh(xs, xs, zs, 2, [](double z) { return z > -8 ? 0 : 1; });
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.kinematics = solver::Kinematics::solid;
  p.layers = layers;
  p.frequencies_hz = {3.0};
  p.wave = {solver::IncidentWave::s, 1.0, 0, 25 * pi / 180, 30 * pi / 180};
  solver::HarmonicProblem::LoadCase sh;
  sh.wave = {solver::IncidentWave::s, 1.0, 1, 40 * pi / 180, 120 * pi / 180};
  p.extra_cases = {sh};
  p.pml_thickness = 10;
  p.with_voids = false;
  p.output_nodes = m.surface_nodes;
  const auto r = solver::solve_harmonic(p);
  for (int c = 0; c < 2; ++c) {
    const solver::PlaneWave& wave = c == 0 ? p.wave : sh.wave;
    const solver::ComplexVector& fe = c == 0 ? r.reference.u[0] : r.reference.u_extra[0][0];
    const solver::IncidentField exact(layers, wave, 2 * pi * 3.0, true);
    double worst = 0, scale = 0;
    for (std::size_t k = 0; k < r.output_nodes.size(); ++k) {
      const auto& x = m.nodes[static_cast<std::size_t>(r.output_nodes[k])];
      if (std::abs(x[0]) > 20 || std::abs(x[1]) > 20) continue;
      const auto u = exact.at(x[0], x[1], 0);
      double e2 = 0, s2 = 0;
      for (int j = 0; j < 3; ++j) {
        e2 += std::norm(fe[static_cast<long>(3 * k) + j] - u[static_cast<std::size_t>(j)]);
        s2 += std::norm(u[static_cast<std::size_t>(j)]);
      }
      worst = std::max(worst, std::sqrt(e2));
      scale = std::max(scale, std::sqrt(s2));
    }
    std::printf("3D inclined %s %.0f deg at azimuth %.0f deg, 3 Hz: surface |u| %.3f x amplitude, FE against the free field "
                "%.2f %% (%zu dofs, %.1f s for both)\n",
                c ? "SH" : "SV", wave.incidence * 180 / pi, wave.azimuth * 180 / pi, scale, 100 * worst / scale, r.n_dofs,
                r.total_seconds);
    CHECK(worst < 0.02 * scale);
  }
}
