// SPDX-License-Identifier: GPL-3.0-or-later
// transient_bench: seconds per 1000 explicit steps of the transient analysis
// (solver/analysis/transient.*) on a structured plane-strain tri6 block, and the sparse
// matrix–vector product in full CSR storage (OpenMP over rows) against the lower triangle
// (Eigen's symmetric product, one thread). Usage: transient_bench [target_dofs ...]
#include <Eigen/SparseCore>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "solver/analysis/transient.hpp"
#include "solver/assembly/system.hpp"

using namespace voidsign;

namespace {

mesh::Mesh block(double width, double depth, double h) {
  mesh::Mesh m;
  m.type = mesh::CellType::tri6;
  const int nx = static_cast<int>(std::lround(width / h)), nz = static_cast<int>(std::lround(depth / h));
  const int gx = 2 * nx + 1, gz = 2 * nz + 1;
  for (int k = 0; k < gz; ++k)
    for (int i = 0; i < gx; ++i) m.nodes.push_back({-0.5 * width + 0.5 * h * i, 0.0, -depth + 0.5 * h * k});
  auto id = [&](int i, int k) { return k * gx + i; };
  auto mid = [&](int p, int q) { return id((p % gx + q % gx) / 2, (p / gx + q / gx) / 2); };
  for (int k = 0; k < nz; ++k)
    for (int i = 0; i < nx; ++i) {
      const int a = id(2 * i, 2 * k), b = id(2 * i + 2, 2 * k), c = id(2 * i + 2, 2 * k + 2), d = id(2 * i, 2 * k + 2);
      auto tri = [&](int p, int q, int r) {
        m.cells.insert(m.cells.end(), {p, q, r, mid(p, q), mid(q, r), mid(r, p)});
        m.layer.push_back(0);
        m.void_id.push_back(-1);
      };
      if ((i + k) % 2 == 0) {
        tri(a, b, c);
        tri(a, c, d);
      } else {
        tri(a, b, d);
        tri(b, c, d);
      }
    }
  m.x_min = -0.5 * width;
  m.x_max = 0.5 * width;
  m.z_min = -depth;
  m.z_max = 0;
  mesh::finish_topology(m, 1e-6);
  return m;
}

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
    const auto m = block(2.0 * nz * h, nz * h, h);
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
      const auto est = solver::estimate_transient(em.n_free(), em.n_nonzeros(), steps, false, 0, 1);
      std::printf("transient %zu dofs, %zu nonzeros, xi %.2f: bound %.2f s, setup %.2f s, %.2f s per 1000 steps "
                  "(estimate %.2f s, %.0f MB)\n",
                  em.n_free(), em.n_nonzeros(), xi, t_bound, t_setup, tr.loop_seconds * 1000 / steps,
                  est.seconds_per_step * 1000, est.bytes / 1e6);
      std::fflush(stdout);
      if (xi > 0) break;
      // SpMV: full CSR (OpenMP) against the lower triangle (Eigen, symmetric product).
      std::vector<double> x(em.n_free(), 1.0), y(em.n_free());
      t0 = now();
      for (int i = 0; i < 50; ++i) em.multiply(x, y);
      const double t_full = (now() - t0) / 50;
      Eigen::SparseMatrix<double, Eigen::RowMajor, int> full(static_cast<int>(em.n_free()), static_cast<int>(em.n_free()));
      std::vector<Eigen::Triplet<double>> trip;
      trip.reserve(em.n_nonzeros() / 2 + em.n_free());
      for (std::size_t i = 0; i < em.n_free(); ++i)
        for (auto k = em.row_pointer()[i]; k < em.row_pointer()[i + 1]; ++k)
          if (em.columns()[static_cast<std::size_t>(k)] <= static_cast<int>(i))
            trip.emplace_back(static_cast<int>(i), em.columns()[static_cast<std::size_t>(k)], em.values()[static_cast<std::size_t>(k)]);
      solver::SparseMatrix lower(static_cast<int>(em.n_free()), static_cast<int>(em.n_free()));
      lower.setFromTriplets(trip.begin(), trip.end());
      const Eigen::Map<const Eigen::VectorXd> xv(x.data(), static_cast<Eigen::Index>(x.size()));
      Eigen::VectorXd yv(static_cast<Eigen::Index>(x.size()));
      t0 = now();
      for (int i = 0; i < 20; ++i) yv.noalias() = lower.selfadjointView<Eigen::Lower>() * xv;
      const double t_lower = (now() - t0) / 20;
      std::printf("  SpMV: full CSR, OpenMP %.2f ms; lower triangle, Eigen symmetric %.2f ms\n", 1e3 * t_full, 1e3 * t_lower);
      std::fflush(stdout);
    }
  }
  return 0;
}
