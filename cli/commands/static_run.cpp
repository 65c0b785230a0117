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

// Sym6 is already in VTK's tensor order (XX, YY, ZZ, XY, YZ, XZ); strains carry engineering
// shears, which the tensor halves.
void push_tensor(std::vector<double>& out, const solver::Sym6& s, bool engineering_shear) {
  const double f = engineering_shear ? 0.5 : 1.0;
  out.insert(out.end(), {s[0], s[1], s[2], f * s[3], f * s[4], f * s[5]});
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

mesh::Field displacement_field(const StaticRun& run, const solver::Vector& u, const char* name) {
  mesh::Field f{name, 3, {}};
  f.values.reserve(3 * run.mesh->n_nodes());
  for (std::size_t n = 0; n < run.mesh->n_nodes(); ++n) {
    const auto d = solver::node_displacement(run.problem, u, n);
    f.values.insert(f.values.end(), d.begin(), d.end());
  }
  return f;
}

}  // namespace

std::unique_ptr<mesh::Mesh> build_checked_mesh(const Scenario& s, mesh::Quality* quality, ProgressLine* progress) {
  if (progress) progress->step("meshing");
  auto m = std::make_unique<mesh::Mesh>(s.model == Model::three_d ? mesh::build_mesh_3d(geometry3d_of(s))
                                                                  : mesh::build_mesh_2d(geometry_of(s)));
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
  run.far_field = far_field_of(s);
  if (s.model == Model::three_d) {
    run.map = solver::surface_map(run.problem, run.result, run.far_field, y_centre_of(s));
    run.anomaly = solver::summarize_map(run.map, *run.mesh);
  } else {
    run.profile = solver::surface_profile(*run.mesh, run.result, run.far_field);
    run.anomaly = solver::summarize(run.profile, s.model == Model::axisymmetric);
  }
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

namespace {

// The roof span: across a tunnel (its diameter), the narrower plan side of a box, else the
// horizontal extent of the section.
double span_of(const Void& v, const VoidExtent& e) {
  switch (v.shape) {
    case Void::Shape::tunnel:
    case Void::Shape::sphere: return 2 * v.radius;
    case Void::Shape::box: return std::min(v.size[0], v.size[1]);
    default: return e.x_right - e.x_left;
  }
}

}  // namespace

std::vector<std::string> model_warnings(const Scenario& s) {
  std::vector<std::string> w;
  double d_max = 0;
  for (std::size_t k = 0; k < s.voids.size(); ++k) {
    const VoidExtent e = extent_of(s.voids[k]);
    d_max = std::max(d_max, -e.z_bottom);
    const double cover = -e.z_top, span = span_of(s.voids[k], e);
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

namespace {

void write_surface_2d(const StaticRun& run, const Scenario& s, const std::filesystem::path& dir) {
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
}

void write_surface_3d(const StaticRun& run, const Scenario& s, const std::filesystem::path& dir) {
  CsvTable t({"x", "y", "ux", "uy", "uz", "ux_ref", "uy_ref", "uz_ref", "dux", "duy", "duz", "tilt_x", "tilt_y",
              "strain_xx", "strain_yy", "strain_xy", "duz_rel"});
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " static surface signature (3D): " + s.title);
  t.comment("units: SI; x, y m; u* m; tilt rad; strain -. z up, settlement negative.");
  t.comment("d* = with voids minus without; tilt_x = d(duz)/dx, tilt_y = d(duz)/dy; strain_* = horizontal strain tensor of "
            "the anomaly (extension positive); duz_rel = duz minus its mean on the far-field ring (" +
            std::to_string(run.far_field.offset) + " m from the voids, or the block's edge)");
  for (const auto& p : run.map.points)
    t.add_row({p.x, p.y, p.u[0], p.u[1], p.u[2], p.u_ref[0], p.u_ref[1], p.u_ref[2], p.du[0], p.du[1], p.du[2], p.tilt_x,
               p.tilt_y, p.strain_xx, p.strain_yy, p.strain_xy, p.duz_rel});
  t.write(dir / "static" / "surface.csv");

  // The ground surface as a 2D mesh of its own, for maps in ParaView.
  mesh::Mesh surf;
  surf.type = run.map.nodes_per_triangle == 6 ? mesh::CellType::tri6 : mesh::CellType::tri3;
  for (const auto& p : run.map.points) surf.nodes.push_back({p.x, p.y, 0.0});
  surf.cells = run.map.triangles;
  surf.layer.assign(run.map.triangles.size() / static_cast<std::size_t>(run.map.nodes_per_triangle), 0);
  surf.void_id.assign(surf.layer.size(), -1);
  mesh::Field du{"displacement_anomaly", 3, {}}, u{"displacement", 3, {}}, uref{"displacement_ref", 3, {}};
  mesh::Field tilt{"tilt", 3, {}}, strain{"strain_anomaly", 6, {}}, rel{"duz_rel", 1, {}};
  for (const auto& p : run.map.points) {
    du.values.insert(du.values.end(), p.du.begin(), p.du.end());
    u.values.insert(u.values.end(), p.u.begin(), p.u.end());
    uref.values.insert(uref.values.end(), p.u_ref.begin(), p.u_ref.end());
    tilt.values.insert(tilt.values.end(), {p.tilt_x, p.tilt_y, 0.0});
    strain.values.insert(strain.values.end(), {p.strain_xx, p.strain_yy, 0.0, p.strain_xy, 0.0, 0.0});
    rel.values.push_back(p.duz_rel);
  }
  write_atomic(dir / "static" / "surface.vtu", [&](const std::filesystem::path& tmp) {
    mesh::write_vtu(tmp, surf, {du, u, uref, tilt, strain, rel}, {});
  });
}

}  // namespace

void write_static_outputs(const StaticRun& run, const Scenario& s, const std::filesystem::path& dir) {
  const mesh::Mesh& m = *run.mesh;
  std::filesystem::create_directories(dir / "static");

  if (s.model == Model::three_d)
    write_surface_3d(run, s, dir);
  else
    write_surface_2d(run, s, dir);
  const solver::ModelSolution& v = run.result.voided;
  const solver::ModelSolution& ref = run.result.reference;
  mesh::Field du = displacement_field(run, v.u - ref.u, "displacement_anomaly");
  std::vector<bool> solid(m.n_cells());
  for (std::size_t c = 0; c < m.n_cells(); ++c) solid[c] = v.active[c] != 0;
  write_atomic(dir / "static" / "field.vtu", [&](const std::filesystem::path& tmp) {
    mesh::write_vtu(tmp, m, {displacement_field(run, v.u, "displacement"), du}, cell_fields(run, v, true), &solid);
  });
  write_atomic(dir / "static" / "field_ref.vtu", [&](const std::filesystem::path& tmp) {
    mesh::write_vtu(tmp, m, {displacement_field(run, ref.u, "displacement")}, cell_fields(run, ref, false));
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
  j["linear_solver"] = run.result.solver;
  j["iterations"] = run.result.iterations;
  j["anomaly"] = {{"uz_min", a.uz_min},
                  {"uz_max", a.uz_max},
                  {"x_uz_min", a.x_uz_min},
                  {"y_uz_min", a.y_uz_min},
                  {"x_uz_max", a.x_uz_max},
                  {"ux_absmax", a.ux_absmax},
                  {"x_ux_absmax", a.x_ux_absmax},
                  {"tilt_absmax", a.tilt_absmax},
                  {"x_tilt_absmax", a.x_tilt_absmax},
                  {"y_tilt_absmax", a.y_tilt_absmax},
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
                                                  ? std::array<double, 3>{0, 0, 0}
                                                  : run.result.voided.wall_translation[k]}};
    jv["min_strength_ratio"] = vs.evaluated ? nlohmann::json(vs.min_strength_ratio) : nlohmann::json(nullptr);
    voids.push_back(jv);
  }
  j["stability"] = {{"criterion", "Mohr-Coulomb through UCS and tensile strength, with tension cut-off"},
                    {"min_strength_ratio", run.stability.min_strength_ratio},
                    {"tension_in_roof", run.stability.tension_in_roof},
                    {"voids", voids}};
  return j;
}

RunEstimate estimate_for(double cells, double dofs, bool three_d) {
  RunEstimate e;
  e.cells = cells;
  e.dofs = dofs;
  const double mdof = std::max(dofs / 1e6, 1e-3);
  if (three_d) {
    // Measured on the 3D benchmark (docs/benchmarks.md, quadratic tetrahedra, conjugate
    // gradients with BoomerAMG, the two models at once): about 5.0 GB of peak memory per
    // million unknowns at every size from 0.23 to 2.07 M, and a whole run of about 42 s per
    // million, growing as DOF^1.1.
    e.memory_bytes = 5.0e9 * mdof + 100e6;
    e.seconds = 42.0 * std::pow(mdof, 1.1) + 0.2;
    return e;
  }
  // Measured on this code (docs/benchmarks.md): the factor takes about 1.6 GB and 7 s per
  // million unknowns, growing a little faster than linearly; matrices and vectors ≈ 0.6 kB/unknown.
  e.memory_bytes = 1.6e9 * std::pow(mdof, 1.1) + 600.0 * dofs + 150e6;
  e.seconds = 2 * 7.0 * std::pow(mdof, 1.2) + 4e-6 * cells + 0.2;
  return e;
}

RunEstimate estimate_run(const Scenario& s) {
  if (s.model == Model::three_d) {
    const double cells = mesh::estimate_cells_3d(geometry3d_of(s));
    // Tetrahedral meshes: about cells/5.5 vertices and 1.27 × cells edges.
    const double nodes = cells * (s.mesh.order == 2 ? 1.45 : 0.18);
    return estimate_for(cells, 3 * nodes, true);
  }
  const double cells = mesh::estimate_cells_2d(geometry_of(s));
  // Triangles: about half as many vertices as cells; quadratic adds one node per edge (×4).
  const double nodes = cells * (s.mesh.order == 2 ? 2.0 : 0.5);
  return estimate_for(cells, 2 * nodes, false);
}

}  // namespace voidsign::cli
