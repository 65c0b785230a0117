// SPDX-License-Identifier: GPL-3.0-or-later
// modal_bench: seconds and peak memory for the lowest natural modes (solver/analysis/modal.*:
// Spectra shift-and-invert on a CHOLMOD factor) of a structured plane-strain tri6 block with
// rollers on the sides and a fixed bottom; with --dim 3 a tet10 box (Gmsh) with rollers on its
// four sides. Usage: modal_bench [--dim 3] [target_dofs [modes [tolerance [subspace]]]]
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "solver/analysis/modal.hpp"
#include "solver/assembly/system.hpp"
#include "solver/fe/mass.hpp"
#include "tests/bench/peak_memory.hpp"
#include "tests/bench/structured_block.hpp"

using namespace voidsign;

namespace {

double now() { return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count(); }

}  // namespace

int main(int argc, char** argv) {
  int dim = 2;
  if (argc > 2 && std::string(argv[1]) == "--dim") {
    dim = std::atoi(argv[2]);
    argc -= 2;
    argv += 2;
  }
  const double target = argc > 1 ? std::atof(argv[1]) : 5e5;
  const int modes = argc > 2 ? std::atoi(argv[2]) : 20;
  // 2D: (2nx+1)(2nz+1) nodes with nx = 2 nz: ≈ 8 nz² nodes, 16 nz² dofs.
  const int nz = static_cast<int>(std::sqrt(target / 16));
  double t0 = now();
  const mesh::Mesh m = dim == 3 ? bench::block_3d(target) : bench::block(2.0 * nz, nz, 1.0);
  if (dim == 3) std::printf("3D tet10 box, %zu nodes, %zu cells, mesh %.1f s\n", m.n_nodes(), m.n_cells(), now() - t0);
  const auto kin = dim == 3 ? solver::Kinematics::solid : solver::Kinematics::plane_strain;
  const solver::Elastic rock{2 * 2000.0 * 100 * 100 * 1.25, 0.25, 2000};
  const std::size_t nc = m.n_cells(), n_dofs = static_cast<std::size_t>(dim) * m.n_nodes();
  const std::vector<char> active(nc, 1);
  t0 = now();
  solver::SparseMatrix k = solver::stiffness_pattern(m);
  solver::assemble_stiffness(m, kin, active, [&](std::size_t) -> const solver::Elastic& { return rock; }, k);
  solver::SparseMatrix mm = k;
  solver::assemble_mass(m, kin, active, [&](std::size_t) { return rock.density; }, mm);
  const double t_assemble = now() - t0;
  std::vector<char> fixed(n_dofs, 0);
  const auto d = static_cast<std::size_t>(dim);
  for (std::size_t n = 0; n < m.n_nodes(); ++n) {
    const auto& x = m.nodes[n];
    if (std::abs(x[0] - m.x_min) < 1e-9 || std::abs(x[0] - m.x_max) < 1e-9) fixed[d * n] = 1;  // rollers
    if (dim == 3 && (std::abs(x[1] - m.y_min) < 1e-9 || std::abs(x[1] - m.y_max) < 1e-9)) fixed[d * n + 1] = 1;
    if (std::abs(x[2] - m.z_min) < 1e-9)
      for (std::size_t j = 0; j < d; ++j) fixed[d * n + j] = 1;  // fixed bottom
  }
  solver::ModalOptions opt;
  opt.n_modes = modes;
  opt.dofs_per_node = dim;
  if (argc > 3) opt.tolerance = std::atof(argv[3]);
  if (argc > 4) opt.subspace = std::atoi(argv[4]);
  t0 = now();
  const auto r = solver::solve_modal(k, mm, fixed, opt);
  const double t_solve = now() - t0;
  double worst = 0;
  for (double v : r.residual) worst = std::max(worst, v);
  std::printf("modal %zu dofs (%zu free), %d modes, tolerance %.0e, subspace %d: assemble %.2f s, solve %.2f s (analysis + factorisation %.2f s, %d operator "
              "products, %d restarts), factor %.1f M nonzeros, worst residual %.1e, f1 %.4f Hz, f%d %.4f Hz, peak memory %.2f GiB\n",
              n_dofs, r.n_free, modes, opt.tolerance, opt.subspace, t_assemble, t_solve, r.seconds_factorize, r.operations, r.iterations, r.factor_nonzeros / 1e6,
              worst, r.freq_hz.front(), modes, r.freq_hz.back(), bench::peak_rss_gib());
  return 0;
}
