// SPDX-License-Identifier: GPL-3.0-or-later
// MUMPS's complex symmetric LDLᵀ (solver/la/complex_ldlt.*) against dense linear algebra: the
// solution, the Schur complement of a set of unknowns and the reduce / expand halves of a solve.
#include <doctest/doctest.h>

#include <Eigen/Dense>
#include <thread>
#include <vector>

#include "solver/la/complex_ldlt.hpp"

using namespace voidsign::solver;
using C = std::complex<double>;

namespace {

// A complex symmetric, indefinite system like K* − ω²M: a 2D grid Laplacian with complex
// stiffness, shifted by a mass term beyond its lowest eigenvalues.
ComplexMatrix grid_system(int nx, int ny, double shift) {
  const long n = static_cast<long>(nx) * ny;
  std::vector<Eigen::Triplet<C, long>> t;
  const C k(1.0, 0.04);
  auto id = [&](int i, int j) { return static_cast<long>(j) * nx + i; };
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx; ++i) {
      const long a = id(i, j);
      t.emplace_back(a, a, 4.0 * k - shift * (1.0 + 0.1 * ((i + 2 * j) % 3)));
      if (i + 1 < nx) {
        t.emplace_back(a, id(i + 1, j), -k);
        t.emplace_back(id(i + 1, j), a, -k);
      }
      if (j + 1 < ny) {
        t.emplace_back(a, id(i, j + 1), -k);
        t.emplace_back(id(i, j + 1), a, -k);
      }
    }
  ComplexMatrix a(n, n);
  a.setFromTriplets(t.begin(), t.end());
  a.makeCompressed();
  return a;
}

Eigen::MatrixXcd rhs(long n, int k) {
  Eigen::MatrixXcd b(n, k);
  for (long i = 0; i < n; ++i)
    for (int c = 0; c < k; ++c) b(i, c) = C(std::sin(0.3 * static_cast<double>(i) + c), std::cos(0.7 * static_cast<double>(i) - c));
  return b;
}

}  // namespace

TEST_CASE("MUMPS LDLT: solution of an indefinite complex symmetric system") {
  const ComplexMatrix a = grid_system(30, 20, 0.9);
  const Eigen::MatrixXcd b = rhs(a.rows(), 3);
  ComplexLdlt ldlt;
  ldlt.analyze(a);
  ldlt.factorize(a);
  const Eigen::MatrixXcd x = ldlt.solve(b);
  const Eigen::MatrixXcd dense = Eigen::MatrixXcd(a);
  const Eigen::MatrixXcd ref = dense.partialPivLu().solve(b);
  CHECK((x - ref).norm() / ref.norm() < 1e-11);
  for (int c = 0; c < 3; ++c) CHECK(complex_relative_residual(a, x.col(c), b.col(c)) < 1e-12);
  CHECK(ldlt.factor_nonzeros() > 0);

  // A new matrix with the same pattern: factorisation only.
  const ComplexMatrix a2 = grid_system(30, 20, 1.7);
  ldlt.factorize(a2);
  const Eigen::MatrixXcd x2 = ldlt.solve(b);
  CHECK(complex_relative_residual(a2, x2.col(0), b.col(0)) < 1e-12);
}

