// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/static_run.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <sstream>

#include "cli/commands/model_setup.hpp"
#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "cli/output/output_dir.hpp"
#include "mesh/build/mesher.hpp"
#include "mesh/io/vtk_writer.hpp"

namespace voidsign::cli {

namespace {

std::string fmt(double v, int prec = 3) {
  std::ostringstream os;
  os.precision(prec);
  os << v;
  return os.str();
}

// VTK's symmetric-tensor order: XX, YY, ZZ, XY, YZ, XZ (y is the out-of-plane direction).
void push_tensor(std::vector<double>& out, const solver::Voigt4& s, bool engineering_shear) {
  const double xz = engineering_shear ? 0.5 * s[2] : s[2];
  out.insert(out.end(), {s[0], s[3], s[1], 0.0, 0.0, xz});
}

std::vector<mesh::Field> cell_fields(const StaticRun& run, const solver::ModelSolution& sol, bool with_ratio) {
  const mesh::Mesh& m = *run.mesh;
  mesh::Field strain{"strain", 6, {}}, stress{"stress", 6, {}}, total{"stress_total", 6, {}};
  mesh::Field ratio{"strength_ratio", 1, {}}, layer{"layer", 1, {}}, vid{"void_id", 1, {}};
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    push_tensor(strain.values, sol.strain[c], true);
    push_tensor(stress.values, sol.stress[c], false);
    push_tensor(total.values, sol.stress_total[c], false);
    layer.values.push_back(m.layer[c]);
    vid.values.push_back(m.void_id[c]);
    if (with_ratio) ratio.values.push_back(run.stability.strength_ratio[c]);
  }
  std::vector<mesh::Field> out{strain, stress, total, layer, vid};
  if (with_ratio) out.push_back(ratio);
  return out;
}

mesh::Field displacement_field(const mesh::Mesh& m, const solver::Vector& u, const char* name) {
  mesh::Field f{name, 3, {}};
  f.values.reserve(3 * m.n_nodes());
  for (std::size_t n = 0; n < m.n_nodes(); ++n) f.values.insert(f.values.end(), {u[2 * n], 0.0, u[2 * n + 1]});
  return f;
}

}  // namespace

std::unique_ptr<mesh::Mesh> build_checked_mesh(const Scenario& s, mesh::Quality* quality, ProgressLine* progress) {
  if (progress) progress->step("meshing");
  auto m = std::make_unique<mesh::Mesh>(mesh::build_mesh_2d(geometry_of(s)));
  if (progress) progress->step("checking elements");
  *quality = mesh::measure_quality(*m);
  if (progress) progress->done();
  if (quality->n_inverted > 0 || quality->min_quality < 1e-3) {
    const auto* v = m->cell(quality->worst_cell);
    const auto& p = m->nodes[v[0]];
    throw SolveError(std::to_string(quality->n_inverted) + " inverted or degenerate element(s), the worst near (x " +
                     fmt(p[0]) + ", z " + fmt(p[2]) + ") m (quality " + fmt(quality->min_quality) +
                     "): reduce mesh.near-void, or smooth sharp corners of the void outline");
  }
  return m;
}

StaticRun run_static(const Scenario& s, ProgressLine* progress) {
  StaticRun run;
  const auto t0 = std::chrono::steady_clock::now();
  run.mesh = build_checked_mesh(s, &run.quality, progress);
  run.mesh_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  run.problem = static_problem_of(s, *run.mesh);
  try {
    run.result = solver::solve_static(run.problem, [&](std::string_view step, double f) {
      if (progress) progress->step(step, f);
    });
  } catch (const solver::SolveFailure& e) {
    throw SolveError(e.what());
  }
  if (progress) progress->done();
  run.profile = solver::surface_profile(*run.mesh, run.result, far_field_of(s));
  run.far_field = far_field_of(s);
  run.anomaly = solver::summarize(run.profile, s.model == Model::axisymmetric);
  run.stability = solver::screen_stability(run.problem, run.result);
  run.warnings = model_warnings(s);
  for (std::size_t k = 0; k < run.stability.voids.size(); ++k) {
    const auto& vs = run.stability.voids[k];
    if (vs.tension_in_roof)
      run.warnings.push_back("void " + std::to_string(k) + ": its roof is in tension (" + fmt(vs.max_roof_tension / 1e6) +
                             " MPa) beyond the tensile strength: an elastic model of this void is not realistic — "
                             "the roof would crack, the void migrate upward or collapse");
    else if (vs.evaluated && vs.min_strength_ratio < 1)
      run.warnings.push_back("void " + std::to_string(k) + ": the rock around its roof exceeds its strength (strength ratio " +
                             fmt(vs.min_strength_ratio) + " < 1): an elastic model of this void is not realistic");
  }
  return run;
}

