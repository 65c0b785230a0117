// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/transient_run.hpp"

#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>
#include <stdexcept>

#include "cli/commands/model_setup.hpp"
#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "cli/output/output_dir.hpp"
#include "cli/output/vtk_series.hpp"

namespace voidsign::cli {

namespace fs = std::filesystem;

namespace {

using Clock = std::chrono::steady_clock;

bool a_wave(const Scenario& s) { return s.analyses.transient->wave.has_value(); }

std::string fmt(double v, int prec = 3) {
  std::ostringstream os;
  os.precision(prec);
  os << v;
  return os.str();
}

// "FILE:LINE:COL: key 'analyses.transient[.sub]'", at the analysis's block.
std::string key_of(const Scenario& s, const std::string& sub = "") {
  const auto& a = *s.analyses.transient;
  return s.file.string() + ":" + std::to_string(a.loc.line) + ":" + std::to_string(a.loc.column) + ": key 'analyses.transient" +
         (sub.empty() ? "" : "." + sub) + "'";
}

solver::TransientProblem problem_of(const Scenario& s, const mesh::Mesh& m) {
  const TransientAnalysis& a = *s.analyses.transient;
  solver::TransientProblem p;
  p.mesh = &m;
  p.kinematics = kinematics_of(s);
  for (const Layer& l : s.layers) {
    const Material& mat = s.materials.at(l.material);
    p.layers.push_back({{mat.young, mat.poisson, mat.density}, mat.damping, l.thickness});
  }
  if (a.wave) p.wave = solver::TransientWave{plane_wave_of(*a.wave, a.amplitude), a.peak_hz, a.delay_s, {}};
  p.source.point = {a.source_x, a.source_y, m.z_max - a.source_depth};
  p.source.direction = a.direction;
  p.source.wavelet.peak_hz = a.peak_hz;
  p.source.wavelet.delay_s = a.delay_s;
  p.source.wavelet.amplitude = a.force;
  p.boundary = solver::OuterBoundary::absorbing;
  if (a.mass_damping) p.damping_fit = solver::TransientProblem::DampingFit::mass_proportional;
  p.duration_s = a.duration_s;
  p.time_step_s = a.time_step_s;
  return p;
}

// Surface nodes, thinned to the one nearest each point of a grid of the given spacing anchored
// at x = 0 (and y = 0); every surface node when the spacing is 0.
std::vector<int> choose_receivers(const mesh::Mesh& m, double spacing) {
  if (spacing <= 0) return m.surface_nodes;
  std::map<std::pair<long, long>, std::pair<double, int>> best;  // grid point → (distance², node)
  for (int n : m.surface_nodes) {
    const auto& q = m.nodes[static_cast<std::size_t>(n)];
    const long i = std::lround(q[0] / spacing), j = m.dim() == 3 ? std::lround(q[1] / spacing) : 0;
    const double dx = q[0] - static_cast<double>(i) * spacing, dy = m.dim() == 3 ? q[1] - static_cast<double>(j) * spacing : 0;
    const double d2 = dx * dx + dy * dy;
    auto [it, fresh] = best.try_emplace({i, j}, d2, n);
    if (!fresh && d2 < it->second.first) it->second = {d2, n};
  }
  std::vector<char> keep(m.n_nodes(), 0);
  for (const auto& [grid, hit] : best) keep[static_cast<std::size_t>(hit.second)] = 1;
  std::vector<int> out;
  for (int n : m.surface_nodes)
    if (keep[static_cast<std::size_t>(n)]) out.push_back(n);
  return out;
}

// Stored entries of the full-storage stiffness: d² per pair of nodes sharing a cell (a node
// with itself included), counted per node from the node–cell adjacency.
std::size_t stiffness_nonzeros(const mesh::Mesh& m, int d) {
  const std::size_t nn = m.n_nodes(), npc = static_cast<std::size_t>(m.npc());
  std::vector<std::size_t> start(nn + 1, 0);
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    for (std::size_t a = 0; a < npc; ++a) ++start[static_cast<std::size_t>(m.cell(c)[a]) + 1];
  for (std::size_t i = 0; i < nn; ++i) start[i + 1] += start[i];
  std::vector<std::size_t> fill(start.begin(), start.end() - 1);
  std::vector<int> cells(start[nn]);
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    for (std::size_t a = 0; a < npc; ++a) cells[fill[static_cast<std::size_t>(m.cell(c)[a])]++] = static_cast<int>(c);
  std::size_t pairs = 0;
#pragma omp parallel reduction(+ : pairs)
  {
    std::vector<int> near;
#pragma omp for schedule(static)
    for (std::int64_t i = 0; i < static_cast<std::int64_t>(nn); ++i) {
      near.clear();
      for (std::size_t k = start[static_cast<std::size_t>(i)]; k < start[static_cast<std::size_t>(i) + 1]; ++k) {
        const int* cn = m.cell(static_cast<std::size_t>(cells[k]));
        near.insert(near.end(), cn, cn + npc);
      }
      std::sort(near.begin(), near.end());
      pairs += static_cast<std::size_t>(std::unique(near.begin(), near.end()) - near.begin());
    }
  }
  return pairs * static_cast<std::size_t>(d) * static_cast<std::size_t>(d);
}

double physical_memory() {
  return static_cast<double>(sysconf(_SC_PHYS_PAGES)) * static_cast<double>(sysconf(_SC_PAGE_SIZE));
}

}  // namespace

TransientPlan plan_transient(const Scenario& s, const mesh::Mesh& m) {
  const TransientAnalysis& a = *s.analyses.transient;
  const solver::TransientProblem p = problem_of(s, m);
  TransientPlan plan;
  double beta_max = 0;
  for (const auto& l : p.layers)
    if (l.damping > 0 && !a.mass_damping)
      beta_max = std::max(beta_max, solver::fit_rayleigh(l.damping, a.peak_hz / 3, 3 * a.peak_hz).beta);
  plan.stable_step_s = solver::stable_time_step(p, false, beta_max)[0];
  plan.undamped_step_s = beta_max > 0 ? solver::stable_time_step(p, false, 0)[0] : plan.stable_step_s;
  if (plan.stable_step_s < 0.5 * plan.undamped_step_s)
    plan.warnings.push_back(
        "transient: the stiffness-proportional part of the Rayleigh damping (beta up to " + fmt(beta_max) + " s, fitted over " +
        fmt(a.peak_hz / 3) + "-" + fmt(3 * a.peak_hz) + " Hz) cuts the stable time step from " + fmt(plan.undamped_step_s) + " s to " +
        fmt(plan.stable_step_s) + " s (" + fmt(plan.undamped_step_s / plan.stable_step_s, 2) + " x the steps): the smallest "
        "elements carry frequencies far above the band, where that damping grows without bound. 'damping: mass-proportional' "
        "(no stiffness term), coarser near-void or surface sizes, or less material damping run faster");
  if (a.time_step_s > plan.stable_step_s)
    throw InputError(s.file.string() + ":" + std::to_string(a.time_step_loc.line) + ":" + std::to_string(a.time_step_loc.column) +
                     ": key 'analyses.transient.time-step': " + fmt(a.time_step_s) + " s is above the stable step of this mesh, " +
                     fmt(plan.stable_step_s, 4) + " s (leave it out to use 0.9 x the stable step)");
  plan.time_step_s = a.time_step_s > 0 ? a.time_step_s : p.safety * plan.stable_step_s;
  plan.n_steps = static_cast<int>(std::ceil(a.duration_s / plan.time_step_s)) + 1;
  const double record = a.record_interval_s > 0 ? a.record_interval_s : 1.0 / (20 * a.peak_hz);
  plan.record_every = std::max(1, static_cast<int>(std::floor(record / plan.time_step_s + 1e-9)));
  if (a.snapshot_interval_s > 0) {
    plan.snapshot_every = std::max(1, static_cast<int>(std::lround(a.snapshot_interval_s / plan.time_step_s)));
    plan.n_snapshots = static_cast<std::size_t>((plan.n_steps - 1) / plan.snapshot_every + 1);
  }
  plan.receivers = choose_receivers(m, a.receiver_spacing);
  if (a.wave) {
    solver::PlaneWavePulse::Spec spec;
    for (const auto& l : p.layers) spec.layers.push_back({l.elastic, 0, 0, l.thickness});
    spec.kind = solver::wave_kind(p.wave->wave);
    spec.incidence = p.wave->wave.incidence;
    spec.azimuth = p.wave->wave.azimuth;
    spec.three_d = m.dim() == 3;
    spec.peak_hz = a.peak_hz;
    plan.wave_delay_s =
        a.delay_s > 0 ? a.delay_s : solver::PlaneWavePulse::automatic_delay(spec, m.z_max - m.z_min, {m.x_min, m.x_max, m.y_min, m.y_max});
    if (a.duration_s <= plan.wave_delay_s)
      throw InputError(key_of(s, "duration") + ": " + fmt(a.duration_s) + " s ends before the pulse's peak reaches the rock at " +
                       fmt(plan.wave_delay_s) + " s (the delay that lets the pulse enter the model after t = 0): lengthen it");
  }

  const int d = solver::dofs_per_node(p.kinematics);
  const std::size_t n_dofs = static_cast<std::size_t>(d) * m.n_nodes();
  const std::size_t n_samples = static_cast<std::size_t>((plan.n_steps - 1) / plan.record_every + 1);
  const std::size_t recorded = n_samples * plan.receivers.size() * static_cast<std::size_t>(d);
  bool layered_beta = false;
  for (const auto& l : p.layers) layered_beta = layered_beta || l.damping != p.layers.front().damping;
  // Node blocks unless single components are held (the axis of an axisymmetric model).
  const int block = s.model == Model::axisymmetric ? 1 : d;
  plan.estimate = solver::estimate_transient(n_dofs, stiffness_nonzeros(m, d), static_cast<std::size_t>(plan.n_steps), layered_beta,
                                             recorded, 2, block);
  // Both operators live at once; traces of both models and their difference; snapshots of both.
  plan.estimate.bytes = 2 * plan.estimate.bytes + 8.0 * static_cast<double>(2 * recorded) +
                        16.0 * static_cast<double>(plan.n_snapshots * n_dofs);
  if (plan.estimate.bytes > 0.8 * physical_memory())
    throw InputError(key_of(s) + ": the run would need about " + fmt(plan.estimate.bytes / 1e9) + " GB, more than 80 % of this " +
                     "machine's " + fmt(physical_memory() / 1e9) + " GB: record fewer samples (record-interval, receiver-spacing), " +
                     "take fewer snapshots or coarsen the mesh");
  return plan;
}

TransientRun run_transient(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress) {
  const auto t0 = Clock::now();
  TransientRun run;
  run.plan = plan_transient(s, m);
  const TransientPlan& plan = run.plan;
  run.warnings = plan.warnings;
  solver::TransientProblem p = problem_of(s, m);
  p.time_step_s = plan.time_step_s;
  p.receivers = plan.receivers;
  p.receiver_every = plan.record_every;
  std::fprintf(stderr, "transient: %d steps of %.3g s (stable step %.3g s), %zu receivers; estimated %.3g s and %.3g GB\n",
               plan.n_steps, plan.time_step_s, plan.stable_step_s, plan.receivers.size(), plan.estimate.seconds_total,
               plan.estimate.bytes / 1e9);

  solver::TransientCallbacks cb;
  int model = -1;  // 0 without voids, 1 with
  if (plan.snapshot_every > 0) {
    cb.snapshot_every = plan.snapshot_every;
    cb.snapshot = [&](int step, double t, std::span<const double> u) {
      if (step == 0) ++model;
      auto& store = model == 0 ? run.snapshots_ref : run.snapshots_voided;
      store.emplace_back(u.begin(), u.end());
      if (model == 0) run.snapshot_times.push_back(t);
    };
  }
  cb.progress = [&](std::string_view step, double f) {
    if (progress) progress->step("transient, " + std::string(step), f);
  };
  try {
    run.result = solver::solve_transient(p, cb);
  } catch (const std::invalid_argument& e) {
    throw InputError(key_of(s) + ": " + e.what());
  }
  if (progress) progress->done();
  for (double v : run.result.reference.u)
    if (!std::isfinite(v)) throw SolveError("transient analysis: the model without voids went unstable (non-finite displacements)");
  for (double v : run.result.voided.u)
    if (!std::isfinite(v)) throw SolveError("transient analysis: the model with voids went unstable (non-finite displacements)");
  if (!a_wave(s) && run.result.source_offset_m > 0.5 * s.mesh.size)
    run.warnings.push_back("transient: the source acts at the nearest node, " + fmt(run.result.source_offset_m) +
                           " m from the point asked for");
  const auto& a = *s.analyses.transient;
  if (a.wave && run.result.wave_earliest_s < 0)
    run.warnings.push_back("transient: with a delay of " + fmt(run.result.wave_delay_s) + " s the pulse is already inside the model at "
                           "t = 0 (it would need " + fmt(run.result.wave_delay_s - run.result.wave_earliest_s) +
                           " s): the start is a jump; leave 'delay' out to have it chosen");
  if (!a.wave && s.model == Model::axisymmetric && std::abs(a.direction[0]) > 1e-12)
    run.warnings.push_back("transient: in an axisymmetric model a force with a radial part is a radial ring load; only a "
                           "vertical force on the axis is a point load");
  run.seconds = std::chrono::duration<double>(Clock::now() - t0).count();
  return run;
}

TransientPeak transient_peak(const TransientRun& run, const mesh::Mesh& m) {
  const auto& r = run.result;
  const std::size_t d = m.dim() == 3 ? 3 : 2, nr = r.receivers.size();
  TransientPeak pk;
  double ref_peak = 0;
  for (std::size_t smp = 0; smp < r.reference.time_s.size(); ++smp)
    for (std::size_t q = 0; q < nr; ++q) {
      double da = 0, ra = 0;
      for (std::size_t j = 0; j < d; ++j) {
        const std::size_t i = (smp * nr + q) * d + j;
        da += r.difference[i] * r.difference[i];
        ra += r.reference.u[i] * r.reference.u[i];
      }
      ref_peak = std::max(ref_peak, std::sqrt(ra));
      if (std::sqrt(da) > pk.anomaly) {
        const auto& x = m.nodes[static_cast<std::size_t>(r.receivers[q])];
        pk.anomaly = std::sqrt(da);
        pk.x = x[0];
        pk.y = x[1];
        pk.t = r.reference.time_s[smp];
      }
    }
  pk.reference = ref_peak;
  return pk;
}

void write_transient_outputs(const TransientRun& run, const Scenario& s, const mesh::Mesh& m, const fs::path& dir) {
  fs::create_directories(dir / "transient");
  const auto& r = run.result;
  const auto& a = *s.analyses.transient;
  const bool three_d = m.dim() == 3;
  const std::size_t d = three_d ? 3 : 2, nr = r.receivers.size();
  const std::vector<std::string> comps = three_d ? std::vector<std::string>{"ux", "uy", "uz"} : std::vector<std::string>{"ux", "uz"};
  std::vector<std::string> cols{"t", "x"};
  if (three_d) cols.push_back("y");
  for (const char* suffix : {"", "_ref"})
    for (const auto& c : comps) cols.push_back(c + suffix);
  for (const auto& c : comps) cols.push_back("d" + c);
  CsvTable t(cols);
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " transient surface seismograms with and without voids: " + s.title);
  t.comment(std::string("units: SI; t s; x") + (three_d ? ", y" : "") + " m; u* displacement, m; z up; *_ref: model without voids; d*: "
            "with voids minus without");
  const std::string rows = "; rows grouped by receiver, then time; time step " + format_number(r.time_step_s) + " s, sampled every " +
                           std::to_string(run.plan.record_every) + " step(s)";
  if (a.wave)
    t.comment("excitation: " + a.wave->describe(three_d) + ", entering from the rock below: a Ricker pulse, peak frequency " +
              format_number(a.peak_hz) + " Hz, " + format_number(a.amplitude) + " m peak (twice the incident wave's) as it passes the "
              "top of the rock at x = 0" + (three_d ? ", y = 0" : "") + " at " + fmt(r.wave_delay_s, 4) + " s" + rows);
  else
    t.comment("source: Ricker wavelet, peak frequency " + format_number(a.peak_hz) + " Hz, peak " + format_number(a.force) +
              (three_d ? " N" : s.model == Model::axisymmetric ? " N/rad" : " N/m") + " at its centre time " +
              format_number(r.reference.time_s.empty() ? 0 : a.delay_s) + " s, at x " + format_number(a.source_x) +
              (three_d ? ", y " + format_number(a.source_y) : std::string()) + ", depth " + format_number(a.source_depth) + " m" + rows);
  std::vector<double> row;
  for (std::size_t q = 0; q < nr; ++q) {
    const auto& x = m.nodes[static_cast<std::size_t>(r.receivers[q])];
    for (std::size_t smp = 0; smp < r.reference.time_s.size(); ++smp) {
      row = {r.reference.time_s[smp], x[0]};
      if (three_d) row.push_back(x[1]);
      const std::size_t b = (smp * nr + q) * d;
      for (std::size_t j = 0; j < d; ++j) row.push_back(r.voided.u[b + j]);
      for (std::size_t j = 0; j < d; ++j) row.push_back(r.reference.u[b + j]);
      for (std::size_t j = 0; j < d; ++j) row.push_back(r.difference[b + j]);
      t.add_row(row);
    }
  }
  t.write(dir / "transient" / "seismograms.csv");

