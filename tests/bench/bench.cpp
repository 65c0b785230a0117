// SPDX-License-Identifier: GPL-3.0-or-later
/// bench: wall time and peak memory of the whole static run (mesh, both models, outputs) for
/// one plane-strain scenario at four mesh densities. Each size runs in its own child process so
/// that its peak resident set is its own; the child sends its figures back through a pipe.
///
///   bench [--model 2d|3d] [--sizes small|all] [--max-dofs N]
///
/// See docs/benchmarks.md for what is measured and the figures on the reference machine.
#include <omp.h>
#include <sys/resource.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <filesystem>
#include <fstream>
#include <span>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include "cli/commands/static_run.hpp"
#include "cli/scenario/scenario.hpp"

namespace {

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

/// One mesh density of the benchmark scenario. Sizes in metres (scenario keys mesh.size,
/// mesh.surface, mesh.near-void); `nominal_dofs` is the count the sizes were tuned to reach.
struct Density {
  const char* label;
  double nominal_dofs;
  double size, surface, near_void;
};

// Tuned on the scenario below with quadratic triangles; the DOF count actually reached is
// printed with the results.
constexpr Density densities[] = {
    {"150k", 150e3, 3.00, 1.50, 0.55},
    {"500k", 500e3, 1.62, 0.81, 0.40},
    {"1M", 1e6, 1.14, 0.57, 0.28},
    {"2M", 2e6, 0.80, 0.40, 0.20},
};

// 3D: the demo block (gallery crossing under a road, scenarios/gallery-under-road-3d.yaml) at
// four densities, tuned from measured counts (447 k DOF at 7.2 / 1.96 / 0.56 m, 883 k at
// 5.1 / 1.41 / 0.40 m, 1.36 M at 4.1 / 1.12 / 0.32 m: DOF ~ h^-1.9 here, the fine sizes near the
// voids and the surface dominating). The tunnel's own curvature caps its size at 0.55 m, so the
// coarsest density cannot go much below 200 k DOF.
constexpr Density densities_3d[] = {
    {"200k", 200e3, 20, 6, 1.5},
    {"500k", 500e3, 6.8, 1.85, 0.53},
    {"1M", 1e6, 4.78, 1.32, 0.375},
    {"2M", 2e6, 3.36, 0.917, 0.262},
};

/// The 3D benchmark scenario: the 3D demo's geometry and loads.
std::string scenario_yaml_3d(const Density& d) {
  std::ostringstream y;
  y.precision(6);
  y << "format: 1\n"
       "title: bench block, gallery under a road in 3D (" << d.label << ")\n"
       "model: 3d\n"
       "domain: {width: 140, length: 140, depth: 50}\n"
       "layers:\n"
       "  - {material: stiff-clay, thickness: 4}\n"
       "  - {material: limestone-weak, thickness: 20}\n"
       "  - {material: limestone-strong}\n"
       "voids:\n"
       "  - {shape: tunnel, from: [-26, -15, 9], to: [26, 15, 9], radius: 1.4}\n"
       "  - {shape: box, x: 18, y: -14, depth: 11, size: [6, 4, 3], yaw: 30}\n"
       "loads:\n"
       "  gravity: {k0: auto}\n"
       "  surface:\n"
       "    - {x: [-70, 70], y: [-3.5, 3.5], pressure: 15.0e3}\n"
       "analyses: {static: {}}\n"
       "mesh: {order: 2, size: " << d.size << ", surface: " << d.surface << ", near-void: " << d.near_void << "}\n";
  return y.str();
}

/// The benchmark scenario: a layered block 600 m × 200 m (loess over chalk over limestone) with
/// a circular gallery and a rectangular room in the chalk, self-weight with k0 from Poisson's
/// ratio, and a loaded strip on the surface, so that both models carry real loads.
std::string scenario_yaml(const Density& d) {
  std::ostringstream y;
  y.precision(6);
  y << "format: 1\n"
       "title: bench block, gallery and room in chalk under a loaded strip (" << d.label << ")\n"
       "model: plane-strain\n"
       "domain: {width: 600, depth: 200}\n"
       "layers:\n"
       "  - {material: loess, thickness: 4}\n"
       "  - {material: chalk, thickness: 40}\n"
       "  - {material: limestone-strong}\n"
       "voids:\n"
       "  - {shape: circle, x: 0, depth: 20, radius: 3}\n"
       "  - {shape: rectangle, x: 45, depth: 26, width: 10, height: 3.5}\n"
       "loads:\n"
       "  gravity: {k0: auto}\n"
       "  surface:\n"
       "    - {from: -12, to: 12, pressure: 80.0e3}\n"
       "analyses: {static: {}}\n"
       "mesh: {order: 2, size: " << d.size << ", surface: " << d.surface << ", near-void: " << d.near_void << "}\n";
  return y.str();
}

/// What a child sends back: plain data, written in one piece.
struct Figures {
  int ok = 0;
  int threads = 0;
  double dofs = 0, nodes = 0, cells = 0, factor_nonzeros = 0;
  double mesh = 0, assemble = 0, analyse = 0, factorize = 0, solve = 0, other = 0, write = 0, total = 0;
  double hwm_bytes = 0;  ///< VmHWM read by the child just before it reports
  int iterations = 0;    ///< conjugate-gradient iterations over all solves (0: direct solver)
  char solver[160] = {};
  char error[512] = {};
};

double vm_hwm_bytes() {
  std::ifstream in("/proc/self/status");
  std::string line;
  while (std::getline(in, line))
    if (line.rfind("VmHWM:", 0) == 0) return std::strtod(line.c_str() + 6, nullptr) * 1024.0;  // kB
  return 0;
}

bool write_all(int fd, const void* data, std::size_t n) {
  const char* p = static_cast<const char*>(data);
  while (n > 0) {
    const ssize_t k = ::write(fd, p, n);
    if (k < 0 && errno == EINTR) continue;
    if (k <= 0) return false;
    p += k;
    n -= static_cast<std::size_t>(k);
  }
  return true;
}

std::size_t read_all(int fd, void* data, std::size_t n) {
  char* p = static_cast<char*>(data);
  std::size_t got = 0;
  while (got < n) {
    const ssize_t k = ::read(fd, p + got, n - got);
    if (k < 0 && errno == EINTR) continue;
    if (k <= 0) break;
    got += static_cast<std::size_t>(k);
  }
  return got;
}

/// Runs in the child: parse, mesh, solve both models, post-process, write into a fresh
/// temporary folder (then removed). Returns the figures; never throws.
bool g_three_d = false;

Figures run_one(const Density& d) {
  Figures f;
  fs::path out;
  try {
    const auto t0 = Clock::now();
    const fs::path file = fs::temp_directory_path() / (std::string("voidsign-bench-") + d.label + ".yaml");
    const voidsign::cli::Scenario s =
        voidsign::cli::parse_scenario(g_three_d ? scenario_yaml_3d(d) : scenario_yaml(d), file);
    voidsign::cli::StaticRun run = voidsign::cli::run_static(s, nullptr);
    const double t_run = seconds_since(t0);

    std::string templ = (fs::temp_directory_path() / "voidsign-bench-XXXXXX").string();
    if (!::mkdtemp(templ.data())) throw std::runtime_error(std::string("mkdtemp: ") + std::strerror(errno));
    out = templ;
    const auto tw = Clock::now();
    voidsign::cli::write_static_outputs(run, s, out);
    f.write = seconds_since(tw);
    f.total = seconds_since(t0);

    const auto& t = run.result.timings;
    f.mesh = run.mesh_seconds;
    f.assemble = t.assemble;
    f.analyse = t.analyse;
    f.factorize = t.factorize;
    f.solve = t.solve;
    f.other = t_run - (f.mesh + f.assemble + f.analyse + f.factorize + f.solve);
    f.nodes = static_cast<double>(run.mesh->n_nodes());
    f.cells = static_cast<double>(run.mesh->n_cells());
    f.dofs = (g_three_d ? 3 : 2) * f.nodes;
    f.iterations = run.result.iterations;
    std::snprintf(f.solver, sizeof f.solver, "%s", run.result.solver.c_str());
    f.factor_nonzeros = run.result.factor_nonzeros;
    f.threads = omp_get_max_threads();
    f.hwm_bytes = vm_hwm_bytes();
    f.ok = 1;
  } catch (const std::exception& e) {
    std::snprintf(f.error, sizeof f.error, "%s", e.what());
  }
  std::error_code ec;
  if (!out.empty()) fs::remove_all(out, ec);
  return f;
}

/// Forks a child for one density and collects its figures and peak RSS [bytes].
Figures run_in_child(const Density& d, double* peak_rss, double* cpu) {
  Figures f;
  *peak_rss = 0;
  *cpu = 0;
  int fds[2];
  if (::pipe(fds) != 0) {
    std::snprintf(f.error, sizeof f.error, "pipe: %s", std::strerror(errno));
    return f;
  }
  std::fflush(nullptr);
  const pid_t pid = ::fork();
  if (pid < 0) {
    std::snprintf(f.error, sizeof f.error, "fork: %s", std::strerror(errno));
    ::close(fds[0]);
    ::close(fds[1]);
    return f;
  }
  if (pid == 0) {
    ::close(fds[0]);
    const Figures mine = run_one(d);
    const bool sent = write_all(fds[1], &mine, sizeof mine);
    ::close(fds[1]);
    ::_exit(sent && mine.ok ? 0 : 1);
  }
  ::close(fds[1]);
  const std::size_t got = read_all(fds[0], &f, sizeof f);
  ::close(fds[0]);
  int status = 0;
  struct rusage ru {};
  while (::wait4(pid, &status, 0, &ru) < 0 && errno == EINTR) {
  }
  *peak_rss = std::max(static_cast<double>(ru.ru_maxrss) * 1024.0, f.hwm_bytes);  // ru_maxrss in KiB on Linux
  const auto secs = [](const timeval& tv) { return static_cast<double>(tv.tv_sec) + 1e-6 * static_cast<double>(tv.tv_usec); };
  *cpu = secs(ru.ru_utime) + secs(ru.ru_stime);
  if (got != sizeof f) {
    f = Figures{};
    if (WIFSIGNALED(status))
      std::snprintf(f.error, sizeof f.error, "child killed by signal %d (%s)", WTERMSIG(status), strsignal(WTERMSIG(status)));
    else
      std::snprintf(f.error, sizeof f.error, "child exited (status %d) without reporting", WEXITSTATUS(status));
  }
  return f;
}

/// Busy CPU time of the whole machine so far [s], from the first line of /proc/stat.
double machine_busy_seconds() {
  std::ifstream in("/proc/stat");
  std::string cpu;
  double user = 0, nice = 0, system = 0, idle = 0, iowait = 0, irq = 0, softirq = 0, steal = 0;
  in >> cpu >> user >> nice >> system >> idle >> iowait >> irq >> softirq >> steal;
  if (!in || cpu != "cpu") return 0;
  return (user + nice + system + irq + softirq + steal) / static_cast<double>(sysconf(_SC_CLK_TCK));
}

struct Row {
  const Density* density;
  Figures f;
  double peak_rss = 0;
  double cpu = 0;  ///< user + system seconds of the child
  double others = 0;  ///< cores kept busy by other processes during the run, on average
};

void usage(std::FILE* to) {
  std::fprintf(to,
               "usage: bench [--model 2d|3d] [--sizes small|all] [--max-dofs N]\n"
               "  --model 2d      plane strain, quadratic triangles (default)\n"
               "  --model 3d      the 3D demo block, quadratic tetrahedra\n"
               "  --sizes small   the two smallest densities (about 150 k and 500 k DOF)\n"
               "  --sizes all     all four, up to about 2 M DOF (default)\n"
               "  --max-dofs N    skip densities whose nominal DOF count exceeds N\n");
}

constexpr double gib = 1024.0 * 1024.0 * 1024.0;

// Targets: the whole run at about 1 M DOF (quadratic elements, both models) within 20 s and
// 4 GiB in 2D, 60 s and 8 GiB in 3D; total time growing no faster than DOF^1.3.
constexpr double target_exponent = 1.3;

}  // namespace

