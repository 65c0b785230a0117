// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/complex_ldlt.hpp"

#include <dlfcn.h>
#include <metis.h>
#include <zmumps_c.h>

#include <chrono>
#include <climits>
#include <complex>
#include <cstdlib>
#include <cstring>
#include <mutex>
#include <sstream>
#include <string>

#include "solver/la/mpi_runtime.hpp"

namespace voidsign::solver {

static_assert(sizeof(ZMUMPS_COMPLEX) == sizeof(std::complex<double>), "MUMPS complex layout");

namespace {
using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

// MUMPS's 1-based control and information arrays.
constexpr int icntl(int k) { return k - 1; }

// MUMPS keeps module-level state (its load-balancing module among others) across the instances
// of a process: two factorisations at once in one copy of the library corrupt each other
// (measured: an allocation failure in ZMUMPS_LOAD_INIT). Each copy of the library therefore has
// a lock that every call holds. Copy 0 is the MPI build voidsign links; copy 1, where installed,
// is Debian's sequential build, loaded privately (RTLD_LOCAL | RTLD_DEEPBIND: its own MPI stubs
// and module state, invisible to the rest of the process), so that two factorisations can run
// at the same time.
struct Backend {
  using Entry = void (*)(ZMUMPS_STRUC_C*);
  Entry entry = nullptr;
  bool sequential_build = false;
  std::mutex lock;
};

Backend& backend(int slot) {
  static Backend linked;
  static Backend private_copy;
  static std::once_flag once;
  std::call_once(once, [] {
    linked.entry = zmumps_c;
    if (std::getenv("VOIDSIGN_ONE_MUMPS")) return;
    void* h = nullptr;
    for (const char* name : {"libzmumps_seq.so", "libzmumps_seq-5.5.so"})
      if (!h) h = dlopen(name, RTLD_NOW | RTLD_LOCAL | RTLD_DEEPBIND);
    if (!h) return;
    const auto entry = reinterpret_cast<Backend::Entry>(dlsym(h, "zmumps_c"));
    if (!entry) return;
    // Only a copy of the very version this file was compiled against shares the structure's
    // layout: ask it.
    ZMUMPS_STRUC_C probe{};
    probe.comm_fortran = -987654;
    probe.par = 1;
    probe.sym = 2;
    probe.job = -1;
    entry(&probe);
    const bool same = probe.infog[0] == 0 && std::strcmp(probe.version_number, MUMPS_VERSION) == 0;
    for (int k : {1, 2, 3}) probe.icntl[icntl(k)] = -1;
    probe.icntl[icntl(4)] = 0;
    probe.job = -2;
    entry(&probe);
    if (!same) return;
    private_copy.entry = entry;
    private_copy.sequential_build = true;
  });
  return slot == 1 && private_copy.entry ? private_copy : linked;
}

std::string mumps_error(const char* phase, int info1, int info2) {
  std::ostringstream os;
  os << "MUMPS " << phase << " failed (INFOG(1) = " << info1 << ", INFOG(2) = " << info2;
  switch (info1) {
    case -10: os << ": the matrix is numerically singular"; break;
    case -13: os << ": memory allocation failed"; break;
    case -8:
    case -9:
    case -14:
    case -15: os << ": working space too small"; break;
    case -6: os << ": the matrix is structurally singular"; break;
    default: break;
  }
  os << ")";
  return os.str();
}

// Nested-dissection order of the nodes of `a` (d consecutive unknowns each) that hold no Schur
// unknown, by METIS on the node graph, then the Schur unknowns: MUMPS's PERM_IN, the 1-based
// position of each unknown in the pivot order.
std::vector<MUMPS_INT> metis_positions(const ComplexMatrix& a, int d, const std::vector<char>& in_schur) {
  const long n = a.rows();
  if (n % d != 0) throw ComplexSolveError("ComplexLdlt: unknowns not a multiple of the unknowns per node");
  const long nn = n / d;
  std::vector<idx_t> vertex(static_cast<std::size_t>(nn), -1);
  std::vector<long> node;
  for (long v = 0; v < nn; ++v) {
    int count = 0;
    for (int c = 0; c < d; ++c) count += in_schur[static_cast<std::size_t>(d * v + c)];
    if (count != 0 && count != d) throw ComplexSolveError("ComplexLdlt: the Schur set splits a node");
    if (count == 0) {
      vertex[static_cast<std::size_t>(v)] = static_cast<idx_t>(node.size());
      node.push_back(v);
    }
  }
  const long* outer = a.outerIndexPtr();
  const long* inner = a.innerIndexPtr();
  std::vector<idx_t> xadj(node.size() + 1, 0), adj;
  for (std::size_t q = 0; q < node.size(); ++q) {
    const long col = d * node[q];
    for (long k = outer[col]; k < outer[col + 1]; ++k) {
      const long i = inner[k];
      if (i % d != 0 || i / d == node[q]) continue;
      const idx_t w = vertex[static_cast<std::size_t>(i / d)];
      if (w >= 0) adj.push_back(w);
    }
    xadj[q + 1] = static_cast<idx_t>(adj.size());
  }
  auto nv = static_cast<idx_t>(node.size());
  std::vector<idx_t> order(node.size()), where(node.size());
  if (nv >= 3) {
    idx_t options[METIS_NOPTIONS];
    METIS_SetDefaultOptions(options);
    options[METIS_OPTION_NUMBERING] = 0;
    if (METIS_NodeND(&nv, xadj.data(), adj.data(), nullptr, options, order.data(), where.data()) != METIS_OK)
      throw ComplexSolveError("ComplexLdlt: METIS nested dissection failed");
  } else {
    for (idx_t q = 0; q < nv; ++q) order[static_cast<std::size_t>(q)] = q;
  }
  std::vector<MUMPS_INT> position(static_cast<std::size_t>(n), 0);
  MUMPS_INT next = 1;
  for (idx_t q : order)
    for (int c = 0; c < d; ++c) position[static_cast<std::size_t>(d * node[static_cast<std::size_t>(q)] + c)] = next++;
  for (long j = 0; j < n; ++j)
    if (in_schur[static_cast<std::size_t>(j)]) position[static_cast<std::size_t>(j)] = next++;
  return position;
}

}  // namespace

struct ComplexLdlt::Impl {
  ZMUMPS_STRUC_C id{};
  bool initialised = false, analysed = false, factorised = false, reduced = false;
  LdltOrdering ordering = LdltOrdering::automatic;
  long n = 0;
  std::vector<MUMPS_INT> irn, jcn, schur_list, perm_in;
  std::vector<long> pos;  // position in the CSC value array of each lower-triangle entry
  std::vector<std::complex<double>> values, schur_buffer;
  Eigen::MatrixXcd schur, rhs, reduced_rhs;
  double analyse_s = 0, factor_s = 0;

