// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/commands/dynamic_run.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>
#include <stdexcept>

#include "cli/commands/model_setup.hpp"
#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "cli/output/output_dir.hpp"
#include "cli/output/vtk_series.hpp"
#include "mesh/io/vtk_writer.hpp"
#include "solver/analysis/static.hpp"
#include "solver/fe/pml.hpp"

namespace voidsign::cli {

namespace fs = std::filesystem;

namespace {

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

std::string fmt(double v, int prec = 3) {
  std::ostringstream os;
  os.precision(prec);
  os << v;
  return os.str();
}


std::array<double, 3> centroid(const mesh::Mesh& m, std::size_t c) {
  std::array<double, 3> g{0, 0, 0};
  const int nv = m.dim() == 3 ? 4 : 3;  // corners
  for (int a = 0; a < nv; ++a)
    for (int i = 0; i < 3; ++i) g[static_cast<std::size_t>(i)] += m.nodes[static_cast<std::size_t>(m.cell(c)[a])][static_cast<std::size_t>(i)] / nv;
  return g;
}

// Cells within one half-size of a void's wall (for a circle: within two radii of its centre).
// The half-size is half the smallest extent of the void's cells' bounding box, so that a long
// tunnel gets a band of about its radius, not of its length.
std::vector<char> near_void_cells(const mesh::Mesh& m) {
  std::vector<char> near(m.n_cells(), 0);
  for (int k = 0; k < m.n_voids; ++k) {
    std::array<double, 3> lo{1e300, 1e300, 1e300}, hi{-1e300, -1e300, -1e300};
    for (std::size_t c = 0; c < m.n_cells(); ++c) {
      if (m.void_id[c] != k) continue;
      near[c] = 1;
      for (int a = 0; a < m.npc(); ++a)
        for (std::size_t i = 0; i < 3; ++i) {
          const double v = m.nodes[static_cast<std::size_t>(m.cell(c)[a])][i];
          lo[i] = std::min(lo[i], v);
          hi[i] = std::max(hi[i], v);
        }
    }
    if (lo[0] > hi[0]) continue;
    double half = 1e300;
    for (std::size_t i = 0; i < 3; ++i)
      if (i != 1 || m.dim() == 3) half = std::min(half, 0.5 * (hi[i] - lo[i]));
    std::vector<std::array<double, 3>> wall;
    for (const mesh::Facet& f : m.facets)
      if (f.kind == mesh::FacetKind::void_wall)
        for (int a = 0; a < mesh::nodes_per_facet(m.type); ++a) {
          const auto& p = m.nodes[static_cast<std::size_t>(f.nodes[a])];
          bool mine = true;
          for (std::size_t i = 0; i < 3; ++i) mine = mine && p[i] >= lo[i] - 1e-9 && p[i] <= hi[i] + 1e-9;
          if (mine) wall.push_back(p);
        }
    for (std::size_t c = 0; c < m.n_cells(); ++c) {
      if (near[c]) continue;
      const auto g = centroid(m, c);
      bool cand = true;
      for (std::size_t i = 0; i < 3; ++i) cand = cand && g[i] >= lo[i] - half && g[i] <= hi[i] + half;
      if (!cand) continue;
      for (const auto& p : wall)
        if (std::hypot(g[0] - p[0], g[1] - p[1], g[2] - p[2]) <= half) {
          near[c] = 1;
          break;
        }
    }
  }
  return near;
}

// Standard modal assurance criterion (Allemang & Brown 1982) over the unknowns free in both.
double mac(const Eigen::MatrixXd& a, Eigen::Index i, const Eigen::MatrixXd& b, Eigen::Index j,
           const std::vector<char>& shared) {
  double ab = 0, aa = 0, bb = 0;
  for (Eigen::Index r = 0; r < a.rows(); ++r) {
    if (!shared[static_cast<std::size_t>(r)]) continue;
    ab += a(r, i) * b(r, j);
    aa += a(r, i) * a(r, i);
    bb += b(r, j) * b(r, j);
  }
  return aa > 0 && bb > 0 ? ab * ab / (aa * bb) : 0.0;
}

std::vector<double> surface_ratio(const mesh::Mesh& m, int d, const Eigen::MatrixXd& shapes) {
  std::vector<double> out;
  for (Eigen::Index j = 0; j < shapes.cols(); ++j) {
    double all = 0, top = 0;
    for (std::size_t n = 0; n < m.n_nodes(); ++n) {
      double a2 = 0;
      for (int i = 0; i < d; ++i) a2 += shapes(d * static_cast<Eigen::Index>(n) + i, j) * shapes(d * static_cast<Eigen::Index>(n) + i, j);
      all = std::max(all, a2);
    }
    for (int n : m.surface_nodes) {
      double a2 = 0;
      for (int i = 0; i < d; ++i) a2 += shapes(d * n + i, j) * shapes(d * n + i, j);
      top = std::max(top, a2);
    }
    out.push_back(all > 0 ? std::sqrt(top / all) : 0.0);
  }
  return out;
}

double max_node_amplitude(int d, const Eigen::VectorXd& u) {
  double best = 0;
  for (Eigen::Index b = 0; b + d <= u.size(); b += d) best = std::max(best, u.segment(b, d).norm());
  return best;
}

}  // namespace

// ---------------------------------------------------------------------------------------------
// Modal

ModalRun run_modal(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress) {
  const auto t0 = Clock::now();
  ModalRun run;
  run.kinematics = kinematics_of(s);
  const solver::StaticProblem p = static_problem_of(s, m);
  const int d = solver::dofs_per_node(run.kinematics);
  const std::size_t nc = m.n_cells();
  std::vector<char> all(nc, 1), solid(nc);
  for (std::size_t c = 0; c < nc; ++c) solid[c] = m.void_id[c] < 0;
  auto material_of = [&](std::size_t c) -> const solver::Elastic& { return p.layers[static_cast<std::size_t>(m.layer[c])].elastic; };
  const solver::DensityOf density_of = [&](std::size_t c) { return p.layers[static_cast<std::size_t>(m.layer[c])].elastic.density; };

  run.fixed_reference = solver::outer_constraints(p);
  run.fixed_voided = run.fixed_reference;
  {
    std::vector<char> touched(m.n_nodes(), 0);
    for (std::size_t c = 0; c < nc; ++c)
      if (solid[c])
        for (int a = 0; a < m.npc(); ++a) touched[static_cast<std::size_t>(m.cell(c)[a])] = 1;
    for (std::size_t n = 0; n < m.n_nodes(); ++n)
      if (!touched[n])
        for (int j = 0; j < d; ++j) run.fixed_voided[static_cast<std::size_t>(d) * n + static_cast<std::size_t>(j)] = 1;
  }
  solver::ModalOptions opt;
  opt.n_modes = s.analyses.modal->modes;
  opt.shift_hz = s.analyses.modal->shift_hz;
  opt.dofs_per_node = d;
  solver::ModalSolver modal;
  auto solve = [&](const std::vector<char>& active, const std::vector<char>& fixed, const char* what) {
    if (progress) progress->step(std::string("modal: ") + what, 0);
    solver::SparseMatrix k = solver::stiffness_pattern(m);
    solver::assemble_stiffness(m, run.kinematics, active, material_of, k);
    solver::SparseMatrix mm = k;
    solver::assemble_mass(m, run.kinematics, active, density_of, mm);
    try {
      auto r = modal.solve(k, mm, fixed, opt);
      return std::make_pair(std::move(r), std::move(mm));
    } catch (const solver::ModalFailure& e) {
      throw SolveError(std::string("modal analysis (") + what + "): " + e.what());
    } catch (const std::invalid_argument& e) {
      throw InputError(s.file.string() + ": key 'analyses.modal.modes': " + e.what() +
                       " (ask for fewer modes than the model has unknowns)");
    }
  };
  auto [rv, mv] = solve(solid, run.fixed_voided, "model with voids");
  auto [rr, mr] = solve(all, run.fixed_reference, "model without voids");
  run.voided = std::move(rv);
  run.reference = std::move(rr);
  if (progress) progress->step("modal: matching modes", 0.9);

  run.part_voided = solver::participation(mv, run.fixed_voided, run.voided.shapes, run.kinematics);
  run.part_reference = solver::participation(mr, run.fixed_reference, run.reference.shapes, run.kinematics);
  run.near_void_cell = near_void_cells(m);
  run.near_void_energy = solver::energy_fraction_in(m, run.kinematics, solid, density_of, run.voided.shapes, run.near_void_cell);
  run.near_void_energy_ref =
      solver::energy_fraction_in(m, run.kinematics, all, density_of, run.reference.shapes, run.near_void_cell);
  {
    // A uniform translation's kinetic energy is the mass: its fraction is the region's mass share.
    Eigen::MatrixXd r = Eigen::MatrixXd::Zero(d * static_cast<Eigen::Index>(m.n_nodes()), 1);
    for (Eigen::Index i = 0; i < r.rows(); i += d) r(i, 0) = 1;
    run.near_void_mass_fraction = solver::energy_fraction_in(m, run.kinematics, solid, density_of, r, run.near_void_cell)[0];
  }
  run.surface_ratio = surface_ratio(m, d, run.voided.shapes);
  run.surface_ratio_ref = surface_ratio(m, d, run.reference.shapes);

  // Matching: the pair with the largest MAC first, while it is at least mac_threshold; the rest by order.
  const auto nv = run.voided.shapes.cols(), nr = run.reference.shapes.cols();
  std::vector<char> shared(run.fixed_voided.size());
  for (std::size_t i = 0; i < shared.size(); ++i) shared[i] = !run.fixed_voided[i] && !run.fixed_reference[i];
  Eigen::MatrixXd macs(nv, nr);
  for (Eigen::Index i = 0; i < nv; ++i)
    for (Eigen::Index j = 0; j < nr; ++j) macs(i, j) = mac(run.voided.shapes, i, run.reference.shapes, j, shared);
  run.match.assign(static_cast<std::size_t>(nv), -1);
  run.mac.assign(static_cast<std::size_t>(nv), 0);
  run.by_shape.assign(static_cast<std::size_t>(nv), 0);
  std::vector<char> taken(static_cast<std::size_t>(nr), 0);
  for (;;) {
    Eigen::Index bi = -1, bj = -1;
    double best = mac_threshold;
    for (Eigen::Index i = 0; i < nv; ++i) {
      if (run.match[static_cast<std::size_t>(i)] >= 0) continue;
      for (Eigen::Index j = 0; j < nr; ++j)
        if (!taken[static_cast<std::size_t>(j)] && macs(i, j) >= best) {
          best = macs(i, j);
          bi = i;
          bj = j;
        }
    }
    if (bi < 0) break;
    run.match[static_cast<std::size_t>(bi)] = static_cast<int>(bj);
    run.by_shape[static_cast<std::size_t>(bi)] = 1;
    taken[static_cast<std::size_t>(bj)] = 1;
  }
  for (Eigen::Index i = 0; i < nv; ++i) {
    if (run.match[static_cast<std::size_t>(i)] >= 0) continue;
    for (Eigen::Index j = 0; j < nr; ++j)
      if (!taken[static_cast<std::size_t>(j)]) {
        run.match[static_cast<std::size_t>(i)] = static_cast<int>(j);
        taken[static_cast<std::size_t>(j)] = 1;
        break;
      }
  }
  for (Eigen::Index i = 0; i < nv; ++i)
    if (run.match[static_cast<std::size_t>(i)] >= 0) run.mac[static_cast<std::size_t>(i)] = macs(i, run.match[static_cast<std::size_t>(i)]);
  run.localised.resize(static_cast<std::size_t>(nv));
  for (std::size_t i = 0; i < run.localised.size(); ++i)
    run.localised[i] = m.n_voids > 0 && run.near_void_energy[i] >= std::max(0.5, 3 * run.near_void_mass_fraction);
  if (progress) progress->done();
  run.seconds = seconds_since(t0);
  return run;
}

void write_modal_outputs(const ModalRun& run, const Scenario& s, const mesh::Mesh& m, const fs::path& dir) {
  fs::create_directories(dir / "modal");
  const int d = solver::dofs_per_node(run.kinematics);
  const bool three_d = d == 3;
  CsvTable t({"mode", "f_hz", "f_ref_hz", "ref_mode", "mac", "matched_by_shape", "near_void_energy", "near_void_energy_ref",
              "localised", "surface_ratio", "surface_ratio_ref", "mass_x", "mass_z", "mass_x_ref", "mass_z_ref",
              "residual", "residual_ref"});
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " natural modes with and without voids: " + s.title);
  t.comment("units: SI; f_hz, f_ref_hz Hz; every other column dimensionless. mode and ref_mode count from 1 in ascending "
            "frequency; f_ref_hz is the matched mode of the model without voids");
  t.comment("mac: modal assurance criterion on the unknowns free in both models; matched_by_shape 1 when mac >= " +
            fmt(mac_threshold) + ", else matched by order");
  t.comment("near_void_energy: share of the mode's kinetic energy in the cells within one void half-size of a void wall "
            "(region mass share " + fmt(run.near_void_mass_fraction) + "); localised 1 when >= max(0.5, 3 x mass share)");
  t.comment(std::string("surface_ratio: largest surface amplitude / largest amplitude anywhere; mass_*: effective modal mass / "
                        "total mass") + (three_d ? " (mass_y in the summary)" : ""));
  const std::size_t nv = run.voided.freq_hz.size();
  const std::size_t iz = three_d ? 2 : (run.kinematics == solver::Kinematics::axisymmetric ? 1 : 1);
  auto frac = [](const solver::Participation& p, std::size_t j, std::size_t i) {
    return p.total_mass[i] > 0 ? p.effective_mass[j][i] / p.total_mass[i] : 0.0;
  };
  for (std::size_t j = 0; j < nv; ++j) {
    const int r = run.match[j];
    const auto rj = static_cast<std::size_t>(std::max(r, 0));
    const double nan = std::numeric_limits<double>::quiet_NaN();
    t.add_row({static_cast<double>(j + 1), run.voided.freq_hz[j], r >= 0 ? run.reference.freq_hz[rj] : nan,
               static_cast<double>(r + 1), run.mac[j], static_cast<double>(run.by_shape[j]), run.near_void_energy[j],
               r >= 0 ? run.near_void_energy_ref[rj] : nan, static_cast<double>(run.localised[j]), run.surface_ratio[j],
               r >= 0 ? run.surface_ratio_ref[rj] : nan, frac(run.part_voided, j, 0), frac(run.part_voided, j, 2),
               r >= 0 ? frac(run.part_reference, rj, 0) : nan, r >= 0 ? frac(run.part_reference, rj, 2) : nan,
               run.voided.residual[j], r >= 0 ? run.reference.residual[rj] : nan});
  }
  (void)iz;
  t.write(dir / "modal" / "modes.csv");

