// SPDX-License-Identifier: GPL-3.0-or-later
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <ctime>
#include <iostream>
#include <optional>
#include <sstream>

#include "cli/commands/ambient_run.hpp"
#include "cli/commands/commands.hpp"
#include "cli/commands/dynamic_run.hpp"
#include "cli/commands/model_setup.hpp"
#include "cli/commands/static_run.hpp"
#include "cli/commands/transient_run.hpp"
#include "cli/commands/threshold.hpp"
#include "cli/commands/verdict.hpp"
#include "cli/report/run_report.hpp"
#include "cli/errors.hpp"
#include "cli/output/output_dir.hpp"
#include "cli/scenario/scenario.hpp"

namespace voidsign::cli {

namespace fs = std::filesystem;

namespace {

std::string utc_now() {
  const std::time_t t = std::time(nullptr);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&t));
  return buf;
}

const char* model_name(Model m) {
  switch (m) {
    case Model::plane_strain: return "plane-strain";
    case Model::axisymmetric: return "axisymmetric";
    case Model::three_d: return "3d";
  }
  return "?";
}

// Rejects runs whose estimated memory exceeds what the machine has, before allocating.
void check_budget(const Scenario& s, const RunEstimate& e) {
  const double phys = static_cast<double>(sysconf(_SC_PHYS_PAGES)) * static_cast<double>(sysconf(_SC_PAGE_SIZE));
  if (e.memory_bytes > 0.8 * phys) {
    std::ostringstream os;
    os.precision(3);
    os << s.file.string() << ": key 'mesh': the mesh would need about " << e.memory_bytes / 1e9 << " GB (" << e.dofs / 1e6
       << " M unknowns), more than 80 % of this machine's " << phys / 1e9 << " GB: increase mesh.size, mesh.surface or mesh.near-void";
    throw InputError(os.str());
  }
}

std::string where(const StaticRun& run, double x, double y) {
  char buf[64];
  if (run.mesh->dim() == 3)
    std::snprintf(buf, sizeof buf, "at (x, y) = (%.2f, %.2f) m", x, y);
  else
    std::snprintf(buf, sizeof buf, "at x = %.2f m", x);
  return buf;
}

void print_peaks(const StaticRun& run, const fs::path& dir) {
  const solver::Anomaly& a = run.anomaly;
  const bool three_d = run.mesh->dim() == 3;
  std::printf("\nStatic signature (with voids minus without), ground surface:\n");
  std::printf("  %-34s %12.4g m    %s\n", "largest settlement", a.uz_min, where(run, a.x_uz_min, a.y_uz_min).c_str());
  std::printf("  %-34s %12.4g m\n", "settlement relative to far field", a.rel_uz_min);
  std::printf("  %-34s %12.4g m    %s\n", "largest uplift", a.uz_max, where(run, a.x_uz_max, a.y_uz_max).c_str());
  std::printf("  %-34s %12.4g m    %s\n", "largest horizontal displacement", a.ux_absmax, where(run, a.x_ux_absmax, a.y_ux_absmax).c_str());
  std::printf("  %-34s %12.4g rad  %s\n", "largest tilt", a.tilt_absmax, where(run, a.x_tilt_absmax, a.y_tilt_absmax).c_str());
  std::printf("  %-34s %12.4g -    %s\n", "largest horizontal strain", a.strain_absmax, where(run, a.x_strain_absmax, a.y_strain_absmax).c_str());
  const bool volume = three_d || run.problem.kinematics == solver::Kinematics::axisymmetric;
  std::printf("  %-34s %12.4g %s\n", "trough volume", a.trough_volume, volume ? "m3" : "m3/m");
  if (!three_d) std::printf("  %-34s %12.4g m\n", "inflexion offset", a.inflexion_offset);
  std::printf("  %-34s %12.3g\n", "min strength ratio (voided model)", run.stability.min_strength_ratio);
  std::printf("  %-34s %12s\n", "roof in tension beyond strength", run.stability.tension_in_roof ? "YES" : "no");
  std::printf("  %-34s %12.2g\n", "solve residual (worst)", std::max(run.result.reference.residual, run.result.voided.residual));
  std::printf("\nResults in %s/ (summary.json, mesh.vtu, static/surface.csv, %sstatic/field.vtu, static/field_ref.vtu)\n",
              dir.string().c_str(), three_d ? "static/surface.vtu, " : "");
  std::printf("Caution: %s\n", caution_text);
}


