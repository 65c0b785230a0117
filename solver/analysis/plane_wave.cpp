// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/plane_wave.hpp"

#include <omp.h>

#include <Eigen/Dense>
#include <unsupported/Eigen/FFT>
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <exception>
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

// ---------------------------------------------------------------------------------------------
// The pulse in time.

namespace {

// Weights of four-point Lagrange interpolation at s ∈ [0, 3] on the nodes 0, 1, 2, 3.
std::array<double, 4> lagrange4(double s) {
  return {-(s - 1) * (s - 2) * (s - 3) / 6, s * (s - 2) * (s - 3) / 2, -s * (s - 1) * (s - 3) / 2, s * (s - 1) * (s - 2) / 6};
}

// The first node of a four-point stencil around position `pos` on nodes 0 … n − 1, and the
// position relative to it.
std::pair<std::size_t, double> stencil(double pos, std::size_t n) {
  const double base = std::clamp(std::floor(pos) - 1, 0.0, static_cast<double>(n - 4));
  return {static_cast<std::size_t>(base), pos - base};
}

double unit_ricker(double peak_hz, double tau) {
  const double a = std::numbers::pi * peak_hz * tau;
  return (1 - 2 * a * a) * std::exp(-a * a);
}

}  // namespace

namespace {

// The range of the delay p·h over the corners of the (x, y) range.
std::array<double, 2> delay_range(double p, double cos_az, double sin_az, const std::array<double, 4>& xy) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double x : {xy[0], xy[1]})
    for (double y : {xy[2], xy[3]}) {
      const double ph = p * (x * cos_az + y * sin_az);
      lo = std::min(lo, ph);
      hi = std::max(hi, ph);
    }
  return {lo, hi};
}

// How much earlier than at the top of the half-space on h = 0 the incident wave reaches the
// earliest point of the range: points upstream (p h < 0) and points below that top (the incident
// wave is still coming up there).
double arrival_lead(const PlaneWavePulse::Spec& spec, double max_depth, const std::array<double, 4>& xy) {
  const Elastic& rock = spec.layers.back().elastic;
  const double p = incidence_slowness(rock, spec.kind, spec.incidence);
  const double ca = spec.three_d ? std::cos(spec.azimuth) : 1.0, sa = spec.three_d ? std::sin(spec.azimuth) : 0.0;
  const auto [ph_lo, ph_hi] = delay_range(p, ca, sa, xy);
  double rock_top = 0;
  for (std::size_t j = 0; j + 1 < spec.layers.size(); ++j) rock_top += spec.layers[j].thickness;
  const auto [lam, mu] = lame(rock);
  const double v_in = std::sqrt((spec.kind == WaveKind::p ? lam + 2 * mu : mu) / rock.density);
  const double eta = std::sqrt(std::max(0.0, 1 / (v_in * v_in) - p * p));
  return std::max(0.0, -ph_lo) + std::max(0.0, max_depth - rock_top) * eta;
}

}  // namespace

double PlaneWavePulse::automatic_delay(const Spec& spec, double max_depth, std::array<double, 4> xy_range) {
  if (spec.layers.empty() || !(spec.peak_hz > 0)) throw std::invalid_argument("plane-wave pulse: no layers or no peak frequency");
  return 1.5 / spec.peak_hz + arrival_lead(spec, std::max(max_depth, 0.0), xy_range);
}

