// SPDX-License-Identifier: GPL-3.0-or-later
/// solver_bench: linear solvers on 3D linear elasticity. A layered block (20 MPa over 2 GPa,
/// ν = 0.3) on a structured tetrahedral grid, base fixed, sides on rollers, a pressure patch on
/// the surface and an empty spherical cavity in the stiff layer; see tests/bench/elastic_block.hpp.
///
///   solver_bench                         the standard plan (docs/solvers.md), one child process
///                                        per case so that each peak memory is its own
///   solver_bench --plan quick            a short plan (under a minute)
///   solver_bench --case ELEMENT NZ METHOD [options]
///                                        one case in this process
///
/// ELEMENT is tet4 or tet10; NZ the cells through the depth (the plan sets nx = ny = 2 nz);
/// METHOD one of
///   jacobi       Eigen's ConjugateGradient, diagonal preconditioner, full matrix by rows
///   amg          voidsign's IterativeSolver: CG + BoomerAMG (options below)
///   amg-jacobi   voidsign's IterativeSolver with diagonal scaling
///   gamg         PETSc CG + GAMG with the rigid-body near-null space (when built with PETSc)
///   chol-amd     CHOLMOD supernodal LLᵀ, AMD ordering (the 2D engine's settings)
///   chol-nd      CHOLMOD supernodal LLᵀ, METIS nested dissection
/// Options: --tol T (1e-10), --maxit N, --theta S, --agg N, --pmax N, --nodal 0|1, --rbm 0|1,
///   --cavity R (m, 0 = none; default 4),
///   --max-gflop G (CHOLMOD factorises only when its flop estimate is below G, default 1000),
///   --limit S (seconds per child in a plan, default 400). The standard plan takes about half
///   an hour on 2 cores; the quick one about a minute.
///
/// Each case prints one row: dofs, nonzeros of the lower triangle, set-up and solve seconds,
/// iterations, the relative residual ‖Kx − f‖/‖f‖ recomputed here, the resident memory after
/// the model was built and the peak of the whole process.
#include <omp.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <Eigen/CholmodSupport>
#include <Eigen/IterativeLinearSolvers>
#include <chrono>
#include <cmath>
#include <csignal>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <iostream>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/la/iterative.hpp"
#include "tests/bench/elastic_block.hpp"

#ifdef VOIDSIGN_BENCH_PETSC
#include <petscksp.h>
#endif