void print_modal(const ModalRun& m, const fs::path& dir) {
  std::printf("\nNatural modes (with voids / matched mode without voids):\n");
  for (std::size_t j = 0; j < m.voided.freq_hz.size(); ++j) {
    const int r = m.match[j];
    std::printf("  mode %2zu  %10.4f Hz  %10.4f Hz  (%s, MAC %.2f)  near-void energy %.2f%s\n", j + 1, m.voided.freq_hz[j],
                r >= 0 ? m.reference.freq_hz[static_cast<std::size_t>(r)] : 0.0, m.by_shape[j] ? "by shape" : "by order",
                m.mac[j], m.near_void_energy[j], m.localised[j] ? "  LOCALISED at a void" : "");
  }
  std::printf("Results in %s/modal/ (modes.csv, modes.pvd)\n", dir.string().c_str());
}

void print_harmonic(const HarmonicRun& h, const mesh::Mesh& mesh, const fs::path& dir) {
  const auto peaks = harmonic_peaks(h, mesh);
  const HarmonicPeak* top = nullptr;
  for (const auto& p : peaks)
    if (!top || p.anomaly > top->anomaly) top = &p;
  double res = 0;
  for (double v : h.result.reference.residual) res = std::max(res, v);
  for (double v : h.result.voided.residual) res = std::max(res, v);
  std::printf("\nHarmonic signature (with voids minus without), ground surface, %zu frequencies %.4g-%.4g Hz:\n",
              h.result.frequencies_hz.size(), h.result.frequencies_hz.front(), h.result.frequencies_hz.back());
  if (top)
    std::printf("  %-34s %12.4g m    at %.4g Hz, x = %.2f m%s (without voids there: %.4g m)\n", "largest |anomaly|", top->anomaly,
                top->f_hz, top->x, mesh.dim() == 3 ? (", y = " + std::to_string(top->y)).c_str() : "", top->reference);
  std::printf("  %-34s %12.2g\n", "solve residual (worst)", res);
  std::printf("Results in %s/harmonic/ (surface.csv, fields.pvd)\n", dir.string().c_str());
}

void print_ambient(const AmbientRun& a, const mesh::Mesh& mesh, const fs::path& dir) {
  std::printf("\nAmbient signature (with voids minus without), ground surface, noise %s, %zu frequencies %.4g-%.4g Hz:\n",
              a.noise_name.c_str(), a.frequencies_hz.size(), a.frequencies_hz.front(), a.frequencies_hz.back());
  const std::size_t d = static_cast<std::size_t>(a.d);
  for (const AmbientWavefield& w : a.fields) {
    const auto& b = w.bands.front();
    const std::size_t q = w.peak_point;
    const auto& x = mesh.nodes[static_cast<std::size_t>(a.points[q])];
    const double dz = b.anomaly[q * d + d - 1], z = b.reference[q * d + d - 1];
    std::printf("  %-14s largest vertical anomaly RMS %10.3g m at x = %.2f m%s; ambient there %.3g m (ratio %.2g)\n", w.name.c_str(), dz,
                x[0], a.d == 3 ? (", y = " + std::to_string(x[1])).c_str() : "", z, z > 0 ? dz / z : 0.0);
  }
  std::printf("  %-34s %12.2g\n", "solve residual (worst)", a.residual);
  std::printf("Results in %s/ambient/ (surface.csv, psd.csv, spectra.csv)\n", dir.string().c_str());
}

