// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/verdict.hpp"

#include "cli/commands/model_setup.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <numbers>
#include <sstream>

#include "solver/signals/instrument.hpp"
#include "solver/signals/noise_model.hpp"
#include "solver/signals/sensor_catalogue.hpp"

namespace voidsign::cli {

namespace {

using solver::MeasuredQuantity;
using solver::SensorKind;

std::string fmt(double v, int prec = 3) {
  std::ostringstream os;
  os.precision(prec);
  os << v;
  return os.str();
}

void finish(Verdict& v, double threshold) {
  v.snr = v.noise > 0 ? v.signal / v.noise : 0;
  v.detectable = v.snr >= threshold;
  v.factor = v.detectable ? v.snr / threshold : (v.snr > 0 ? threshold / v.snr : std::numeric_limits<double>::infinity());
}

Verdict start(const std::string& analysis, const SensorUse& u) {
  Verdict v;
  v.analysis = analysis;
  v.sensor = u.label;
  v.quantity = std::string(solver::quantity_name(u.spec.quantity));
  v.unit = std::string(solver::quantity_unit(u.spec.quantity));
  return v;
}

solver::RadarGeometry geometry_of(const SensorUse& u) { return solver::radar_geometry(u.spec); }

std::string radar_how(const SensorUse& u) {
  const auto g = geometry_of(u);
  const double p = u.spec.footprint_m ? u.spec.footprint_m->value : 0;
  return "line of sight, incidence " + fmt(g.incidence_deg) + " deg, heading " + fmt(g.heading_deg) + " deg, " +
         (g.look == solver::LookSide::right ? "right" : "left") + "-looking" +
         (p > 0 ? ", averaged over " + fmt(p) + " m pixels" : ", point value");
}

// The static profile (2D) or a line through the voids along x (3D) the surveys follow.
struct Profile {
  std::vector<double> x, dux, duz;  // duz relative to the far field
  double y = 0;
};

// Linear interpolation inside the surface triangles (corner nodes) of a 3D map.
std::optional<std::array<double, 2>> sample_map(const solver::SurfaceMap& map, double x, double y) {
  const std::size_t npt = static_cast<std::size_t>(map.nodes_per_triangle);
  for (std::size_t t = 0; t + npt <= map.triangles.size(); t += npt) {
    const auto& a = map.points[static_cast<std::size_t>(map.triangles[t])];
    const auto& b = map.points[static_cast<std::size_t>(map.triangles[t + 1])];
    const auto& c = map.points[static_cast<std::size_t>(map.triangles[t + 2])];
    const double det = (b.x - a.x) * (c.y - a.y) - (c.x - a.x) * (b.y - a.y);
    if (det == 0) continue;
    const double l1 = ((x - a.x) * (c.y - a.y) - (c.x - a.x) * (y - a.y)) / det;
    const double l2 = ((b.x - a.x) * (y - a.y) - (x - a.x) * (b.y - a.y)) / det;
    const double l0 = 1 - l1 - l2;
    if (l0 < -1e-9 || l1 < -1e-9 || l2 < -1e-9) continue;
    return std::array<double, 2>{l0 * a.du[0] + l1 * b.du[0] + l2 * c.du[0], l0 * a.duz_rel + l1 * b.duz_rel + l2 * c.duz_rel};
  }
  return std::nullopt;
}

Profile survey_line(const Scenario& s, const StaticRun& run) {
  Profile p;
  if (run.mesh->dim() == 2) {
    for (const auto& r : run.profile) {
      p.x.push_back(r.x);
      p.dux.push_back(r.dux);
      p.duz.push_back(r.duz_rel);
    }
    return p;
  }
  p.y = y_centre_of(s);
  const double step = s.mesh.surface / 2;
  for (double x = run.mesh->x_min; x <= run.mesh->x_max + 1e-9; x += step)
    if (auto v = sample_map(run.map, std::min(x, run.mesh->x_max), p.y)) {
      p.x.push_back(std::min(x, run.mesh->x_max));
      p.dux.push_back((*v)[0]);
      p.duz.push_back((*v)[1]);
    }
  return p;
}

// Radar in 3D: the LOS anomaly averaged over square pixels tiling the surface (aligned with
// x = y = 0), each surface point weighted by its share of the surface area; the point values
// when the pixel is 0.
Verdict radar_3d(const SensorUse& u, const StaticRun& run, Verdict v) {
  const auto g = geometry_of(u);
  const auto& pts = run.map.points;
  std::vector<double> los(pts.size()), area(pts.size(), 0.0);
  for (std::size_t i = 0; i < pts.size(); ++i)
    los[i] = solver::los_displacement(g, {pts[i].du[0], pts[i].du[1], pts[i].duz_rel});
  const std::size_t npt = static_cast<std::size_t>(run.map.nodes_per_triangle);
  for (std::size_t t = 0; t + npt <= run.map.triangles.size(); t += npt) {
    const auto& a = pts[static_cast<std::size_t>(run.map.triangles[t])];
    const auto& b = pts[static_cast<std::size_t>(run.map.triangles[t + 1])];
    const auto& c = pts[static_cast<std::size_t>(run.map.triangles[t + 2])];
    const double at = 0.5 * std::abs((b.x - a.x) * (c.y - a.y) - (c.x - a.x) * (b.y - a.y));
    for (std::size_t k = 0; k < npt; ++k) area[static_cast<std::size_t>(run.map.triangles[t + k])] += at / static_cast<double>(npt);
  }
  const double p = u.spec.footprint_m ? u.spec.footprint_m->value : 0;
  if (p <= 0) {
    for (std::size_t i = 0; i < pts.size(); ++i)
      if (std::abs(los[i]) > v.signal) {
        v.signal = std::abs(los[i]);
        v.x = pts[i].x;
        v.y = pts[i].y;
      }
    return v;
  }
  std::map<std::pair<long, long>, std::array<double, 2>> cells;  // (Σ a·los, Σ a)
  for (std::size_t i = 0; i < pts.size(); ++i) {
    auto& c = cells[{std::lround(pts[i].x / p), std::lround(pts[i].y / p)}];
    c[0] += area[i] * los[i];
    c[1] += area[i];
  }
  for (const auto& [key, c] : cells)
    if (c[1] > 0 && std::abs(c[0] / c[1]) > v.signal) {
      v.signal = std::abs(c[0] / c[1]);
      v.x = static_cast<double>(key.first) * p;
      v.y = static_cast<double>(key.second) * p;
    }
  return v;
}

Verdict radar_2d(const SensorUse& u, const Profile& prof, Verdict v) {
  const auto g = geometry_of(u);
  std::vector<double> los(prof.x.size());
  for (std::size_t i = 0; i < los.size(); ++i) los[i] = solver::los_displacement_profile(g, prof.dux[i], prof.duz[i], u.profile_bearing_deg);
  const double p = u.spec.footprint_m ? u.spec.footprint_m->value : 0;
  const std::vector<double> seen = p > 0 ? solver::pixel_average(prof.x, los, p) : los;
  for (std::size_t i = 0; i < seen.size(); ++i)
    if (std::abs(seen[i]) > v.signal) {
      v.signal = std::abs(seen[i]);
      v.x = prof.x[i];
    }
  return v;
}

}  // namespace

void add_static_verdicts(const Scenario& s, const StaticRun& run, Detectability& d) {
  const bool three_d = run.mesh->dim() == 3;
  const Profile prof = survey_line(s, run);
  for (const SensorUse& u : s.sensors) {
    Verdict v = start("static", u);
    switch (u.spec.kind) {
      case SensorKind::radar_los:
        v = three_d ? radar_3d(u, run, v) : radar_2d(u, prof, v);
        v.noise = solver::static_sigma(u.spec);
        v.how = radar_how(u) + "; the whole static change between two acquisitions";
        break;
      case SensorKind::levelling:
      case SensorKind::gnss: {
        const bool horizontal = u.spec.quantity == MeasuredQuantity::horizontal_displacement;
        if (prof.x.size() < 2) {
          d.skipped.push_back({"static", u.label, "no survey line on the surface"});
          continue;
        }
        const auto b = solver::sample_benchmarks(prof.x, horizontal ? prof.dux : prof.duz, u.spec.spacing_m->value, u.origin_m);
        v.signal = std::abs(b.peak);
        v.x = b.x_peak_m;
        v.y = prof.y;
        v.noise = solver::static_sigma(u.spec, b.distance_to_reference_m);
        v.how = std::string(horizontal ? "horizontal" : "vertical") + " displacement at benchmarks every " +
                fmt(u.spec.spacing_m->value) + " m along x" + (three_d ? " (at y = " + fmt(prof.y) + " m)" : "") +
                ", relative to the datum benchmark at x = " + fmt(b.reference_x_m) + " m";
        if (u.spec.sigma_per_sqrt_km) v.how += "; sigma grows as b sqrt(distance / 1 km)";
        break;
      }
      case SensorKind::tiltmeter:
        v.signal = run.anomaly.tilt_absmax;
        v.x = run.anomaly.x_tilt_absmax;
        v.y = run.anomaly.y_tilt_absmax;
        v.noise = solver::static_sigma(u.spec);
        v.how = "placed where the anomaly's tilt is largest";
        break;
      case SensorKind::strainmeter:
        v.signal = run.anomaly.strain_absmax;
        v.x = run.anomaly.x_strain_absmax;
        v.y = run.anomaly.y_strain_absmax;
        v.noise = solver::static_sigma(u.spec);
        v.how = "placed where the anomaly's horizontal strain is largest";
        break;
      case SensorKind::seismometer:
      case SensorKind::geophone:
        d.skipped.push_back({"static", u.label, "records ground velocity; a static change has none"});
        continue;
    }
    finish(v, d.threshold);
    d.rows.push_back(v);
  }
}

void add_ambient_verdicts(const Scenario& s, const AmbientRun& run, const mesh::Mesh& m, Detectability& d) {
  const std::size_t dd = static_cast<std::size_t>(run.d), nq = run.points.size(), nf = run.frequencies_hz.size();
  const auto& f = run.frequencies_hz;
  for (const AmbientWavefield& w : run.fields) {
    const std::string analysis = w.name == "body-waves" ? "ambient, body waves" : "ambient, surface waves";
    for (const SensorUse& u : s.sensors) {
      Verdict v = start(analysis, u);
      std::vector<double> g_anom(nf), g_ref(nf);
      double lo = f.front(), hi = f.back();
      auto best_over_points = [&](const auto& psd_of) {
        // psd_of(q, k, anomaly?) → PSD at point q, frequency k
        double best = -1, ref_there = 0;
        for (std::size_t q = 0; q < nq; ++q) {
          for (std::size_t k = 0; k < nf; ++k) {
            g_anom[k] = psd_of(q, k, true);
            g_ref[k] = psd_of(q, k, false);
          }
          const double a = std::sqrt(std::max(0.0, solver::integrate_log(f, g_anom, lo, hi)));
          if (a > best) {
            best = a;
            ref_there = std::sqrt(std::max(0.0, solver::integrate_log(f, g_ref, lo, hi)));
            const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
            v.x = x[0];
            v.y = x[1];
          }
        }
        v.signal = best;
        v.ambient = ref_there;
        v.ambient_ratio = ref_there > 0 ? best / ref_there : 0.0;
      };
      if (u.spec.kind == SensorKind::seismometer || u.spec.kind == SensorKind::geophone) {
        lo = std::max(lo, u.spec.band_lo_hz->value);
        hi = std::min(hi, u.spec.band_hi_hz->value);
        if (!(hi > lo)) {
          d.skipped.push_back({analysis, u.label, "its band (" + fmt(u.spec.band_lo_hz->value) + "-" + fmt(u.spec.band_hi_hz->value) +
                                                      " Hz) does not overlap the analysis band"});
          continue;
        }
        const std::size_t z = dd - 1;
        best_over_points([&](std::size_t q, std::size_t k, bool anomaly) {
          const double w2 = std::pow(2 * std::numbers::pi * f[k], 2);
          return w2 * (anomaly ? w.psd.anomaly[k][q * dd + z] : w.psd.reference[k][q * dd + z]);
        });
        v.instrument_noise = solver::band_rms(u.spec.self_noise->psd, lo, hi);
        v.how = "vertical velocity RMS over " + fmt(lo) + "-" + fmt(hi) + " Hz at the best surface point; noise: the ambient motion "
                "there (without voids) and the sensor's self-noise over the same band, in quadrature";
      } else if (u.spec.kind == SensorKind::radar_los) {
        const auto g = geometry_of(u);
        const auto l = solver::los_unit_vector(g);
        const double window = u.spec.window_s ? u.spec.window_s->value : 0;
        // LOS of each case's complex response (2D: the profile along the bearing), window gain,
        // incoherent sum over the cases.
        const double br = u.profile_bearing_deg * std::numbers::pi / 180;
        const double lx = dd == 3 ? l.east : l.east * std::sin(br) + l.north * std::cos(br);
        const double ly = dd == 3 ? l.north : 0.0;
        best_over_points([&](std::size_t q, std::size_t k, bool anomaly) {
          double psd = 0;
          for (std::size_t c = 0; c < w.weights.size(); ++c) {
            const auto& hv = w.voided[c][k];
            const auto& hr = w.reference[c][k];
            auto los_of = [&](const std::vector<std::complex<double>>& h) {
              return dd == 3 ? lx * h[q * dd] + ly * h[q * dd + 1] + l.up * h[q * dd + 2] : lx * h[q * dd] + l.up * h[q * dd + 1];
            };
            const std::complex<double> val = anomaly ? los_of(hv) - los_of(hr) : los_of(hr);
            psd += w.weights[c][k] * std::norm(val);
          }
          const double gain = window > 0 ? solver::window_gain(f[k], window) : 1.0;
          return gain * gain * psd;
        });
        v.instrument_noise = solver::static_sigma(u.spec);
        v.how = radar_how(u) + " (point value, an upper bound), RMS over " + fmt(lo) + "-" + fmt(hi) + " Hz after averaging over its " +
                fmt(window) + " s acquisition window (|sinc(fW)|); noise: its precision and the ambient motion, in quadrature";
      } else {
        d.skipped.push_back({analysis, u.label, "a static survey reading averages over hours to days, over which ambient motion averages "
                                                "to zero"});
        continue;
      }
      // The anomaly rides on the ambient motion it is part of: in one record it has to stand out
      // against that motion as well as against the instrument (docs/detectability.md).
      v.noise = std::hypot(v.instrument_noise, v.ambient);
      v.snr_instrument = v.instrument_noise > 0 ? v.signal / v.instrument_noise : 0.0;
      finish(v, d.threshold);
      d.rows.push_back(v);
    }
  }
}

namespace {

// LOS weights of the model's components: (x, z) in 2D along the profile's bearing, (x, y, z) in 3D.
std::array<double, 3> los_weights(const SensorUse& u, int d) {
  const auto l = solver::los_unit_vector(geometry_of(u));
  const double br = u.profile_bearing_deg * std::numbers::pi / 180;
  if (d == 3) return {l.east, l.north, l.up};
  return {l.east * std::sin(br) + l.north * std::cos(br), l.up, 0.0};
}

bool seismic(const SensorUse& u) { return u.spec.kind == SensorKind::seismometer || u.spec.kind == SensorKind::geophone; }

// Self-noise RMS over [lo, hi] clipped to the sensor's table; 0 when nothing is left.
double self_noise_rms(const SensorUse& u, double lo, double hi) {
  const auto& psd = u.spec.self_noise->psd;
  lo = std::max({lo, psd.f_hz.front(), u.spec.band_lo_hz->value});
  hi = std::min({hi, psd.f_hz.back(), u.spec.band_hi_hz->value});
  return hi > lo ? solver::band_rms(psd, lo, hi) : 0.0;
}

}  // namespace

void add_harmonic_verdicts(const Scenario& s, const HarmonicRun& run, const mesh::Mesh& m, Detectability& d) {
  const auto& r = run.result;
  const int dd = m.dim() == 3 ? 3 : 2;
  for (const SensorUse& u : s.sensors) {
    Verdict v = start("harmonic", u);
    if (!seismic(u) && u.spec.kind != SensorKind::radar_los) {
      d.skipped.push_back({"harmonic", u.label, "a static survey reading averages a steady vibration to zero"});
      continue;
    }
    const double window = u.spec.window_s ? u.spec.window_s->value : 0;
    const auto lw = seismic(u) ? std::array<double, 3>{0, 0, 0} : los_weights(u, dd);
    double best_snr = -1;
    for (std::size_t f = 0; f < r.frequencies_hz.size(); ++f) {
      const double fr = r.frequencies_hz[f];
      double noise = 0;
      if (seismic(u)) {
        if (fr < u.spec.band_lo_hz->value || fr > u.spec.band_hi_hz->value) continue;
        noise = self_noise_rms(u, fr / std::sqrt(2.0), fr * std::sqrt(2.0));
        if (!(noise > 0)) continue;
      } else {
        noise = solver::static_sigma(u.spec);
      }
      for (int k : run.surface) {
        const auto seg = static_cast<Eigen::Index>(dd) * k;
        std::complex<double> du;
        double sig = 0;
        if (seismic(u)) {
          du = r.voided.u[f][seg + dd - 1] - r.reference.u[f][seg + dd - 1];
          sig = 2 * std::numbers::pi * fr * std::abs(du) / std::sqrt(2.0);  // RMS velocity of the sinusoid
        } else {
          for (int j = 0; j < dd; ++j) du += lw[static_cast<std::size_t>(j)] * (r.voided.u[f][seg + j] - r.reference.u[f][seg + j]);
          sig = std::abs(du) * (window > 0 ? solver::window_gain(fr, window) : 1.0);
        }
        if (sig / noise > best_snr) {
          best_snr = sig / noise;
          v.signal = sig;
          v.noise = noise;
          const auto& x = m.nodes[static_cast<std::size_t>(r.output_nodes[static_cast<std::size_t>(k)])];
          v.x = x[0];
          v.y = x[1];
          v.how = seismic(u) ? "RMS vertical velocity of the steady anomaly at " + fmt(fr) + " Hz; noise: the sensor's self-noise over "
                               "one octave around it (a short record; longer records narrow the band)"
                             : radar_how(u) + " (point value), anomaly amplitude at " + fmt(fr) + " Hz times |sinc(fW)| for its " +
                                   fmt(window) + " s window";
        }
      }
    }
    if (best_snr < 0) {
      d.skipped.push_back({"harmonic", u.label, "no frequency of the sweep lies in its band"});
      continue;
    }
    finish(v, d.threshold);
    d.rows.push_back(v);
  }
}

void add_transient_verdicts(const Scenario& s, const TransientRun& run, const mesh::Mesh& m, Detectability& d) {
  const auto& r = run.result;
  const std::size_t dd = m.dim() == 3 ? 3 : 2, nr = r.receivers.size(), ns = r.reference.time_s.size();
  const double dt = ns > 1 ? r.reference.time_s[1] - r.reference.time_s[0] : 0;
  const double fp = s.analyses.transient->peak_hz;
  for (const SensorUse& u : s.sensors) {
    Verdict v = start("transient", u);
    if (!seismic(u) && u.spec.kind != SensorKind::radar_los) {
      d.skipped.push_back({"transient", u.label, "a static survey reading averages a passing wave to nothing"});
      continue;
    }
    if (ns < 3) {
      d.skipped.push_back({"transient", u.label, "too few samples"});
      continue;
    }
    if (seismic(u)) {
      v.noise = self_noise_rms(u, fp / 3, 3 * fp);
      if (!(v.noise > 0)) {
        d.skipped.push_back({"transient", u.label, "its band does not overlap the wavelet's band (peak/3 to 3 x peak)"});
        continue;
      }
      for (std::size_t q = 0; q < nr; ++q)
        for (std::size_t k = 1; k + 1 < ns; ++k) {
          const double vel = (r.difference[((k + 1) * nr + q) * dd + dd - 1] - r.difference[((k - 1) * nr + q) * dd + dd - 1]) / (2 * dt);
          if (std::abs(vel) > v.signal) {
            v.signal = std::abs(vel);
            const auto& x = m.nodes[static_cast<std::size_t>(r.receivers[q])];
            v.x = x[0];
            v.y = x[1];
          }
        }
      v.how = "peak vertical velocity of the anomaly (central differences of the seismograms); noise: the sensor's self-noise RMS "
              "over " + fmt(fp / 3) + "-" + fmt(3 * fp) + " Hz";
    } else {
      const auto lw = los_weights(u, static_cast<int>(dd));
      const double window = u.spec.window_s ? u.spec.window_s->value : 0;
      const std::size_t w = std::max<std::size_t>(1, static_cast<std::size_t>(std::lround(window / dt)));
      std::vector<double> los(ns);
      for (std::size_t q = 0; q < nr; ++q) {
        for (std::size_t k = 0; k < ns; ++k) {
          double sum = 0;
          for (std::size_t j = 0; j < dd; ++j) sum += lw[j] * r.difference[(k * nr + q) * dd + j];
          los[k] = sum;
        }
        double run_sum = 0;  // moving mean over w samples
        for (std::size_t k = 0; k < ns; ++k) {
          run_sum += los[k];
          if (k >= w) run_sum -= los[k - w];
          const double mean = run_sum / static_cast<double>(std::min(k + 1, w));
          if (k + 1 >= std::min(w, ns) && std::abs(mean) > v.signal) {
            v.signal = std::abs(mean);
            const auto& x = m.nodes[static_cast<std::size_t>(r.receivers[q])];
            v.x = x[0];
            v.y = x[1];
          }
        }
      }
      v.noise = solver::static_sigma(u.spec);
      v.how = radar_how(u) + " (point value), the line-of-sight anomaly averaged over its " + fmt(window) + " s window (" +
              std::to_string(w) + " samples), largest over time";
    }
    finish(v, d.threshold);
    d.rows.push_back(v);
  }
}

nlohmann::json detectability_json(const Detectability& d) {
  nlohmann::json a = nlohmann::json::array();
  for (const Verdict& v : d.rows) {
    nlohmann::json j = {{"analysis", v.analysis}, {"sensor", v.sensor},   {"quantity", v.quantity}, {"unit", v.unit},
                        {"signal", v.signal},     {"noise", v.noise},     {"snr", v.snr},           {"detectable", v.detectable},
                        {"threshold", d.threshold}, {"x", v.x},           {"how", v.how}};
    j[v.detectable ? "margin" : "misses_by"] = std::isfinite(v.factor) ? nlohmann::json(v.factor) : nlohmann::json(nullptr);
    if (v.ambient_ratio) {
      j["relative_to_ambient"] = *v.ambient_ratio;
      j["ambient"] = v.ambient;
      j["instrument_noise"] = v.instrument_noise;
      j["snr_instrument_only"] = v.snr_instrument;
    }
    a.push_back(j);
  }
  for (const NoVerdict& n : d.skipped)
    a.push_back({{"analysis", n.analysis}, {"sensor", n.sensor}, {"detectable", nullptr}, {"reason", n.reason}});
  return a;
}

void print_detectability(const Detectability& d) {
  if (d.rows.empty() && d.skipped.empty()) return;
  std::printf("\nDetectability (signal = the void's anomaly as the sensor records it; detectable when SNR >= %g):\n", d.threshold);
  std::printf("  %-24s %-24s %-22s %13s %13s %9s  %s\n", "analysis", "sensor", "quantity", "signal", "noise", "SNR", "verdict");
  for (const Verdict& v : d.rows) {
    char verdict[64];
    if (v.detectable)
      std::snprintf(verdict, sizeof verdict, "DETECTABLE (x%.3g margin)", v.factor);
    else if (std::isfinite(v.factor))
      std::snprintf(verdict, sizeof verdict, "not detectable (misses x%.3g)", v.factor);
    else
      std::snprintf(verdict, sizeof verdict, "not detectable (no signal)");
    char sig[48], noi[48];
    std::snprintf(sig, sizeof sig, "%.3g %s", v.signal, v.unit.c_str());
    std::snprintf(noi, sizeof noi, "%.3g %s", v.noise, v.unit.c_str());
    std::printf("  %-24s %-24s %-22s %13s %13s %9.3g  %s\n", v.analysis.c_str(), v.sensor.c_str(), v.quantity.c_str(), sig, noi, v.snr,
                verdict);
  }
  // Pairs without a verdict, one line per analysis and reason.
  std::vector<std::pair<std::string, std::string>> keys;
  std::map<std::pair<std::string, std::string>, std::string> sensors;
  for (const NoVerdict& n : d.skipped) {
    const auto key = std::make_pair(n.analysis, n.reason);
    if (!sensors.count(key)) keys.push_back(key);
    auto& list = sensors[key];
    list += (list.empty() ? "" : ", ") + n.sensor;
  }
  for (const auto& key : keys)
    std::printf("  %-24s no verdict for %s: %s\n", key.first.c_str(), sensors[key].c_str(), key.second.c_str());
}

}  // namespace voidsign::cli