  std::vector<bool> keep(m.n_cells(), true);
  std::vector<std::string> files;
  const mesh::Field layer = cell_tag("layer", m, [&](std::size_t c) { return m.layer[c]; });
  const mesh::Field vid = cell_tag("void_id", m, [&](std::size_t c) { return m.void_id[c]; });
  const mesh::Field near = cell_tag("near_void", m, [&](std::size_t c) { return run.near_void_cell[c]; });
  for (std::size_t j = 0; j < nv; ++j) {
    const Eigen::VectorXd a = run.voided.shapes.col(static_cast<Eigen::Index>(j));
    const double sa = max_node_amplitude(d, a);
    std::vector<mesh::Field> pf{vector_field("mode", m, d, a, sa > 0 ? 1 / sa : 0)};
    if (run.match[j] >= 0) {
      Eigen::VectorXd b = run.reference.shapes.col(run.match[j]);
      // Same sign as the voided mode on the shared unknowns, for side-by-side viewing.
      double dot = 0;
      for (Eigen::Index i = 0; i < a.size(); ++i)
        if (!run.fixed_voided[static_cast<std::size_t>(i)]) dot += a[i] * b[i];
      const double sb = max_node_amplitude(d, b);
      pf.push_back(vector_field("mode_ref", m, d, b, sb > 0 ? (dot < 0 ? -1 : 1) / sb : 0));
    }
    const std::string name = numbered("mode", j + 1);
    write_atomic(dir / "modal" / name, [&](const fs::path& tmp) { mesh::write_vtu(tmp, m, pf, {layer, vid, near}); });
    files.push_back(name);
  }
  write_pvd(dir / "modal" / "modes.pvd", files, run.voided.freq_hz,
            "voidsign natural modes; timestep = frequency of the mode with voids [Hz]; point data 'mode' (with voids) and "
            "'mode_ref' (matched mode without voids), dimensionless, scaled to a largest nodal displacement of 1; SI units "
            "(m) for coordinates");
}

