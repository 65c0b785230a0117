// SPDX-License-Identifier: GPL-3.0-or-later
// The free field of an inclined plane wave in layered ground (solver/analysis/plane_wave): the
// vertical limit against the layer recursion, the free surface of a half-space against the
// closed-form reflection coefficients, energy conservation in undamped layers, oblique SH through
// a layer against its closed-form transfer function, and continuity at interfaces.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <numbers>

#include "solver/analysis/plane_wave.hpp"

using namespace voidsign;
using solver::Complex;
using solver::WaveKind;

namespace {

constexpr double pi = std::numbers::pi;

solver::HarmonicLayer layer(double vs, double nu, double rho, double xi, double thickness) {
  const double mu = rho * vs * vs;
  return {{2 * mu * (1 + nu), nu, rho}, xi, thickness};
}

double speed(const solver::HarmonicLayer& l, bool p_wave) {
  const double mu = l.elastic.young / (2 * (1 + l.elastic.poisson));
  const double lambda = l.elastic.young * l.elastic.poisson / ((1 + l.elastic.poisson) * (1 - 2 * l.elastic.poisson));
  return std::sqrt((p_wave ? lambda + 2 * mu : mu) / l.elastic.density);
}

const std::vector<solver::HarmonicLayer> three_layers = {
    layer(180, 0.35, 1800, 0.04, 6), layer(320, 0.3, 1950, 0.03, 14), layer(700, 0.28, 2200, 0.02, 0)};

}  // namespace

TEST_CASE("inclined plane wave: vertical incidence equals the layer recursion (Kramer 1996, eq. 7.34)") {
  for (const auto kind : {WaveKind::sv, WaveKind::p}) {
    const auto type = kind == WaveKind::p ? solver::IncidentWave::p : solver::IncidentWave::s;
    for (double f : {0.7, 3.1, 11.0, 27.0}) {
      const double w = 2 * pi * f;
      const solver::LayeredPlaneWave wave(solver::hysteretic_layers(three_layers), kind, w, 0.0, 1e-3);
      const solver::VerticalColumn column(three_layers, type, w, 1e-3);
      for (double depth : {0.0, 2.5, 6.0, 13.0, 20.0, 35.0}) {
        const auto u = wave.displacement(0.0, depth);
        const Complex along = kind == WaveKind::p ? u[2] : u[0];
        const Complex across = kind == WaveKind::p ? u[0] : u[2];
        CHECK(std::abs(along - column.displacement(depth)) < 1e-10 * 1e-3);
        CHECK(std::abs(across) < 1e-14);
      }
    }
  }
}

TEST_CASE("inclined plane wave: free surface of a half-space against Aki & Richards (2002, eq. 5.27)") {
  const solver::HarmonicLayer rock = layer(1000, 0.25, 2500, 0.0, 0);
  const double alpha = speed(rock, true), beta = speed(rock, false);
  const auto layers = solver::hysteretic_layers({rock});
  for (double deg : {5.0, 20.0, 35.0, 50.0, 65.0, 80.0}) {
    const double i = deg * pi / 180;
    const double p = std::sin(i) / alpha;
    const double ci = std::cos(i) / alpha, cj = std::sqrt(1 / (beta * beta) - p * p);
    const double q = 1 / (beta * beta) - 2 * p * p;
    const double d = q * q + 4 * p * p * ci * cj;
    const double pp = (-q * q + 4 * p * p * ci * cj) / d;
    const double ps = 4 * (alpha / beta) * p * ci * q / d;
    const solver::LayeredPlaneWave wave(layers, WaveKind::p, 2 * pi * 5, p, 1.0);
    const auto r = wave.reflected();
    CHECK(std::abs(std::abs(r[0]) - std::abs(pp)) < 1e-12);
    CHECK(std::abs(std::abs(r[1]) - std::abs(ps)) < 1e-12);
    // Energy flux across a horizontal plane ∝ ρ V cos θ |A|² (Aki & Richards 2002, §5.2.4).
    CHECK(std::norm(r[0]) + (beta * cj * beta) / (alpha * ci * alpha) * std::norm(r[1]) == doctest::Approx(1).epsilon(1e-12));
    // Incident SV at the same angle, below the critical angle: SS and SP (eq. 5.27).
    const double ps_v = std::sin(i) / beta;
    if (ps_v * alpha < 1) {
      const double cjs = std::cos(i) / beta;
      const double cis = std::sqrt(1 / (alpha * alpha) - ps_v * ps_v);
      const double qs = 1 / (beta * beta) - 2 * ps_v * ps_v;
      const double ds = qs * qs + 4 * ps_v * ps_v * cis * cjs;
      const double ss = (qs * qs - 4 * ps_v * ps_v * cis * cjs) / ds;
      const double sp = 4 * (beta / alpha) * ps_v * cjs * qs / ds;
      const solver::LayeredPlaneWave sv(layers, WaveKind::sv, 2 * pi * 5, ps_v, 1.0);
      const auto rs = sv.reflected();
      CHECK(std::abs(std::abs(rs[1]) - std::abs(ss)) < 1e-12);
      CHECK(std::abs(std::abs(rs[0]) - std::abs(sp)) < 1e-12);
    }
  }
}

