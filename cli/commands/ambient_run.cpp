// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/ambient_run.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <sstream>
#include <stdexcept>

#include "cli/commands/dynamic_run.hpp"
#include "cli/commands/model_setup.hpp"
#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "solver/analysis/harmonic.hpp"

namespace voidsign::cli {

namespace fs = std::filesystem;

namespace {

using Clock = std::chrono::steady_clock;
using LoadCase = solver::HarmonicProblem::LoadCase;

std::string fmt(double v, int prec = 3) {
  std::ostringstream os;
  os.precision(prec);
  os << v;
  return os.str();
}

// Plan-view centre of the voids' cells (the middle of the block without voids).
std::array<double, 2> voids_centre(const mesh::Mesh& m) {
  double x = 0, y = 0, n = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    if (m.void_id[c] >= 0) {
      const auto& q = m.nodes[static_cast<std::size_t>(m.cell(c)[0])];
      x += q[0];
      y += q[1];
      n += 1;
    }
  if (n == 0) return {0.5 * (m.x_min + m.x_max), 0.5 * (m.y_min + m.y_max)};
  return {x / n, y / n};
}

struct PlannedCase {
  LoadCase load;
  std::string name;
  int field = 0;  // 0 body waves, 1 surface waves
};

// The load cases of each wavefield assumption (docs/theory.md, "Ambient noise"): unit plane S
// (3d: along x and along y) and P waves; unit vertical surface forces two far-field cells inside
// the absorbing band on either side (3d: at eight azimuths around the voids).
std::vector<PlannedCase> plan_cases(const AmbientAnalysis& a, const mesh::Mesh& m, double band, double h) {
  std::vector<PlannedCase> out;
  const bool three_d = m.dim() == 3;
  if (a.body_waves) {
    LoadCase s;
    s.source = solver::HarmonicProblem::Source::plane_wave;
    s.wave = {solver::IncidentWave::s, 1.0, 0};
    out.push_back({s, three_d ? "vertically incident S wave, motion along x" : "vertically incident S wave", 0});
    if (three_d) {
      s.wave.polarization = 1;
      out.push_back({s, "vertically incident S wave, motion along y", 0});
    }
    LoadCase p = s;
    p.wave = {solver::IncidentWave::p, 1.0, 0};
    out.push_back({p, "vertically incident P wave", 0});
  }
  if (a.surface_waves) {
    LoadCase f;
    f.source = solver::HarmonicProblem::Source::point_force;
    f.force.direction = {0, 0, -1};
    f.force.amplitude = 1.0;
    const double x_lo = m.x_min + band + 2 * h, x_hi = m.x_max - band - 2 * h;
    if (!three_d) {
      for (double x : {x_lo, x_hi}) {
        f.force.point = {x, 0, m.z_max};
        out.push_back({f, "vertical surface force at x = " + fmt(x, 4) + " m", 1});
      }
    } else {
      const auto c = voids_centre(m);
      const double y_lo = m.y_min + band + 2 * h, y_hi = m.y_max - band - 2 * h;
      const double r = std::min({c[0] - x_lo, x_hi - c[0], c[1] - y_lo, y_hi - c[1]});
      for (int k = 0; k < 8; ++k) {
        const double az = k * std::numbers::pi / 4;
        f.force.point = {c[0] + r * std::cos(az), c[1] + r * std::sin(az), m.z_max};
        out.push_back({f, "vertical surface force at azimuth " + std::to_string(45 * k) + " deg, " + fmt(r, 4) + " m out", 1});
      }
    }
  }
  return out;
}

// The surface values of one case: [f][q · d + j] for the chosen points.
std::vector<std::vector<std::complex<double>>> surface_of(const std::vector<solver::ComplexVector>& u, const std::vector<int>& pts,
                                                          int d) {
  std::vector<std::vector<std::complex<double>>> out(u.size());
  for (std::size_t f = 0; f < u.size(); ++f) {
    out[f].resize(pts.size() * static_cast<std::size_t>(d));
    for (std::size_t q = 0; q < pts.size(); ++q)
      for (int j = 0; j < d; ++j) out[f][q * static_cast<std::size_t>(d) + static_cast<std::size_t>(j)] = u[f][d * pts[q] + j];
  }
  return out;
}

}  // namespace

double ambient_noise_displacement_psd(const AmbientAnalysis& a, double f_hz) {
  const double w = 2 * std::numbers::pi * f_hz;
  if (a.noise == AmbientAnalysis::Noise::table)
    return solver::psd_at(solver::convert(a.table, solver::PsdQuantity::displacement), f_hz);
  const auto model = a.noise == AmbientAnalysis::Noise::low ? solver::NoiseModel::low : solver::NoiseModel::high;
  double accel = 0;
  if (f_hz <= 10) {
    accel = solver::peterson_accel_psd(model, f_hz);
  } else {
    const solver::PetersonRow& row = solver::peterson_table(model).front();
    accel = std::pow(10.0, (row.a_db + row.b_db_per_decade * std::log10(1 / f_hz)) / 10);
  }
  return accel / (w * w * w * w);
}

AmbientRun run_ambient(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress) {
  const auto t0 = Clock::now();
  const AmbientAnalysis& a = *s.analyses.ambient;
  AmbientRun run;
  run.d = m.dim() == 3 ? 3 : 2;
  const int d = run.d, vz = d - 1;
  run.frequencies_hz = a.frequencies_hz;
  for (double f : a.frequencies_hz) {
    run.target_z.push_back(ambient_noise_displacement_psd(a, f));
    run.target_h.push_back(run.target_z.back());
  }
  run.noise_name = a.noise == AmbientAnalysis::Noise::table ? a.table_file.string()
                   : a.noise == AmbientAnalysis::Noise::low ? "Peterson (1993) New Low Noise Model (NLNM)"
                                                            : "Peterson (1993) New High Noise Model (NHNM)";

  solver::HarmonicProblem p = harmonic_problem_of(s, m);
  p.frequencies_hz = a.frequencies_hz;
  p.output_nodes = m.surface_nodes;
  run.pml_thickness = absorbing_band(s, m, a.absorbing, "analyses.ambient");
  p.pml_thickness = run.pml_thickness;
  const std::vector<PlannedCase> cases = plan_cases(a, m, run.pml_thickness, s.mesh.size);
  p.source = cases.front().load.source;
  p.wave = cases.front().load.wave;
  p.force = cases.front().load.force;
  for (std::size_t c = 1; c < cases.size(); ++c) p.extra_cases.push_back(cases[c].load);

  solver::HarmonicResult r;
  try {
    r = solver::solve_harmonic(p, [&](std::string_view step, double f) {
      if (progress) progress->step(std::string("ambient: ") + std::string(step), f);
    });
  } catch (const solver::SolveFailure& e) {
    throw SolveError(std::string("ambient analysis: ") + e.what());
  } catch (const std::invalid_argument& e) {
    throw InputError(s.file.string() + ": key 'analyses.ambient': " + e.what());
  }
  if (progress) progress->done();
  for (double v : r.reference.residual) run.residual = std::max(run.residual, v);
  for (double v : r.voided.residual) run.residual = std::max(run.residual, v);

  // Surface points outside the band, as node ids, and the matching point near the voids.
  const std::vector<int> idx = surface_points(r, m);
  if (idx.empty()) throw InputError(s.file.string() + ": key 'analyses.ambient': no ground surface is left outside the absorbing band");
  for (int k : idx) run.points.push_back(r.output_nodes[static_cast<std::size_t>(k)]);
  const auto centre = voids_centre(m);
  double best = INFINITY;
  for (std::size_t q = 0; q < run.points.size(); ++q) {
    const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
    const double dist = std::hypot(x[0] - centre[0], d == 3 ? x[1] - centre[1] : 0.0);
    if (dist < best) {
      best = dist;
      run.scale_point = q;
    }
  }

  const std::size_t nf = run.frequencies_hz.size();
  const std::size_t q0 = run.scale_point * static_cast<std::size_t>(d);
  for (int field = 0; field < 2; ++field) {
    AmbientWavefield w;
    w.name = field == 0 ? "body-waves" : "surface-waves";
    for (std::size_t c = 0; c < cases.size(); ++c) {
      if (cases[c].field != field) continue;
      const auto& ur = c == 0 ? r.reference.u : r.reference.u_extra[c - 1];
      const auto& uv = c == 0 ? r.voided.u : r.voided.u_extra[c - 1];
      w.case_names.push_back(cases[c].name);
      w.reference.push_back(surface_of(ur, idx, d));
      w.voided.push_back(surface_of(uv, idx, d));
    }
    if (w.case_names.empty()) continue;
    // Weights: each case's power chosen so that the model without voids reproduces the target
    // PSD at the matching point (body waves: S horizontally, P vertically; surface waves: the
    // sum of the sources, vertically).
    w.weights.assign(w.case_names.size(), std::vector<double>(nf, 0.0));
    for (std::size_t f = 0; f < nf; ++f) {
      if (field == 0) {
        for (std::size_t c = 0; c < w.case_names.size(); ++c) {
          const bool p_wave = c + 1 == w.case_names.size();
          const std::size_t comp = p_wave ? static_cast<std::size_t>(vz) : c;  // S along x (and y), P along z
          const double h2 = std::norm(w.reference[c][f][q0 + comp]);
          if (!(h2 > 0)) throw SolveError("ambient analysis: the model without voids does not move at the matching point");
          w.weights[c][f] = (p_wave ? run.target_z[f] : run.target_h[f]) / h2;
        }
      } else {
        double sum = 0;
        for (std::size_t c = 0; c < w.case_names.size(); ++c) sum += std::norm(w.reference[c][f][q0 + static_cast<std::size_t>(vz)]);
        if (!(sum > 0)) throw SolveError("ambient analysis: the surface sources do not reach the matching point");
        for (auto& wc : w.weights) wc[f] = run.target_z[f] / sum;
      }
    }
    w.psd = solver::combine_cases(w.voided, w.reference, w.weights);
    std::vector<solver::FrequencyBand> bands{{a.band_lo_hz, a.band_hi_hz, std::sqrt(a.band_lo_hz * a.band_hi_hz)}};
    for (const auto& b : solver::octave_bands(a.band_lo_hz, a.band_hi_hz)) bands.push_back(b);
    for (const auto& b : bands) {
      AmbientBandRms br;
      br.lo_hz = b.lo_hz;
      br.hi_hz = b.hi_hz;
      br.model = solver::band_rms(run.frequencies_hz, w.psd.model, b.lo_hz, b.hi_hz);
      br.reference = solver::band_rms(run.frequencies_hz, w.psd.reference, b.lo_hz, b.hi_hz);
      br.anomaly = solver::band_rms(run.frequencies_hz, w.psd.anomaly, b.lo_hz, b.hi_hz);
      w.bands.push_back(std::move(br));
    }
    const auto& full = w.bands.front().anomaly;
    for (std::size_t q = 0; q < run.points.size(); ++q) {
      if (full[q * static_cast<std::size_t>(d) + static_cast<std::size_t>(vz)] > full[w.peak_point * static_cast<std::size_t>(d) + static_cast<std::size_t>(vz)])
        w.peak_point = q;
      if (full[q * static_cast<std::size_t>(d)] > full[w.peak_point_h * static_cast<std::size_t>(d)]) w.peak_point_h = q;
    }
    run.fields.push_back(std::move(w));
  }
  if (r.pml_wavelengths < 0.25)
    run.warnings.push_back("ambient: the absorbing band is " + fmt(r.pml_wavelengths) +
                           " S wavelengths thick at the lowest frequency; there the block is small against the wavelength and "
                           "the response is close to quasi-static (widen the block or raise the band's lower end)");
  run.seconds = std::chrono::duration<double>(Clock::now() - t0).count();
  return run;
}

void write_ambient_outputs(const AmbientRun& run, const Scenario& s, const mesh::Mesh& m, const fs::path& dir) {
  fs::create_directories(dir / "ambient");
  const bool three_d = run.d == 3;
  const std::size_t d = static_cast<std::size_t>(run.d);
  const std::vector<std::string> comps = three_d ? std::vector<std::string>{"x", "y", "z"} : std::vector<std::string>{"x", "z"};
  std::vector<std::string> cols{"wavefield", "band_lo_hz", "band_hi_hz", "x"};
  if (three_d) cols.push_back("y");
  for (const char* kind : {"", "_ref", "_d"})
    for (const auto& c : comps) cols.push_back(std::string("rms") + (std::string(kind) == "_d" ? "_d" + c : "_" + c + kind));
  CsvTable t(cols);
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " ambient surface motion with and without voids: " + s.title);
  t.comment("units: SI; band_*_hz Hz; x" + std::string(three_d ? ", y" : "") + " m; rms_* displacement RMS over the band, m "
            "(square root of the one-sided PSD integrated over the band); *_ref: model without voids; rms_d*: of the anomaly "
            "(with voids minus without)");
  t.comment("noise: " + run.noise_name + "; wavefield 0 = body-waves (vertically incident P and S), 1 = surface-waves (surface "
            "sources on both sides); the first band of each wavefield is the whole analysis band, then its octave bands");
  std::vector<double> row;
  for (std::size_t w = 0; w < run.fields.size(); ++w) {
    const AmbientWavefield& f = run.fields[w];
    const double code = f.name == "body-waves" ? 0 : 1;
    for (const auto& b : f.bands)
      for (std::size_t q = 0; q < run.points.size(); ++q) {
        const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
        row = {code, b.lo_hz, b.hi_hz, x[0]};
        if (three_d) row.push_back(x[1]);
        for (const auto* v : {&b.model, &b.reference, &b.anomaly})
          for (std::size_t j = 0; j < d; ++j) row.push_back((*v)[q * d + j]);
        t.add_row(row);
      }
  }
  t.write(dir / "ambient" / "surface.csv");

