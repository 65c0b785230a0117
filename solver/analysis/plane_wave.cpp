// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/plane_wave.hpp"

#include <Eigen/Dense>
#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

namespace voidsign::solver {

namespace {

std::array<double, 2> lame(const Elastic& e) {
  const double mu = e.young / (2 * (1 + e.poisson));
  const double lambda = e.young * e.poisson / ((1 + e.poisson) * (1 - 2 * e.poisson));
  return {lambda, mu};
}

// √(1/v² − p²) on the branch with Im ≤ 0 (up-going waves decay upward, e^{iωt}).
Complex vertical_slowness(Complex inverse_speed_squared, double p) {
  Complex eta = std::sqrt(inverse_speed_squared - p * p);
  if (eta.imag() > 0 || (eta.imag() == 0 && eta.real() < 0)) eta = -eta;
  return eta;
}

}  // namespace

std::vector<ComplexLayer> hysteretic_layers(const std::vector<HarmonicLayer>& layers) {
  std::vector<ComplexLayer> out;
  out.reserve(layers.size());
  for (const HarmonicLayer& l : layers) {
    const auto [lambda, mu] = lame(l.elastic);
    const Complex f = hysteretic_factor(l.damping);
    out.push_back({f * lambda, f * mu, Complex(l.elastic.density), l.thickness});
  }
  return out;
}

std::vector<ComplexLayer> rayleigh_layers(const std::vector<RayleighLayer>& layers, double omega) {
  if (!(omega > 0)) throw std::invalid_argument("rayleigh_layers: omega must be > 0");
  std::vector<ComplexLayer> out;
  out.reserve(layers.size());
  for (const RayleighLayer& l : layers) {
    const auto [lambda, mu] = lame(l.elastic);
    const Complex k(1.0, omega * l.beta);
    out.push_back({k * lambda, k * mu, l.elastic.density * Complex(1.0, -l.alpha / omega), l.thickness});
  }
  return out;
}

double incidence_slowness(const Elastic& half_space, WaveKind kind, double incidence) {
  const auto [lambda, mu] = lame(half_space);
  const double v = std::sqrt((kind == WaveKind::p ? lambda + 2 * mu : mu) / half_space.density);
  return std::sin(incidence) / v;
}

LayeredPlaneWave::LayeredPlaneWave(std::vector<ComplexLayer> layers, WaveKind kind, double omega, double slowness,
                                   Complex amplitude)
    : kind_(kind), omega_(omega), p_(slowness) {
  if (layers.empty()) throw std::invalid_argument("LayeredPlaneWave: no layers");
  if (!(omega > 0)) throw std::invalid_argument("LayeredPlaneWave: omega must be > 0");
  if (!std::isfinite(slowness)) throw std::invalid_argument("LayeredPlaneWave: slowness must be finite");
  const std::size_t n = layers.size();
  layers_.resize(n);
  double z = 0;
  for (std::size_t j = 0; j < n; ++j) {
    const ComplexLayer& l = layers[j];
    if (!(std::abs(l.mu) > 0) || !(std::abs(l.density) > 0))
      throw std::invalid_argument("LayeredPlaneWave: a layer has no shear modulus or density");
    Layer& L = layers_[j];
    L.lambda = l.lambda;
    L.mu = l.mu;
    L.vp = std::sqrt((l.lambda + 2.0 * l.mu) / l.density);
    L.vs = std::sqrt(l.mu / l.density);
    L.eta_p = vertical_slowness(l.density / (l.lambda + 2.0 * l.mu), p_);
    L.eta_s = vertical_slowness(l.density / l.mu, p_);
    L.z_top = z;
    if (j + 1 < n) {
      if (!(l.thickness > 0)) throw std::invalid_argument("LayeredPlaneWave: layer thickness must be > 0");
      z -= l.thickness;
      L.z_bottom = z;
    } else {
      L.z_bottom = -std::numeric_limits<double>::infinity();
    }
  }
  traction_scale_ = 1.0 / std::abs(layers.back().density * layers_.back().vs);

  // The global matrix: unknowns per layer above the half-space (4 P–SV, 2 SH) and the reflected
  // waves of the half-space (2 or 1); rows: the surface tractions, then the continuity of
  // (u_h, u_z, t_h, t_z) (SH: u_t, t_t) at each interface.
  const bool sh = kind == WaveKind::sh;
  const int per = sh ? 2 : 4;        // unknowns per layer
  const int comps = sh ? 2 : 4;      // field values per wave
  const int n_waves = sh ? 2 : 4;    // waves per layer
  const int half = static_cast<int>(n) - 1;
  const int size = per * half + (sh ? 1 : 2);
  const Complex a = amplitude / 2.0;
  // Column of wave w of layer j, −1 for the half-space's up-going (incident or absent) waves.
  auto column = [&](int j, int w) -> int {
    if (j < half) return per * j + w;
    if (sh) return w == 1 ? per * half : -1;
    return w == 1 ? per * half : w == 3 ? per * half + 1 : -1;
  };
  auto incident = [&](int w) -> Complex {
    if (sh) return w == 0 ? a : Complex(0.0);
    if (kind == WaveKind::p) return w == 0 ? a : Complex(0.0);
    return w == 2 ? a : Complex(0.0);
  };
  Eigen::MatrixXcd A = Eigen::MatrixXcd::Zero(size, size);
  Eigen::VectorXcd b = Eigen::VectorXcd::Zero(size);
  // Adds ± the field values (components first..first+count) of every wave of layer j at z to
  // the rows from row0.
  auto add = [&](int row0, int j, double z_at, double sign, int first, int count) {
    for (int w = 0; w < n_waves; ++w) {
      const auto f = wave_field(j, w, z_at);
      const int col = column(j, w);
      for (int c = 0; c < count; ++c) {
        const Complex v = sign * f[static_cast<std::size_t>(first + c)];
        if (col >= 0)
          A(row0 + c, col) += v;
        else
          b(row0 + c) -= v * incident(w);
      }
    }
  };
  const int tractions = sh ? 1 : 2;
  add(0, 0, 0.0, 1.0, comps - tractions, tractions);
  for (int k = 0; k < half; ++k) {
    const int row0 = tractions + comps * k;
    const double zi = layers_[static_cast<std::size_t>(k)].z_bottom;
    add(row0, k, zi, 1.0, 0, comps);
    add(row0, k + 1, zi, -1.0, 0, comps);
  }
  const Eigen::PartialPivLU<Eigen::MatrixXcd> lu(A);
  const Eigen::VectorXcd x = lu.solve(b);
  const double scale = std::max(b.norm(), std::numeric_limits<double>::min());
  if (!x.allFinite() || (A * x - b).norm() > 1e-8 * scale)
    throw std::runtime_error("LayeredPlaneWave: the layered system is singular (grazing incidence in a layer?)");
  amp_.assign(n, {Complex(0.0), Complex(0.0), Complex(0.0), Complex(0.0)});
  for (int j = 0; j <= half; ++j)
    for (int w = 0; w < n_waves; ++w) {
      const int col = column(j, w);
      amp_[static_cast<std::size_t>(j)][static_cast<std::size_t>(w)] = col >= 0 ? x(col) : incident(w);
    }
}

std::array<Complex, 4> LayeredPlaneWave::wave_field(int j, int w, double z) const {
  const Layer& L = layers_[static_cast<std::size_t>(j)];
  const bool up = w % 2 == 0;
  const bool half_space = static_cast<std::size_t>(j) + 1 == layers_.size();
  const double z_ref = up && !half_space ? L.z_bottom : L.z_top;
  const Complex i(0.0, 1.0);
  if (kind_ == WaveKind::sh) {
    const Complex sz = up ? L.eta_s : -L.eta_s;
    const Complex e = std::exp(-i * omega_ * sz * (z - z_ref));
    return {e, L.mu * sz * e * traction_scale_, 0.0, 0.0};
  }
  const bool p_wave = w < 2;
  const Complex eta = p_wave ? L.eta_p : L.eta_s;
  const Complex sz = up ? eta : -eta;
  Complex dh, dz;
  if (p_wave) {
    dh = L.vp * p_;
    dz = L.vp * sz;
  } else {
    dh = L.vs * eta;
    dz = up ? -L.vs * p_ : L.vs * p_;
  }
  const Complex e = std::exp(-i * omega_ * sz * (z - z_ref));
  const Complex th = L.mu * (sz * dh + p_ * dz);
  const Complex tz = L.lambda * (p_ * dh + sz * dz) + 2.0 * L.mu * sz * dz;
  return {dh * e, dz * e, th * e * traction_scale_, tz * e * traction_scale_};
}

int LayeredPlaneWave::layer_at(double z) const {
  int j = 0;
  while (static_cast<std::size_t>(j) + 1 < layers_.size() && z < layers_[static_cast<std::size_t>(j)].z_bottom) ++j;
  return j;
}

std::array<Complex, 3> LayeredPlaneWave::displacement(double h, double depth) const {
  const double z = -depth;
  const int j = layer_at(z);
  const auto& amp = amp_[static_cast<std::size_t>(j)];
  const Complex phase = std::exp(Complex(0.0, -omega_ * p_ * h));
  if (kind_ == WaveKind::sh) {
    Complex ut = 0;
    for (int w = 0; w < 2; ++w) ut += amp[static_cast<std::size_t>(w)] * wave_field(j, w, z)[0];
    return {Complex(0.0), ut * phase, Complex(0.0)};
  }
  Complex uh = 0, uz = 0;
  for (int w = 0; w < 4; ++w) {
    const auto f = wave_field(j, w, z);
    uh += amp[static_cast<std::size_t>(w)] * f[0];
    uz += amp[static_cast<std::size_t>(w)] * f[1];
  }
  return {uh * phase, Complex(0.0), uz * phase};
}

std::array<Complex, 2> LayeredPlaneWave::reflected() const {
  const auto& h = amp_.back();
  if (kind_ == WaveKind::sh) return {Complex(0.0), h[1] / h[0]};
  const Complex inc = kind_ == WaveKind::p ? h[0] : h[2];
  return {h[1] / inc, h[3] / inc};
}

WaveKind wave_kind(const PlaneWave& wave) {
  if (wave.type == IncidentWave::p) return WaveKind::p;
  return wave.polarization == 1 ? WaveKind::sh : WaveKind::sv;
}

namespace {

LayeredPlaneWave checked_wave(const std::vector<HarmonicLayer>& layers, const PlaneWave& wave, double omega,
                              bool three_d) {
  if (layers.empty()) throw std::invalid_argument("plane wave: no layers");
  if (wave.polarization < 0 || wave.polarization > 1)
    throw std::invalid_argument("plane wave: polarization must be 0 (SV) or 1 (SH)");
  if (wave.type == IncidentWave::s && wave.polarization == 1 && !three_d)
    throw std::invalid_argument("plane wave: SH waves (motion out of the plane) need a 3D model");
  if (!(std::abs(wave.incidence) < std::numbers::pi / 2))
    throw std::invalid_argument("plane wave: the angle of incidence must be below 90 degrees");
  const WaveKind kind = wave_kind(wave);
  const double p = incidence_slowness(layers.back().elastic, kind, wave.incidence);
  return LayeredPlaneWave(hysteretic_layers(layers), kind, omega, p, wave.amplitude);
}

}  // namespace

IncidentField::IncidentField(const std::vector<HarmonicLayer>& layers, const PlaneWave& wave, double omega,
                             bool three_d)
    : wave_(checked_wave(layers, wave, omega, three_d)),
      cos_az_(three_d ? std::cos(wave.azimuth) : 1.0),
      sin_az_(three_d ? std::sin(wave.azimuth) : 0.0) {}

std::array<Complex, 3> IncidentField::at(double x, double y, double depth) const {
  const auto u = wave_.displacement(x * cos_az_ + y * sin_az_, depth);
  return {u[0] * cos_az_ - u[1] * sin_az_, u[0] * sin_az_ + u[1] * cos_az_, u[2]};
}

}  // namespace voidsign::solver
