// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/la/cholesky.hpp"

#include <cholmod.h>
#include <metis.h>

#include <algorithm>
#include <initializer_list>
#include <stdexcept>
#include <vector>

namespace voidsign::solver {

namespace {

// A CHOLMOD view (no copy) of the lower triangle stored in `k`.
cholmod_sparse view_lower(const SparseMatrix& k) {
  if (!k.isCompressed()) throw std::logic_error("Cholesky: the matrix must be compressed");
  cholmod_sparse a{};
  a.nrow = a.ncol = static_cast<std::size_t>(k.rows());
  a.nzmax = static_cast<std::size_t>(k.nonZeros());
  a.p = const_cast<int*>(k.outerIndexPtr());
  a.i = const_cast<int*>(k.innerIndexPtr());
  a.x = const_cast<double*>(k.valuePtr());
  a.stype = -1;
  a.itype = CHOLMOD_INT;
  a.xtype = CHOLMOD_REAL;
  a.dtype = CHOLMOD_DOUBLE;
  a.sorted = 1;
  a.packed = 1;
  return a;
}

// The node graph of `k` (d unknowns per node, full d×d blocks in the pattern, as
// stiffness_pattern stores them), restricted to the nodes with keep[node]: CSR arrays over the
// kept nodes numbered 0, 1, … in node order.
struct NodeGraph {
  std::vector<idx_t> xadj, adj;
  std::vector<int> node;  // kept node of each graph vertex
};

NodeGraph node_graph(const SparseMatrix& k, int d, const std::vector<char>& keep) {
  const int nn = static_cast<int>(k.rows()) / d;
  NodeGraph g;
  std::vector<int> vertex(static_cast<std::size_t>(nn), -1);
  for (int v = 0; v < nn; ++v)
    if (keep[static_cast<std::size_t>(v)]) {
      vertex[static_cast<std::size_t>(v)] = static_cast<int>(g.node.size());
      g.node.push_back(v);
    }
  const std::size_t nv = g.node.size();
  const int* outer = k.outerIndexPtr();
  const int* inner = k.innerIndexPtr();
  // Lower adjacency from the first unknown of each node block: column d·J, rows d·I with I > J.
  auto for_each_edge = [&](auto&& f) {
    for (int J = 0; J < nn; ++J) {
      const int vj = vertex[static_cast<std::size_t>(J)];
      if (vj < 0) continue;
      for (int p = outer[d * J]; p < outer[d * J + 1]; ++p) {
        const int i = inner[p];
        if (i % d != 0 || i / d <= J) continue;
        const int vi = vertex[static_cast<std::size_t>(i / d)];
        if (vi >= 0) f(vi, vj);
      }
    }
  };
  g.xadj.assign(nv + 1, 0);
  for_each_edge([&](int a, int b) {
    ++g.xadj[static_cast<std::size_t>(a) + 1];
    ++g.xadj[static_cast<std::size_t>(b) + 1];
  });
  for (std::size_t v = 0; v < nv; ++v) g.xadj[v + 1] += g.xadj[v];
  g.adj.resize(static_cast<std::size_t>(g.xadj[nv]));
  std::vector<idx_t> fill(g.xadj.begin(), g.xadj.end() - 1);
  for_each_edge([&](int a, int b) {
    g.adj[static_cast<std::size_t>(fill[static_cast<std::size_t>(a)]++)] = b;
    g.adj[static_cast<std::size_t>(fill[static_cast<std::size_t>(b)]++)] = a;
  });
  return g;
}

// The kept nodes in nested-dissection order (METIS), or in node order when there are few.
std::vector<int> metis_order(const SparseMatrix& k, int d, const std::vector<char>& keep) {
  NodeGraph g = node_graph(k, d, keep);
  idx_t nv = static_cast<idx_t>(g.node.size());
  if (nv < 3) return g.node;
  idx_t options[METIS_NOPTIONS];
  METIS_SetDefaultOptions(options);
  options[METIS_OPTION_NUMBERING] = 0;
  // METIS_NodeND's first output (its "perm") is CHOLMOD's Perm: order[k] is the vertex placed
  // k-th. (Swapped, the factor fills an order of magnitude more: see the tests.)
  std::vector<idx_t> order(static_cast<std::size_t>(nv)), where(static_cast<std::size_t>(nv));
  if (METIS_NodeND(&nv, g.xadj.data(), g.adj.data(), nullptr, options, order.data(), where.data()) != METIS_OK)
    throw std::runtime_error("METIS nested dissection failed");
  std::vector<int> out(static_cast<std::size_t>(nv));
  for (std::size_t q = 0; q < out.size(); ++q) out[q] = g.node[static_cast<std::size_t>(order[q])];
  return out;
}

// Node order → permutation of the unknowns: perm[j] = the unknown that becomes unknown j.
std::vector<int> expand(const std::vector<int>& nodes, int d) {
  std::vector<int> perm;
  perm.reserve(nodes.size() * static_cast<std::size_t>(d));
  for (int v : nodes)
    for (int c = 0; c < d; ++c) perm.push_back(d * v + c);
  return perm;
}

void check_blocks(const SparseMatrix& k, int d) {
  if (k.rows() % d != 0) throw std::logic_error("Cholesky: unknowns not a multiple of the unknowns per node");
}

}  // namespace

struct Cholesky::Impl {
  cholmod_common c{};
  cholmod_factor* L = nullptr;
  int dofs_per_node = 1;
  Ordering ordering = Ordering::automatic;
  bool metis = false;
  std::vector<int> position;  // cached inverse of L->Perm