nlohmann::json modal_summary(const ModalRun& run) {
  nlohmann::json modes = nlohmann::json::array();
  double worst = 0;
  for (std::size_t j = 0; j < run.voided.freq_hz.size(); ++j) {
    const int r = run.match[j];
    nlohmann::json jm = {{"mode", j + 1},
                         {"f_hz", run.voided.freq_hz[j]},
                         {"near_void_energy", run.near_void_energy[j]},
                         {"localised", run.localised[j] != 0},
                         {"surface_ratio", run.surface_ratio[j]},
                         {"mac", run.mac[j]},
                         {"matched_by", run.by_shape[j] ? "shape" : "order"}};
    jm["f_ref_hz"] = r >= 0 ? nlohmann::json(run.reference.freq_hz[static_cast<std::size_t>(r)]) : nlohmann::json(nullptr);
    jm["ref_mode"] = r >= 0 ? nlohmann::json(r + 1) : nlohmann::json(nullptr);
    jm["shift_ratio"] = r >= 0 && run.reference.freq_hz[static_cast<std::size_t>(r)] > 0
                            ? nlohmann::json(run.voided.freq_hz[j] / run.reference.freq_hz[static_cast<std::size_t>(r)] - 1)
                            : nlohmann::json(nullptr);
    modes.push_back(jm);
    worst = std::max(worst, run.voided.residual[j]);
  }
  for (double r : run.reference.residual) worst = std::max(worst, r);
  double max_shift = 0;
  for (const auto& jm : modes)
    if (!jm["shift_ratio"].is_null()) max_shift = std::max(max_shift, std::abs(jm["shift_ratio"].get<double>()));
  return {{"solver", "Spectra shift-invert Lanczos on a CHOLMOD factor of K - sigma M, consistent mass"},
          {"modes", modes},
          {"frequencies_hz", run.voided.freq_hz},
          {"frequencies_ref_hz", run.reference.freq_hz},
          {"residual", worst},
          {"largest_relative_shift", max_shift},
          {"localised_modes", std::count(run.localised.begin(), run.localised.end(), 1)},
          {"near_void_mass_fraction", run.near_void_mass_fraction},
          {"free_dofs", run.voided.n_free},
          {"seconds", run.seconds}};
}

