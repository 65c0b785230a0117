// SPDX-License-Identifier: GPL-3.0-or-later
// mumps_bench: one harmonic system (the plane-strain model of harmonic_bench, one frequency)
// factorised by UMFPACK's LU (what solve_harmonic uses) and by MUMPS's complex symmetric LDLᵀ
// (SYM = 2), one MPI process. Prints analysis, factorisation and solve seconds, factor entries
// and residuals. Not part of ctest; MUMPS is not linked into voidsign.
//
// Usage: mumps_bench [--size H] [--freq F] [--ordering amd|metis]
#include <mpi.h>
#include <zmumps_c.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "mesh/build/mesher.hpp"
#include "solver/analysis/harmonic.hpp"

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
  MPI_Init(&argc, &argv);
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

  // MUMPS wants the lower triangle in 1-based coordinates.
  std::vector<MUMPS_INT> irn, jcn;
  std::vector<mumps_double_complex> a;
  for (long j = 0; j < n; ++j)
    for (solver::ComplexMatrix::InnerIterator it(sys.matrix, j); it; ++it)
      if (it.row() >= j) {
        irn.push_back(static_cast<MUMPS_INT>(it.row() + 1));
        jcn.push_back(static_cast<MUMPS_INT>(j + 1));
        a.push_back({it.value().real(), it.value().imag()});
      }
  std::vector<mumps_double_complex> rhs(static_cast<std::size_t>(n));
  for (long i = 0; i < n; ++i) rhs[static_cast<std::size_t>(i)] = {sys.rhs[i].real(), sys.rhs[i].imag()};
  ZMUMPS_STRUC_C id{};
  id.comm_fortran = -987654;  // MPI_COMM_WORLD
  id.par = 1;
  id.sym = 2;  // general symmetric: LDLᵀ with 2×2 pivots
  id.job = -1;
  zmumps_c(&id);
  id.icntl[0] = id.icntl[1] = id.icntl[2] = -1;
  id.icntl[3] = 0;
  id.icntl[6] = ordering == "metis" ? 5 : 0;  // ICNTL(7): 0 AMD, 5 METIS
  id.n = static_cast<MUMPS_INT>(n);
  id.nnz = static_cast<MUMPS_INT8>(a.size());
  id.irn = irn.data();
  id.jcn = jcn.data();
  id.a = a.data();
  id.rhs = rhs.data();
  auto t = Clock::now();
  id.job = 1;
  zmumps_c(&id);
  const double ta = since(t);
  t = Clock::now();
  id.job = 2;
  zmumps_c(&id);
  const double tf = since(t);
  t = Clock::now();
  id.job = 3;
  zmumps_c(&id);
  const double ts = since(t);
  solver::ComplexVector x(n);
  for (long i = 0; i < n; ++i) x[i] = {rhs[static_cast<std::size_t>(i)].r, rhs[static_cast<std::size_t>(i)].i};
  const double res = solver::complex_relative_residual(sys.matrix, x, sys.rhs);
  std::printf("MUMPS LDL^T  : analyse %.2f s, factorise %.2f s, solve %.2f s; factor %.3g entries, %.3g flops, residual %.1e "
              "(INFOG(1) = %d)\n",
              ta, tf, ts, static_cast<double>(id.infog[28]), id.rinfog[2], res, id.infog[0]);
  id.job = -2;
  zmumps_c(&id);
  MPI_Finalize();
  return 0;
}