  Backend* lib = nullptr;
  void call(int job) {
    const std::lock_guard<std::mutex> lock(lib->lock);
    id.job = job;
    lib->entry(&id);
  }
  int info1() const { return id.infog[0]; }
  int info2() const { return id.infog[1]; }
};

ComplexLdlt::ComplexLdlt(LdltOrdering ordering, int slot) : impl_(std::make_unique<Impl>()) {
  ensure_mpi();
  Impl& s = *impl_;
  s.ordering = ordering;
  s.lib = &backend(slot);
  // The sequential build's MPI stubs know only their own MPI_COMM_WORLD.
  s.id.comm_fortran = s.lib->sequential_build ? -987654 : mpi_comm_self_fortran();
  s.id.par = 1;
  s.id.sym = 2;
  s.call(-1);
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("initialisation", s.info1(), s.info2()));
  s.initialised = true;
  s.id.icntl[icntl(1)] = -1;  // no error, diagnostic or statistics output
  s.id.icntl[icntl(2)] = -1;
  s.id.icntl[icntl(3)] = -1;
  s.id.icntl[icntl(4)] = 0;
}

ComplexLdlt::~ComplexLdlt() {
  if (impl_->initialised) impl_->call(-2);
}

void ComplexLdlt::analyze(const ComplexMatrix& a, const std::vector<long>& schur, int dofs_per_node) {
  Impl& s = *impl_;
  if (a.rows() != a.cols()) throw ComplexSolveError("ComplexLdlt: the matrix is not square");
  if (a.rows() >= INT_MAX) throw ComplexSolveError("ComplexLdlt: too many unknowns for 32-bit MUMPS indices");
  s.n = a.rows();
  s.irn.clear();
  s.jcn.clear();
  s.pos.clear();
  const long* outer = a.outerIndexPtr();
  const long* inner = a.innerIndexPtr();
  for (long j = 0; j < s.n; ++j)
    for (long k = outer[j]; k < outer[j + 1]; ++k)
      if (inner[k] >= j) {
        s.irn.push_back(static_cast<MUMPS_INT>(inner[k] + 1));
        s.jcn.push_back(static_cast<MUMPS_INT>(j + 1));
        s.pos.push_back(k);
      }
  s.values.resize(s.pos.size());
  for (std::size_t k = 0; k < s.pos.size(); ++k) s.values[k] = a.valuePtr()[s.pos[k]];
  s.id.n = static_cast<MUMPS_INT>(s.n);
  s.id.nnz = static_cast<MUMPS_INT8>(s.pos.size());
  s.id.irn = s.irn.data();
  s.id.jcn = s.jcn.data();
  s.id.a = reinterpret_cast<ZMUMPS_COMPLEX*>(s.values.data());
  s.schur_list.clear();
  std::vector<char> in_schur(static_cast<std::size_t>(s.n), 0);
  for (long v : schur) {
    if (v < 0 || v >= s.n) throw ComplexSolveError("ComplexLdlt: Schur unknown out of range");
    if (in_schur[static_cast<std::size_t>(v)]) throw ComplexSolveError("ComplexLdlt: Schur unknown listed twice");
    in_schur[static_cast<std::size_t>(v)] = 1;
    s.schur_list.push_back(static_cast<MUMPS_INT>(v + 1));
  }
  s.id.perm_in = nullptr;
  switch (s.ordering) {
    case LdltOrdering::amd: s.id.icntl[icntl(7)] = 0; break;
    case LdltOrdering::scotch: s.id.icntl[icntl(7)] = 3; break;
    case LdltOrdering::pord: s.id.icntl[icntl(7)] = 4; break;
    case LdltOrdering::automatic:
    case LdltOrdering::metis:
      s.perm_in = metis_positions(a, dofs_per_node, in_schur);
      s.id.perm_in = s.perm_in.data();
      s.id.icntl[icntl(7)] = 1;  // the given order
      break;
  }
  const auto ns = static_cast<long>(s.schur_list.size());
  if (ns > 0) {
    // The complete Schur complement (both triangles), column-major, on this single process.
    s.id.icntl[icntl(19)] = 3;
    s.id.size_schur = static_cast<MUMPS_INT>(ns);
    s.id.listvar_schur = s.schur_list.data();
    s.id.nprow = s.id.npcol = 1;
    s.id.mblock = s.id.nblock = 100;
    s.id.schur_lld = static_cast<MUMPS_INT>(ns);
    s.schur_buffer.assign(static_cast<std::size_t>(ns * ns), 0.0);
    s.id.schur = reinterpret_cast<ZMUMPS_COMPLEX*>(s.schur_buffer.data());
  } else {
    s.id.icntl[icntl(19)] = 0;
    s.id.size_schur = 0;
    s.id.listvar_schur = nullptr;
    s.id.schur = nullptr;
  }
  const auto t0 = Clock::now();
  s.call(1);
  s.analyse_s = seconds_since(t0);
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("analysis", s.info1(), s.info2()));
  s.analysed = true;
  s.factorised = false;
}

