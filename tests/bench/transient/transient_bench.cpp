// SPDX-License-Identifier: GPL-3.0-or-later
// transient_bench: seconds per 1000 explicit steps of the transient analysis
// (solver/analysis/transient.*) on a structured plane-strain tri6 block, and one stiffness
// product in the storage the step uses (node blocks); with --dim 3 on a tet10 box (Gmsh).
// Usage: transient_bench [--dim 3] [target_dofs ...]
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "solver/analysis/transient.hpp"
#include "solver/assembly/system.hpp"
#include "tests/bench/peak_memory.hpp"
#include "tests/bench/structured_block.hpp"

using namespace voidsign;

namespace {

double now() { return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count(); }

}  // namespace

int main(int argc, char** argv) {
  std::vector<double> targets;
  int dim = 2;
  for (int i = 1; i < argc; ++i) {
    if (std::string(argv[i]) == "--dim" && i + 1 < argc) {
      dim = std::atoi(argv[++i]);
      continue;
    }
    targets.push_back(std::atof(argv[i]));
  }
  if (targets.empty()) targets = dim == 3 ? std::vector<double>{5e5} : std::vector<double>{2e5, 1e6};
  for (double target : targets) {
    // 2D: (2nx+1)(2nz+1) nodes with nx = 2 nz: ≈ 8 nz² nodes, 16 nz² dofs.
    const int nz = static_cast<int>(std::sqrt(target / 16));
    const double h = 1.0;
    double t_mesh = now();
    const auto m = dim == 3 ? bench::block_3d(target) : bench::block(2.0 * nz * h, nz * h, h);
    t_mesh = now() - t_mesh;
    if (dim == 3) std::printf("3D tet10 box, %zu nodes, %zu cells, mesh %.1f s\n", m.n_nodes(), m.n_cells(), t_mesh);
    solver::TransientProblem p;
    p.mesh = &m;
    p.kinematics = dim == 3 ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
    const double g = 2000.0 * 100 * 100;
    p.layers = {{{2 * g * 1.25, 0.25, 2000}, 0.02}};
    p.source.point = {0, 0, 0};
    p.source.wavelet = {5, 0, 1e3};
    p.receivers = m.surface_nodes;
    double t0 = now();
    const auto [dt, w] = solver::stable_time_step(p, false, 0.0);
    const double t_bound = now() - t0;
    // Undamped, and with Rayleigh damping (the extra pass w = u + βv).
    for (double xi : {0.0, 0.02}) {
      p.layers[0].damping = xi;
      t0 = now();
      const solver::ExplicitModel em(p, false, 0.9 * dt);
      const double t_setup = now() - t0;
      const int steps = 1000;
      const auto tr = em.run(steps, m.surface_nodes[m.surface_nodes.size() / 2], {});
      const auto est = solver::estimate_transient(em.n_free(), em.n_nonzeros(), steps, false, 0, 1, em.block_size());
      std::printf("transient %zu dofs, %zu nonzeros, xi %.2f: bound %.2f s, setup %.2f s, %.2f s per 1000 steps "
                  "(estimate %.2f s, %.0f MB), peak memory %.2f GiB\n",
                  em.n_free(), em.n_nonzeros(), xi, t_bound, t_setup, tr.loop_seconds * 1000 / steps,
                  est.seconds_per_step * 1000, est.bytes / 1e6, bench::peak_rss_gib());
      std::fflush(stdout);
      if (xi > 0) break;
      // One stiffness product in the storage the step uses (node blocks when possible).
      std::vector<double> x(em.n_free(), 1.0), y(em.n_free());
      t0 = now();
      for (int i = 0; i < 50; ++i) em.multiply(x, y);
      const double t_product = (now() - t0) / 50;
      std::printf("  SpMV (%s, OpenMP): %.2f ms\n", em.block_size() > 1 ? "node blocks" : "scalar CSR", 1e3 * t_product);
      std::fflush(stdout);
    }
  }
  return 0;
}