std::vector<std::string> model_warnings(const Scenario& s) {
  std::vector<std::string> w;
  double d_max = 0;
  for (std::size_t k = 0; k < s.voids.size(); ++k) {
    const VoidExtent e = extent_of(s.voids[k]);
    d_max = std::max(d_max, -e.z_bottom);
    const double cover = -e.z_top, span = e.x_right - e.x_left;
    // Waltham & Fookes (2003): cave roofs thicker than 0.7 × span are normally stable.
    if (span > 0 && cover < 0.7 * span)
      w.push_back("void " + std::to_string(k) + ": cover " + fmt(cover) + " m is less than 0.7 × its span " + fmt(span) +
                  " m (Waltham & Fookes 2003): the roof may not stand; the elastic result is a lower bound at best");
    // The layer at the crown: soil or fill roofs ravel rather than arch (common practice).
    double z = 0;
    for (const Layer& l : s.layers) {
      const double bot = l.thickness > 0 ? z - l.thickness : -s.domain.depth;
      if (e.z_top <= z && e.z_top > bot) {
        if (!(s.materials.at(l.material).ucs > 0))
          w.push_back("void " + std::to_string(k) + ": its roof lies in '" + l.material +
                      "', which has no strength data (soil or fill): such roofs ravel and migrate (common practice)");
        break;
      }
      z = bot;
    }
  }
  if (s.model == Model::plane_strain && !s.voids.empty()) {
    const bool net_force = s.loads.gravity || !s.loads.surface.empty() ||
                           std::any_of(s.voids.begin(), s.voids.end(), [](const Void& v) { return v.contents == Contents::water; });
    // Block-size study in docs/theory.md: tilt and strain settle once the block is ≥ 10 void
    // depths wide and ≥ 3 deep; absolute Δu_z never does in plane strain (Flamant).
    if (s.domain.width < 10 * d_max || s.domain.depth < 3 * d_max)
      w.push_back("the block (" + fmt(s.domain.width) + " m × " + fmt(s.domain.depth) + " m) is small for voids " + fmt(d_max) +
                  " m deep: use width ≥ " + fmt(10 * d_max) + " m and depth ≥ " + fmt(3 * d_max) +
                  " m for tilt and strain to within a few per cent");
    if (net_force)
      w.push_back("plane strain with a load that has a net resultant: the absolute settlement grows with the log of the "
                  "block size (Flamant); trust tilt, strain, curvature and the settlement relative to the far field");
  }
  return w;
}

void write_static_outputs(const StaticRun& run, const Scenario& s, const std::filesystem::path& dir) {
  const mesh::Mesh& m = *run.mesh;
  std::filesystem::create_directories(dir / "static");
  const bool axi = s.model == Model::axisymmetric;

  CsvTable t({"x", "ux", "uz", "ux_ref", "uz_ref", "dux", "duz", "tilt", "strain_xx", "duz_rel", "curvature"});
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " static surface signature: " + s.title);
  t.comment(std::string("units: SI; x") + (axi ? " (radius r)" : "") +
            " m; u* m; tilt rad; strain_xx -; curvature 1/m. z up, settlement negative.");
  t.comment("d* = with voids minus without; tilt = d(duz)/dx; strain_xx = d(dux)/dx (extension positive); "
            "duz_rel = duz minus its mean at the far-field points (x_centre +/- " + std::to_string(run.far_field.offset) + " m, or the block's edge if nearer)");
  for (const auto& r : run.profile)
    t.add_row({r.x, r.ux, r.uz, r.ux_ref, r.uz_ref, r.dux, r.duz, r.tilt, r.strain, r.duz_rel, r.curvature});
  t.write(dir / "static" / "surface.csv");

  const solver::ModelSolution& v = run.result.voided;
  const solver::ModelSolution& ref = run.result.reference;
  mesh::Field du = displacement_field(m, v.u - ref.u, "displacement_anomaly");
  std::vector<bool> solid(m.n_cells());
  for (std::size_t c = 0; c < m.n_cells(); ++c) solid[c] = v.active[c] != 0;
  write_atomic(dir / "static" / "field.vtu", [&](const std::filesystem::path& tmp) {
    mesh::write_vtu(tmp, m, {displacement_field(m, v.u, "displacement"), du}, cell_fields(run, v, true), &solid);
  });
  write_atomic(dir / "static" / "field_ref.vtu", [&](const std::filesystem::path& tmp) {
    mesh::write_vtu(tmp, m, {displacement_field(m, ref.u, "displacement")}, cell_fields(run, ref, false));
  });
  write_atomic(dir / "mesh.vtu", [&](const std::filesystem::path& tmp) {
    mesh::Field layer{"layer", 1, {}}, vid{"void_id", 1, {}};
    for (std::size_t c = 0; c < m.n_cells(); ++c) {
      layer.values.push_back(m.layer[c]);
      vid.values.push_back(m.void_id[c]);
    }
    mesh::write_vtu(tmp, m, {}, {layer, vid});
  });
}

