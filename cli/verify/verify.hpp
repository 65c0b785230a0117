// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The verification cases: finite-element results against published closed-form solutions.
/// `voidsign verify` prints them; the test suite asserts them (tests/cli/test_verify.cpp).
#include <functional>
#include <string>
#include <vector>

#include "solver/analysis/static.hpp"
#include "solver/analytic/analytic.hpp"

namespace voidsign::cli {

/// One compared quantity.
struct VerifyRow {
  std::string case_name;
  std::string quantity;
  double computed = 0;
  double reference = 0;
  double rel_error = 0;  ///< |computed − reference| / |reference|
  double tolerance = 0;  ///< maximum allowed rel_error (or, for rates, the minimum rate; see `is_minimum`)
  std::string source;    ///< the published solution and its status
  bool is_minimum = false;  ///< the row passes when computed ≥ tolerance (convergence rates)
  bool pass() const { return is_minimum ? computed >= tolerance : rel_error <= tolerance; }
};

struct VerifyCase {
  std::string name;
  std::function<std::vector<VerifyRow>()> run;
};

/// Every case, in the order `voidsign verify` prints them.
const std::vector<VerifyCase>& verification_cases();

/// The 3D cases (cli/verify/verify3d.cpp), appended to verification_cases().
std::vector<VerifyCase> verification_cases_3d();

/// The dynamic cases (cli/verify/verify_dynamic.cpp), appended after the 3D ones.
std::vector<VerifyCase> verification_cases_dynamic();

/// The layered column of the lithostatic cases on mesh `m` (2D or 3D): gravity switched on with
/// k0 = ν/(1−ν), or (in_situ) a prescribed in-situ state with k0 = 0.8. `ref` receives the
/// column for the closed form.
solver::StaticProblem lithostatic_column_problem(const mesh::Mesh& m, bool in_situ,
                                                 std::vector<solver::analytic::ColumnLayer>* ref);

/// Helper: a row with rel_error filled in.
VerifyRow compare(std::string case_name, std::string quantity, double computed, double reference, double tol,
                  std::string source);

/// The Verruijt & Booker case on a block `width_over_h` tunnel depths wide: rows for x = 0 and x = h.
std::vector<VerifyRow> verruijt_booker_rows(double width_over_h);

/// Kirsch convergence: L2 displacement error for a mesh size h (order 1 or 2); returns {h, error}.
std::pair<double, double> kirsch_l2_error(int order, double h);

}  // namespace voidsign::cli