void ComplexLdlt::factorize(const ComplexMatrix& a) {
  Impl& s = *impl_;
  if (!s.analysed) analyze(a);
  if (a.rows() != s.n) throw ComplexSolveError("ComplexLdlt: matrix size differs from the analysed one");
  for (std::size_t k = 0; k < s.pos.size(); ++k) s.values[k] = a.valuePtr()[s.pos[k]];
  s.id.a = reinterpret_cast<ZMUMPS_COMPLEX*>(s.values.data());
  const auto t0 = Clock::now();
  s.factorised = s.reduced = false;
  for (int attempt = 0;; ++attempt) {
    s.call(2);
    const int e = s.info1();
    const bool short_space = e == -8 || e == -9 || e == -14 || e == -15;
    if (!(short_space && attempt < 4)) break;
    // MUMPS's workspace estimate proved short (possible with delayed pivots): allow more.
    s.id.icntl[icntl(14)] = 2 * std::max<MUMPS_INT>(s.id.icntl[icntl(14)], 20);
  }
  s.factor_s = seconds_since(t0);
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("factorisation", s.info1(), s.info2()));
  s.factorised = true;
  const long ns = schur_size();
  if (ns > 0) s.schur = Eigen::Map<const Eigen::MatrixXcd>(s.schur_buffer.data(), ns, ns);
}