TEST_CASE("inclined plane wave: undamped layers return all the incident energy (Aki & Richards 2002, sec. 5.2.4)") {
  std::vector<solver::HarmonicLayer> elastic = three_layers;
  for (auto& l : elastic) l.damping = 0;
  const auto layers = solver::hysteretic_layers(elastic);
  const double alpha = speed(elastic.back(), true), beta = speed(elastic.back(), false);
  for (const auto kind : {WaveKind::p, WaveKind::sv, WaveKind::sh})
    for (double deg : {10.0, 30.0, 55.0})
      for (double f : {0.9, 4.0, 17.0, 60.0}) {
        const double v = kind == WaveKind::p ? alpha : beta;
        const double p = std::sin(deg * pi / 180) / v;
        const solver::LayeredPlaneWave wave(layers, kind, 2 * pi * f, p, 1.0);
        const auto r = wave.reflected();
        const double eta_p2 = 1 / (alpha * alpha) - p * p, eta_s = std::sqrt(1 / (beta * beta) - p * p);
        const double eta_in = kind == WaveKind::p ? std::sqrt(eta_p2) : eta_s;
        // Flux ∝ ρ V² η |A|² (η = cos θ / V); an evanescent reflected P carries none.
        const double fp = eta_p2 > 0 ? alpha * alpha * std::sqrt(eta_p2) * std::norm(r[0]) : 0.0;
        const double fs = beta * beta * eta_s * std::norm(r[1]);
        CAPTURE(deg);
        CAPTURE(f);
        CHECK((fp + fs) / (v * v * eta_in) == doctest::Approx(1).epsilon(1e-10));
      }
}

TEST_CASE("inclined plane wave: oblique SH through a damped layer against the closed-form transfer function") {
  // u_surface / (2a) = 1 / (cos(ωη₁H) + i (μ₁*η₁)/(μ₂*η₂) sin(ωη₁H)): Kramer (1996, eq. 7.40)
  // for one layer on elastic rock, with the vertical wavenumber ωη in place of ω/V (derived the
  // same way: u = U₀ cos(ωη₁z) in the layer, continuity of u and τ at its base).
  const std::vector<solver::HarmonicLayer> two = {layer(200, 0.3, 1800, 0.05, 12), layer(900, 0.25, 2300, 0.01, 0)};
  const auto layers = solver::hysteretic_layers(two);
  for (double deg : {0.0, 25.0, 50.0})
    for (double f : {1.0, 3.9, 4.2, 12.0, 30.0}) {
      const double w = 2 * pi * f;
      const double p = std::sin(deg * pi / 180) / speed(two[1], false);
      const solver::LayeredPlaneWave wave(layers, WaveKind::sh, w, p, 1.0);
      const Complex mu1 = layers[0].mu, mu2 = layers[1].mu;
      const Complex eta1 = std::sqrt(layers[0].density / mu1 - p * p), eta2 = std::sqrt(layers[1].density / mu2 - p * p);
      const double H = two[0].thickness;
      const Complex expected =
          1.0 / (std::cos(w * eta1 * H) + Complex(0, 1) * (mu1 * eta1) / (mu2 * eta2) * std::sin(w * eta1 * H));
      CHECK(std::abs(wave.displacement(0, 0)[1] - expected) < 1e-10 * std::abs(expected));
    }
}

