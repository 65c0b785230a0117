// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/threshold.hpp"

#include <yaml-cpp/yaml.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <sstream>

#include "cli/commands/ambient_run.hpp"
#include "cli/commands/dynamic_run.hpp"
#include "cli/commands/transient_run.hpp"
#include "cli/commands/static_run.hpp"
#include "cli/errors.hpp"

namespace voidsign::cli {

namespace {

constexpr double k_min = 1.0 / 64;
constexpr int max_runs_per_row = 24;

std::string read_text(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(file.string() + ": cannot read the scenario again for the threshold search");
  std::ostringstream buf;
  buf << in.rdbuf();
  return buf.str();
}

void scale_number(YAML::Node n, double k) { n = n.as<double>() * k; }

}  // namespace

std::string scaled_scenario_text(const Scenario& s, double k, const std::string& analysis) {
  YAML::Node root = YAML::Load(read_text(s.file));
  YAML::Node v = root["voids"][0];
  const std::string shape = v["shape"].as<std::string>();
  if (shape == "circle" || shape == "sphere" || shape == "tunnel") {
    scale_number(v["radius"], k);
  } else if (shape == "ellipse") {
    scale_number(v["axes"][0], k);
    scale_number(v["axes"][1], k);
  } else if (shape == "rectangle") {
    scale_number(v["width"], k);
    scale_number(v["height"], k);
  } else if (shape == "box") {
    for (int i = 0; i < 3; ++i) scale_number(v["size"][i], k);
  } else if (shape == "polygon") {
    double cx = 0, cz = 0;
    const std::size_t n = v["points"].size();
    for (std::size_t i = 0; i < n; ++i) {
      cx += v["points"][i][0].as<double>() / static_cast<double>(n);
      cz += v["points"][i][1].as<double>() / static_cast<double>(n);
    }
    for (std::size_t i = 0; i < n; ++i) {
      v["points"][i][0] = cx + k * (v["points"][i][0].as<double>() - cx);
      v["points"][i][1] = cz + k * (v["points"][i][1].as<double>() - cz);
    }
  }
  if (k < 1) {
    // Keep the void's outline as well resolved as in the scenario.
    YAML::Node mesh = root["mesh"];
    if (mesh && mesh["near-void"]) scale_number(mesh["near-void"], k);
  }
  YAML::Node analyses = root["analyses"];
  YAML::Node kept;
  if (analysis == "static")
    kept["static"] = YAML::Node(YAML::NodeType::Map);
  else
    kept[analysis] = analyses[analysis];
  root["analyses"] = kept;
  YAML::Emitter out;
  out << root;
  return std::string(out.c_str()) + "\n";
}

std::vector<ThresholdResult> find_thresholds(const Scenario& s, const Detectability& d, ProgressLine* progress) {
  std::vector<ThresholdResult> out;
  if (s.voids.empty()) return out;
  const Void& v0 = s.voids.front();
  const bool radial = v0.shape == Void::Shape::circle || v0.shape == Void::Shape::sphere || v0.shape == Void::Shape::tunnel;

  // Every run's SNRs by (analysis family, k); nullopt where the scenario rejects the size.
  std::map<std::pair<std::string, double>, std::optional<std::map<std::string, double>>> cache;
  auto evaluate = [&](const std::string& family, double k) -> const std::optional<std::map<std::string, double>>& {
    auto key = std::make_pair(family, k);
    if (auto it = cache.find(key); it != cache.end()) return it->second;
    std::optional<std::map<std::string, double>> snrs;
    try {
      const Scenario sk = parse_scenario(scaled_scenario_text(s, k, family), s.file);
      Detectability dk;
      dk.threshold = d.threshold;
      if (family == "static") {
        const StaticRun run = run_static(sk, nullptr);
        add_static_verdicts(sk, run, dk);
      } else {
        mesh::Quality q;
        const auto m = build_checked_mesh(sk, &q, nullptr);
        if (family == "ambient") add_ambient_verdicts(sk, run_ambient(sk, *m, nullptr), *m, dk);
        if (family == "harmonic") add_harmonic_verdicts(sk, run_harmonic(sk, *m, nullptr), *m, dk);
        if (family == "transient") add_transient_verdicts(sk, run_transient(sk, *m, nullptr), *m, dk);
      }
      snrs.emplace();
      for (const Verdict& r : dk.rows) (*snrs)[r.analysis + "|" + r.sensor] = r.snr;
    } catch (const InputError&) {
      // the scaled void no longer fits: the end of the range
    }
    return cache[key] = snrs;
  };

  for (std::size_t i = 0; i < d.rows.size(); ++i) {
    const Verdict& row = d.rows[i];
    const std::string family = row.analysis.rfind("ambient", 0) == 0 ? "ambient" : row.analysis;
    const std::string id = row.analysis + "|" + row.sensor;
    if (progress) progress->step("threshold search: " + row.sensor + " (" + row.analysis + ")", static_cast<double>(i) / static_cast<double>(d.rows.size()));
    ThresholdResult t;
    t.analysis = row.analysis;
    t.sensor = row.sensor;
    t.parameter = radial ? "radius" : "scale";
    t.base = radial ? v0.radius : 1.0;
    const double target = std::log(d.threshold);
    auto f_of = [&](double k) -> std::optional<double> {
      ++t.runs;
      const auto& r = evaluate(family, k);
      if (!r || !r->count(id) || !(r->at(id) > 0)) return std::nullopt;
      return std::log(r->at(id)) - target;
    };
    // Bracket [ka (below the threshold), kb (at or above)].
    double ka = 1, kb = 1, fa = 0, fb = 0;
    const double f1 = row.snr > 0 ? std::log(row.snr) - target : -INFINITY;
    bool bracketed = false;
    if (f1 >= 0) {
      kb = 1;
      fb = f1;
      for (double k = 0.5; k >= k_min; k /= 2) {
        const auto f = f_of(k);
        if (!f) break;
        if (*f < 0) {
          ka = k;
          fa = *f;
          bracketed = true;
          break;
        }
        kb = k;
        fb = *f;
      }
      if (!bracketed) {
        t.status = ThresholdResult::Status::below_range;
        t.value = t.base * kb;
        t.snr = std::exp(fb + target);
      }
    } else {
      ka = 1;
      fa = f1;
      for (double k = 2; k <= 64; k *= 2) {
        const auto f = f_of(k);
        if (!f) break;  // the void no longer fits
        if (*f >= 0) {
          kb = k;
          fb = *f;
          bracketed = true;
          break;
        }
        ka = k;
        fa = *f;
      }
      if (!bracketed) {
        t.status = ThresholdResult::Status::above_range;
        t.value = t.base * ka;
        t.snr = std::isfinite(fa) ? std::exp(fa + target) : 0.0;
      }
    }
    if (bracketed) {
      // Regula falsi on g(ln k) = ln SNR − ln threshold, Illinois variant; kb is always detectable.
      int side = 0;
      while (t.runs < max_runs_per_row && fb > 0.01 && std::log(kb / ka) > 1e-4) {
        const double la = std::log(ka), lb = std::log(kb);
        double lc = std::isfinite(fa) ? lb - fb * (lb - la) / (fb - fa) : 0.5 * (la + lb);
        if (!(lc > la && lc < lb)) lc = 0.5 * (la + lb);
        const double kc = std::exp(lc);
        const auto fc = f_of(kc);
        if (!fc) break;
        if (*fc >= 0) {
          kb = kc;
          fb = *fc;
          if (side == 1) fa /= 2;
          side = 1;
        } else {
          ka = kc;
          fa = *fc;
          if (side == -1) fb /= 2;
          side = -1;
        }
      }
      // The halvings of the Illinois step scale f for the interpolation only; report the run.
      const auto& r = evaluate(family, kb);
      t.status = ThresholdResult::Status::found;
      t.value = t.base * kb;
      t.snr = r && r->count(id) ? r->at(id) : 0.0;
    }
    out.push_back(t);
  }
  if (progress) progress->done();
  return out;
}

nlohmann::json thresholds_json(const std::vector<ThresholdResult>& t) {
  nlohmann::json a = nlohmann::json::array();
  for (const auto& r : t) {
    const char* status = r.status == ThresholdResult::Status::found         ? "found"
                         : r.status == ThresholdResult::Status::below_range ? "detectable at the smallest size tried"
                                                                            : "not detectable at the largest size that fits";
    a.push_back({{"analysis", r.analysis}, {"sensor", r.sensor}, {"parameter", r.parameter}, {"scenario_value", r.base},
                 {"threshold_value", r.value}, {"snr_there", r.snr}, {"status", status}, {"runs", r.runs}});
  }
  return a;
}

void print_thresholds(const std::vector<ThresholdResult>& t, double threshold) {
  if (t.empty()) return;
  std::printf("\nSmallest detectable void 0 at its depth (SNR >= %g; the model re-run at each size tried):\n", threshold);
  for (const auto& r : t) {
    const char* unit = r.parameter == "radius" ? " m" : "";
    if (r.status == ThresholdResult::Status::found)
      std::printf("  %-24s %-24s %s %.4g%s (scenario: %.4g%s), re-run SNR %.3g, %d runs\n", r.analysis.c_str(), r.sensor.c_str(),
                  r.parameter.c_str(), r.value, unit, r.base, unit, r.snr, r.runs);
    else if (r.status == ThresholdResult::Status::below_range)
      std::printf("  %-24s %-24s detectable down to %s %.4g%s, the smallest tried (SNR %.3g)\n", r.analysis.c_str(), r.sensor.c_str(),
                  r.parameter.c_str(), r.value, unit, r.snr);
    else
      std::printf("  %-24s %-24s not detectable up to %s %.4g%s, the largest that fits or was tried (SNR %.3g)\n", r.analysis.c_str(),
                  r.sensor.c_str(), r.parameter.c_str(), r.value, unit, r.snr);
  }
}

}  // namespace voidsign::cli
