// SPDX-License-Identifier: GPL-3.0-or-later
// Ambient-noise propagation: the band integral and the incoherent sum of load cases.
#include <doctest/doctest.h>

#include <cmath>
#include <complex>
#include <stdexcept>
#include <vector>

#include "solver/analysis/ambient.hpp"

using namespace voidsign;

namespace {

std::vector<double> log_grid(double lo, double hi, int n) {
  std::vector<double> f;
  for (int k = 0; k < n; ++k) f.push_back(lo * std::pow(hi / lo, static_cast<double>(k) / (n - 1)));
  return f;
}

}  // namespace

TEST_CASE("ambient band integral: exact for 1/f, second order for power laws, edges between samples") {
  const auto f = log_grid(0.1, 20, 31);
  std::vector<double> inv(f.size()), pow2(f.size());
  for (std::size_t i = 0; i < f.size(); ++i) {
    inv[i] = 3.0 / f[i];
    pow2[i] = f[i] * f[i];
  }
  // ∫ 3/f df = 3 ln(hi/lo), also between samples.
  CHECK(solver::integrate_log(f, inv, 0.1, 20) == doctest::Approx(3 * std::log(200.0)).epsilon(1e-12));
  CHECK(solver::integrate_log(f, inv, 0.37, 5.3) == doctest::Approx(3 * std::log(5.3 / 0.37)).epsilon(1e-12));
  // ∫ f² df = (hi³ − lo³)/3: the rule converges at second order in the log step.
  const double exact = (std::pow(20.0, 3) - std::pow(0.1, 3)) / 3;
  const double e31 = std::abs(solver::integrate_log(f, pow2, 0.1, 20) / exact - 1);
  const auto f2 = log_grid(0.1, 20, 61);
  std::vector<double> p2(f2.size());
  for (std::size_t i = 0; i < f2.size(); ++i) p2[i] = f2[i] * f2[i];
  const double e61 = std::abs(solver::integrate_log(f2, p2, 0.1, 20) / exact - 1);
  CHECK(e31 < 0.05);
  CHECK(e31 / e61 == doctest::Approx(4).epsilon(0.05));
  CHECK(solver::integrate_log(f, inv, 2, 2) == 0);
  CHECK_THROWS_AS(solver::integrate_log(f, inv, 0.05, 2), std::invalid_argument);
  CHECK_THROWS_AS(solver::integrate_log(f, inv, 1, 30), std::invalid_argument);
  const std::vector<double> bad{1, 0.5};
  CHECK_THROWS_AS(solver::integrate_log(bad, std::vector<double>{1, 1}, 0.6, 0.9), std::invalid_argument);
}

TEST_CASE("ambient load cases add in power; the anomaly of each case is its coherent difference") {
  using C = std::complex<double>;
  // Two cases, two frequencies, one point with two components.
  const solver::CaseResponses ref{{{C(1, 0), C(0, 0)}, {C(1, 0), C(0, 0)}}, {{C(0, 0), C(0, 2)}, {C(0, 0), C(0, 2)}}};
  const solver::CaseResponses vd{{{C(1.1, 0), C(0, 0)}, {C(0.9, 0.1), C(0, 0)}}, {{C(0, 0), C(0, 2)}, {C(0, 0), C(0.3, 2)}}};
  const std::vector<std::vector<double>> w{{4, 4}, {0.25, 1}};
  const auto psd = solver::combine_cases(vd, ref, w);
  CHECK(psd.reference[0][0] == doctest::Approx(4));
  CHECK(psd.reference[0][1] == doctest::Approx(1));  // 0.25 · |2i|²
  CHECK(psd.reference[1][1] == doctest::Approx(4));
  CHECK(psd.model[0][0] == doctest::Approx(4 * 1.21));
  CHECK(psd.anomaly[0][0] == doctest::Approx(4 * 0.01));
  CHECK(psd.anomaly[1][0] == doctest::Approx(4 * (0.01 + 0.01)));
  CHECK(psd.anomaly[1][1] == doctest::Approx(1 * 0.09));
  CHECK(psd.anomaly[0][1] == doctest::Approx(0).scale(1));
  const std::vector<std::vector<double>> neg{{-1, 4}, {0.25, 1}};
  CHECK_THROWS_AS(solver::combine_cases(vd, ref, neg), std::invalid_argument);
  // Band RMS of a flat PSD S over [lo, hi]: √(S (hi − lo)).
  const auto f = log_grid(1, 4, 200);
  const std::vector<std::vector<double>> flat(f.size(), std::vector<double>{2.0, 8.0});
  const auto rms = solver::band_rms(f, flat, 1, 4);
  CHECK(rms[0] == doctest::Approx(std::sqrt(6.0)).epsilon(1e-4));
  CHECK(rms[1] == doctest::Approx(std::sqrt(24.0)).epsilon(1e-4));
}
