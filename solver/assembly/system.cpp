// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/assembly/system.hpp"

#include <omp.h>

#include <algorithm>
#include <cmath>
#include <numeric>

namespace voidsign::solver {

namespace {

// Node adjacency (including the node itself), each row sorted, as CSR.
void node_graph(const mesh::Mesh& m, std::vector<int>& start, std::vector<int>& adj) {
  const std::size_t nn = m.n_nodes();
  const int npc = m.npc();
  std::vector<int> count(nn + 1, 0);
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const int* v = m.cell(c);
    for (int a = 0; a < npc; ++a) count[v[a] + 1] += npc;
  }
  std::partial_sum(count.begin(), count.end(), count.begin());
  std::vector<int> raw(static_cast<std::size_t>(count[nn]));
  std::vector<int> fill(count.begin(), count.end() - 1);
  for (std::size_t c = 0; c < m.n_cells(); ++c) {
    const int* v = m.cell(c);
    for (int a = 0; a < npc; ++a)
      for (int b = 0; b < npc; ++b) raw[fill[v[a]]++] = v[b];
  }
  start.assign(nn + 1, 0);
  adj.clear();
  adj.reserve(raw.size() / 2);
  for (std::size_t i = 0; i < nn; ++i) {
    auto b = raw.begin() + count[i], e = raw.begin() + count[i + 1];
    std::sort(b, e);
    e = std::unique(b, e);
    adj.insert(adj.end(), b, e);
    start[i + 1] = static_cast<int>(adj.size());
  }
}

}  // namespace

SparseMatrix stiffness_pattern(const mesh::Mesh& m) {
  std::vector<int> start, adj;
  node_graph(m, start, adj);
  const int nn = static_cast<int>(m.n_nodes());
  const int d = m.dim() == 3 ? 3 : 2;
  const int nd = d * nn;
  // Column d·a+i holds rows d·a+j (j >= i), then d·b+j for every neighbour b > a.
  std::vector<int> outer(static_cast<std::size_t>(nd) + 1, 0);
  for (int a = 0; a < nn; ++a) {
    int above = 0;
    for (int p = start[a]; p < start[a + 1]; ++p)
      if (adj[p] > a) ++above;
    for (int i = 0; i < d; ++i) outer[d * a + i + 1] = outer[d * a + i] + (d - i) + d * above;
  }
  SparseMatrix k(nd, nd);
  k.resizeNonZeros(outer[nd]);
  std::copy(outer.begin(), outer.end(), k.outerIndexPtr());
  int* rows = k.innerIndexPtr();
#pragma omp parallel for schedule(static)
  for (int a = 0; a < nn; ++a) {
    for (int i = 0; i < d; ++i) {
      int p0 = outer[d * a + i];
      for (int j = i; j < d; ++j) rows[p0++] = d * a + j;
      for (int p = start[a]; p < start[a + 1]; ++p) {
        const int b = adj[p];
        if (b <= a) continue;
        for (int j = 0; j < d; ++j) rows[p0++] = d * b + j;
      }
    }
  }
  std::fill(k.valuePtr(), k.valuePtr() + k.nonZeros(), 0.0);
  return k;
}

namespace {

// f(pos, p, q) for each entry (p, q) of cell c's element matrix (d unknowns per node) that falls
// in the lower triangle of k: pos is its place in k's value array.
template <class F>
void for_each_lower_entry(const mesh::Mesh& m, int d, std::size_t c, const SparseMatrix& k, F f) {
  const int npc = m.npc();
  const int nd = d * npc;
  const int* outer = k.outerIndexPtr();
  const int* rows = k.innerIndexPtr();
  int dof[3 * max_cell_nodes];
  const int* v = m.cell(c);
  for (int a = 0; a < npc; ++a)
    for (int j = 0; j < d; ++j) dof[d * a + j] = d * v[a] + j;
  for (int q = 0; q < nd; ++q) {
    const int col = dof[q];
    const int* b = rows + outer[col];
    const int* e = rows + outer[col + 1];
    for (int p = 0; p < nd; ++p) {
      const int row = dof[p];
      if (row >= col) f(std::lower_bound(b, e, row) - rows, p, q);
    }
  }
}

// k += sign · K_e over the cells take(i) ≥ 0, i < n_items.
template <class Take>
void add_cell_stiffness(const mesh::Mesh& m, Kinematics kin, long n_items, Take take,
                        const std::function<const Elastic&(std::size_t)>& material_of, double sign, SparseMatrix& k) {
  const int d = dofs_per_node(kin);
  const int nd = d * m.npc();
  double* vals = k.valuePtr();
#pragma omp parallel if (n_items > 512)
  {
    std::vector<double> ke(static_cast<std::size_t>(nd * nd));
#pragma omp for schedule(dynamic, 512)
    for (long i = 0; i < n_items; ++i) {
      const long c = take(i);
      if (c < 0) continue;
      const auto cu = static_cast<std::size_t>(c);
      stiffness(m, cu, material_of(cu), kin, ke);
      for_each_lower_entry(m, d, cu, k, [&](long pos, int p, int q) {
#pragma omp atomic
        vals[pos] += sign * ke[static_cast<std::size_t>(p * nd + q)];
      });
    }
  }
}

}  // namespace