PlaneWavePulse::PlaneWavePulse(const Spec& spec, double t_end, double max_depth, std::array<double, 4> xy_range)
    : spec_(spec) {
  if (spec.layers.empty()) throw std::invalid_argument("plane-wave pulse: no layers");
  if (spec.kind == WaveKind::sh && !spec.three_d)
    throw std::invalid_argument("plane-wave pulse: SH waves (motion out of the plane) need a 3D model");
  if (!(std::abs(spec.incidence) < std::numbers::pi / 2))
    throw std::invalid_argument("plane-wave pulse: the angle of incidence must be below 90 degrees");
  if (!(spec.peak_hz > 0)) throw std::invalid_argument("plane-wave pulse: peak frequency must be > 0");
  if (!(t_end > 0)) throw std::invalid_argument("plane-wave pulse: end time must be > 0");
  if (spec.delay_s < 0) throw std::invalid_argument("plane-wave pulse: delay must be >= 0");
  max_depth = std::max(max_depth, 0.0);
  const double f0 = spec.peak_hz;
  p_ = incidence_slowness(spec.layers.back().elastic, spec.kind, spec.incidence);
  cos_az_ = spec.three_d ? std::cos(spec.azimuth) : 1.0;
  sin_az_ = spec.three_d ? std::sin(spec.azimuth) : 0.0;
  comps_ = spec.kind == WaveKind::sh ? 1 : 2;

  const auto [ph_lo, ph_hi] = delay_range(p_, cos_az_, sin_az_, xy_range);
  const std::size_t n_layers = spec.layers.size();
  top_.assign(n_layers, 0);
  for (std::size_t j = 1; j < n_layers; ++j) {
    if (!(spec.layers[j - 1].thickness > 0)) throw std::invalid_argument("plane-wave pulse: layer thickness must be > 0");
    top_[j] = top_[j - 1] + spec.layers[j - 1].thickness;
  }
  const double lead = arrival_lead(spec, max_depth, xy_range);
  delay_ = spec.delay_s > 0 ? spec.delay_s : 1.5 / f0 + lead;
  earliest_ = delay_ - lead - 1.5 / f0;

  // Histories over τ = t − p h ∈ [−max p h, t_end − min p h].
  dt_ = 1 / (40 * f0);
  tau0_ = std::min(-ph_hi, delay_ - 1.5 / f0) - 2 * dt_;
  const double tau_hi = t_end - ph_lo + 2 * dt_;
  n_tau_ = static_cast<std::size_t>(std::ceil((tau_hi - tau0_) / dt_)) + 1;
  n_tau_ = std::max<std::size_t>(n_tau_, 4);
  const double window = 8 * static_cast<double>(n_tau_) * dt_ + 30.0;
  n_fft_ = 1024;
  while (static_cast<double>(n_fft_) * dt_ < window) n_fft_ *= 2;

  // Depth samples, uniform within each layer that the range reaches (a point on an interface
  // belongs to the layer above, as in LayeredPlaneWave).
  const double f_depth = 2.5 * f0;
  for (std::size_t j = 0; j < n_layers; ++j) {
    if (j > 0 && !(max_depth > top_[j])) break;
    const auto [lj, mj] = lame(spec.layers[j].elastic);
    const double dz = std::sqrt(mj / spec.layers[j].elastic.density) / f_depth / 20;
    const double bottom = j + 1 < n_layers ? top_[j + 1] : std::numeric_limits<double>::infinity();
    const double end = std::min(bottom, std::max(max_depth, top_[j] + 3 * dz));
    const double len = end - top_[j];
    const auto n_int = static_cast<std::size_t>(std::max(3.0, std::ceil(len / dz)));
    spans_.push_back({depth_.size(), n_int + 1, top_[j], len / static_cast<double>(n_int)});
    for (std::size_t i = 0; i <= n_int; ++i) depth_.push_back(top_[j] + len * static_cast<double>(i) / static_cast<double>(n_int));
  }

  // The sampled wavelet's spectrum.
  Eigen::FFT<double> fft;
  std::vector<Complex> r(n_fft_), rs(n_fft_);
  for (std::size_t k = 0; k < n_fft_; ++k) r[k] = unit_ricker(f0, tau0_ + static_cast<double>(k) * dt_ - delay_);
  fft.fwd(rs.data(), r.data(), static_cast<Eigen::DenseIndex>(n_fft_));
  const double df = 1 / (static_cast<double>(n_fft_) * dt_);
  const auto k_cut = std::min(n_fft_ / 2 - 1, static_cast<std::size_t>(std::floor(6 * f0 / df)));

  // Transfer functions T[k][sample][comp] for k = 1 … k_cut (the wavelet has no content at 0 Hz
  // and none worth keeping above 6 f0, where its spectrum is below 1e-13 of its peak).
  const std::size_t ns = depth_.size(), nc = static_cast<std::size_t>(comps_);
  std::vector<Complex> transfer(k_cut * ns * nc);
  std::exception_ptr error;
#pragma omp parallel for schedule(dynamic, 8)
  for (std::int64_t kk = 1; kk <= static_cast<std::int64_t>(k_cut); ++kk) {
    try {
      const double w = 2 * std::numbers::pi * df * static_cast<double>(kk);
      const LayeredPlaneWave wave(rayleigh_layers(spec.layers, w), spec.kind, w, p_, 1.0);
      Complex* out = &transfer[(static_cast<std::size_t>(kk) - 1) * ns * nc];
      for (std::size_t s = 0; s < ns; ++s) {
        const auto u = wave.displacement(0, depth_[s]);
        if (comps_ == 1) {
          out[s] = u[1];
        } else {
          out[2 * s] = u[0];
          out[2 * s + 1] = u[2];
        }
      }
    } catch (...) {
#pragma omp critical(voidsign_pulse_error)
      if (!error) error = std::current_exception();
    }
  }
  if (error) std::rethrow_exception(error);

  // Histories: amplitude × inverse FFT of R T (and of iω R T for the velocity).
  u_.assign(ns * nc * n_tau_, 0.0);
  v_.assign(u_.size(), 0.0);
#pragma omp parallel
  {
    Eigen::FFT<double> local;
    std::vector<Complex> y(n_fft_), x(n_fft_);
#pragma omp for schedule(dynamic, 1)
    for (std::int64_t q = 0; q < static_cast<std::int64_t>(ns * nc); ++q) {
      const auto s = static_cast<std::size_t>(q) / nc, c = static_cast<std::size_t>(q) % nc;
      for (int velocity = 0; velocity < 2; ++velocity) {
        std::fill(y.begin(), y.end(), Complex(0.0));
        for (std::size_t k = 1; k <= k_cut; ++k) {
          Complex val = rs[k] * transfer[(k - 1) * ns * nc + s * nc + c];
          if (velocity) val *= Complex(0.0, 2 * std::numbers::pi * df * static_cast<double>(k));
          y[k] = val;
          y[n_fft_ - k] = std::conj(val);
        }
        local.inv(x.data(), y.data(), static_cast<Eigen::DenseIndex>(n_fft_));
        double* dst = &(velocity ? v_ : u_)[static_cast<std::size_t>(q) * n_tau_];
        for (std::size_t k = 0; k < n_tau_; ++k) dst[k] = spec.amplitude * x[k].real();
      }
    }
  }
}