  Impl() {
    cholmod_start(&c);
    c.supernodal = CHOLMOD_SUPERNODAL;
    c.final_ll = 1;
    c.print = 0;
    c.error_handler = nullptr;
  }
  ~Impl() {
    if (L) cholmod_free_factor(&L, &c);
    cholmod_finish(&c);
  }
};

Cholesky::Cholesky(int dofs_per_node, Ordering ordering) : impl_(std::make_unique<Impl>()) {
  if (dofs_per_node < 1) throw std::logic_error("Cholesky: dofs_per_node must be positive");
  impl_->dofs_per_node = dofs_per_node;
  impl_->ordering = ordering;
}

Cholesky::~Cholesky() = default;

void Cholesky::analyze(const SparseMatrix& k) {
  Impl& s = *impl_;
  if (s.L) cholmod_free_factor(&s.L, &s.c);
  s.position.clear();
  cholmod_sparse a = view_lower(k);
  s.c.nmethods = 1;
  s.c.postorder = 1;
  s.metis = s.ordering == Ordering::metis_nodes ||
            (s.ordering == Ordering::automatic && k.rows() >= metis_min_unknowns);
  if (s.metis) {
    check_blocks(k, s.dofs_per_node);
    const std::vector<char> all(static_cast<std::size_t>(k.rows() / s.dofs_per_node), 1);
    std::vector<int> perm = expand(metis_order(k, s.dofs_per_node, all), s.dofs_per_node);
    s.c.method[0].ordering = CHOLMOD_GIVEN;
    s.L = cholmod_analyze_p(&a, perm.data(), nullptr, 0, &s.c);
  } else {
    s.c.method[0].ordering = CHOLMOD_AMD;
    s.L = cholmod_analyze(&a, &s.c);
  }
  if (!s.L) throw std::runtime_error("CHOLMOD symbolic analysis failed (status " + std::to_string(s.c.status) + ")");
}

void Cholesky::analyze_grouped(const SparseMatrix& k, const std::vector<int>& group) {
  Impl& s = *impl_;
  const int d = s.dofs_per_node;
  check_blocks(k, d);
  const std::size_t nn = static_cast<std::size_t>(k.rows() / d);
  if (group.size() != nn) throw std::logic_error("Cholesky::analyze_grouped: one group per node");
  std::vector<int> nodes;
  nodes.reserve(nn);
  for (int grp = 0; grp < 3; ++grp) {
    std::vector<char> keep(nn, 0);
    for (std::size_t v = 0; v < nn; ++v) keep[v] = group[v] == grp;
    const std::vector<int> part = metis_order(k, d, keep);
    nodes.insert(nodes.end(), part.begin(), part.end());
  }
  if (nodes.size() != nn) throw std::logic_error("Cholesky::analyze_grouped: groups must be 0, 1 or 2");
  if (s.L) cholmod_free_factor(&s.L, &s.c);
  s.position.clear();
  cholmod_sparse a = view_lower(k);
  std::vector<int> perm = expand(nodes, d);
  s.c.nmethods = 1;
  s.c.method[0].ordering = CHOLMOD_GIVEN;
  s.c.postorder = 0;
  s.metis = true;
  s.L = cholmod_analyze_p(&a, perm.data(), nullptr, 0, &s.c);
  s.c.postorder = 1;
  if (!s.L) throw std::runtime_error("CHOLMOD symbolic analysis failed (status " + std::to_string(s.c.status) + ")");
  const int* p = static_cast<const int*>(s.L->Perm);
  for (std::size_t j = 0; j < perm.size(); ++j)
    if (p[j] != perm[j]) throw std::logic_error("CHOLMOD changed the given elimination order");
}

const std::vector<int>& Cholesky::positions() const {
  Impl& s = *impl_;
  if (!s.L) throw std::logic_error("Cholesky::positions before analyze");
  if (s.position.size() != s.L->n) {
    s.position.assign(s.L->n, -1);
    const int* p = static_cast<const int*>(s.L->Perm);
    for (std::size_t j = 0; j < s.L->n; ++j) s.position[static_cast<std::size_t>(p[j])] = static_cast<int>(j);
  }
  return s.position;
}

Eigen::MatrixXd Cholesky::trailing_block(int count) const {
  const Impl& s = *impl_;
  if (!s.L || !s.L->is_super || !s.L->is_ll || s.L->xtype != CHOLMOD_REAL)
    throw std::logic_error("Cholesky::trailing_block needs a supernodal LLᵀ factor");
  const int n = static_cast<int>(s.L->n), first = n - count;
  Eigen::MatrixXd out = Eigen::MatrixXd::Zero(count, count);
  const int* super = static_cast<const int*>(s.L->super);
  const int* pi = static_cast<const int*>(s.L->pi);
  const int* px = static_cast<const int*>(s.L->px);
  const int* ls = static_cast<const int*>(s.L->s);
  const double* lx = static_cast<const double*>(s.L->x);
  for (std::size_t sn = 0; sn < s.L->nsuper; ++sn) {
    const int k1 = super[sn], k2 = super[sn + 1];
    if (k2 <= first) continue;
    const int nsrow = pi[sn + 1] - pi[sn];
    for (int j = std::max(k1, first); j < k2; ++j)
      for (int i = 0; i < nsrow; ++i) {
        const int row = ls[pi[sn] + i];
        if (row >= first) out(row - first, j - first) = lx[px[sn] + i + (j - k1) * nsrow];
      }
  }
  return out;
}

namespace {

cholmod_dense view_dense(const Vector& b) {
  cholmod_dense v{};
  v.nrow = static_cast<std::size_t>(b.size());
  v.ncol = 1;
  v.nzmax = v.d = v.nrow;
  v.x = const_cast<double*>(b.data());
  v.xtype = CHOLMOD_REAL;
  v.dtype = CHOLMOD_DOUBLE;
  return v;
}

// Applies the solve steps `systems` (CHOLMOD_P, CHOLMOD_L, …) to b in turn.
Vector cholmod_steps(cholmod_factor* L, cholmod_common* c, const Vector& b, std::initializer_list<int> systems) {
  Vector out = b;
  for (int sys : systems) {
    cholmod_dense rhs = view_dense(out);
    cholmod_dense* x = cholmod_solve(sys, L, &rhs, c);
    if (!x) throw std::runtime_error("CHOLMOD solve failed (status " + std::to_string(c->status) + ")");
    out = Eigen::Map<const Vector>(static_cast<const double*>(x->x), b.size());
    cholmod_free_dense(&x, c);
  }
  return out;
}

}  // namespace

Vector Cholesky::forward(const Vector& b) const {
  if (!impl_->L) throw std::logic_error("Cholesky::forward before factorize");
  return cholmod_steps(impl_->L, &impl_->c, b, {CHOLMOD_P, CHOLMOD_L});
}

Vector Cholesky::backward(const Vector& y) const {
  if (!impl_->L) throw std::logic_error("Cholesky::backward before factorize");
  return cholmod_steps(impl_->L, &impl_->c, y, {CHOLMOD_Lt, CHOLMOD_Pt});
}

Status Cholesky::factorize(const SparseMatrix& k) {
  Impl& s = *impl_;
  if (!s.L) analyze(k);
  cholmod_sparse a = view_lower(k);
  cholmod_factorize(&a, s.L, &s.c);
  if (s.c.status == CHOLMOD_NOT_POSDEF || s.L->minor < s.L->n) return Status::singular;
  if (s.c.status < CHOLMOD_OK) throw std::runtime_error("CHOLMOD factorisation failed (status " + std::to_string(s.c.status) + ")");
  return Status::ok;
}

Vector Cholesky::solve(const Vector& b) const {
  if (!impl_->L) throw std::logic_error("Cholesky::solve before factorize");
  return cholmod_steps(impl_->L, &impl_->c, b, {CHOLMOD_A});
}

double Cholesky::factor_nonzeros() const { return impl_->c.lnz; }

double Cholesky::factor_flops() const { return impl_->c.fl; }

std::string Cholesky::ordering() const { return impl_->metis ? "METIS (node graph)" : "AMD"; }

}  // namespace voidsign::solver