// ---------------------------------------------------------------------------------------------
// Harmonic

// Absorbing band: the scenario's, or max(4 h, min(0.15 W, 0.25 D)) reduced until the DRM box
// (the band's inner edge less 3 far-field cells) still holds every void.
double absorbing_band(const Scenario& s, const mesh::Mesh& m, double requested, const std::string& key) {
  const double h = s.mesh.size;
  double reach_x = 0, reach_y = 0, reach_z = 0;
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    if (m.void_id[c] < 0) continue;
    for (int a = 0; a < m.npc(); ++a) {
      const auto& q = m.nodes[static_cast<std::size_t>(m.cell(c)[a])];
      reach_x = std::max(reach_x, std::abs(q[0]));
      reach_y = std::max(reach_y, std::abs(q[1]));
      reach_z = std::max(reach_z, m.z_max - q[2]);
    }
  }
  const double w = std::min(-m.x_min, m.x_max), depth = m.z_max - m.z_min;
  double room = std::min(w - reach_x, depth - reach_z);
  if (m.dim() == 3) room = std::min(room, std::min(-m.y_min, m.y_max) - reach_y);
  room -= 4 * h;  // DRM box margin: two of the largest cells, one layer of DRM cells, one to spare
  const std::string block = s.model == Model::three_d ? "domain.width, domain.length or domain.depth" : "domain.width or domain.depth";
  if (requested > 0) {
    if (requested > room)
      throw InputError(s.file.string() + ": key '" + key + ".absorbing': a band of " + fmt(requested) +
                       " m leaves no room between it and the voids (at most " + fmt(std::max(room, 0.0)) +
                       " m fits): make it thinner or enlarge " + block);
    return requested;
  }
  double band = std::max(4 * h, std::min(0.15 * 2 * w, 0.25 * depth));
  band = std::min(band, room);
  if (band < 2 * h)
    throw InputError(s.file.string() + ": key '" + key + "': the block is too small for an absorbing band of at least two "
                     "elements (" + fmt(2 * h) + " m) outside the voids: enlarge " + block + " or reduce mesh.size");
  return band;
}