double PlaneWavePulse::bytes() const { return 8.0 * static_cast<double>(u_.size() + v_.size()); }

void PlaneWavePulse::at(double x, double y, double depth, double t, double* u, double* v) const {
  const int d = spec_.three_d ? 3 : 2;
  const double h = x * cos_az_ + y * sin_az_;
  const double pos_t = (t - p_ * h - tau0_) / dt_;
  double uc[2] = {0, 0}, vc[2] = {0, 0};
  if (pos_t >= 0 && pos_t <= static_cast<double>(n_tau_ - 1)) {
    std::size_t j = 0;
    while (j + 1 < spans_.size() && depth > top_[j + 1]) ++j;
    const Span& sp = spans_[j];
    const auto [bz, sz] = stencil((depth - sp.top) / sp.step, sp.count);
    const auto [bt, st] = stencil(pos_t, n_tau_);
    const auto wz = lagrange4(sz), wt = lagrange4(st);
    for (int c = 0; c < comps_; ++c)
      for (std::size_t a = 0; a < 4; ++a) {
        const std::size_t row = ((sp.first + bz + a) * static_cast<std::size_t>(comps_) + static_cast<std::size_t>(c)) * n_tau_ + bt;
        double su = 0, sv = 0;
        for (std::size_t b = 0; b < 4; ++b) {
          su += wt[b] * u_[row + b];
          sv += wt[b] * v_[row + b];
        }
        uc[c] += wz[a] * su;
        vc[c] += wz[a] * sv;
      }
  }
  // (h, z) or t to model axes.
  double ux, uy, uz, vx, vy, vz;
  if (comps_ == 1) {
    ux = -uc[0] * sin_az_, uy = uc[0] * cos_az_, uz = 0;
    vx = -vc[0] * sin_az_, vy = vc[0] * cos_az_, vz = 0;
  } else {
    ux = uc[0] * cos_az_, uy = uc[0] * sin_az_, uz = uc[1];
    vx = vc[0] * cos_az_, vy = vc[0] * sin_az_, vz = vc[1];
  }
  if (d == 3) {
    u[0] = ux, u[1] = uy, u[2] = uz;
    v[0] = vx, v[1] = vy, v[2] = vz;
  } else {
    u[0] = ux, u[1] = uz;
    v[0] = vx, v[1] = vz;
  }
}

}  // namespace voidsign::solver