void assemble_stiffness(const mesh::Mesh& m, Kinematics kin, const std::vector<char>& active,
                        const std::function<const Elastic&(std::size_t)>& material_of, SparseMatrix& k) {
  std::fill(k.valuePtr(), k.valuePtr() + k.nonZeros(), 0.0);
  add_cell_stiffness(
      m, kin, static_cast<long>(m.n_cells()), [&](long c) { return active[static_cast<std::size_t>(c)] ? c : -1L; },
      material_of, 1.0, k);
}

void subtract_stiffness(const mesh::Mesh& m, Kinematics kin, const std::vector<std::size_t>& cells,
                        const std::function<const Elastic&(std::size_t)>& material_of, SparseMatrix& k) {
  // Entries that only the listed cells filled cancel to round-off; they are set to exact zeros
  // (as a fresh assembly without those cells would leave them), judged against their value before.
  double* vals = k.valuePtr();
  std::vector<std::pair<long, double>> touched;  // position, value before
  std::vector<char> seen(static_cast<std::size_t>(k.nonZeros()), 0);
  for (std::size_t c : cells)
    for_each_lower_entry(m, dofs_per_node(kin), c, k, [&](long pos, int, int) {
      if (!seen[static_cast<std::size_t>(pos)]) {
        seen[static_cast<std::size_t>(pos)] = 1;
        touched.emplace_back(pos, vals[pos]);
      }
    });
  add_cell_stiffness(
      m, kin, static_cast<long>(cells.size()), [&](long i) { return static_cast<long>(cells[static_cast<std::size_t>(i)]); },
      material_of, -1.0, k);
  for (const auto& [pos, before] : touched)
    if (std::abs(vals[pos]) <= 1e-12 * std::abs(before)) vals[pos] = 0;
}

void constrain_matrix(SparseMatrix& k, const std::vector<char>& fixed) {
  const int n = static_cast<int>(k.cols());
  const int* outer = k.outerIndexPtr();
  const int* rows = k.innerIndexPtr();
  double* vals = k.valuePtr();
  double diag_sum = 0;
  long diag_n = 0;
  for (int j = 0; j < n; ++j)
    if (!fixed[j] && vals[outer[j]] > 0) {
      diag_sum += vals[outer[j]];
      ++diag_n;
    }
  const double scale = diag_n ? diag_sum / static_cast<double>(diag_n) : 1.0;
  for (int j = 0; j < n; ++j) {
    // The diagonal comes first in each column of the lower triangle.
    if (fixed[j] && !(vals[outer[j]] > 0)) vals[outer[j]] = scale;
    for (int p = outer[j] + 1; p < outer[j + 1]; ++p)
      if (fixed[j] || fixed[rows[p]]) vals[p] = 0;
  }
}

Vector constrained_rhs(const SparseMatrix& k0, const SparseMatrix& kc, const std::vector<char>& fixed,
                       const Vector& f, const Vector& g) {
  Vector rhs = f;
  if (g.size() && g.lpNorm<Eigen::Infinity>() > 0) rhs -= k0.selfadjointView<Eigen::Lower>() * g;
  const int* outer = kc.outerIndexPtr();
  const double* vals = kc.valuePtr();
  for (Eigen::Index j = 0; j < rhs.size(); ++j)
    if (fixed[j]) rhs[j] = vals[outer[j]] * (g.size() ? g[j] : 0.0);
  return rhs;
}

double relative_residual(const SparseMatrix& k_lower, const Vector& u, const Vector& f) {
  const Vector ku = k_lower.selfadjointView<Eigen::Lower>() * u;
  const double fn = f.norm();
  const double scale = fn > 0 ? fn : ku.norm();
  return scale > 0 ? (ku - f).norm() / scale : 0.0;
}

}  // namespace voidsign::solver