  if (run.snapshot_times.empty()) return;
  const int di = static_cast<int>(d);
  const mesh::Field layer = cell_tag("layer", m, [&](std::size_t c) { return m.layer[c]; });
  const mesh::Field vid = cell_tag("void_id", m, [&](std::size_t c) { return m.void_id[c]; });
  std::vector<std::string> files;
  std::vector<double> diff;
  for (std::size_t k = 0; k < run.snapshot_times.size() && k < run.snapshots_voided.size(); ++k) {
    const auto& uv = run.snapshots_voided[k];
    const auto& ur = run.snapshots_ref[k];
    diff.resize(uv.size());
    for (std::size_t i = 0; i < uv.size(); ++i) diff[i] = uv[i] - ur[i];
    const std::vector<mesh::Field> pf{vector_field("displacement", m, di, uv), vector_field("displacement_ref", m, di, ur),
                                      vector_field("anomaly", m, di, diff)};
    const std::string name = numbered("snapshot", k);
    write_atomic(dir / "transient" / name, [&](const fs::path& tmp) { mesh::write_vtu(tmp, m, pf, {layer, vid}); });
    files.push_back(name);
  }
  write_pvd(dir / "transient" / "snapshots.pvd", files, run.snapshot_times,
            "voidsign transient snapshots; timestep = time [s]; point data displacement (with voids), displacement_ref "
            "(without), anomaly (difference), m; SI units; nodes inside voids are at rest in the model with voids");
}