  // PSDs at every surface point and frequency.
  std::vector<std::string> pc{"wavefield", "f_hz", "x"};
  if (three_d) pc.push_back("y");
  for (const char* kind : {"", "_ref", "_d"})
    for (const auto& c : comps) pc.push_back(std::string("psd") + (std::string(kind) == "_d" ? "_d" + c : "_" + c + kind));
  CsvTable pt(pc);
  pt.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " ambient displacement PSD per surface point with and without voids: " +
             s.title);
  pt.comment("units: SI; f_hz Hz; x" + std::string(three_d ? ", y" : "") + " m; psd_* one-sided displacement PSD, m^2/Hz; *_ref "
             "without voids; psd_d* of the anomaly (with voids minus without, per load case, summed in power); wavefield 0 "
             "body-waves, 1 surface-waves");
  for (const AmbientWavefield& f : run.fields)
    for (std::size_t k = 0; k < run.frequencies_hz.size(); ++k)
      for (std::size_t q = 0; q < run.points.size(); ++q) {
        const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
        row = {f.name == "body-waves" ? 0.0 : 1.0, run.frequencies_hz[k], x[0]};
        if (three_d) row.push_back(x[1]);
        for (const auto* v : {&f.psd.model, &f.psd.reference, &f.psd.anomaly})
          for (std::size_t j = 0; j < d; ++j) row.push_back((*v)[k][q * d + j]);
        pt.add_row(row);
      }
  pt.write(dir / "ambient" / "psd.csv");

  // Spectra at each wavefield's point of largest vertical anomaly.
  std::vector<std::string> sc{"wavefield", "f_hz", "x"};
  if (three_d) sc.push_back("y");
  sc.insert(sc.end(), {"noise_psd_z", "psd_z", "psd_z_ref", "psd_dz", "psd_x", "psd_x_ref", "psd_dx"});
  CsvTable sp(sc);
  sp.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " ambient displacement spectra at the point of largest vertical "
             "anomaly: " + s.title);
  sp.comment("units: SI; f_hz Hz; x m; psd_* one-sided displacement PSD, m^2/Hz; noise_psd_z the noise model as vertical "
             "displacement; *_ref without voids; psd_d* of the anomaly; wavefield 0 body-waves, 1 surface-waves");
  for (const AmbientWavefield& f : run.fields) {
    const std::size_t q = f.peak_point;
    const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
    for (std::size_t k = 0; k < run.frequencies_hz.size(); ++k) {
      row = {f.name == "body-waves" ? 0.0 : 1.0, run.frequencies_hz[k], x[0]};
      if (three_d) row.push_back(x[1]);
      const std::size_t z = q * d + d - 1, h = q * d;
      row.insert(row.end(), {run.target_z[k], f.psd.model[k][z], f.psd.reference[k][z], f.psd.anomaly[k][z], f.psd.model[k][h],
                             f.psd.reference[k][h], f.psd.anomaly[k][h]});
      sp.add_row(row);
    }
  }
  sp.write(dir / "ambient" / "spectra.csv");
}