namespace {

using namespace voidsign;
using Clock = std::chrono::steady_clock;
double since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

/// A value from /proc/self/status in GiB (VmRSS, VmHWM).
double status_gib(const char* key) {
  std::ifstream in("/proc/self/status");
  std::string line;
  const std::size_t len = std::strlen(key);
  while (std::getline(in, line))
    if (line.compare(0, len, key) == 0 && line[len] == ':') return std::atof(line.c_str() + len + 1) / (1024.0 * 1024.0);
  return 0;
}

struct Settings {
  double tol = 1e-10;
  int maxit = 5000;
  double theta = 0.5;
  int agg = 0;
  int pmax = 4;
  int nodal = 0;
  int rbm = 0;
  double max_gflop = 1000;
  double limit = 400;
  double cavity = 4;
};

struct Outcome {
  double setup_s = 0, solve_s = 0;
  int iterations = -1;
  Eigen::VectorXd x;
  std::string note;
};

bench::BlockSpec spec_for(const std::string& element, int nz, double cavity) {
  bench::BlockSpec s;
  s.quadratic = element == "tet10";
  if (!s.quadratic && element != "tet4") throw std::invalid_argument("element must be tet4 or tet10");
  s.nz = nz;
  s.nx = s.ny = 2 * nz;
  s.lx = s.ly = 60;
  s.lz = 30;
  s.layers = {{10, 20e6, 0.3}, {1e9, 2e9, 0.3}};
  s.pressure = 100e3;
  s.patch_half_width = 7.5;
  s.cavity_radius = cavity;
  s.cavity_depth = 16;
  return s;
}

Outcome run_jacobi(const bench::BlockModel& m, const Settings& st) {
  Outcome o;
  auto t0 = Clock::now();
  using RowMatrix = Eigen::SparseMatrix<double, Eigen::RowMajor, int>;
  RowMatrix full = m.lower.selfadjointView<Eigen::Lower>();
  Eigen::ConjugateGradient<RowMatrix, Eigen::Lower | Eigen::Upper, Eigen::DiagonalPreconditioner<double>> cg;
  cg.setTolerance(st.tol);
  cg.setMaxIterations(st.maxit);
  cg.compute(full);
  o.setup_s = since(t0);
  t0 = Clock::now();
  o.x = cg.solve(m.load);
  o.solve_s = since(t0);
  o.iterations = static_cast<int>(cg.iterations());
  if (cg.info() != Eigen::Success) o.note = "not converged";
  return o;
}

Outcome run_iterative(const bench::BlockModel& m, const Settings& st, bool amg) {
  solver::IterativeOptions opt;
  opt.rel_tol = st.tol;
  opt.max_iterations = st.maxit;
  opt.preconditioner = amg ? solver::Preconditioner::amg : solver::Preconditioner::jacobi;
  opt.strong_threshold = st.theta;
  opt.aggressive_levels = st.agg;
  opt.interp_max_elements = st.pmax;
  opt.nodal_coarsening = st.nodal != 0;
  opt.rigid_body_modes = st.rbm != 0;
  solver::IterativeSolver is(opt);
  is.setup(m.lower, 3, &m.nodes);
  const solver::IterativeResult r = is.solve(m.load);
  Outcome o;
  o.setup_s = r.setup_s;
  o.solve_s = r.solve_s;
  o.iterations = r.iterations;
  o.x = r.x;
  o.note = r.method + (r.converged ? "" : ", not converged");
  return o;
}

Outcome run_cholmod(const bench::BlockModel& m, const Settings& st, bool nested) {
  Outcome o;
  auto t0 = Clock::now();
  Eigen::CholmodSupernodalLLT<bench::SparseMatrix, Eigen::Lower> llt;
  auto& cm = llt.cholmod();
  cm.nmethods = 1;
  cm.method[0].ordering = nested ? CHOLMOD_METIS : CHOLMOD_AMD;
  cm.postorder = 1;
  llt.analyzePattern(m.lower);
  const double lnz = cm.lnz, gflop = cm.fl / 1e9;
  char buf[160];
  std::snprintf(buf, sizeof buf, "nnz(L) %.3g (%.1f GiB), %.0f Gflop", lnz, lnz * 8 / (1 << 30), gflop);
  o.note = buf;
  if (gflop > st.max_gflop) {
    o.setup_s = since(t0);
    o.note += "; not factorised (over --max-gflop)";
    return o;
  }
  llt.factorize(m.lower);
  o.setup_s = since(t0);
  if (llt.info() != Eigen::Success) throw std::runtime_error("CHOLMOD factorisation failed");
  t0 = Clock::now();
  o.x = llt.solve(m.load);
  o.solve_s = since(t0);
  o.iterations = 0;
  return o;
}

#ifdef VOIDSIGN_BENCH_PETSC
#define PETSC_CHECK(call)                                              \
  do {                                                                 \
    if ((call) != 0) throw std::runtime_error("PETSc call failed: " #call); \
  } while (0)

Outcome run_gamg(const bench::BlockModel& m, const Settings& st) {
  setenv("OMPI_MCA_ess_singleton_isolated", "1", 0);
  PETSC_CHECK(PetscInitializeNoArguments());
  Outcome o;
  const int n = static_cast<int>(m.dofs());
  auto t0 = Clock::now();
  Mat a;
  {
    using RowMatrix = Eigen::SparseMatrix<double, Eigen::RowMajor, int>;
    RowMatrix full = m.lower.selfadjointView<Eigen::Lower>();
    full.prune(0.0);
    PETSC_CHECK(MatCreate(PETSC_COMM_SELF, &a));
    PETSC_CHECK(MatSetSizes(a, n, n, n, n));
    PETSC_CHECK(MatSetType(a, MATSEQAIJ));
    PETSC_CHECK(MatSetBlockSize(a, 3));
    PETSC_CHECK(MatSeqAIJSetPreallocationCSR(a, full.outerIndexPtr(), full.innerIndexPtr(), full.valuePtr()));
  }
  Vec coords;
  PETSC_CHECK(VecCreateSeq(PETSC_COMM_SELF, n, &coords));
  PETSC_CHECK(VecSetBlockSize(coords, 3));
  {
    PetscScalar* c;
    PETSC_CHECK(VecGetArray(coords, &c));
    for (std::size_t i = 0; i < m.nodes.size(); ++i)
      for (int k = 0; k < 3; ++k) c[3 * i + k] = m.nodes[i][k];
    PETSC_CHECK(VecRestoreArray(coords, &c));
  }
  MatNullSpace near;
  PETSC_CHECK(MatNullSpaceCreateRigidBody(coords, &near));
  PETSC_CHECK(MatSetNearNullSpace(a, near));
  KSP ksp;
  PC pc;
  PETSC_CHECK(KSPCreate(PETSC_COMM_SELF, &ksp));
  PETSC_CHECK(KSPSetOperators(ksp, a, a));
  PETSC_CHECK(KSPSetType(ksp, KSPCG));
  PETSC_CHECK(KSPSetNormType(ksp, KSP_NORM_UNPRECONDITIONED));
  PETSC_CHECK(KSPSetTolerances(ksp, st.tol, 0.0, 1e30, st.maxit));
  PETSC_CHECK(KSPGetPC(ksp, &pc));
  PETSC_CHECK(PCSetType(pc, PCGAMG));
  PETSC_CHECK(KSPSetFromOptions(ksp));
  PETSC_CHECK(KSPSetUp(ksp));
  o.setup_s = since(t0);
  Vec b, x;
  o.x = Eigen::VectorXd::Zero(n);
  PETSC_CHECK(VecCreateSeqWithArray(PETSC_COMM_SELF, 1, n, m.load.data(), &b));
  PETSC_CHECK(VecCreateSeqWithArray(PETSC_COMM_SELF, 1, n, o.x.data(), &x));
  t0 = Clock::now();
  PETSC_CHECK(KSPSolve(ksp, b, x));
  o.solve_s = since(t0);
  PetscInt its;
  KSPConvergedReason reason;
  PETSC_CHECK(KSPGetIterationNumber(ksp, &its));
  PETSC_CHECK(KSPGetConvergedReason(ksp, &reason));
  o.iterations = static_cast<int>(its);
  o.note = reason > 0 ? "PETSc CG + GAMG (6 rigid-body modes)" : "not converged";
  VecDestroy(&b);
  VecDestroy(&x);
  KSPDestroy(&ksp);
  MatNullSpaceDestroy(&near);
  VecDestroy(&coords);
  MatDestroy(&a);
  PetscFinalize();
  return o;
}
#endif

int run_case(const std::string& element, int nz, const std::string& method, const Settings& st) {
  const auto t0 = Clock::now();
  bench::BlockModel m = bench::build_block(spec_for(element, nz, st.cavity));
  bench::constrain_block(m);
  const double build_s = since(t0);
  const double model_gib = status_gib("VmRSS");
  Outcome o;
  if (method == "jacobi") o = run_jacobi(m, st);
  else if (method == "amg") o = run_iterative(m, st, true);
  else if (method == "amg-jacobi") o = run_iterative(m, st, false);
  else if (method == "chol-amd") o = run_cholmod(m, st, false);
  else if (method == "chol-nd") o = run_cholmod(m, st, true);
#ifdef VOIDSIGN_BENCH_PETSC
  else if (method == "gamg") o = run_gamg(m, st);
#endif
  else throw std::invalid_argument("unknown method '" + method + "'");
  double rel = NAN;
  if (o.x.size() == m.load.size()) rel = (bench::symmetric_product(m.lower, o.x) - m.load).norm() / m.load.norm();
  std::printf("%-6s %3d %-10s %9zu %10lld %7.1f %8.2f %8.2f %6d %9.1e %7.2f %7.2f  %s\n", element.c_str(), nz,
              method.c_str(), m.dofs(), static_cast<long long>(m.lower.nonZeros()), build_s, o.setup_s, o.solve_s,
              o.iterations, rel, model_gib, status_gib("VmHWM"), o.note.c_str());
  std::fflush(stdout);
  return 0;
}

void print_header() {
  std::printf("%-6s %3s %-10s %9s %10s %7s %8s %8s %6s %9s %7s %7s  %s\n", "elem", "nz", "method", "dofs", "nnz(L)",
              "build", "setup_s", "solve_s", "iters", "rel_res", "model", "peak", "(GiB) notes");
  std::fflush(stdout);
}

struct PlanCase {
  const char* element;
  int nz;
  const char* method;
};

// The standard plan (docs/solvers.md): tet4 at about 100k, 300k, 1M and 2M unknowns (nz 20,
// 29, 44, 55); tet10 from 8k to 1M (nz 4 to 22), where the small sizes locate the crossover
// with CHOLMOD. Over --max-gflop, CHOLMOD reports its symbolic analysis only.
const std::vector<PlanCase> kStandardPlan = {
    {"tet4", 20, "chol-amd"},  {"tet4", 20, "chol-nd"},  {"tet4", 20, "jacobi"},  {"tet4", 20, "amg"},
    {"tet4", 20, "gamg"},      {"tet4", 29, "chol-nd"},  {"tet4", 29, "jacobi"},  {"tet4", 29, "amg"},
    {"tet4", 29, "gamg"},      {"tet4", 44, "chol-nd"},  {"tet4", 44, "amg"},     {"tet4", 55, "chol-nd"},
    {"tet4", 55, "amg"},       {"tet10", 4, "chol-nd"},  {"tet10", 4, "amg"},     {"tet10", 6, "chol-nd"},
    {"tet10", 6, "amg"},       {"tet10", 8, "chol-nd"},  {"tet10", 8, "amg"},     {"tet10", 10, "chol-amd"},
    {"tet10", 10, "chol-nd"},  {"tet10", 10, "amg"},     {"tet10", 10, "gamg"},   {"tet10", 14, "chol-nd"},
    {"tet10", 14, "amg"},      {"tet10", 18, "chol-nd"}, {"tet10", 22, "chol-nd"}, {"tet10", 22, "amg"},
};
const std::vector<PlanCase> kQuickPlan = {
    {"tet4", 12, "chol-nd"}, {"tet4", 12, "jacobi"}, {"tet4", 12, "amg"}, {"tet4", 12, "gamg"},
    {"tet10", 6, "chol-nd"}, {"tet10", 6, "amg"},
};

int run_plan(const std::vector<PlanCase>& plan, const std::vector<std::string>& passthrough, double limit) {
  print_header();
  int failures = 0;
  for (const auto& c : plan) {
#ifndef VOIDSIGN_BENCH_PETSC
    if (std::string(c.method) == "gamg") continue;
#endif
    std::vector<std::string> args = {"/proc/self/exe", "--case", c.element, std::to_string(c.nz), c.method};
    args.insert(args.end(), passthrough.begin(), passthrough.end());
    const pid_t pid = fork();
    if (pid < 0) throw std::runtime_error("fork failed");
    if (pid == 0) {
      alarm(static_cast<unsigned>(limit));
      std::vector<char*> argv;
      for (auto& a : args) argv.push_back(a.data());
      argv.push_back(nullptr);
      execv("/proc/self/exe", argv.data());
      _exit(127);
    }
    int status = 0;
    waitpid(pid, &status, 0);
    if (!WIFEXITED(status) || WEXITSTATUS(status) != 0) {
      ++failures;
      std::printf("%-6s %3d %-10s  %s\n", c.element, c.nz, c.method,
                  WIFSIGNALED(status) && WTERMSIG(status) == SIGALRM ? "stopped: over the time limit" : "failed");
      std::fflush(stdout);
    }
  }
  return failures ? 1 : 0;
}

}  // namespace

int main(int argc, char** argv) {
  try {
    Settings st;
    std::vector<std::string> passthrough;
    std::string plan = "standard";
    std::vector<std::string> positional;
    bool single = false, header = false;
    for (int i = 1; i < argc; ++i) {
      const std::string a = argv[i];
      auto value = [&]() -> std::string {
        if (i + 1 >= argc) throw std::invalid_argument(a + " needs a value");
        passthrough.push_back(a);
        passthrough.push_back(argv[i + 1]);
        return argv[++i];
      };
      if (a == "--case") single = true;
      else if (a == "--plan") plan = argv[i + 1 < argc ? ++i : i];
      else if (a == "--tol") st.tol = std::stod(value());
      else if (a == "--maxit") st.maxit = std::stoi(value());
      else if (a == "--theta") st.theta = std::stod(value());
      else if (a == "--agg") st.agg = std::stoi(value());
      else if (a == "--pmax") st.pmax = std::stoi(value());
      else if (a == "--nodal") st.nodal = std::stoi(value());
      else if (a == "--rbm") st.rbm = std::stoi(value());
      else if (a == "--cavity") st.cavity = std::stod(value());
      else if (a == "--max-gflop") st.max_gflop = std::stod(value());
      else if (a == "--limit") st.limit = std::stod(argv[i + 1 < argc ? ++i : i]);
      else if (a == "--header") header = true;
      else if (!a.empty() && a[0] == '-') throw std::invalid_argument("unknown option " + a);
      else positional.push_back(a);
    }
    if (header) print_header();
    if (header && !single) return 0;
    if (single) {
      if (positional.size() != 3) throw std::invalid_argument("--case needs ELEMENT NZ METHOD");
      return run_case(positional[0], std::stoi(positional[1]), positional[2], st);
    }
    if (plan != "standard" && plan != "quick") throw std::invalid_argument("--plan is standard or quick");
    std::printf("solver_bench: %d OpenMP threads; tol %.0e\n", omp_get_max_threads(), st.tol);
    return run_plan(plan == "quick" ? kQuickPlan : kStandardPlan, passthrough, st.limit);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "solver_bench: %s\n", e.what());
    return 2;
  }
}
