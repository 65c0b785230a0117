// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analysis/ambient.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

namespace voidsign::solver {

namespace {

// f·g at x = ln f by linear interpolation between samples i and i + 1.
double fg_at(std::span<const double> f, std::span<const double> g, std::size_t i, double x) {
  const double x0 = std::log(f[i]), x1 = std::log(f[i + 1]);
  const double y0 = f[i] * g[i], y1 = f[i + 1] * g[i + 1];
  const double t = x1 > x0 ? (x - x0) / (x1 - x0) : 0.0;
  return y0 + t * (y1 - y0);
}

}  // namespace

double integrate_log(std::span<const double> f, std::span<const double> g, double lo, double hi) {
  if (f.size() != g.size() || f.empty()) throw std::invalid_argument("integrate_log: sample arrays differ in length or are empty");
  for (std::size_t i = 0; i < f.size(); ++i)
    if (!(f[i] > 0) || (i > 0 && !(f[i] > f[i - 1])))
      throw std::invalid_argument("integrate_log: frequencies must be positive and strictly increasing");
  const double tol = 1e-9 * f.back();
  if (lo < f.front() - tol || hi > f.back() + tol || hi < lo)
    throw std::invalid_argument("integrate_log: band [" + std::to_string(lo) + ", " + std::to_string(hi) +
                                "] Hz is not inside the sampled range [" + std::to_string(f.front()) + ", " +
                                std::to_string(f.back()) + "] Hz");
  lo = std::clamp(lo, f.front(), f.back());
  hi = std::clamp(hi, f.front(), f.back());
  if (f.size() == 1 || hi == lo) return 0;
  double sum = 0;
  const double xl = std::log(lo), xh = std::log(hi);
  for (std::size_t i = 0; i + 1 < f.size(); ++i) {
    const double a = std::max(xl, std::log(f[i])), b = std::min(xh, std::log(f[i + 1]));
    if (b <= a) continue;
    sum += 0.5 * (b - a) * (fg_at(f, g, i, a) + fg_at(f, g, i, b));
  }
  return sum;
}

AmbientPsd combine_cases(const CaseResponses& voided, const CaseResponses& reference,
                         const std::vector<std::vector<double>>& weights) {
  if (voided.size() != reference.size() || weights.size() != voided.size() || voided.empty())
    throw std::invalid_argument("combine_cases: the load cases of the two models and the weights differ in number");
  const std::size_t nf = reference[0].size();
  const std::size_t n = nf ? reference[0][0].size() : 0;
  AmbientPsd out;
  out.model.assign(nf, std::vector<double>(n, 0.0));
  out.reference = out.model;
  out.anomaly = out.model;
  for (std::size_t c = 0; c < voided.size(); ++c) {
    if (voided[c].size() != nf || reference[c].size() != nf || weights[c].size() != nf)
      throw std::invalid_argument("combine_cases: a load case has a different number of frequencies");
    for (std::size_t f = 0; f < nf; ++f) {
      const double w = weights[c][f];
      if (!(w >= 0)) throw std::invalid_argument("combine_cases: negative or undefined weight");
      const auto& hv = voided[c][f];
      const auto& hr = reference[c][f];
      if (hv.size() != n || hr.size() != n) throw std::invalid_argument("combine_cases: responses differ in size");
      for (std::size_t k = 0; k < n; ++k) {
        out.model[f][k] += w * std::norm(hv[k]);
        out.reference[f][k] += w * std::norm(hr[k]);
        out.anomaly[f][k] += w * std::norm(hv[k] - hr[k]);
      }
    }
  }
  return out;
}

std::vector<double> band_rms(std::span<const double> f, const std::vector<std::vector<double>>& psd, double lo, double hi) {
  if (psd.size() != f.size()) throw std::invalid_argument("band_rms: one PSD row per frequency expected");
  const std::size_t n = psd.empty() ? 0 : psd[0].size();
  std::vector<double> out(n, 0.0), column(f.size());
  for (std::size_t k = 0; k < n; ++k) {
    for (std::size_t i = 0; i < f.size(); ++i) column[i] = psd[i][k];
    out[k] = std::sqrt(std::max(0.0, integrate_log(f, column, lo, hi)));
  }
  return out;
}

}  // namespace voidsign::solver
