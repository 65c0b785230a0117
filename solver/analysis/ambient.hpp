// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Ambient ground motion through the harmonic transfer functions of a model: a stationary random
/// wavefield, described by its one-sided power spectral density (PSD), made of mutually
/// incoherent load cases (a plane P wave, a plane S wave, sources on either side, …). With H_c
/// the complex response of a point to load case c at unit amplitude and w_c(f) ≥ 0 the power
/// given to that case, the displacement PSD of each component there is
///
///   S_u(f) = Σ_c w_c(f) |H_c(f)|²,       and of the anomaly  S_Δu(f) = Σ_c w_c(f) |H_c − H_c,ref|²,
///
/// (incoherent cases add in power; the anomaly of each case is the coherent difference of the two
/// models under the same realisation). RMS over a band [f₁, f₂] = √(∫ S df). docs/theory.md,
/// "Ambient noise", states the wavefield assumptions that choose the cases and the weights.
#include <complex>
#include <cstddef>
#include <span>
#include <vector>

namespace voidsign::solver {

/// ∫ g(f) df over [lo, hi] from samples g at ascending frequencies f [Hz] (f > 0), by the
/// trapezoidal rule on f·g in ln f (exact for g ∝ 1/f; on a log-spaced grid the natural rule),
/// with f·g interpolated linearly in ln f at band edges between samples. Requires
/// f.front() ≤ lo ≤ hi ≤ f.back() (to a relative 1e-9); throws std::invalid_argument otherwise.
double integrate_log(std::span<const double> f, std::span<const double> g, double lo, double hi);

/// The responses of one model: per load case, per frequency, n_points × d complex displacements
/// [m per unit case amplitude], point-major then component.
using CaseResponses = std::vector<std::vector<std::vector<std::complex<double>>>>;  // [case][f][q·d + j]

/// Displacement PSDs [m²/Hz] of one model and of the anomaly, laid out [f][q·d + j].
struct AmbientPsd {
  std::vector<std::vector<double>> model, reference, anomaly;
};

/// Combines incoherent load cases: weights[c][f] is the power w_c(f) [m²/Hz per unit amplitude²].
/// `voided` and `reference` must have the same shape. Throws std::invalid_argument on a shape
/// mismatch or a negative weight.
AmbientPsd combine_cases(const CaseResponses& voided, const CaseResponses& reference,
                         const std::vector<std::vector<double>>& weights);

/// RMS [m] of each entry of a PSD laid out [f][k] over [lo, hi]: √∫ S_k df (integrate_log).
std::vector<double> band_rms(std::span<const double> f, const std::vector<std::vector<double>>& psd, double lo, double hi);

}  // namespace voidsign::solver