nlohmann::json transient_summary(const TransientRun& run, const Scenario& s, const mesh::Mesh& m) {
  const auto& r = run.result;
  const auto& a = *s.analyses.transient;
  const TransientPeak pk = transient_peak(run, m);
  nlohmann::json peak = {{"anomaly_absmax", pk.anomaly}, {"x", pk.x}, {"t", pk.t}, {"reference_absmax", pk.reference},
                         {"relative", pk.reference > 0 ? nlohmann::json(pk.anomaly / pk.reference) : nlohmann::json(nullptr)}};
  if (m.dim() == 3) peak["y"] = pk.y;
  nlohmann::json damping = nlohmann::json::array();
  for (const auto& dmp : r.damping) damping.push_back({{"alpha_per_s", dmp.alpha}, {"beta_s", dmp.beta}});
  nlohmann::json source;
  if (a.wave)
    source = {{"type", "plane wave"},
              {"wave", a.wave->name()},
              {"incidence_deg", a.wave->incidence_deg},
              {"azimuth_deg", a.wave->azimuth_deg},
              {"wavelet", "Ricker"},
              {"peak_frequency_hz", a.peak_hz},
              {"amplitude", a.amplitude},
              {"amplitude_meaning", "twice the incident pulse's peak displacement, at the top of the rock"},
              {"delay_s", r.wave_delay_s},
              {"method", "domain reduction method (Bielak et al. 2003), free field by Fourier synthesis of the layered solution"},
              {"drm_box", {{"half_width", r.drm_box.half_width}, {"half_length", r.drm_box.half_length}, {"depth", r.drm_box.depth}}},
              {"drm_cells", r.drm_cells},
              {"free_field_seconds", r.wave_seconds},
              {"free_field_bytes", r.wave_bytes}};
  else
    source = {{"type", "point force"},      {"wavelet", "Ricker"},  {"peak_frequency_hz", a.peak_hz}, {"force", a.force},
              {"delay_s", a.delay_s},       {"x", a.source_x},      {"y", a.source_y},               {"depth", a.source_depth},
              {"node_offset", r.source_offset_m}};
  return {{"scheme", "explicit central differences, HRZ-lumped mass, Lysmer-Kuhlemeyer dashpots on sides and bottom"},
          {"damping_fit", a.mass_damping ? "mass-proportional" : "rayleigh"},
          {"source", source},
          {"duration_s", a.duration_s},
          {"time_step_s", r.time_step_s},
          {"stable_step_s", r.stable_step_s},
          {"steps", r.n_steps},
          {"sample_interval_s", r.time_step_s * run.plan.record_every},
          {"receivers", r.receivers.size()},
          {"snapshots", run.snapshot_times.size()},
          {"elements_per_wavelength", a.elements_per_wavelength},
          {"rayleigh_damping", damping},
          {"check", "every recorded displacement finite (an unstable step would have stopped the run)"},
          {"peak_anomaly", peak},
          {"free_dofs", {{"reference", r.reference.n_free}, {"voids", r.voided.n_free}}},
          {"estimate", {{"seconds", run.plan.estimate.seconds_total}, {"bytes", run.plan.estimate.bytes}}},
          {"seconds_loop", r.reference.loop_seconds + r.voided.loop_seconds},
          {"seconds", run.seconds}};
}

}  // namespace voidsign::cli
