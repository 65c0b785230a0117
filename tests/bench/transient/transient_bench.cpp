// SPDX-License-Identifier: GPL-3.0-or-later
// transient_bench: seconds per 1000 explicit steps of the transient analysis
// (solver/analysis/transient.*) on a structured plane-strain tri6 block, and one stiffness
// product in the storage the step uses (node blocks). Usage: transient_bench [target_dofs ...]
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "solver/analysis/transient.hpp"
#include "solver/assembly/system.hpp"
#include "tests/bench/structured_block.hpp"

using namespace voidsign;

namespace {

double now() { return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count(); }

}  // namespace

int main(int argc, char** argv) {
  std::vector<double> targets;
  for (int i = 1; i < argc; ++i) targets.push_back(std::atof(argv[i]));
  if (targets.empty()) targets = {2e5, 1e6};
  for (double target : targets) {
    // (2nx+1)(2nz+1) nodes with nx = 2 nz: ≈ 8 nz² nodes, 16 nz² dofs.
    const int nz = static_cast<int>(std::sqrt(target / 16));
    const double h = 1.0;
    const auto m = bench::block(2.0 * nz * h, nz * h, h);
    solver::TransientProblem p;
    p.mesh = &m;
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
                  "(estimate %.2f s, %.0f MB)\n",
                  em.n_free(), em.n_nonzeros(), xi, t_bound, t_setup, tr.loop_seconds * 1000 / steps,
                  est.seconds_per_step * 1000, est.bytes / 1e6);
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