void print_transient(const TransientRun& t, const mesh::Mesh& mesh, const fs::path& dir) {
  const TransientPeak pk = transient_peak(t, mesh);
  std::printf("\nTransient signature (with voids minus without), ground surface, %d steps of %.3g s:\n", t.result.n_steps,
              t.result.time_step_s);
  std::printf("  %-34s %12.4g m    at t = %.4g s, x = %.2f m%s\n", "largest |anomaly|", pk.anomaly, pk.t, pk.x,
              mesh.dim() == 3 ? (", y = " + std::to_string(pk.y)).c_str() : "");
  std::printf("  %-34s %12.4g m\n", "largest surface motion (no voids)", pk.reference);
  std::printf("Results in %s/transient/ (seismograms.csv%s)\n", dir.string().c_str(),
              t.snapshot_times.empty() ? "" : ", snapshots.pvd");
}

}  // namespace

fs::path output_dir_for(const RunOptions& opt, const fs::path& scenario_dir, const fs::path& from_file) {
  if (opt.out) return fs::absolute(*opt.out);
  if (!from_file.empty()) return from_file;
  return scenario_dir / "results" / opt.scenario.stem();
}

int run_command(const RunOptions& opt) {
  const auto t_start = std::chrono::steady_clock::now();
  Scenario s = load_scenario(opt.scenario);
  const fs::path dir = output_dir_for(opt, s.file.parent_path(), s.output_dir);
  if (fs::exists(dir) && !(fs::is_directory(dir) && fs::is_empty(dir)) && !opt.force)
    throw InputError(dir.string() + ": output folder exists and is not empty; use --force to replace it");
  if (!s.analyses.static_ && !s.analyses.modal && !s.analyses.harmonic && !s.analyses.transient && !s.analyses.ambient)
    throw InputError(s.file.string() + ": key 'analyses': no analysis was requested (add 'static: {}', 'modal: {}', "
                                       "'harmonic: ...', 'transient: ...' or 'ambient: ...')");
  if (opt.find_threshold && (s.sensors.empty() || s.voids.empty()))
    throw InputError(s.file.string() + ": --find-threshold needs at least one void and a 'sensors' list in the scenario");
  for (const auto& w : s.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
  check_budget(s, estimate_run(s));

  ProgressLine progress(ProgressLine::stderr_is_terminal());
  // The static analysis builds the mesh; without it the mesh is built alone. Every analysis uses it.
  StaticRun run;
  if (s.analyses.static_) {
    run = run_static(s, &progress);
  } else {
    const auto t0 = std::chrono::steady_clock::now();
    run.mesh = build_checked_mesh(s, &run.quality, &progress);
    run.mesh_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    run.warnings = model_warnings(s);
  }
  std::optional<ModalRun> modal;
  std::optional<HarmonicRun> harmonic;
  if (s.analyses.modal) modal = run_modal(s, *run.mesh, &progress);
  if (s.analyses.harmonic) {
    harmonic = run_harmonic(s, *run.mesh, &progress);
    run.warnings.insert(run.warnings.end(), harmonic->warnings.begin(), harmonic->warnings.end());
  }
  std::optional<TransientRun> transient;
  if (s.analyses.transient) {
    transient = run_transient(s, *run.mesh, &progress);
    run.warnings.insert(run.warnings.end(), transient->warnings.begin(), transient->warnings.end());
  }
  std::optional<AmbientRun> ambient;
  if (s.analyses.ambient) {
    ambient = run_ambient(s, *run.mesh, &progress);
    run.warnings.insert(run.warnings.end(), ambient->warnings.begin(), ambient->warnings.end());
  }
  for (const auto& w : run.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());

  Detectability detect;
  detect.threshold = opt.snr;
  if (s.analyses.static_) add_static_verdicts(s, run, detect);
  if (ambient) add_ambient_verdicts(s, *ambient, *run.mesh, detect);
  if (harmonic) add_harmonic_verdicts(s, *harmonic, *run.mesh, detect);
  if (transient) add_transient_verdicts(s, *transient, *run.mesh, detect);
  if (modal && !s.sensors.empty())
    detect.skipped.push_back({"modal", "every sensor", "natural modes have a shape but no amplitude; see the modal block"});

  std::vector<ThresholdResult> thresholds;
  if (opt.find_threshold) thresholds = find_thresholds(s, detect, &progress);

  // Everything goes to a staging folder that replaces DIR only when complete.
  progress.step("writing");
  const auto t_write = std::chrono::steady_clock::now();
  const fs::path staging = dir.parent_path() / (dir.filename().string() + ".partial-" + std::to_string(getpid()));
  try {
    fs::remove_all(staging);
    fs::create_directories(staging);
    if (s.analyses.static_) write_static_outputs(run, s, staging);
    if (modal) write_modal_outputs(*modal, s, *run.mesh, staging);
    if (harmonic) write_harmonic_outputs(*harmonic, s, *run.mesh, staging);
    if (transient) write_transient_outputs(*transient, s, *run.mesh, staging);
    if (ambient) write_ambient_outputs(*ambient, s, *run.mesh, staging);
    nlohmann::json j;
    j["format"] = 1;
    j["tool_version"] = VOIDSIGN_VERSION;
    j["input_sha256"] = s.sha256;
    j["input_file"] = s.file.string();
    j["date_utc"] = utc_now();
    j["title"] = s.title;
    j["model"] = model_name(s.model);
    j["units"] = "SI: m, Pa, rad, Hz, s; z up, settlement negative; anomaly = with voids minus without";
    j["mesh"] = {{"nodes", run.mesh->n_nodes()},
                 {"elements", run.mesh->n_cells()},
                 {"dofs", static_cast<std::size_t>(run.mesh->dim() == 3 ? 3 : 2) * run.mesh->n_nodes()},
                 {"order", s.mesh.order},
                 {"min_quality", run.quality.min_quality},
                 {"mean_quality", run.quality.mean_quality},
                 {"size", s.mesh.size},
                 {"near_void", s.mesh.near_void},
                 {"surface", s.mesh.surface}};
    if (s.analyses.static_) j["static"] = static_summary(run);
    if (modal) j["modal"] = modal_summary(*modal);
    if (harmonic) j["harmonic"] = harmonic_summary(*harmonic, s, *run.mesh);
    if (transient) j["transient"] = transient_summary(*transient, s, *run.mesh);
    if (ambient) j["ambient"] = ambient_summary(*ambient, s, *run.mesh);
    j["detectability"] = detectability_json(detect);
    if (opt.find_threshold) j["threshold_search"] = thresholds_json(thresholds);
    std::vector<std::string> warnings = s.warnings;
    warnings.insert(warnings.end(), run.warnings.begin(), run.warnings.end());
    j["warnings"] = warnings;
    j["caution"] = caution_text;
    const auto& t = run.result.timings;
    const double write_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_write).count();
    j["timings_s"] = {{"mesh", run.mesh_seconds},
                      {"assemble", t.assemble},
                      {"analyse", t.analyse},
                      {"factorize", t.factorize},
                      {"solve", t.analyse + t.factorize + t.solve},
                      {"modal", modal ? modal->seconds : 0.0},
                      {"harmonic", harmonic ? harmonic->result.total_seconds : 0.0},
                      {"transient", transient ? transient->seconds : 0.0},
                      {"ambient", ambient ? ambient->seconds : 0.0},
                      {"write", write_s},
                      {"total", std::chrono::duration<double>(std::chrono::steady_clock::now() - t_start).count()}};
    write_text_atomic(staging / "summary.json", j.dump(2) + "\n");
    ReportInputs rep;
    rep.scenario = &s;
    rep.base = &run;
    rep.static_ran = s.analyses.static_;
    rep.modal = modal ? &*modal : nullptr;
    rep.harmonic = harmonic ? &*harmonic : nullptr;
    rep.transient = transient ? &*transient : nullptr;
    rep.ambient = ambient ? &*ambient : nullptr;
    rep.detectability = &detect;
    rep.thresholds = &thresholds;
    rep.warnings = warnings;
    rep.date_utc = j["date_utc"];
    write_report(rep, staging);
    if (fs::exists(dir)) fs::remove_all(dir);
    fs::create_directories(dir.parent_path());
    fs::rename(staging, dir);
  } catch (const fs::filesystem_error& e) {
    std::error_code ec;
    fs::remove_all(staging, ec);
    throw WriteError(std::string("cannot write results: ") + e.what());
  } catch (...) {
    std::error_code ec;
    fs::remove_all(staging, ec);
    throw;
  }
  progress.done();
  if (s.analyses.static_) print_peaks(run, dir);
  if (modal) print_modal(*modal, dir);
  if (harmonic) print_harmonic(*harmonic, *run.mesh, dir);
  if (transient) print_transient(*transient, *run.mesh, dir);
  if (ambient) print_ambient(*ambient, *run.mesh, dir);
  print_detectability(detect);
  print_thresholds(thresholds, detect.threshold);
  std::printf("\nReport: %s (plots in %s)\n", (dir / "report.html").string().c_str(), (dir / "plots").string().c_str());
  if (!s.analyses.static_) std::printf("Caution: %s\n", caution_text);
  return exit_ok;
}