TEST_CASE("MUMPS LDLT: Schur complement and the reduce / expand halves of a solve") {
  const ComplexMatrix a = grid_system(24, 18, 1.1);
  const long n = a.rows();
  // Γ: a ring of unknowns in the middle, not contiguous in the numbering.
  std::vector<long> gamma;
  for (long v = 0; v < n; ++v) {
    const long i = v % 24, j = v / 24;
    if ((i == 8 || i == 15) && j >= 5 && j <= 12) gamma.push_back(v);
    if ((j == 5 || j == 12) && i > 8 && i < 15) gamma.push_back(v);
  }
  const auto ng = static_cast<long>(gamma.size());
  std::vector<long> other;
  std::vector<char> in_gamma(static_cast<std::size_t>(n), 0);
  for (long v : gamma) in_gamma[static_cast<std::size_t>(v)] = 1;
  for (long v = 0; v < n; ++v)
    if (!in_gamma[static_cast<std::size_t>(v)]) other.push_back(v);

  ComplexLdlt ldlt;
  ldlt.analyze(a, gamma);
  ldlt.factorize(a);
  REQUIRE(ldlt.schur_size() == ng);

  // Dense reference S = A_ΓΓ − A_ΓO A_OO⁻¹ A_OΓ.
  const Eigen::MatrixXcd dense = Eigen::MatrixXcd(a);
  const auto no = static_cast<long>(other.size());
  Eigen::MatrixXcd aoo(no, no), aog(no, ng), agg(ng, ng);
  for (long r = 0; r < no; ++r) {
    for (long c = 0; c < no; ++c) aoo(r, c) = dense(other[r], other[c]);
    for (long c = 0; c < ng; ++c) aog(r, c) = dense(other[r], gamma[c]);
  }
  for (long r = 0; r < ng; ++r)
    for (long c = 0; c < ng; ++c) agg(r, c) = dense(gamma[r], gamma[c]);
  const Eigen::MatrixXcd s_ref = agg - aog.transpose() * aoo.partialPivLu().solve(aog);
  CHECK((ldlt.schur() - s_ref).norm() / s_ref.norm() < 1e-11);

  // A solve in two halves around the caller's Schur system, two right-hand sides at once, one of
  // them with a modified Schur system (as the model without voids is solved).
  const Eigen::MatrixXcd b = rhs(n, 2);
  const Eigen::MatrixXcd y = ldlt.reduce(b);
  Eigen::MatrixXcd z = Eigen::MatrixXcd::Zero(ng, ng);
  for (long k = 0; k < ng; ++k) z(k, k) = C(0.5, 0.1);
  Eigen::MatrixXcd xg(ng, 2);
  xg.col(0) = ldlt.schur().partialPivLu().solve(y.col(0));
  xg.col(1) = (ldlt.schur() + z).partialPivLu().solve(y.col(1));
  const Eigen::MatrixXcd x = ldlt.expand(xg);
  const Eigen::VectorXcd x0 = dense.partialPivLu().solve(b.col(0));
  CHECK((x.col(0) - x0).norm() / x0.norm() < 1e-11);
  Eigen::MatrixXcd modified = dense;
  for (long k = 0; k < ng; ++k) modified(gamma[k], gamma[k]) += z(k, k);
  const Eigen::VectorXcd x1 = modified.partialPivLu().solve(b.col(1));
  CHECK((x.col(1) - x1).norm() / x1.norm() < 1e-11);
  CHECK_THROWS_AS(ldlt.expand(xg), ComplexSolveError);  // each expand needs its own reduce
}

// MUMPS is not re-entrant; ComplexLdlt serialises the calls into each copy of the library, and
// slot 1 uses a second copy, so the two threads factorise at the same time.
TEST_CASE("MUMPS LDLT: instances in two threads at once") {
  const ComplexMatrix a = grid_system(60, 40, 0.8);
  const Eigen::MatrixXcd b = rhs(a.rows(), 1);
  double residual[2] = {1, 1};
  std::vector<std::thread> threads;
  for (int t = 0; t < 2; ++t)
    threads.emplace_back([&, t] {
      ComplexLdlt ldlt(LdltOrdering::automatic, t);
      ldlt.analyze(a);
      for (int rep = 0; rep < 5; ++rep) {
        ldlt.factorize(a);
        residual[t] = complex_relative_residual(a, ldlt.solve(b).col(0), b.col(0));
      }
    });
  for (auto& th : threads) th.join();
  // tools/deps.sh installs Debian's sequential MUMPS as the second, private copy.
  CHECK(ComplexLdlt::concurrent_slots());
  CHECK(residual[0] < 1e-12);
  CHECK(residual[1] < 1e-12);
}

TEST_CASE("MUMPS LDLT: a singular matrix is an error") {
  ComplexMatrix a = grid_system(10, 10, 0.0);
  // Zero a row and column entirely.
  for (long j = 0; j < a.cols(); ++j)
    for (ComplexMatrix::InnerIterator it(a, j); it; ++it)
      if (it.row() == 37 || j == 37) it.valueRef() = 0;
  ComplexLdlt ldlt;
  ldlt.analyze(a);
  CHECK_THROWS_AS(ldlt.factorize(a), ComplexSolveError);
}
