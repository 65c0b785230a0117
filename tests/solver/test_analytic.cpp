// SPDX-License-Identifier: GPL-3.0-or-later
// Checks of the closed-form reference solutions: the published check values, each with its
// source and verification status beside it, plus mathematical checks (boundary conditions,
// limits, equilibrium, Hooke's law, integrals) that do not depend on any printed number.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <numbers>
#include <sstream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "solver/analytic/analytic.hpp"

namespace an = voidsign::solver::analytic;

namespace {

constexpr double pi = std::numbers::pi;

/// True when `value` agrees with the decimal text `shown` to within half a unit of its last
/// shown digit ("2.9842e-6" allows +-0.5e-10), i.e. `value` rounds to what is printed.
bool matches_shown(double value, std::string_view shown) {
  const std::string text(shown);
  const double ref = std::stod(text);
  const std::size_t e_pos = text.find_first_of("eE");
  const std::string mantissa = text.substr(0, e_pos);
  const int exponent = e_pos == std::string::npos ? 0 : std::stoi(text.substr(e_pos + 1));
  const std::size_t dot = mantissa.find('.');
  const int decimals = dot == std::string::npos ? 0 : static_cast<int>(mantissa.size() - dot - 1);
  const double half_unit = 0.5 * std::pow(10.0, exponent - decimals);
  return std::abs(value - ref) <= half_unit * (1.0 + 1e-9);
}

std::string show(double v) {
  std::ostringstream os;
  os.precision(12);
  os << v;
  return os.str();
}

#define CHECK_SHOWN(expr, text)                                                              \
  do {                                                                                       \
    const double shown_value_ = (expr);                                                      \
    CHECK_MESSAGE(matches_shown(shown_value_, text),                                         \
                  #expr " = " << show(shown_value_) << ", reference " << (text));            \
  } while (0)

/// |a - b| <= tol * scale, reported with both values.
#define CHECK_CLOSE(a, b, tol, scale)                                                        \
  do {                                                                                       \
    const double ca_ = (a), cb_ = (b);                                                       \
    CHECK_MESSAGE(std::abs(ca_ - cb_) <= (tol) * (scale),                                    \
                  #a " = " << show(ca_) << ", " #b " = " << show(cb_));                      \
  } while (0)

/// Composite Simpson rule on [lo, hi] with n (even) panels.
template <class F>
double simpson(F f, double lo, double hi, int n) {
  const double h = (hi - lo) / n;
  double sum = f(lo) + f(hi);
  for (int k = 1; k < n; ++k) sum += (k % 2 ? 4.0 : 2.0) * f(lo + k * h);
  return sum * h / 3.0;
}

/// Location of the maximum of a unimodal f on [lo, hi] (golden-section search).
template <class F>
double argmax(F f, double lo, double hi) {
  const double g = (std::sqrt(5.0) - 1.0) / 2.0;
  double a = lo, b = hi, c = b - g * (b - a), d = a + g * (b - a);
  double fc = f(c), fd = f(d);
  for (int it = 0; it < 200; ++it) {
    if (fc > fd) {
      b = d; d = c; fd = fc; c = b - g * (b - a); fc = f(c);
    } else {
      a = c; c = d; fc = fd; d = a + g * (b - a); fd = f(d);
    }
  }
  return (a + b) / 2.0;
}

/// Central first derivative.
template <class F>
double ddx(F f, double x, double h) {
  return (f(x + h) - f(x - h)) / (2.0 * h);
}

}  // namespace

// =============================================================================================
// Kirsch (1898) / Brady & Brown (2004, eq. 6.18)
// =============================================================================================

TEST_CASE("Kirsch: check values of Brady & Brown (2004), eq. 6.18") {
  // Kirsch (1898); Brady & Brown (2004) eq. 6.18. Status: verified from the publication's text
  // (textbook) and checked mathematically. Book values are compression positive:
  // p1 = 10 MPa along theta = 0 (x), p2 = 5 MPa along theta = 90 deg (z); in project terms
  // sxx = -10 MPa, szz = -5 MPa.
  const an::KirschCase c{.radius_m = 1.0, .sxx_far_pa = -10e6, .szz_far_pa = -5e6,
                         .shear_modulus_pa = 10e9, .poisson = 0.25};
  // Hoop stress on the wall: 5 MPa at 0 deg, 25 MPa at 90 deg (compression) -> negative here.
  CHECK(an::kirsch_at(c, 1.0, 0.0).stt_pa == doctest::Approx(-5e6).epsilon(1e-12).scale(0));
  CHECK(an::kirsch_at(c, 1.0, pi / 2).stt_pa == doctest::Approx(-25e6).epsilon(1e-12).scale(0));
  // Excavation displacement of the wall: u_r(a, 0) = -6.25e-4 m, u_r(a, 90 deg) = -1.25e-4 m.
  CHECK_SHOWN(an::kirsch_at(c, 1.0, 0.0).ur_m, "-6.25e-4");
  CHECK_SHOWN(an::kirsch_at(c, 1.0, pi / 2).ur_m, "-1.25e-4");
  // Hydrostatic p0 = 10 MPa: u_r(a) = -5.0e-4 m (also -p0 a^2 / (2 G r) at any r).
  const an::KirschCase hyd{.radius_m = 1.0, .sxx_far_pa = -10e6, .szz_far_pa = -10e6,
                           .shear_modulus_pa = 10e9, .poisson = 0.25};
  CHECK_SHOWN(an::kirsch_at(hyd, 1.0, 0.3).ur_m, "-5.0e-4");
  CHECK(an::kirsch_at(hyd, 4.0, 1.1).ur_m == doctest::Approx(-10e6 / (2 * 10e9 * 4.0)).scale(0));
  // Wall hoop stress (p1 + p2) - 2 (p1 - p2) cos 2theta, extreme 3 p1 - p2 at 90 deg.
  for (double th : {0.0, 0.4, 1.0, 2.5}) {
    const double book = 15e6 - 2.0 * 5e6 * std::cos(2 * th);
    CHECK(an::kirsch_at(c, 1.0, th).stt_pa == doctest::Approx(-book).epsilon(1e-12).scale(0));
  }
  // Uniaxial tension sigma along x: concentration -1 at 0 deg and 3 at 90 deg.
  const an::KirschCase uni{.radius_m = 2.0, .sxx_far_pa = 1e6, .szz_far_pa = 0,
                           .shear_modulus_pa = 1e9, .poisson = 0.3};
  CHECK(an::kirsch_at(uni, 2.0, 0.0).stt_pa == doctest::Approx(-1e6).epsilon(1e-12).scale(0));
  CHECK(an::kirsch_at(uni, 2.0, pi / 2).stt_pa == doctest::Approx(3e6).epsilon(1e-12).scale(0));
}

TEST_CASE("Kirsch: traction-free wall, wall pressure and far-field limit (mathematical)") {
  const an::KirschCase c{.radius_m = 1.5, .sxx_far_pa = -7e6, .szz_far_pa = -3e6,
                         .shear_modulus_pa = 2e9, .poisson = 0.3};
  for (double th = 0.0; th < 2 * pi; th += 0.37) {
    const an::KirschPoint w = an::kirsch_at(c, 1.5, th);
    CHECK(std::abs(w.srr_pa) < 1e-6);
    CHECK(std::abs(w.srt_pa) < 1e-6);
    // Far field: Cartesian stresses tend to the applied principal stresses.
    const an::KirschPoint f = an::kirsch_at(c, 1.5e4, th);
    CHECK_CLOSE(f.sxx_pa, -7e6, 1e-7, 7e6);
    CHECK_CLOSE(f.szz_pa, -3e6, 1e-7, 7e6);
    CHECK_CLOSE(f.sxz_pa, 0.0, 1e-7, 7e6);
  }
  // Wall pressure: sigma_rr(a) = -p_i, and p_i = p0 cancels the hydrostatic excavation.
  an::KirschCase p = c;
  p.wall_pressure_pa = 1.2e6;
  CHECK(an::kirsch_at(p, 1.5, 0.8).srr_pa == doctest::Approx(-1.2e6).epsilon(1e-12).scale(0));
  const an::KirschCase balanced{.radius_m = 1.0, .sxx_far_pa = -4e6, .szz_far_pa = -4e6,
                                .shear_modulus_pa = 1e9, .poisson = 0.2, .wall_pressure_pa = 4e6};
  const an::KirschPoint b = an::kirsch_at(balanced, 1.7, 0.5);
  CHECK(std::abs(b.ur_m) < 1e-18);
  CHECK(b.srr_pa == doctest::Approx(-4e6).epsilon(1e-12).scale(0));
  CHECK(b.stt_pa == doctest::Approx(-4e6).epsilon(1e-12).scale(0));
  // Offset form agrees with the polar form (theta from +x toward +z).
  const an::KirschPoint q1 = an::kirsch_at(c, 2.5, std::atan2(2.0, 1.5));
  const an::KirschPoint q2 = an::kirsch_at_offset(c, 1.5, 2.0);
  CHECK(q1.szz_pa == doctest::Approx(q2.szz_pa).epsilon(1e-12).scale(0));
  CHECK(q1.uz_m == doctest::Approx(q2.uz_m).epsilon(1e-12).scale(0));
}

TEST_CASE("Kirsch: equilibrium and plane-strain Hooke's law by finite differences") {
  // The displacements must reproduce the stress change (with hole minus far field).
  const double g = 3e9, nu = 0.27, lambda = 2 * g * nu / (1 - 2 * nu);
  const an::KirschCase c{.radius_m = 1.0, .sxx_far_pa = -6e6, .szz_far_pa = -2.5e6,
                         .shear_modulus_pa = g, .poisson = nu};
  const double h = 1e-5;
  for (auto [x, z] : {std::pair{1.3, 0.4}, std::pair{-0.8, 1.1}, std::pair{0.2, -2.0},
                      std::pair{-2.2, -1.7}}) {
    auto at = [&](double dx, double dz) { return an::kirsch_at_offset(c, x + dx, z + dz); };
    const an::KirschPoint p = at(0, 0), xp = at(h, 0), xm = at(-h, 0), zp = at(0, h),
                          zm = at(0, -h);
    const double exx = (xp.ux_m - xm.ux_m) / (2 * h), ezz = (zp.uz_m - zm.uz_m) / (2 * h);
    const double exz = 0.5 * ((zp.ux_m - zm.ux_m) + (xp.uz_m - xm.uz_m)) / (2 * h);
    CHECK_CLOSE(p.sxx_pa - c.sxx_far_pa, lambda * (exx + ezz) + 2 * g * exx, 1e-6, 6e6);
    CHECK_CLOSE(p.szz_pa - c.szz_far_pa, lambda * (exx + ezz) + 2 * g * ezz, 1e-6, 6e6);
    CHECK_CLOSE(p.sxz_pa, 2 * g * exz, 1e-6, 6e6);
    // div sigma = 0
    const double fx = (xp.sxx_pa - xm.sxx_pa + zp.sxz_pa - zm.sxz_pa) / (2 * h);
    const double fz = (xp.sxz_pa - xm.sxz_pa + zp.szz_pa - zm.szz_pa) / (2 * h);
    CHECK(std::abs(fx) < 1e-6 * 6e6);
    CHECK(std::abs(fz) < 1e-6 * 6e6);
  }
}

// =============================================================================================
// Mogi (1958) and McTigue (1987)
// =============================================================================================

TEST_CASE("Mogi / McTigue: published check values") {
  // Mogi (1958); McTigue (1987) eqs. 52-53. Status: verified against independent
  // implementations and checked mathematically.
  an::SphereSource s{.radius_m = 10, .depth_m = 100, .pressure_change_pa = 1e6,
                     .shear_modulus_pa = 10e9, .poisson = 0.25};
  CHECK_SHOWN(an::mogi_surface(s, 0).uz_m, "7.50000e-6");
  CHECK_SHOWN(an::mogi_surface(s, 100).uz_m, "2.65165e-6");
  CHECK_SHOWN(an::mogi_surface(s, 100).ur_m, "2.65165e-6");
  auto ur = [&](double r) { return an::mogi_surface(s, r).ur_m; };
  const double r_peak = argmax(ur, 0, 300);
  CHECK_SHOWN(r_peak, "70.711");
  CHECK_SHOWN(ur(r_peak), "2.88675e-6");
  CHECK(r_peak == doctest::Approx(100 / std::sqrt(2.0)).epsilon(1e-7).scale(0));
  CHECK_SHOWN(an::mogi_surface(s, 0).err, "7.5e-8");
  CHECK_SHOWN(an::mogi_surface(s, 0).ett, "7.5e-8");
  // Tilt (computed for the reference from the formula): du_z/dr(d) = -3.977e-8 rad; largest
  // |du_z/dr| = 6.440e-8 rad at r = d/2.
  CHECK_SHOWN(an::mogi_surface(s, 100).tilt_rad, "-3.977e-8");
  auto abs_tilt = [&](double r) { return std::abs(an::mogi_surface(s, r).tilt_rad); };
  const double r_tilt = argmax(abs_tilt, 0, 300);
  CHECK(r_tilt == doctest::Approx(50.0).epsilon(1e-6).scale(0));
  CHECK_SHOWN(abs_tilt(r_tilt), "6.440e-8");

  // McTigue (1987) correction.
  s.mctigue_correction = true;
  CHECK_SHOWN(an::mogi_surface(s, 0).uz_m, "7.507745e-6");
  CHECK_SHOWN(an::mctigue_factor(s, 0), "1.0010326");
  s.radius_m = 30;  // a/d = 0.3
  CHECK_SHOWN(an::mctigue_factor(s, 0), "1.02788");
  s.radius_m = 50;  // a/d = 0.5
  CHECK_SHOWN(an::mctigue_factor(s, 0), "1.12908");

  // Excavated cavity under p0 = rho g d = 2.4525 MPa (rho = 2500 kg/m^3, g = 9.81 m/s^2, the
  // value the reference used): dP = -p0 gives u_z(0) = -1.839e-5 m.
  const double p0 = 2500 * 9.81 * 100;
  CHECK_SHOWN(p0 / 1e6, "2.4525");
  const an::SphereSource dig{.radius_m = 10, .depth_m = 100, .pressure_change_pa = -p0,
                             .shear_modulus_pa = 10e9, .poisson = 0.25};
  CHECK_SHOWN(an::mogi_surface(dig, 0).uz_m, "-1.839e-5");
}

TEST_CASE("Mogi: uplift volume 2(1-nu) dV, strains and tilt by differentiation (mathematical)") {
  for (double nu : {0.0, 0.25, 0.4}) {
    const an::SphereSource s{.radius_m = 10, .depth_m = 100, .pressure_change_pa = 1e6,
                             .shear_modulus_pa = 10e9, .poisson = nu};
    // r = d tan(t) maps [0, inf) onto [0, pi/2); dA = 2 pi r dr.
    auto integrand = [&](double t) {
      const double r = s.depth_m * std::tan(t), dr = s.depth_m / std::pow(std::cos(t), 2);
      return an::mogi_surface(s, r).uz_m * 2 * pi * r * dr;
    };
    const double volume = simpson(integrand, 0, pi / 2 - 1e-9, 4000);
    const double ratio = volume / an::mogi_cavity_volume_change_m3(s);
    CHECK(ratio == doctest::Approx(2 * (1 - nu)).epsilon(1e-7).scale(0));
    if (nu == 0.25) CHECK_SHOWN(ratio, "1.500000");  // Mogi (1958): uplift volume / dV
  }
  for (bool corr : {false, true}) {
    const an::SphereSource s{.radius_m = 40, .depth_m = 100, .pressure_change_pa = -3e6,
                             .shear_modulus_pa = 5e9, .poisson = 0.3, .mctigue_correction = corr};
    for (double r : {7.0, 50.0, 130.0, 400.0}) {
      const an::AxisymmetricSurfacePoint p = an::mogi_surface(s, r);
      const double h = 1e-3;
      const double tilt = ddx([&](double q) { return an::mogi_surface(s, q).uz_m; }, r, h);
      const double err = ddx([&](double q) { return an::mogi_surface(s, q).ur_m; }, r, h);
      CHECK(p.tilt_rad == doctest::Approx(tilt).epsilon(1e-6).scale(0));
      CHECK(p.err == doctest::Approx(err).epsilon(1e-6).scale(0));
      CHECK(p.ett == doctest::Approx(p.ur_m / r).epsilon(1e-12).scale(0));
    }
  }
}

// =============================================================================================
// Verruijt & Booker (1996)
// =============================================================================================

TEST_CASE("Verruijt & Booker: check values") {
  // Verruijt & Booker (1996), form from memory, checked mathematically.
  // R = 5 m, h = 20 m, nu = 0.25. Published sign: settlement positive; project u_z = -w.
  const an::TunnelCase e{.radius_m = 5, .depth_m = 20, .poisson = 0.25, .epsilon = 0.01};
  CHECK_SHOWN(an::verruijt_booker_surface(e, 0).uz_m, "-0.03750");
  CHECK_SHOWN(an::verruijt_booker_surface(e, 20).uz_m, "-0.01875");
  CHECK_SHOWN(an::verruijt_booker_surface(e, 20).ux_m, "-0.01875");
  const an::TunnelCase d{.radius_m = 5, .depth_m = 20, .poisson = 0.25, .delta = 0.005};
  CHECK_SHOWN(an::verruijt_booker_surface(d, 0).uz_m, "-0.01250");

  // Trough area by numerical integration (x = h tan t): 2.35619 m^2 against a tunnel area
  // loss of 2 pi eps R^2 = 1.57080 m^2 (ratio 1.5000); the delta mode adds no area.
  auto area = [](const an::TunnelCase& t) {
    auto f = [&](double s) {
      const double x = t.depth_m * std::tan(s), dx = t.depth_m / std::pow(std::cos(s), 2);
      return -an::verruijt_booker_surface(t, x).uz_m * dx;
    };
    return simpson(f, -pi / 2 + 1e-9, pi / 2 - 1e-9, 4000);
  };
  const double trough = area(e), loss = 2 * pi * e.epsilon * e.radius_m * e.radius_m;
  CHECK_SHOWN(trough, "2.35619");
  CHECK_SHOWN(loss, "1.57080");
  CHECK_SHOWN(trough / loss, "1.5000");
  CHECK(std::abs(area(d)) < 1e-9);
}

TEST_CASE("Verruijt & Booker: surface consequences and derivatives (mathematical)") {
  for (double nu : {0.0, 0.25, 0.3, 0.45, 0.5}) {
    const an::TunnelCase e{.radius_m = 3, .depth_m = 15, .poisson = nu, .epsilon = 0.004};
    const double h = e.depth_m, r2 = e.radius_m * e.radius_m;
    // Area 4 pi (1 - nu) eps R^2.
    auto f = [&](double s) {
      const double x = h * std::tan(s), dx = h / std::pow(std::cos(s), 2);
      return an::verruijt_booker_surface(e, x).uz_m * dx;
    };
    const double area = simpson(f, -pi / 2 + 1e-9, pi / 2 - 1e-9, 4000);
    CHECK(area == doctest::Approx(-4 * pi * (1 - nu) * e.epsilon * r2).epsilon(1e-7).scale(0));
    // Half the central value at x = h; largest |u_x| = 2 eps R^2 (1 - nu) / h at x = h.
    const double w0 = an::verruijt_booker_surface(e, 0).uz_m;
    CHECK(an::verruijt_booker_surface(e, h).uz_m == doctest::Approx(w0 / 2).epsilon(1e-12).scale(0));
    auto abs_ux = [&](double x) { return std::abs(an::verruijt_booker_surface(e, x).ux_m); };
    const double xm = argmax(abs_ux, 0.1, 10 * h);
    CHECK(xm == doctest::Approx(h).epsilon(1e-6).scale(0));
    if (nu > 0) {
      CHECK(abs_ux(xm) == doctest::Approx(2 * e.epsilon * r2 * (1 - nu) / h).epsilon(1e-10).scale(0));
    }
    // Sagaseta (1987) incompressible limit: 2 eps R^2 h / (x^2 + h^2).
    if (nu == 0.5) {
      CHECK(an::verruijt_booker_surface(e, 7).uz_m ==
            doctest::Approx(-2 * e.epsilon * r2 * h / (49 + h * h)).epsilon(1e-12).scale(0));
    }
    // Tilt and strain equal the derivatives of the displacements, for both modes together.
    const an::TunnelCase both{.radius_m = 3, .depth_m = 15, .poisson = nu, .epsilon = 0.004,
                              .delta = -0.0025};
    for (double x : {-40.0, -9.0, 0.0, 3.0, 15.0, 26.0}) {
      const an::PlaneSurfacePoint p = an::verruijt_booker_surface(both, x);
      const double hh = 1e-4;
      const double tilt = ddx([&](double q) { return an::verruijt_booker_surface(both, q).uz_m; },
                              x, hh);
      const double strain = ddx(
          [&](double q) { return an::verruijt_booker_surface(both, q).ux_m; }, x, hh);
      CHECK_CLOSE(p.tilt_rad, tilt, 1e-7, 1e-4);
      CHECK_CLOSE(p.strain_xx, strain, 1e-7, 1e-4);
    }
  }
}

TEST_CASE("Verruijt & Booker: full field (mathematical checks)") {
  for (double nu : {0.0, 0.25, 0.3, 0.45, 0.5}) {
    for (int mode = 0; mode < 2; ++mode) {
      const an::TunnelCase t{.radius_m = 4, .depth_m = 18, .poisson = nu,
                             .epsilon = mode == 0 ? 0.01 : 0.0, .delta = mode == 1 ? 0.006 : 0.0};
      const double g = 1.0, lambda = nu == 0.5 ? 0.0 : 2 * g * nu / (1 - 2 * nu);
      const double scale = 0.01 * 16 / (18.0 * 18.0);  // typical surface strain
      auto u = [&](double x, double z) { return an::verruijt_booker_field(t, x, z); };
      for (double x : {-30.0, -7.0, 0.0, 2.5, 11.0, 18.0, 45.0}) {
        // Surface formulas equal the full field at z = 0.
        const an::PlaneSurfacePoint s = an::verruijt_booker_surface(t, x);
        CHECK_CLOSE(u(x, 0).ux_m, s.ux_m, 1e-12, 0.01);
        CHECK_CLOSE(u(x, 0).uz_m, s.uz_m, 1e-12, 0.01);
        // Traction-free surface: sigma_xz = 0 and sigma_zz = 0. For nu = 1/2 the mean stress
        // is not defined by the displacements; check incompressibility there instead.
        const double h = 1e-4;
        const double exx = (u(x + h, 0).ux_m - u(x - h, 0).ux_m) / (2 * h);
        const double ezz = (u(x, h).uz_m - u(x, -h).uz_m) / (2 * h);
        const double exz =
            0.5 * ((u(x, h).ux_m - u(x, -h).ux_m) + (u(x + h, 0).uz_m - u(x - h, 0).uz_m)) /
            (2 * h);
        CHECK(std::abs(2 * g * exz) < 1e-7 * scale);
        if (nu < 0.5) {
          CHECK(std::abs(lambda * (exx + ezz) + 2 * g * ezz) < 1e-7 * scale);
        } else {
          CHECK(std::abs(exx + ezz) < 1e-7 * scale);
        }
      }
      // Navier's equations (lambda + G) grad div u + G lap u = 0 at interior points.
      if (nu < 0.5) {
        for (auto [x, z] : {std::pair{3.0, -5.0}, std::pair{-12.0, -30.0},
                            std::pair{25.0, -18.0}, std::pair{0.0, -9.0}}) {
          const double h = 1e-2;
          auto ux = [&](double dx, double dz) { return u(x + dx, z + dz).ux_m; };
          auto uz = [&](double dx, double dz) { return u(x + dx, z + dz).uz_m; };
          const double uxx = (ux(h, 0) - 2 * ux(0, 0) + ux(-h, 0)) / (h * h);
          const double uxzz = (ux(0, h) - 2 * ux(0, 0) + ux(0, -h)) / (h * h);
          const double uzxx = (uz(h, 0) - 2 * uz(0, 0) + uz(-h, 0)) / (h * h);
          const double uzz = (uz(0, h) - 2 * uz(0, 0) + uz(0, -h)) / (h * h);
          const double ux_xz = (ux(h, h) - ux(h, -h) - ux(-h, h) + ux(-h, -h)) / (4 * h * h);
          const double uz_xz = (uz(h, h) - uz(h, -h) - uz(-h, h) + uz(-h, -h)) / (4 * h * h);
          const double fx = (lambda + g) * (uxx + uz_xz) + g * (uxx + uxzz);
          const double fz = (lambda + g) * (ux_xz + uzz) + g * (uzxx + uzz);
          const double ref = (lambda + 2 * g) * (std::abs(uxx) + std::abs(uzz) + std::abs(ux_xz));
          CHECK(std::abs(fx) < 1e-5 * ref);
          CHECK(std::abs(fz) < 1e-5 * ref);
        }
      }
    }
  }
  // Wall displacement for R/h -> 0: u_r = -eps R (epsilon mode), delta R cos 2phi (delta mode).
  for (double nu : {0.0, 0.3, 0.5}) {
    const double rr = 1e-3, h = 10.0;
    const an::TunnelCase e{.radius_m = rr, .depth_m = h, .poisson = nu, .epsilon = 0.01};
    const an::TunnelCase d{.radius_m = rr, .depth_m = h, .poisson = nu, .delta = 0.01};
    for (double phi = 0.1; phi < 2 * pi; phi += 0.5) {
      const double x = rr * std::cos(phi), z = -h - rr * std::sin(phi);
      const double cx = std::cos(phi), cz = -std::sin(phi);  // outward normal, project axes
      const an::Displacement2 ue = an::verruijt_booker_field(e, x, z);
      const an::Displacement2 ud = an::verruijt_booker_field(d, x, z);
      CHECK_CLOSE(ue.ux_m * cx + ue.uz_m * cz, -0.01 * rr, 1e-3, 0.01 * rr);
      CHECK_CLOSE(ud.ux_m * cx + ud.uz_m * cz, 0.01 * rr * std::cos(2 * phi), 1e-3, 0.01 * rr);
    }
  }
  CHECK(an::verruijt_booker_epsilon(0.01) == doctest::Approx(0.005).scale(0));
}

// =============================================================================================
// Boussinesq (1885)
// =============================================================================================

TEST_CASE("Boussinesq: published check values") {
  // Boussinesq (1885); displacement forms as in Jaeger, Cook & Zimmerman (2007).
  // Status: verified against an independent implementation and checked numerically.
  // Point load P = 1 MN, E = 10 GPa, nu = 0.25, r = 10 m on the surface.
  const an::AxisymmetricDisplacement p = an::boussinesq_point_load(1e6, 10e9, 0.25, 10, 0);
  CHECK_SHOWN(p.uz_m, "-2.9842e-6");
  CHECK_SHOWN(p.ur_m, "-9.9472e-7");
  // Circle (Timoshenko & Goodier 1970): q = 100 kPa, a = 1 m, E = 10 MPa, nu = 0.3.
  auto w = [](double r) { return an::circular_load_surface_uz(100e3, 1.0, 10e6, 0.3, r); };
  CHECK_SHOWN(w(0), "-0.018200");
  CHECK_SHOWN(w(1.0), "-0.011586");
  CHECK_SHOWN(w(1.0) / w(0), "0.63662");
  CHECK_SHOWN(w(1.5), "-6.477997e-3");
  CHECK_SHOWN(w(3.0), "-3.077327e-3");
  CHECK_SHOWN(w(10.0), "-9.111418e-4");
  CHECK_SHOWN(an::circular_load_mean_uz(100e3, 1.0, 10e6, 0.3), "-0.015449");
  // Closed forms: w0 = 2 q a (1 - nu^2) / E, edge (2/pi) w0.
  CHECK(w(0) == doctest::Approx(-2 * 100e3 * 0.91 / 10e6).epsilon(1e-14).scale(0));
  CHECK(w(1.0) == doctest::Approx(2 / pi * w(0)).epsilon(1e-14).scale(0));
}

TEST_CASE("Boussinesq: continuity, superposition, mean and surface tractions (mathematical)") {
  const double q = 250e3, a = 2.0, e = 40e6, nu = 0.35, k = q * (1 - nu * nu) / (pi * e);
  auto w = [&](double r) { return an::circular_load_surface_uz(q, a, e, nu, r); };
  // Continuous at the edge r = a.
  CHECK(w(a * (1 - 1e-10)) == doctest::Approx(w(a)).epsilon(1e-8).scale(0));
  CHECK(w(a * (1 + 1e-10)) == doctest::Approx(w(a)).epsilon(1e-7).scale(0));
  // Superposition of surface point loads, w = k * integral of dA / distance.
  // Inside (polar coordinates about the evaluation point): w = k * integral of rho_max dphi.
  for (double r : {0.0, 0.7, 1.5, 1.95}) {
    auto rho_max = [&](double phi) {
      return -r * std::cos(phi) + std::sqrt(a * a - r * r * std::pow(std::sin(phi), 2));
    };
    CHECK(w(r) == doctest::Approx(-k * simpson(rho_max, 0, 2 * pi, 2000)).epsilon(1e-10).scale(0));
  }
  // Outside (polar coordinates about the centre of the circle).
  for (double r : {3.0, 6.0, 20.0}) {
    auto ring = [&](double s) {
      auto inv_dist = [&](double phi) {
        return 1.0 / std::sqrt(r * r + s * s - 2 * r * s * std::cos(phi));
      };
      return s * simpson(inv_dist, 0, 2 * pi, 400);
    };
    CHECK(w(r) == doctest::Approx(-k * simpson(ring, 0, a, 400)).epsilon(1e-8).scale(0));
  }
  // Mean over the loaded area.
  const double mean =
      simpson([&](double r) { return w(r) * 2 * pi * r; }, 0, a, 20000) / (pi * a * a);
  CHECK(mean == doctest::Approx(an::circular_load_mean_uz(q, a, e, nu)).epsilon(1e-6).scale(0));
  // Far away the circle acts as a point load P = q pi a^2.
  CHECK(w(200 * a) == doctest::Approx(an::boussinesq_point_load(q * pi * a * a, e, nu, 200 * a, 0)
                                          .uz_m)
                          .epsilon(1e-4));
  // Point load: sigma_zz = sigma_rz = 0 on the surface away from the load, and the surface
  // form w = P (1 - nu^2) / (pi E r).
  const double g = an::shear_modulus(e, nu), lambda = 2 * g * nu / (1 - 2 * nu), load = 5e5;
  auto u = [&](double r, double z) { return an::boussinesq_point_load(load, e, nu, r, z); };
  for (double r : {0.5, 3.0, 12.0}) {
    const double h = 1e-5 * r;
    const double err = (u(r + h, 0).ur_m - u(r - h, 0).ur_m) / (2 * h);
    const double ett = u(r, 0).ur_m / r;
    const double ezz = (u(r, h).uz_m - u(r, -h).uz_m) / (2 * h);
    const double erz = 0.5 * ((u(r, h).ur_m - u(r, -h).ur_m) + (u(r + h, 0).uz_m - u(r - h, 0).uz_m)) /
                       (2 * h);
    const double szz = lambda * (err + ett + ezz) + 2 * g * ezz;
    const double stress_scale = load / (r * r);
    CHECK(std::abs(szz) < 1e-6 * stress_scale);
    CHECK(std::abs(2 * g * erz) < 1e-6 * stress_scale);
    CHECK(u(r, 0).uz_m == doctest::Approx(-load * (1 - nu * nu) / (pi * e * r)).epsilon(1e-12).scale(0));
    CHECK(u(r, 0).ur_m == doctest::Approx(-load * (1 - 2 * nu) / (4 * pi * g * r)).epsilon(1e-12).scale(0));
  }
}

// =============================================================================================
// Lithostatic column
// =============================================================================================

TEST_CASE("Lithostatic column") {
  CHECK(an::standard_gravity == 9.80665);  // CGPM (1901)
  const std::vector<an::ColumnLayer> col{{.thickness_m = 3, .density_kg_m3 = 1800, .k0 = 0.5},
                                         {.thickness_m = 5, .density_kg_m3 = 2000, .k0 = 0.6},
                                         {.thickness_m = 0, .density_kg_m3 = 2400, .k0 = 0.8}};
  const double g = an::standard_gravity;
  CHECK(an::lithostatic_stress(col, 0.0).szz_pa == 0.0);
  CHECK(an::lithostatic_stress(col, 2.0).szz_pa == 0.0);  // above the surface
  CHECK(an::lithostatic_stress(col, -2.0).szz_pa == doctest::Approx(-1800 * g * 2).scale(0));
  CHECK(an::lithostatic_stress(col, -2.0).sxx_pa == doctest::Approx(-0.5 * 1800 * g * 2).scale(0));
  const double at10 = -(1800 * 3 + 2000 * 5 + 2400 * 2) * g;
  CHECK(an::lithostatic_stress(col, -10.0).szz_pa == doctest::Approx(at10).scale(0));
  CHECK(an::lithostatic_stress(col, -10.0).sxx_pa == doctest::Approx(0.8 * at10).scale(0));
  CHECK(an::lithostatic_stress(col, -10.0, 9.81).szz_pa == doctest::Approx(at10 / g * 9.81).scale(0));
  // sigma_zz continuous across the interfaces; sigma_xx takes the K0 of the layer above there.
  for (double zi : {-3.0, -8.0}) {
    const double above = an::lithostatic_stress(col, zi * (1 - 1e-12)).szz_pa;
    const double below = an::lithostatic_stress(col, zi * (1 + 1e-12)).szz_pa;
    const double at = an::lithostatic_stress(col, zi).szz_pa;
    CHECK(above == doctest::Approx(at).epsilon(1e-10).scale(0));
    CHECK(below == doctest::Approx(at).epsilon(1e-10).scale(0));
  }
  CHECK(an::lithostatic_stress(col, -3.0).sxx_pa ==
        doctest::Approx(0.5 * an::lithostatic_stress(col, -3.0).szz_pa).scale(0));
  CHECK(an::lithostatic_stress(col, -3.0 - 1e-9).sxx_pa ==
        doctest::Approx(0.6 * an::lithostatic_stress(col, -3.0).szz_pa).scale(0));
  // A single layer is a straight line; the empty column is rejected.
  const std::vector<an::ColumnLayer> one{{.thickness_m = 1, .density_kg_m3 = 2000, .k0 = 1.0}};
  CHECK(an::lithostatic_stress(one, -50.0).szz_pa == doctest::Approx(-2000 * g * 50).scale(0));
  CHECK_THROWS_AS(an::lithostatic_stress({}, -1.0), std::invalid_argument);
  CHECK(an::k0_laterally_constrained(0.25) == doctest::Approx(1.0 / 3.0).scale(0));
  CHECK(an::shear_modulus(78e9, 0.25) == doctest::Approx(31.2e9).scale(0));
}

// =============================================================================================
// Inglis (1913)
// =============================================================================================

TEST_CASE("Inglis: check values and consistency of the boundary formula") {
  // Inglis (1913). Status: sigma (1 + 2a/b) verified in secondary reference texts only.
  CHECK(an::inglis_max_stress(1.0, 1, 1) == doctest::Approx(3).scale(0));
  CHECK(an::inglis_max_stress(1.0, 2, 1) == doctest::Approx(5).scale(0));
  CHECK(an::inglis_max_stress(1.0, 3, 1) == doctest::Approx(7).scale(0));
  CHECK(an::inglis_max_stress(1.0, 10, 1) == doctest::Approx(21).scale(0));
  // Biaxial by superposition, a/b = 2, K = 0.5: 4.5 sigma at the a-axis end, 0 at the b-axis end.
  const an::InglisBiaxial bi = an::inglis_biaxial(2e6, 0.5, 4.0, 2.0);
  CHECK(bi.at_a_end_pa == doctest::Approx(4.5 * 2e6).scale(0));
  CHECK(std::abs(bi.at_b_end_pa) < 1e-9);
  // Boundary hoop-stress formula (from memory; consistency checks only).
  for (auto [a, b] : {std::pair{2.0, 1.0}, std::pair{1.0, 3.0}, std::pair{5.0, 0.5}}) {
    const double s = 1e6;
    CHECK(an::inglis_boundary_hoop_stress(s, pi / 2, a, b, 0) ==
          doctest::Approx(an::inglis_max_stress(s, a, b)).scale(0));
    CHECK(an::inglis_boundary_hoop_stress(s, pi / 2, a, b, pi / 2) == doctest::Approx(-s).scale(0));
    for (double kk : {0.0, 0.5, 1.3}) {
      const an::InglisBiaxial ref = an::inglis_biaxial(s, kk, a, b);
      auto both = [&](double t) {
        return an::inglis_boundary_hoop_stress(s, pi / 2, a, b, t) +
               an::inglis_boundary_hoop_stress(kk * s, 0, a, b, t);
      };
      CHECK(both(0) == doctest::Approx(ref.at_a_end_pa).scale(s));
      CHECK(both(pi / 2) == doctest::Approx(ref.at_b_end_pa).scale(s));
    }
  }
  // a = b: the Kirsch wall stress for a uniaxial tension along x (beta = 0).
  const an::KirschCase c{.radius_m = 1, .sxx_far_pa = 1e6, .szz_far_pa = 0,
                         .shear_modulus_pa = 1e9, .poisson = 0.25};
  for (double t = 0; t < 2 * pi; t += 0.3) {
    CHECK(an::inglis_boundary_hoop_stress(1e6, 0, 1, 1, t) ==
          doctest::Approx(an::kirsch_at(c, 1, t).stt_pa).scale(1e6));
  }
}

// =============================================================================================
// Gaussian trough: Peck (1969), O'Reilly & New (1982)
// =============================================================================================

TEST_CASE("Gaussian trough: derived trough quantities check case") {
  // Peck (1969) Gaussian trough, i = K z0 after O'Reilly & New (1982): common practice rules
  // (read in secondary sources); derived quantities [D]. D = 6 m, z0 = 20 m, K = 0.5, V_L = 1 %.
  const an::GaussianTrough t = an::gaussian_trough(0.01, 6.0, 0.5, 20.0);
  CHECK(t.width_i_m == doctest::Approx(10.0).scale(0));
  CHECK_SHOWN(an::trough_volume_per_metre(0.01, 6.0), "0.2827");
  CHECK_SHOWN(t.smax_m * 1e3, "11.28");  // mm
  const an::TroughExtremes x = an::gaussian_trough_extremes(t);
  CHECK_SHOWN(x.max_slope, "6.84e-4");
  CHECK(std::abs(1 / x.max_slope - 1460) < 5);  // "about 1/1460" (3 figures)
  CHECK_SHOWN(x.max_compression, "-5.64e-4");
  CHECK_SHOWN(x.max_tension, "2.52e-4");
  CHECK_SHOWN(x.max_tension_at_m, "17.3");
  CHECK_SHOWN(x.max_tension_at_m, "17.32");
  CHECK_SHOWN(x.axis_curvature_per_m, "1.13e-4");
  // Shape factors: s(i) = 0.607 s_max, s(2.5 i) = 0.044 s_max, tensile peak 0.446 s_max / z0.
  CHECK_SHOWN(an::gaussian_trough_at(t, 10).settlement_m / t.smax_m, "0.607");
  CHECK_SHOWN(an::gaussian_trough_at(t, 25).settlement_m / t.smax_m, "0.044");
  CHECK_SHOWN(x.max_tension / (t.smax_m / t.axis_depth_m), "0.446");
  // Horizontal displacement h(y) = (y / z0) s(y), toward the axis.
  const an::TroughPoint p = an::gaussian_trough_at(t, 7.0);
  CHECK(p.ux_m == doctest::Approx(-7.0 / 20.0 * p.settlement_m).scale(0));
  CHECK(p.uz_m == -p.settlement_m);
  CHECK(an::gaussian_trough_at(t, -7.0).ux_m == doctest::Approx(-p.ux_m).scale(0));
}

TEST_CASE("Gaussian trough: derivatives, extremes and area (mathematical)") {
  const an::GaussianTrough t = an::gaussian_trough(0.015, 7.2, 0.45, 25.0);
  auto at = [&](double x) { return an::gaussian_trough_at(t, x); };
  for (double x : {-30.0, -5.0, 0.0, 4.0, 11.25, 40.0}) {
    const double h = 1e-4;
    CHECK_CLOSE(at(x).tilt_rad, ddx([&](double q) { return at(q).uz_m; }, x, h), 1e-7, 1e-3);
    CHECK_CLOSE(at(x).strain_xx, ddx([&](double q) { return at(q).ux_m; }, x, h), 1e-7, 1e-3);
    CHECK_CLOSE(at(x).curvature_per_m, ddx([&](double q) { return at(q).tilt_rad; }, x, h),
                1e-7, 1e-4);
  }
  const an::TroughExtremes e = an::gaussian_trough_extremes(t);
  const double xs = argmax([&](double x) { return at(x).tilt_rad; }, 0, 100);
  CHECK(xs == doctest::Approx(e.max_slope_at_m).epsilon(1e-6).scale(0));
  CHECK(at(xs).tilt_rad == doctest::Approx(e.max_slope).epsilon(1e-10).scale(0));
  const double xt = argmax([&](double x) { return at(x).strain_xx; }, 0, 100);
  CHECK(xt == doctest::Approx(e.max_tension_at_m).epsilon(1e-6).scale(0));
  CHECK(at(xt).strain_xx == doctest::Approx(e.max_tension).epsilon(1e-10).scale(0));
  CHECK(at(0).strain_xx == doctest::Approx(e.max_compression).scale(0));
  CHECK(at(0).curvature_per_m == doctest::Approx(e.axis_curvature_per_m).scale(0));
  // The trough holds the settlement volume V_s.
  const double area = simpson([&](double x) { return at(x).settlement_m; }, -200, 200, 20000);
  CHECK(area == doctest::Approx(an::trough_volume_per_metre(0.015, 7.2)).epsilon(1e-10).scale(0));
}
