// SPDX-License-Identifier: GPL-3.0-or-later
// mumps_bench: one harmonic system (the plane-strain model of harmonic_bench, one frequency)
// factorised by UMFPACK's LU (what solve_harmonic uses) and by MUMPS's complex symmetric LDLᵀ
// (SYM = 2, solver/la/complex_ldlt.hpp) with each of its orderings. Prints analysis,
// factorisation and solve seconds, factor entries and residuals. Not part of ctest.
//
// Usage: mumps_bench [--size H] [--freq F] [--ordering amd|metis]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/harmonic.hpp"
#include "solver/la/complex_ldlt.hpp"

using namespace voidsign;

namespace {

using Clock = std::chrono::steady_clock;
double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

solver::HarmonicLayer layer(double vs, double nu, double rho, double xi, double thickness = 0) {
  const double g = rho * vs * vs;
  return {{2 * g * (1 + nu), nu, rho}, xi, thickness};
}

}  // namespace

int main(int argc, char** argv) {
  double size = 1.2, freq = 6.0;
  std::string ordering = "amd";
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string k = argv[i], v = argv[i + 1];
    if (k == "--size") size = std::atof(v.c_str());
    else if (k == "--freq") freq = std::atof(v.c_str());
    else if (k == "--ordering") ordering = v;
  }
  mesh::Geometry2D g;
  g.width = 240;
  g.depth = 120;
  g.layer_thickness = {6, 114};
  mesh::VoidOutline v;
  v.cz = -10;
  v.radius = 2;
  g.voids = {v};
  g.sizing = {size, 0.3, size, 2, 0.25};
  const mesh::Mesh m = mesh::build_mesh_2d(g);
  solver::HarmonicProblem p;
  p.mesh = &m;
  p.layers = {layer(180, 0.3, 1800, 0.04, 6), layer(450, 0.28, 2000, 0.02)};
  p.frequencies_hz = {freq};
  p.pml_thickness = 30;
  const auto sys = solver::harmonic_system(p, freq, true);
  const long n = sys.matrix.rows();
  std::printf("2D, %ld unknowns, %ld nonzeros (full), %.1f Hz, ordering %s\n", n, static_cast<long>(sys.matrix.nonZeros()),
              freq, ordering.c_str());

  {
    solver::ComplexLu lu(ordering == "metis" ? solver::ComplexOrdering::metis : solver::ComplexOrdering::amd);
    auto t = Clock::now();
    lu.analyze(sys.matrix);
    const double ta = since(t);
    t = Clock::now();
    lu.factorize(sys.matrix);
    const double tf = since(t);
    t = Clock::now();
    const auto s = lu.solve_checked(sys.rhs, 1e-8);
    const double ts = since(t);
    std::printf("UMFPACK LU   : analyse %.2f s, factorise %.2f s, solve %.2f s; L+U %.3g entries, %.3g flops, residual %.1e\n",
                ta, tf, ts, lu.factor_nonzeros(), lu.flops(), s.residual);
  }

  for (const auto& [name, order] : {std::pair{"metis", solver::LdltOrdering::metis},
                                     std::pair{"amd", solver::LdltOrdering::amd},
                                     std::pair{"scotch", solver::LdltOrdering::scotch},
                                     std::pair{"pord", solver::LdltOrdering::pord}}) {
    solver::ComplexLdlt ldlt(order);
    auto t = Clock::now();
    ldlt.analyze(sys.matrix, {}, 2);
    const double ta = since(t);
    t = Clock::now();
    ldlt.factorize(sys.matrix);
    const double tf = since(t);
    t = Clock::now();
    const solver::ComplexVector x = ldlt.solve(sys.rhs).col(0);
    const double ts = since(t);
    std::printf("MUMPS LDL^T %-9s: analyse %.2f s, factorise %.2f s, solve %.2f s; factor %.3g entries, %.3g flops, "
                "memory %.0f MB, residual %.1e\n",
                name, ta, tf, ts, ldlt.factor_nonzeros(), ldlt.flops(), ldlt.peak_bytes() / 1e6,
                solver::complex_relative_residual(sys.matrix, x, sys.rhs));
  }
  return 0;
}