Eigen::MatrixXcd ComplexLdlt::solve(const Eigen::MatrixXcd& b) {
  Impl& s = *impl_;
  if (!s.factorised) throw ComplexSolveError("ComplexLdlt::solve called before a successful factorize");
  if (schur_size() > 0) throw ComplexSolveError("ComplexLdlt::solve: use reduce and expand with a Schur set");
  if (b.rows() != s.n) throw ComplexSolveError("ComplexLdlt::solve: right-hand side of the wrong size");
  s.rhs = b;
  s.id.rhs = reinterpret_cast<ZMUMPS_COMPLEX*>(s.rhs.data());
  s.id.nrhs = static_cast<MUMPS_INT>(b.cols());
  s.id.lrhs = static_cast<MUMPS_INT>(s.n);
  s.id.icntl[icntl(26)] = 0;
  s.call(3);
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("solve", s.info1(), s.info2()));
  return s.rhs;
}

const Eigen::MatrixXcd& ComplexLdlt::schur() const { return impl_->schur; }

Eigen::MatrixXcd ComplexLdlt::reduce(const Eigen::MatrixXcd& b) {
  Impl& s = *impl_;
  if (!s.factorised || schur_size() == 0) throw ComplexSolveError("ComplexLdlt::reduce needs a factorisation with a Schur set");
  if (b.rows() != s.n) throw ComplexSolveError("ComplexLdlt::reduce: right-hand side of the wrong size");
  s.rhs = b;
  s.reduced_rhs.setZero(schur_size(), b.cols());
  s.id.rhs = reinterpret_cast<ZMUMPS_COMPLEX*>(s.rhs.data());
  s.id.nrhs = static_cast<MUMPS_INT>(b.cols());
  s.id.lrhs = static_cast<MUMPS_INT>(s.n);
  s.id.redrhs = reinterpret_cast<ZMUMPS_COMPLEX*>(s.reduced_rhs.data());
  s.id.lredrhs = static_cast<MUMPS_INT>(schur_size());
  s.id.icntl[icntl(26)] = 1;
  s.call(3);
  s.id.icntl[icntl(26)] = 0;
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("reduction", s.info1(), s.info2()));
  s.reduced = true;
  return s.reduced_rhs;
}

Eigen::MatrixXcd ComplexLdlt::expand(const Eigen::MatrixXcd& x_schur) {
  Impl& s = *impl_;
  if (!s.reduced) throw ComplexSolveError("ComplexLdlt::expand must follow reduce");
  if (x_schur.rows() != schur_size() || x_schur.cols() != s.rhs.cols())
    throw ComplexSolveError("ComplexLdlt::expand: Schur solutions of the wrong shape");
  s.reduced_rhs = x_schur;
  s.id.rhs = reinterpret_cast<ZMUMPS_COMPLEX*>(s.rhs.data());
  s.id.redrhs = reinterpret_cast<ZMUMPS_COMPLEX*>(s.reduced_rhs.data());
  s.id.icntl[icntl(26)] = 2;
  s.call(3);
  s.id.icntl[icntl(26)] = 0;
  s.reduced = false;
  if (s.info1() < 0) throw ComplexSolveError(mumps_error("expansion", s.info1(), s.info2()));
  return s.rhs;
}

bool ComplexLdlt::analysed() const { return impl_->analysed; }
long ComplexLdlt::schur_size() const { return static_cast<long>(impl_->schur_list.size()); }

double ComplexLdlt::factor_nonzeros() const {
  const int e = impl_->id.infog[icntl(29)];
  return e >= 0 ? e : -1e6 * e;
}

double ComplexLdlt::flops() const { return impl_->id.rinfog[icntl(3)]; }

double ComplexLdlt::peak_bytes() const {
  const double schur_bytes = 16.0 * static_cast<double>(impl_->schur_buffer.size());
  return 1e6 * impl_->id.infog[icntl(22)] + schur_bytes;
}

double ComplexLdlt::estimated_bytes() const {
  return 1e6 * impl_->id.infog[icntl(17)] + 16.0 * static_cast<double>(impl_->schur_buffer.size());
}

double ComplexLdlt::estimated_entries() const {
  const int e = impl_->id.infog[icntl(20)];
  return e >= 0 ? e : -1e6 * e;
}

double ComplexLdlt::estimated_flops() const { return impl_->id.rinfog[icntl(1)]; }

double ComplexLdlt::analyse_seconds() const { return impl_->analyse_s; }
double ComplexLdlt::factorize_seconds() const { return impl_->factor_s; }

bool ComplexLdlt::concurrent_slots() { return &backend(1) != &backend(0); }

}  // namespace voidsign::solver