TEST_CASE("inclined plane wave: displacement and traction continuous at the interfaces, phase e^{-i omega p h}") {
  const auto layers = solver::hysteretic_layers(three_layers);
  const double p = std::sin(40 * pi / 180) / speed(three_layers.back(), false);
  const solver::LayeredPlaneWave wave(layers, WaveKind::sv, 2 * pi * 8, p, 1.0);
  for (double depth : {6.0, 20.0}) {
    const auto above = wave.displacement(0, depth - 1e-9), below = wave.displacement(0, depth + 1e-9);
    for (int c : {0, 2}) CHECK(std::abs(above[static_cast<std::size_t>(c)] - below[static_cast<std::size_t>(c)]) < 1e-8);
  }
  const auto u0 = wave.displacement(0, 3), u1 = wave.displacement(10, 3);
  const Complex shift = std::exp(Complex(0, -2 * pi * 8 * p * 10));
  CHECK(std::abs(u1[0] - u0[0] * shift) < 1e-13);
  CHECK(std::abs(u1[2] - u0[2] * shift) < 1e-13);
  // Deep incidence with evanescent reflected P (SV beyond the critical angle) stays finite.
  const double p_post = std::sin(70 * pi / 180) / speed(three_layers.back(), false);
  const solver::LayeredPlaneWave post(layers, WaveKind::sv, 2 * pi * 40, p_post, 1.0);
  CHECK(std::isfinite(std::abs(post.displacement(0, 0)[0])));
  CHECK(std::abs(post.displacement(0, 0)[0]) < 10);
}

namespace {

std::vector<solver::RayleighLayer> rayleigh(const std::vector<solver::HarmonicLayer>& layers, double alpha, double beta) {
  std::vector<solver::RayleighLayer> out;
  for (const auto& l : layers) out.push_back({l.elastic, alpha, beta, l.thickness});
  return out;
}

double unit_ricker(double f0, double tau) {
  const double a = pi * f0 * tau;
  return (1 - 2 * a * a) * std::exp(-a * a);
}

}  // namespace

TEST_CASE("plane-wave pulse: a homogeneous half-space gives the incident and reflected pulses exactly") {
  // Undamped rock, so every reflection coefficient is real and frequency independent: the field is
  // Σ A d r(t − delay − p h − s_z z) over the incident, PP and PS waves (z up, the surface z = 0).
  const solver::HarmonicLayer rock = layer(800, 0.25, 2400, 0.0, 0);
  const double alpha = speed(rock, true), beta = speed(rock, false);
  for (const auto kind : {WaveKind::sv, WaveKind::p}) {
    solver::PlaneWavePulse::Spec spec;
    spec.layers = rayleigh({rock}, 0, 0);
    spec.kind = kind;
    spec.incidence = (kind == WaveKind::p ? 25 : -15) * pi / 180;
    spec.amplitude = 2e-3;
    spec.peak_hz = 6;
    const solver::PlaneWavePulse pulse(spec, 1.0, 120, {-150, 150, 0, 0});
    const double p = solver::incidence_slowness(rock.elastic, kind, spec.incidence);
    const solver::LayeredPlaneWave harmonic(solver::hysteretic_layers({rock}), kind, 2 * pi * 6, p, 1.0);
    const auto r = harmonic.reflected();
    CHECK(std::abs(r[0].imag()) < 1e-12);
    CHECK(std::abs(r[1].imag()) < 1e-12);
    const double ep = std::sqrt(1 / (alpha * alpha) - p * p), es = std::sqrt(1 / (beta * beta) - p * p);
    const double a = spec.amplitude / 2;
    double worst = 0;
    for (double x : {-140.0, -30.0, 0.0, 55.0, 140.0})
      for (double depth : {0.0, 13.7, 61.0, 119.0})
        for (double t = 0; t <= 1.0; t += 0.0173) {
          const double z = -depth, tau = t - pulse.delay() - p * x;
          double uh = 0, uz = 0;
          auto add = [&](double amp, double dh, double dz, double sz) {
            const double w = amp * a * unit_ricker(6, tau - sz * z);
            uh += w * dh;
            uz += w * dz;
          };
          if (kind == WaveKind::p) {
            add(1.0, alpha * p, alpha * ep, ep);
          } else {
            add(1.0, beta * es, -beta * p, es);
          }
          add(r[0].real(), alpha * p, -alpha * ep, -ep);
          add(r[1].real(), beta * es, beta * p, -es);
          double u[2], v[2];
          pulse.at(x, 0, depth, t, u, v);
          worst = std::max(worst, std::hypot(u[0] - uh, u[1] - uz));
        }
    std::printf("pulse in a half-space (%s): worst error %.2e of the amplitude; %zu depth samples, FFT of %zu, delay %.3f s\n",
                kind == WaveKind::p ? "P 25 deg" : "SV -15 deg", worst / spec.amplitude, pulse.depth_samples(),
                pulse.fft_length(), pulse.delay());
    CHECK(worst < 2e-4 * spec.amplitude);
    CHECK(pulse.earliest_arrival() == doctest::Approx(0).epsilon(1e-9));
  }
}