solver::HarmonicProblem harmonic_problem_of(const Scenario& s, const mesh::Mesh& m) {
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.kinematics = kinematics_of(s);
  for (const Layer& l : s.layers) {
    const Material& mat = s.materials.at(l.material);
    p.layers.push_back({{mat.young, mat.poisson, mat.density}, mat.damping, l.thickness});
  }
  return p;
}

std::vector<int> surface_points(const solver::HarmonicResult& r, const mesh::Mesh& m) {
  std::vector<int> pos(m.n_nodes(), -1), out;
  for (std::size_t k = 0; k < r.output_nodes.size(); ++k) pos[static_cast<std::size_t>(r.output_nodes[k])] = static_cast<int>(k);
  for (int n : m.surface_nodes) {
    const auto& q = m.nodes[static_cast<std::size_t>(n)];
    if (pos[static_cast<std::size_t>(n)] < 0 || solver::in_pml(r.pml, {q[0], q[1], q[2] - 1e-9})) continue;
    bool in_band = q[0] < r.pml.x_lo - 1e-9 || q[0] > r.pml.x_hi + 1e-9;
    if (m.dim() == 3) in_band = in_band || q[1] < r.pml.y_lo - 1e-9 || q[1] > r.pml.y_hi + 1e-9;
    if (!in_band) out.push_back(pos[static_cast<std::size_t>(n)]);
  }
  return out;
}

