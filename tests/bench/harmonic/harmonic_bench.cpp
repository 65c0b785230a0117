// SPDX-License-Identifier: GPL-3.0-or-later
// harmonic_bench: seconds per frequency of the harmonic analysis on a 2D (or 3D) layered block
// with one void, a PML band and a vertically incident S wave, for each frequency loop and
// ordering and with or without the shared factorisation. Not part of ctest.
//
// Usage: harmonic_bench [--dim 2|3] [--size H] [--freqs N] [--loop sequential|parallel|both]
//                       [--ordering metis|amd|scotch|pord|all] [--share on|off|both]
//                       [--estimate on]
// --share: both models on one factorisation per frequency (the default) or each on its own.
// --estimate on: only MUMPS's analysis of one frequency (estimated factor, flops, memory).
// H is the far-field cell size [m] (2D default 1.0 gives about 200 k unknowns).
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/harmonic.hpp"

using namespace voidsign;

namespace {

solver::HarmonicLayer layer(double vs, double nu, double rho, double xi, double thickness = 0) {
  const double g = rho * vs * vs;
  return {{2 * g * (1 + nu), nu, rho}, xi, thickness};
}

double peak_rss_mb() {
  FILE* f = std::fopen("/proc/self/status", "r");
  if (!f) return 0;
  char line[256];
  double kb = 0;
  while (std::fgets(line, sizeof line, f))
    if (std::strncmp(line, "VmHWM:", 6) == 0) kb = std::atof(line + 6);
  std::fclose(f);
  return kb / 1024;
}

}  // namespace

int main(int argc, char** argv) {
  int dim = 2, n_freq = 4;
  double size = -1;
  std::string loop = "parallel", ordering = "metis", share = "on";
  bool estimate_only = false;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string k = argv[i], v = argv[i + 1];
    if (k == "--dim") dim = std::atoi(v.c_str());
    else if (k == "--size") size = std::atof(v.c_str());
    else if (k == "--freqs") n_freq = std::atoi(v.c_str());
    else if (k == "--loop") loop = v;
    else if (k == "--ordering") ordering = v;
    else if (k == "--share") share = v;
    else if (k == "--estimate") estimate_only = v == "on";
    else {
      std::fprintf(stderr, "unknown option %s\n", k.c_str());
      return 2;
    }
  }
  const std::vector<solver::HarmonicLayer> layers = {layer(180, 0.3, 1800, 0.04, 6), layer(450, 0.28, 2000, 0.02)};
  mesh::Mesh m;
  if (dim == 2) {
    if (size <= 0) size = 1.0;
    mesh::Geometry2D g;
    g.width = 240;
    g.depth = 120;
    g.layer_thickness = {6, 114};
    mesh::VoidOutline v;
    v.cz = -10;
    v.radius = 2;
    g.voids = {v};
    g.sizing = {size, 0.3, size, 2, 0.25};
    m = mesh::build_mesh_2d(g);
  } else {
    if (size <= 0) size = 6.0;
    mesh::Geometry3D g;
    g.width = 100;
    g.length = 100;
    g.depth = 60;
    g.layer_thickness = {6, 54};
    mesh::VoidSolid v;
    v.cz = -10;
    v.radius = 2.5;
    g.voids = {v};
    g.sizing = {size, 1.0, size, 2, 0.3};
    m = mesh::build_mesh_3d(g);
  }
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.kinematics = dim == 3 ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
  p.layers = layers;
  for (int k = 0; k < n_freq; ++k) p.frequencies_hz.push_back(2.0 + 2.0 * k);
  p.pml_thickness = dim == 3 ? 15 : 30;
  p.output_nodes = m.surface_nodes;
  if (dim == 3) p.box = {12, 12, 22};
  std::printf("%dD, %zu cells, %zu nodes, %zu unknowns, %d frequencies x 2 models\n", dim, m.n_cells(), m.n_nodes(),
              static_cast<std::size_t>(dim) * m.n_nodes(), n_freq);
  std::fflush(stdout);
  if (estimate_only) {
    // MUMPS's analysis of the first frequency alone: what one frequency would cost.
    const auto e = solver::estimate_harmonic(p);
    std::printf("Schur unknowns %zu, %d factorisation(s) per frequency, estimated factor %.3g entries, %.3g flops, "
                "%.0f MB each (%.0f MB available), about %.1f s per frequency\n",
                e.shared_boundary, e.factorisations_per_frequency, e.factor_entries, e.flops, e.bytes / 1e6,
                e.available_bytes / 1e6, e.seconds_per_frequency);
    return 0;
  }
  std::vector<std::pair<std::string, solver::FrequencyLoop>> loops;
  if (loop == "both" || loop == "sequential") loops.push_back({"sequential", solver::FrequencyLoop::sequential});
  if (loop == "both" || loop == "parallel") loops.push_back({"parallel", solver::FrequencyLoop::parallel});
  std::vector<std::pair<std::string, bool>> shares;
  if (share == "both" || share == "on") shares.push_back({"shared", true});
  if (share == "both" || share == "off") shares.push_back({"separate", false});
  const std::vector<std::pair<std::string, solver::LdltOrdering>> all_orders = {
      {"metis", solver::LdltOrdering::metis}, {"amd", solver::LdltOrdering::amd},
      {"scotch", solver::LdltOrdering::scotch}, {"pord", solver::LdltOrdering::pord}};
  for (const auto& [oname, o] : all_orders) {
    if (ordering != "all" && ordering != oname) continue;
    for (const auto& [sname, sh] : shares)
      for (const auto& [lname, l] : loops) {
        p.loop = l;
        p.ordering = o;
        p.share_factorisation = sh;
        const auto r = solver::solve_harmonic(p);
        double fs = 0, worst = 0;
        for (std::size_t f = 0; f < p.frequencies_hz.size(); ++f) {
          fs += r.reference.factor_seconds[f] + r.voided.factor_seconds[f];
          worst = std::max({worst, r.reference.residual[f], r.voided.residual[f]});
        }
        const auto nfreq = static_cast<double>(p.frequencies_hz.size());
        std::printf("%-9s %-8s %-10s (%s): total %.2f s = setup %.2f + analyse %.2f + solves; wall per frequency (both "
                    "models) %.2f s; factorisation %.2f s per frequency; Schur unknowns %zu; factor %.3g entries, MUMPS "
                    "%.0f MB, process peak %.0f MB, worst residual %.1e\n",
                    oname.c_str(), sname.c_str(), lname.c_str(), r.loop.c_str(), r.total_seconds, r.setup_seconds,
                    r.analyse_seconds, (r.total_seconds - r.setup_seconds) / nfreq, fs / nfreq, r.shared_boundary,
                    r.factor_nonzeros, r.peak_bytes / 1e6, peak_rss_mb(), worst);
        std::fflush(stdout);
      }
  }
  return 0;
}
