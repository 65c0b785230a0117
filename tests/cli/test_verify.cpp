// SPDX-License-Identifier: GPL-3.0-or-later
// The verification table as tests: each case must pass on its default mesh. Sources are named in
// each row (cli/verify/verify.cpp) and in docs/verification.md.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>

#include "cli/verify/verify.hpp"

using namespace voidsign::cli;

namespace {

void check_case(const std::string& name) {
  for (const VerifyCase& c : verification_cases()) {
    if (c.name != name) continue;
    const auto rows = c.run();
    REQUIRE(!rows.empty());
    for (const VerifyRow& r : rows) {
      std::printf("%s | %s | computed %.6g | reference %.6g | rel.err %.2e | tol %.2g | %s\n", r.case_name.c_str(),
                  r.quantity.c_str(), r.computed, r.reference, r.rel_error, r.tolerance, r.source.c_str());
      CHECK_MESSAGE(r.pass(), r.quantity);
    }
    return;
  }
  FAIL("no verification case " << name);
}

}  // namespace

TEST_CASE("verify: Kirsch (1898) uniaxial far field, hoop stress 3S and -S within 1 %") { check_case("kirsch-uniaxial"); }
TEST_CASE("verify: Kirsch (1898) hydrostatic, hoop stress 2p and wall displacement within 1 %") {
  check_case("kirsch-hydrostatic");
}
TEST_CASE("verify: Verruijt & Booker (1996) shallow tunnel ground loss within 5 %") { check_case("verruijt-booker"); }
TEST_CASE("verify: Mogi (1958) / McTigue (1987) pressurised sphere within 2 %") { check_case("mogi-mctigue"); }
TEST_CASE("verify: Boussinesq circular load centre settlement within 2 %") { check_case("boussinesq-circle"); }
TEST_CASE("verify: lithostatic column within 0.1 % in every layer") { check_case("lithostatic"); }
TEST_CASE("verify: Mogi (1958) / McTigue (1987) sphere in 3D within 3 %, and against the axisymmetric model within 1 %") {
  check_case("sphere-3d");
}
TEST_CASE("verify: lithostatic column in 3D within 0.1 %") { check_case("lithostatic-3d"); }
TEST_CASE("verify: Boussinesq (1885) square load on a half-space in 3D within 3 %") { check_case("boussinesq-3d"); }
TEST_CASE("verify: a tunnel 20 depths long in 3D against plane strain within 2 %") { check_case("tunnel-plane-strain"); }
TEST_CASE("verify: clamped-clamped strip, first two bending modes within 2 % of Blevins (1979)") { check_case("blevins-strip"); }
TEST_CASE("verify: damped layer on rock, Vs/(4H) within 1 % and resonant amplification within 3 % of Kramer (1996)") {
  check_case("site-response-kramer");
}
TEST_CASE("verify: three-layer column within 3 % of Haskell-Thomson from 0.1 to 20 Hz") { check_case("haskell-thomson-column"); }
TEST_CASE("verify: convergence order on Kirsch, linear >= 1.8 and quadratic >= 2.5") { check_case("convergence-kirsch"); }

TEST_CASE("Verruijt & Booker error against block size, printed (the 100 h row is asserted above)") {
  // The ground-loss load has no net resultant, so the error settles as the block grows.
  for (double w : {25.0, 50.0, 100.0}) {
    const auto rows = verruijt_booker_rows(w);
    for (const auto& r : rows) std::printf("block %5.0f h | %s | rel.err %.3e\n", w, r.quantity.c_str(), r.rel_error);
    CHECK(rows.size() == 2);
  }
}

TEST_CASE("Kirsch L2 error against mesh size, three refinements (printed)") {
  for (int order : {1, 2}) {
    double prev_h = 0, prev_e = 0;
    for (double h : {0.4, 0.2, 0.1}) {
      const auto [he, e] = kirsch_l2_error(order, h);
      if (prev_e > 0) {
        const double rate = std::log(prev_e / e) / std::log(prev_h / he);
        std::printf("order %d: h %.4f -> %.4f, L2 error %.3e -> %.3e, rate %.2f\n", order, prev_h, he, prev_e, e, rate);
        if (h == 0.1) CHECK(rate > (order == 1 ? 1.8 : 2.5));  // the coarsest pair is pre-asymptotic
      }
      prev_h = he;
      prev_e = e;
    }
  }
}