// The harmonic analysis of the scenario as the solver takes it.
solver::HarmonicProblem harmonic_sweep_of(const Scenario& s, const mesh::Mesh& m) {
  const HarmonicAnalysis& a = *s.analyses.harmonic;
  solver::HarmonicProblem p = harmonic_problem_of(s, m);
  p.frequencies_hz = a.frequencies_hz;
  if (a.excitation == HarmonicAnalysis::Excitation::wave) {
    p.source = solver::HarmonicProblem::Source::plane_wave;
    p.wave = plane_wave_of(a.wave, a.amplitude);
  } else {
    p.source = solver::HarmonicProblem::Source::point_force;
    p.force.point = {a.source_x, a.source_y, -a.source_depth};
    p.force.direction = a.direction;
    p.force.amplitude = a.force;
  }
  p.pml_thickness = absorbing_band(s, m, a.absorbing, "analyses.harmonic");
  return p;
}

solver::HarmonicEstimate estimate_harmonic_run(const Scenario& s, const mesh::Mesh& m) {
  const solver::HarmonicProblem p = harmonic_sweep_of(s, m);
  try {
    return solver::estimate_harmonic(p);
  } catch (const solver::SolveFailure& e) {
    throw SolveError(std::string("harmonic analysis: ") + e.what());
  } catch (const std::invalid_argument& e) {
    throw InputError(s.file.string() + ": key 'analyses.harmonic': " + e.what());
  }
}

HarmonicRun run_harmonic(const Scenario& s, const mesh::Mesh& m, ProgressLine* progress) {
  HarmonicRun run;
  const solver::HarmonicProblem p = harmonic_sweep_of(s, m);
  run.pml_thickness = p.pml_thickness;
  try {
    run.result = solver::solve_harmonic(p, [&](std::string_view step, double f) {
      if (progress) progress->step(std::string("harmonic: ") + std::string(step), f);
    });
  } catch (const solver::SolveFailure& e) {
    throw SolveError(std::string("harmonic analysis: ") + e.what());
  } catch (const std::invalid_argument& e) {
    throw InputError(s.file.string() + ": key 'analyses.harmonic': " + e.what());
  }
  if (progress) progress->done();
  run.surface = surface_points(run.result, m);
  if (run.result.force_node >= 0 && run.result.force_offset > 0.5 * s.mesh.size)
    run.warnings.push_back("harmonic: the source acts at the nearest node, " + fmt(run.result.force_offset) +
                           " m from the point asked for");
  if (run.result.pml_wavelengths < 0.25)
    run.warnings.push_back("harmonic: the absorbing band is " + fmt(run.result.pml_wavelengths) +
                           " S wavelengths thick at the lowest frequency; near-field motion is absorbed less well there "
                           "(widen the block or raise the lowest frequency)");
  return run;
}

std::vector<HarmonicPeak> harmonic_peaks(const HarmonicRun& run, const mesh::Mesh& m) {
  const int d = m.dim() == 3 ? 3 : 2;
  std::vector<HarmonicPeak> out;
  const auto& r = run.result;
  for (std::size_t f = 0; f < r.frequencies_hz.size(); ++f) {
    HarmonicPeak pk;
    pk.f_hz = r.frequencies_hz[f];
    for (int k : run.surface) {
      const auto seg = static_cast<Eigen::Index>(d) * k;
      const double da = (r.voided.u[f].segment(seg, d) - r.reference.u[f].segment(seg, d)).norm();
      if (da > pk.anomaly) {
        const auto& q = m.nodes[static_cast<std::size_t>(r.output_nodes[static_cast<std::size_t>(k)])];
        pk.anomaly = da;
        pk.reference = r.reference.u[f].segment(seg, d).norm();
        pk.x = q[0];
        pk.y = q[1];
      }
    }
    out.push_back(pk);
  }
  return out;
}