int main(int argc, char** argv) {
  bool small = false;
  double max_dofs = 0;  // 0 = no limit
  for (int i = 1; i < argc; ++i) {
    const std::string_view a = argv[i];
    if (a == "-h" || a == "--help") {
      usage(stdout);
      return 0;
    }
    if ((a == "--sizes" || a == "--max-dofs" || a == "--model") && i + 1 >= argc) {
      std::fprintf(stderr, "bench: %s needs a value\n", argv[i]);
      usage(stderr);
      return 2;
    }
    if (a == "--model") {
      const std::string_view v = argv[++i];
      if (v == "3d")
        g_three_d = true;
      else if (v != "2d") {
        std::fprintf(stderr, "bench: --model takes '2d' or '3d', not '%s'\n", argv[i]);
        return 2;
      }
    } else if (a == "--sizes") {
      const std::string_view v = argv[++i];
      if (v == "small")
        small = true;
      else if (v == "all")
        small = false;
      else {
        std::fprintf(stderr, "bench: --sizes takes 'small' or 'all', not '%s'\n", argv[i]);
        return 2;
      }
    } else if (a == "--max-dofs") {
      char* end = nullptr;
      max_dofs = std::strtod(argv[++i], &end);
      if (end == argv[i] || *end != '\0' || !(max_dofs > 0)) {
        std::fprintf(stderr, "bench: --max-dofs takes a positive number, not '%s'\n", argv[i]);
        return 2;
      }
    } else {
      std::fprintf(stderr, "bench: unknown argument '%s'\n", argv[i]);
      usage(stderr);
      return 2;
    }
  }

  std::vector<const Density*> chosen;
  const std::span<const Density> table = g_three_d ? std::span<const Density>(densities_3d) : std::span<const Density>(densities);
  for (const Density& d : table) {
    if (small && chosen.size() >= 2) break;
    if (max_dofs > 0 && d.nominal_dofs > max_dofs) continue;
    chosen.push_back(&d);
  }
  if (chosen.empty()) {
    std::fprintf(stderr, "bench: no density fits --max-dofs %.0f (the smallest is %.0f DOF)\n", max_dofs,
                 table[0].nominal_dofs);
    return 2;
  }

  const double phys = static_cast<double>(sysconf(_SC_PHYS_PAGES)) * static_cast<double>(sysconf(_SC_PAGE_SIZE));
  std::printf("voidsign bench: %s, both models (with and without voids) per run\n",
              g_three_d ? "3D, quadratic tetrahedra" : "plane strain, quadratic triangles");
  std::printf("machine: %ld cores online, %.1f GiB memory\n\n", sysconf(_SC_NPROCESSORS_ONLN), phys / gib);

  // Rows are printed as each size finishes, so that a long run shows its progress.
  const char* head = "%-5s %8s %8s %8s %7s %8s %7s %7s %7s %7s %7s %7s %7s %8s %6s %6s\n";
  std::printf(head, "size", "DOF", "nodes", "elements", "mesh", "assemble", "analyse", "factor", "solve", "other", "write",
              "total", "CPU", "peak RSS", "others", "iter");
  std::printf(head, "", "[-]", "[-]", "[-]", "[s]", "[s]", "[s]", "[s]", "[s]", "[s]", "[s]", "[s]", "[s]", "[GiB]",
              "[core]", "[-]");
  std::fflush(stdout);
  std::vector<Row> rows;
  int failures = 0, threads = 0;
  for (const Density* d : chosen) {
    std::fprintf(stderr, "bench: running %s (mesh.size %.2f m) ...\n", d->label, d->size);
    Row r{d, {}, 0, 0, 0};
    const double busy0 = machine_busy_seconds();
    const auto t0 = Clock::now();
    r.f = run_in_child(*d, &r.peak_rss, &r.cpu);
    const double wall = seconds_since(t0);
    r.others = std::max(0.0, (machine_busy_seconds() - busy0 - r.cpu) / wall);
    if (!r.f.ok) {
      std::fprintf(stderr, "bench: %s failed: %s\n", d->label, r.f.error);
      std::printf("%-5s failed: %s\n", d->label, r.f.error);
      ++failures;
      continue;
    }
    const Figures& f = r.f;
    std::printf("%-5s %8.0f %8.0f %8.0f %7.2f %8.2f %7.2f %7.2f %7.2f %7.2f %7.2f %7.2f %7.2f %8.2f %6.2f %6d\n",
                r.density->label, f.dofs, f.nodes, f.cells, f.mesh, f.assemble, f.analyse, f.factorize, f.solve, f.other,
                f.write, f.total, r.cpu, r.peak_rss / gib, r.others, f.iterations);
    std::fflush(stdout);
    threads = f.threads;
    rows.push_back(r);
  }
  if (rows.empty()) return 1;
  std::printf("factor, solve: both models. other: parsing, set-up, signature, stability screening. total: wall, with\n"
              "write. CPU: user + system of the run (%d OpenMP threads). others: cores busy with other processes\n"
              "meanwhile (above ~0.2 the times are inflated; rerun on a quiet machine).\n",
              threads);
  std::printf("linear solver per size (factor: set-up of the solver, i.e. factorisation or multigrid hierarchy;\n"
              "iter: conjugate-gradient iterations over all solves):\n");
  for (const Row& r : rows) std::printf("  %-5s %s\n", r.density->label, r.f.solver);
  const bool direct = std::all_of(rows.begin(), rows.end(), [](const Row& r) { return r.f.factor_nonzeros > 0; });
  if (direct) {
    std::printf("nonzeros of the Cholesky factor L [millions]:");
    for (const Row& r : rows) std::printf("  %s %.1f", r.density->label, r.f.factor_nonzeros / 1e6);
    std::printf("\n");
  }

  if (rows.size() >= 2) {
    std::printf("\ngrowth of total time with DOF, exponent p in t ~ DOF^p:\n");
    for (std::size_t i = 1; i < rows.size(); ++i) {
      const Figures &a = rows[i - 1].f, &b = rows[i].f;
      const double p = std::log(b.total / a.total) / std::log(b.dofs / a.dofs);
      const double pf = std::log(b.factorize / a.factorize) / std::log(b.dofs / a.dofs);
      if (direct) {
        const double pl = std::log(b.factor_nonzeros / a.factor_nonzeros) / std::log(b.dofs / a.dofs);
        std::printf("  %-5s -> %-5s p = %.2f   (factorisation time DOF^%.2f, factor nonzeros DOF^%.2f)\n",
                    rows[i - 1].density->label, rows[i].density->label, p, pf, pl);
      } else {
        std::printf("  %-5s -> %-5s p = %.2f   (solver set-up time DOF^%.2f)\n", rows[i - 1].density->label,
                    rows[i].density->label, p, pf);
      }
    }
    // Least-squares slope of ln t against ln DOF over all sizes.
    double sx = 0, sy = 0, sxx = 0, sxy = 0;
    const double n = static_cast<double>(rows.size());
    for (const Row& r : rows) {
      const double x = std::log(r.f.dofs), y = std::log(r.f.total);
      sx += x;
      sy += y;
      sxx += x * x;
      sxy += x * y;
    }
    const double p = (n * sxy - sx * sy) / (n * sxx - sx * sx);
    std::printf("  fit over %zu sizes   p = %.2f   (target: at most %.1f, %s)\n", rows.size(), p, target_exponent,
                p <= target_exponent ? "met" : "MISSED");
  }

  // The target at about 1 M DOF: the measured size closest to it (in log DOF), if any is within 30 %.
  const Row* near = nullptr;
  for (const Row& r : rows)
    if (!near || std::abs(std::log(r.f.dofs / 1e6)) < std::abs(std::log(near->f.dofs / 1e6))) near = &r;
  const double target_seconds = g_three_d ? 60.0 : 20.0, target_bytes = (g_three_d ? 8.0 : 4.0) * gib;
  if (near && std::abs(std::log(near->f.dofs / 1e6)) < std::log(1.3)) {
    const bool t_ok = near->f.total <= target_seconds, m_ok = near->peak_rss <= target_bytes;
    std::printf("\nat %.0f DOF: total %.1f s (target %.0f s, %s), peak RSS %.2f GiB (target %.0f GiB, %s)\n", near->f.dofs,
                near->f.total, target_seconds, t_ok ? "met" : "MISSED", near->peak_rss / gib, target_bytes / gib,
                m_ok ? "met" : "MISSED");
  }
  return failures ? 1 : 0;
}