int check_command(const fs::path& file) {
  Scenario s = load_scenario(file);
  for (const auto& w : s.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
  for (const auto& w : model_warnings(s)) std::fprintf(stderr, "warning: %s\n", w.c_str());
  const RunEstimate e = estimate_run(s);
  std::printf("%s: scenario is valid (%s, %zu layer(s), %zu void(s))\n", s.file.string().c_str(), model_name(s.model),
              s.layers.size(), s.voids.size());
  std::printf("estimate before meshing: %.0f elements, %.0f unknowns, %.2f GB peak, %.1f s\n", e.cells, e.dofs,
              e.memory_bytes / 1e9, e.seconds);
  check_budget(s, e);
  ProgressLine progress(ProgressLine::stderr_is_terminal());
  mesh::Quality q;
  const auto t0 = std::chrono::steady_clock::now();
  auto m = build_checked_mesh(s, &q, &progress);
  const double t_mesh = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  const double dofs = (m->dim() == 3 ? 3.0 : 2.0) * static_cast<double>(m->n_nodes());
  const RunEstimate after = estimate_for(static_cast<double>(m->n_cells()), dofs, m->dim() == 3);
  std::printf("mesh: %zu nodes, %zu elements (order %d), %.0f unknowns, built in %.2f s\n", m->n_nodes(), m->n_cells(),
              s.mesh.order, dofs, t_mesh);
  std::printf("element quality: min %.3f, mean %.3f (1 = equilateral); no inverted elements\n", q.min_quality,
              q.mean_quality);
  std::printf("run estimate (both models): %.2f GB peak memory, %.1f s\n", after.memory_bytes / 1e9, after.seconds);
  if (s.analyses.transient) {
    const TransientPlan plan = plan_transient(s, *m);
    std::printf("transient estimate: %d steps of %.3g s (stable step %.3g s), %zu receivers, %zu snapshots per model; "
                "%.2f GB, %.1f s for both models\n",
                plan.n_steps, plan.time_step_s, plan.stable_step_s, plan.receivers.size(), plan.n_snapshots,
                plan.estimate.bytes / 1e9, plan.estimate.seconds_total);
    for (const auto& w : plan.warnings) std::printf("warning: %s\n", w.c_str());
  }
  if (s.analyses.harmonic) {
    const solver::HarmonicEstimate h = estimate_harmonic_run(s, *m);
    std::printf("harmonic estimate: %zu unknowns, %d factorisation(s) per frequency", h.n_dofs,
                h.factorisations_per_frequency);
    if (h.shared_boundary > 0) std::printf(" (both models, Schur complement on %zu void-boundary unknowns)", h.shared_boundary);
    std::printf("; factor %.3g entries, %.3g flops, %.2f GB each; about %.2g s per frequency, %zu frequencies\n",
                h.factor_entries, h.flops, h.bytes / 1e9, h.seconds_per_frequency, s.analyses.harmonic->frequencies_hz.size());
    if (h.available_bytes > 0 && h.bytes > 0.9 * h.available_bytes)
      std::printf("warning: harmonic: one factorisation needs %.2f GB, more than the %.2f GB available: the run would be "
                  "refused; coarsen the mesh (mesh.size, mesh.near-void) or reduce the block\n",
                  h.bytes / 1e9, 0.9 * h.available_bytes / 1e9);
  }
  return exit_ok;
}

}  // namespace voidsign::cli