void write_harmonic_outputs(const HarmonicRun& run, const Scenario& s, const mesh::Mesh& m, const fs::path& dir) {
  fs::create_directories(dir / "harmonic");
  const bool three_d = m.dim() == 3;
  const int d = three_d ? 3 : 2;
  const auto& r = run.result;
  const HarmonicAnalysis& a = *s.analyses.harmonic;
  std::vector<std::string> cols{"f_hz", "x"};
  const std::vector<std::string> comps = three_d ? std::vector<std::string>{"ux", "uy", "uz"} : std::vector<std::string>{"ux", "uz"};
  if (three_d) cols.push_back("y");
  for (const char* suffix : {"", "_ref"})
    for (const auto& c : comps) {
      cols.push_back(c + suffix + "_re");
      cols.push_back(c + suffix + "_im");
    }
  for (const auto& c : comps) cols.push_back("d" + c + "_amp");
  CsvTable t(cols);
  t.comment(std::string("voidsign ") + VOIDSIGN_VERSION + " harmonic surface response with and without voids: " + s.title);
  t.comment(std::string("units: SI; f_hz Hz; x") + (three_d ? ", y" : "") +
            " m; u* complex displacement amplitudes, real and imaginary parts, m (time factor exp(i omega t)); z up");
  if (a.excitation == HarmonicAnalysis::Excitation::wave)
    t.comment("excitation: " + a.wave.describe(three_d) + ", entering from the rock below; amplitude " + format_number(a.amplitude) +
              " m = twice the incident wave's (at vertical incidence the bedrock outcrop motion: divide u by it for the "
              "surface/outcrop transfer function)");
  else
    t.comment("excitation: point force " + format_number(a.force) + (three_d ? " N" : " N/m") + " at x " + format_number(a.source_x) +
              (three_d ? ", y " + format_number(a.source_y) : std::string()) + ", depth " + format_number(a.source_depth) + " m");
  t.comment("*_ref: model without voids; d*_amp = |with voids minus without| (modulus of the complex difference), m; "
            "surface nodes inside the absorbing band are left out");
  std::vector<double> row;
  for (std::size_t f = 0; f < r.frequencies_hz.size(); ++f)
    for (int k : run.surface) {
      const auto& q = m.nodes[static_cast<std::size_t>(r.output_nodes[static_cast<std::size_t>(k)])];
      row = {r.frequencies_hz[f], q[0]};
      if (three_d) row.push_back(q[1]);
      const auto seg = static_cast<Eigen::Index>(d) * k;
      for (const auto* u : {&r.voided.u[f], &r.reference.u[f]})
        for (int i = 0; i < d; ++i) {
          row.push_back((*u)[seg + i].real());
          row.push_back((*u)[seg + i].imag());
        }
      for (int i = 0; i < d; ++i) row.push_back(std::abs(r.voided.u[f][seg + i] - r.reference.u[f][seg + i]));
      t.add_row(row);
    }
  t.write(dir / "harmonic" / "surface.csv");

  // Fields: every node (output_nodes is every node when none were asked for).
  const bool every = r.output_nodes.size() == m.n_nodes();
  std::vector<std::string> files;
  const mesh::Field layer = cell_tag("layer", m, [&](std::size_t c) { return m.layer[c]; });
  const mesh::Field vid = cell_tag("void_id", m, [&](std::size_t c) { return m.void_id[c]; });
  const mesh::Field band = cell_tag("absorbing", m, [&](std::size_t c) { return r.pml_cell[c]; });
  for (std::size_t f = 0; f < r.frequencies_hz.size() && every; ++f) {
    std::vector<mesh::Field> pf;
    auto add = [&](const std::string& name, const solver::ComplexVector& u) {
      const Eigen::VectorXd re = u.real(), im = u.imag(), amp = u.cwiseAbs();
      pf.push_back(vector_field(name + "_re", m, d, re, 1));
      pf.push_back(vector_field(name + "_im", m, d, im, 1));
      pf.push_back(vector_field(name + "_amplitude", m, d, amp, 1));
    };
    add("displacement", r.voided.u[f]);
    add("displacement_ref", r.reference.u[f]);
    add("anomaly", r.voided.u[f] - r.reference.u[f]);
    const std::string name = numbered("fields", f);
    write_atomic(dir / "harmonic" / name, [&](const fs::path& tmp) { mesh::write_vtu(tmp, m, pf, {layer, vid, band}); });
    files.push_back(name);
  }
  write_pvd(dir / "harmonic" / "fields.pvd", files, r.frequencies_hz,
            "voidsign harmonic response; timestep = frequency [Hz]; point data displacement_* (with voids), "
            "displacement_ref_* (without), anomaly_* (difference): real part, imaginary part and amplitude (modulus) per "
            "component, m; SI units; cells with absorbing = 1 are the absorbing band (non-physical field)");
}