nlohmann::json static_summary(const StaticRun& run) {
  const solver::Anomaly& a = run.anomaly;
  nlohmann::json j;
  j["residual"] = std::max(run.result.reference.residual, run.result.voided.residual);
  j["residual_reference"] = run.result.reference.residual;
  j["residual_voids"] = run.result.voided.residual;
  j["anomaly"] = {{"uz_min", a.uz_min},
                  {"uz_max", a.uz_max},
                  {"x_uz_min", a.x_uz_min},
                  {"x_uz_max", a.x_uz_max},
                  {"ux_absmax", a.ux_absmax},
                  {"x_ux_absmax", a.x_ux_absmax},
                  {"tilt_absmax", a.tilt_absmax},
                  {"x_tilt_absmax", a.x_tilt_absmax},
                  {"strain_absmax", a.strain_absmax},
                  {"x_strain_absmax", a.x_strain_absmax},
                  {"strain_min", a.strain_min},
                  {"strain_max", a.strain_max},
                  {"curvature_absmax", a.curvature_absmax},
                  {"far_field_uz", a.far_field_uz},
                  {"far_field_offset", run.far_field.offset},
                  {"uz_rel_min", a.rel_uz_min},
                  {"trough_volume", a.trough_volume},
                  {"inflexion_offset", a.inflexion_offset}};
  nlohmann::json voids = nlohmann::json::array();
  for (std::size_t k = 0; k < run.stability.voids.size(); ++k) {
    const auto& vs = run.stability.voids[k];
    nlohmann::json jv = {{"void", k},
                         {"tension_in_roof", vs.tension_in_roof},
                         {"max_roof_tension", vs.max_roof_tension},
                         {"wall_translation", run.result.voided.wall_translation.empty()
                                                  ? std::vector<double>{0, 0}
                                                  : std::vector<double>{run.result.voided.wall_translation[k][0],
                                                                        run.result.voided.wall_translation[k][1]}}};
    jv["min_strength_ratio"] = vs.evaluated ? nlohmann::json(vs.min_strength_ratio) : nlohmann::json(nullptr);
    voids.push_back(jv);
  }
  j["stability"] = {{"criterion", "Mohr-Coulomb through UCS and tensile strength, with tension cut-off"},
                    {"min_strength_ratio", run.stability.min_strength_ratio},
                    {"tension_in_roof", run.stability.tension_in_roof},
                    {"voids", voids}};
  return j;
}

RunEstimate estimate_for(double cells, double dofs) {
  RunEstimate e;
  e.cells = cells;
  e.dofs = dofs;
  const double mdof = std::max(dofs / 1e6, 1e-3);
  // Measured on this code (docs/benchmarks.md): the factor takes about 1.6 GB and 7 s per
  // million unknowns, growing a little faster than linearly; matrices and vectors ≈ 0.6 kB/unknown.
  e.memory_bytes = 1.6e9 * std::pow(mdof, 1.1) + 600.0 * dofs + 150e6;
  e.seconds = 2 * 7.0 * std::pow(mdof, 1.2) + 4e-6 * cells + 0.2;
  return e;
}

RunEstimate estimate_run(const Scenario& s) {
  const double cells = mesh::estimate_cells_2d(geometry_of(s));
  // Triangles: about half as many vertices as cells; quadratic adds one node per edge (×4).
  const double nodes = cells * (s.mesh.order == 2 ? 2.0 : 0.5);
  return estimate_for(cells, 2 * nodes);
}

}  // namespace voidsign::cli
