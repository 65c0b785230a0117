// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analytic/dynamics.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>
#include <string>

namespace voidsign::solver::analytic {

namespace {

constexpr double pi = std::numbers::pi;
using cplx = std::complex<double>;

// Bisection of a continuous f on [a, b] with f(a) < 0 < f(b), to the last bit.
template <class F>
double bisect(F f, double a, double b) {
  for (int i = 0; i < 200; ++i) {
    const double m = 0.5 * (a + b);
    if (m <= a || m >= b) break;
    (f(m) < 0 ? a : b) = m;
  }
  return 0.5 * (a + b);
}

// sin(x)/x, also near x = 0.
cplx sinc(cplx x) { return std::abs(x) < 1e-4 ? 1.0 - x * x / 6.0 : std::sin(x) / x; }

void check_layer(const ShLayer& l) {
  if (!(l.thickness_m > 0) || !(l.vs_m_s > 0) || !(l.density_kg_m3 > 0) || !(l.damping >= 0))
    throw std::invalid_argument("SH layer: thickness, Vs and density must be positive and damping non-negative");
}

void check_rock(const ShHalfSpace& r) {
  if (!(r.vs_m_s > 0) || !(r.density_kg_m3 > 0) || !(r.damping >= 0))
    throw std::invalid_argument("SH half-space: Vs and density must be positive and damping non-negative");
}

}  // namespace

double clamped_clamped_lambda(int n) {
  if (n < 1) throw std::invalid_argument("clamped_clamped_lambda: n must be at least 1");
  // cos λ cosh λ = 1 written as cos λ − 1/cosh λ = 0 (no overflow); exactly one root lies in
  // [nπ, (n+1)π], where cos λ runs between ±1 and 1/cosh λ < 0.09.
  const double a = n * pi, b = (n + 1) * pi;
  const double s = (n % 2 == 0) ? -1.0 : 1.0;  // orient so that the function rises
  return bisect([s](double l) { return s * (std::cos(l) - 1 / std::cosh(l)); }, a, b);
}

double beam_clamped_clamped_hz(int n, double length_m, double bending_stiffness_nm2, double mass_per_length_kg_m) {
  const double l = clamped_clamped_lambda(n);
  return l * l / (2 * pi * length_m * length_m) * std::sqrt(bending_stiffness_nm2 / mass_per_length_kg_m);
}

double strip_clamped_clamped_hz(int n, double span_m, double thickness_m, double young_pa, double poisson,
                                double density_kg_m3) {
  const double ei = young_pa / (1 - poisson * poisson) * thickness_m * thickness_m * thickness_m / 12;
  return beam_clamped_clamped_hz(n, span_m, ei, density_kg_m3 * thickness_m);
}

double rayleigh_speed_ratio(double poisson) {
  if (!(poisson >= 0 && poisson < 0.5))
    throw std::invalid_argument("rayleigh_speed_ratio: Poisson's ratio must lie in [0, 0.5)");
  const double k2 = (1 - 2 * poisson) / (2 * (1 - poisson));
  // The secular function is negative at ξ = 0.5 for every κ² in (0, 1/2] (at most
  // 3.0625 − 3.4641 √(1 − κ²/4) < 0) and equals 1 at ξ = 1; the Rayleigh root is its only
  // zero in between. (ξ = 0 is a trivial root, hence the bracket.)
  auto f = [k2](double x) {
    const double x2 = x * x;
    return (2 - x2) * (2 - x2) - 4 * std::sqrt(1 - k2 * x2) * std::sqrt(1 - x2);
  };
  return bisect(f, 0.5, 1.0);
}

double rayleigh_speed_ratio_viktorov(double poisson) { return (0.87 + 1.12 * poisson) / (1 + poisson); }

std::complex<double> complex_shear_speed(double vs_m_s, double damping) {
  return vs_m_s * std::sqrt(cplx(1.0, 2 * damping));
}

std::complex<double> sh_layer_transfer(double freq_hz, const ShLayer& layer, const ShHalfSpace& rock) {
  check_layer(layer);
  check_rock(rock);
  const double w = 2 * pi * freq_hz;
  const cplx vs = complex_shear_speed(layer.vs_m_s, layer.damping);
  const cplx kh = w / vs * layer.thickness_m;
  const cplx alpha = std::isinf(rock.vs_m_s)
                         ? cplx(0)
                         : layer.density_kg_m3 * vs / (rock.density_kg_m3 * complex_shear_speed(rock.vs_m_s, rock.damping));
  return 1.0 / (std::cos(kh) + cplx(0, 1) * alpha * std::sin(kh));
}

double sh_layer_fundamental_hz(const ShLayer& layer) {
  check_layer(layer);
  return layer.vs_m_s / (4 * layer.thickness_m);
}

std::vector<std::complex<double>> sh_column_transfer(std::span<const ShLayer> layers, const ShHalfSpace& rock,
                                                     std::span<const double> freq_hz) {
  for (const ShLayer& l : layers) check_layer(l);
  check_rock(rock);
  std::vector<cplx> out;
  out.reserve(freq_hz.size());
  const bool rigid = std::isinf(rock.vs_m_s);
  const cplx z_rock = rigid ? cplx(0) : rock.density_kg_m3 * complex_shear_speed(rock.vs_m_s, rock.damping);
  for (const double f : freq_hz) {
    const double w = 2 * pi * f;
    cplx u = 1, tau = 0;  // free surface
    for (const ShLayer& l : layers) {
      const cplx v = complex_shear_speed(l.vs_m_s, l.damping);
      const cplx g = l.density_kg_m3 * v * v;  // G* = G(1 + 2iξ)
      const cplx x = w / v * l.thickness_m;   // k* h
      const cplx c = std::cos(x), s = std::sin(x);
      // sin(kh)/(G k) = h sinc(kh)/G and G k sin(kh) = G (kh) sin(kh)/h, both regular at ω = 0.
      const cplx u2 = c * u + l.thickness_m * sinc(x) / g * tau;
      const cplx t2 = -g * x / l.thickness_m * s * u + c * tau;
      u = u2;
      tau = t2;
    }
    // Upgoing amplitude in the rock: ½(u + τ/(i G_r k_r)), G_r k_r = ω ρ_r V_r*.
    const cplx up2 = (rigid || w == 0) ? u : u + tau / (cplx(0, 1) * w * z_rock);
    out.push_back(1.0 / up2);
  }
  return out;
}

}  // namespace voidsign::solver::analytic