nlohmann::json harmonic_summary(const HarmonicRun& run, const Scenario& s, const mesh::Mesh& m) {
  const auto& r = run.result;
  const HarmonicAnalysis& a = *s.analyses.harmonic;
  const auto peaks = harmonic_peaks(run, m);
  const bool three_d = m.dim() == 3;
  nlohmann::json per = nlohmann::json::array();
  auto peak_json = [&](const HarmonicPeak& pk) {
    nlohmann::json j = {{"f_hz", pk.f_hz}, {"anomaly_absmax", pk.anomaly}, {"x", pk.x}, {"reference_amplitude", pk.reference}};
    if (three_d) j["y"] = pk.y;
    j["relative"] = pk.reference > 0 ? nlohmann::json(pk.anomaly / pk.reference) : nlohmann::json(nullptr);
    return j;
  };
  for (const auto& pk : peaks) per.push_back(peak_json(pk));
  // Octave bands from the lowest frequency.
  nlohmann::json bands = nlohmann::json::array();
  const double f0 = r.frequencies_hz.front();
  for (double lo = f0; lo <= r.frequencies_hz.back(); lo *= 2) {
    const double hi = 2 * lo;
    const HarmonicPeak* best = nullptr;
    for (const auto& pk : peaks)
      if (pk.f_hz >= lo && pk.f_hz < hi && (!best || pk.anomaly > best->anomaly)) best = &pk;
    if (!best) continue;
    nlohmann::json j = peak_json(*best);
    j["band_lo_hz"] = lo;
    j["band_hi_hz"] = hi;
    bands.push_back(j);
  }
  const HarmonicPeak* top = nullptr;
  for (const auto& pk : peaks)
    if (!top || pk.anomaly > top->anomaly) top = &pk;
  double res = 0, total = 0;
  for (double v : r.reference.residual) res = std::max(res, v);
  for (double v : r.voided.residual) res = std::max(res, v);
  for (double v : r.reference.seconds) total += v;
  for (double v : r.voided.seconds) total += v;
  nlohmann::json j;
  j["frequencies_hz"] = r.frequencies_hz;
  if (a.excitation == HarmonicAnalysis::Excitation::wave)
    j["excitation"] = {{"type", "plane wave"},       {"wave", a.wave.name()},         {"incidence_deg", a.wave.incidence_deg},
                       {"azimuth_deg", a.wave.azimuth_deg}, {"amplitude", a.amplitude},
                       {"amplitude_meaning", "twice the incident wave's displacement amplitude (vertical incidence: the outcrop motion)"}};
  else
    j["excitation"] = {{"type", "point force"}, {"force", a.force}, {"x", a.source_x}, {"y", a.source_y}, {"depth", a.source_depth},
                       {"node_offset", r.force_offset}};
  j["residual"] = res;
  j["residual_reference"] = r.reference.residual;
  j["residual_voids"] = r.voided.residual;
  j["linear_solver"] = r.linear_solver;
  j["loop"] = r.loop;
  j["absorbing"] = {{"kind", "PML"},
                    {"thickness", run.pml_thickness},
                    {"wavelengths_at_lowest_frequency", r.pml_wavelengths},
                    {"theoretical_reflection_normal", r.pml_reflection_normal},
                    {"theoretical_reflection_45deg", r.pml_reflection_45}};
  j["elements_per_wavelength"] = a.elements_per_wavelength;
  j["surface_points"] = run.surface.size();
  j["peak_anomaly"] = top ? peak_json(*top) : nlohmann::json(nullptr);
  j["bands"] = bands;
  j["per_frequency"] = per;
  j["seconds"] = r.total_seconds;
  j["seconds_solves"] = total;
  return j;
}

}  // namespace voidsign::cli