TEST_CASE("plane-wave pulse: damped layers against a direct Fourier integral of the exact transfer function") {
  // u(t) = (1/π) ∫₀^∞ Re[r̂(ω) T(ω) e^{iω(t − p h)}] dω with the Ricker's closed-form transform
  // r̂(ω) = ω² e^{−ω²/ω₀²} e^{−iωt_d} / (2π² f₀² · √π f₀), ω₀ = 2π f₀ (from r = −g''/(2a) for
  // the Gaussian g = e^{−a t²}, a = π² f₀²): an independent check of the windowing, the FFT and
  // the interpolation in depth and time.
  const auto layers = rayleigh(three_layers, 0.8, 6e-4);
  solver::PlaneWavePulse::Spec spec;
  spec.layers = layers;
  spec.kind = WaveKind::sv;
  spec.incidence = 30 * pi / 180;
  spec.three_d = true;
  spec.azimuth = 50 * pi / 180;
  spec.amplitude = 1.0;
  spec.peak_hz = 5;
  const solver::PlaneWavePulse pulse(spec, 2.0, 40, {-60, 60, -60, 60});
  const double p = solver::incidence_slowness(three_layers.back().elastic, WaveKind::sv, spec.incidence);
  const double f0 = spec.peak_hz, w0 = 2 * pi * f0;
  struct Point {
    double x, y, depth;
  };
  const std::vector<Point> points = {{0, 0, 0}, {-47, 12, 3.3}, {20, -35, 9.1}, {55, 51, 27.4}};
  const std::vector<double> times = {0.35, 0.52, 0.71, 0.9, 1.3, 1.8};
  const double dw = 2 * pi * 0.005;
  std::vector<std::array<double, 3>> direct(points.size() * times.size(), {0, 0, 0});
  for (double w = dw; w < 6 * w0; w += dw) {
    const solver::LayeredPlaneWave wave(solver::rayleigh_layers(layers, w), WaveKind::sv, w, p, 1.0);
    const double mag = w * w * std::exp(-w * w / (w0 * w0)) / (2 * pi * pi * f0 * f0 * std::sqrt(pi) * f0);
    for (std::size_t i = 0; i < points.size(); ++i) {
      const double h = points[i].x * std::cos(spec.azimuth) + points[i].y * std::sin(spec.azimuth);
      const auto u = wave.displacement(0, points[i].depth);
      for (std::size_t k = 0; k < times.size(); ++k) {
        const Complex e = mag * std::exp(Complex(0, w * (times[k] - pulse.delay() - p * h)));
        const double uh = (u[0] * e).real(), uz = (u[2] * e).real();
        auto& out = direct[i * times.size() + k];
        out[0] += dw / pi * uh * std::cos(spec.azimuth);
        out[1] += dw / pi * uh * std::sin(spec.azimuth);
        out[2] += dw / pi * uz;
      }
    }
  }
  double worst = 0, peak = 0;
  for (std::size_t i = 0; i < points.size(); ++i)
    for (std::size_t k = 0; k < times.size(); ++k) {
      double u[3], v[3];
      pulse.at(points[i].x, points[i].y, points[i].depth, times[k], u, v);
      const auto& ref = direct[i * times.size() + k];
      worst = std::max(worst, std::hypot(u[0] - ref[0], u[1] - ref[1], u[2] - ref[2]));
      peak = std::max(peak, std::hypot(ref[0], ref[1], ref[2]));
    }
  std::printf("pulse in damped layers (SV 30 deg, azimuth 50 deg): worst %.2e against a peak of %.3f (direct integral)\n", worst,
              peak);
  CHECK(peak > 0.3);
  CHECK(worst < 1e-3 * peak);
}

TEST_CASE("plane-wave pulse: the velocity is the time derivative of the displacement") {
  solver::PlaneWavePulse::Spec spec;
  spec.layers = rayleigh(three_layers, 0.5, 4e-4);
  spec.kind = WaveKind::p;
  spec.incidence = -20 * pi / 180;
  spec.amplitude = 1e-3;
  spec.peak_hz = 4;
  const solver::PlaneWavePulse pulse(spec, 1.5, 30, {-50, 50, 0, 0});
  const double dt = 1e-4;
  double worst = 0, peak = 0;
  for (double t = 0.2; t < 1.4; t += 0.037) {
    double u0[2], u1[2], v[2], dummy[2];
    pulse.at(12, 0, 7.5, t - dt, u0, dummy);
    pulse.at(12, 0, 7.5, t + dt, u1, dummy);
    pulse.at(12, 0, 7.5, t, dummy, v);
    for (int c = 0; c < 2; ++c) {
      worst = std::max(worst, std::abs((u1[c] - u0[c]) / (2 * dt) - v[c]));
      peak = std::max(peak, std::abs(v[c]));
    }
  }
  CHECK(peak > 0);
  CHECK(worst < 5e-3 * peak);
}