nlohmann::json ambient_summary(const AmbientRun& run, const Scenario& s, const mesh::Mesh& m) {
  const AmbientAnalysis& a = *s.analyses.ambient;
  const std::size_t d = static_cast<std::size_t>(run.d), vz = d - 1;
  nlohmann::json fields = nlohmann::json::object();
  for (const AmbientWavefield& f : run.fields) {
    auto at = [&](std::size_t q) {
      const auto& x = m.nodes[static_cast<std::size_t>(run.points[q])];
      nlohmann::json j = {{"x", x[0]}};
      if (d == 3) j["y"] = x[1];
      return j;
    };
    nlohmann::json bands = nlohmann::json::array();
    for (const auto& b : f.bands) {
      std::size_t best = 0;
      for (std::size_t q = 0; q < run.points.size(); ++q)
        if (b.anomaly[q * d + vz] > b.anomaly[best * d + vz]) best = q;
      nlohmann::json j = {{"band_lo_hz", b.lo_hz}, {"band_hi_hz", b.hi_hz}, {"rms_dz_max", b.anomaly[best * d + vz]},
                          {"rms_z_ref_there", b.reference[best * d + vz]}};
      j["relative"] = b.reference[best * d + vz] > 0 ? nlohmann::json(b.anomaly[best * d + vz] / b.reference[best * d + vz])
                                                     : nlohmann::json(nullptr);
      j.update(at(best));
      bands.push_back(j);
    }
    const auto& full = f.bands.front();
    const std::size_t q = f.peak_point, qh = f.peak_point_h;
    nlohmann::json peak = {{"rms_dz", full.anomaly[q * d + vz]},
                           {"rms_z_ref", full.reference[q * d + vz]},
                           {"relative", full.reference[q * d + vz] > 0 ? full.anomaly[q * d + vz] / full.reference[q * d + vz] : 0.0}};
    peak.update(at(q));
    nlohmann::json peak_h = {{"rms_dx", full.anomaly[qh * d]},
                             {"rms_x_ref", full.reference[qh * d]},
                             {"relative", full.reference[qh * d] > 0 ? full.anomaly[qh * d] / full.reference[qh * d] : 0.0}};
    peak_h.update(at(qh));
    fields[f.name] = {{"cases", f.case_names}, {"peak_vertical", peak}, {"peak_horizontal", peak_h}, {"bands", bands}};
  }
  const auto& sp = m.nodes[static_cast<std::size_t>(run.points[run.scale_point])];
  return {{"noise", run.noise_name},
          {"noise_extrapolated_above_10_hz", a.extrapolated},
          {"horizontal_noise", "equal to the vertical (assumption, body waves only)"},
          {"band_hz", {a.band_lo_hz, a.band_hi_hz}},
          {"frequencies", run.frequencies_hz.size()},
          {"per_octave", a.per_octave},
          {"matched_at", d == 3 ? nlohmann::json{{"x", sp[0]}, {"y", sp[1]}} : nlohmann::json{{"x", sp[0]}}},
          {"noise_rms_z_band", std::sqrt(solver::integrate_log(run.frequencies_hz, run.target_z, a.band_lo_hz, a.band_hi_hz))},
          {"wavefields", fields},
          {"residual", run.residual},
          {"absorbing_thickness", run.pml_thickness},
          {"elements_per_wavelength", a.elements_per_wavelength},
          {"seconds", run.seconds}};
}

}  // namespace voidsign::cli
