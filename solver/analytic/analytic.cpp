// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/analytic/analytic.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>

namespace voidsign::solver::analytic {

namespace {
constexpr double pi = std::numbers::pi;
constexpr double sq(double v) { return v * v; }
}  // namespace

double shear_modulus(double young_pa, double poisson) { return young_pa / (2.0 * (1.0 + poisson)); }

double k0_laterally_constrained(double poisson) { return poisson / (1.0 - poisson); }

// ---------------------------------------------------------------------------------------------
// Kirsch (1898) / Brady & Brown (2004), eq. 6.18. The book works compression positive with
// p1 along theta = 0 and p2 along theta = 90 deg; here p1 = -sxx, p2 = -szz, and the stresses
// are negated back to tension positive. Displacements are physical vectors, so they keep the
// book's sign (u_r outward, u_theta toward increasing theta).
// ---------------------------------------------------------------------------------------------

KirschPoint kirsch_at(const KirschCase& c, double r_m, double theta_rad) {
  const double a = c.radius_m, g = c.shear_modulus_pa, nu = c.poisson;
  const double p1 = -c.sxx_far_pa, p2 = -c.szz_far_pa;  // compression positive (book)
  const double pi_wall = c.wall_pressure_pa;
  const double s = (p1 + p2) / 2.0, d = (p1 - p2) / 2.0;
  const double q2 = sq(a / r_m), q4 = q2 * q2;  // a^2/r^2, a^4/r^4
  const double c2 = std::cos(2.0 * theta_rad), s2 = std::sin(2.0 * theta_rad);

  // Book stresses (compression positive), plus Lame's internal-pressure term p_i a^2/r^2.
  const double srr = s * (1.0 - q2) + d * (1.0 - 4.0 * q2 + 3.0 * q4) * c2 + pi_wall * q2;
  const double stt = s * (1.0 + q2) - d * (1.0 + 3.0 * q4) * c2 - pi_wall * q2;
  const double srt = -d * (1.0 + 2.0 * q2 - 3.0 * q4) * s2;

  // Excavation-induced displacements; the wall pressure pushes outward by p_i a^2 / (2 G r).
  const double f = a * a / (4.0 * g * r_m);
  const double ur = -f * ((p1 + p2) + (p1 - p2) * (4.0 * (1.0 - nu) - q2) * c2) +
                    pi_wall * a * a / (2.0 * g * r_m);
  const double ut = f * (p1 - p2) * (2.0 * (1.0 - 2.0 * nu) + q2) * s2;

  KirschPoint out;
  out.srr_pa = -srr;
  out.stt_pa = -stt;
  out.srt_pa = -srt;
  const double ct = std::cos(theta_rad), st = std::sin(theta_rad);
  out.sxx_pa = out.srr_pa * ct * ct + out.stt_pa * st * st - 2.0 * out.srt_pa * st * ct;
  out.szz_pa = out.srr_pa * st * st + out.stt_pa * ct * ct + 2.0 * out.srt_pa * st * ct;
  out.sxz_pa = (out.srr_pa - out.stt_pa) * st * ct + out.srt_pa * (ct * ct - st * st);
  out.ur_m = ur;
  out.ut_m = ut;
  out.ux_m = ur * ct - ut * st;
  out.uz_m = ur * st + ut * ct;
  return out;
}

KirschPoint kirsch_at_offset(const KirschCase& c, double dx_m, double dz_m) {
  return kirsch_at(c, std::hypot(dx_m, dz_m), std::atan2(dz_m, dx_m));
}

// ---------------------------------------------------------------------------------------------
// Mogi (1958); McTigue (1987) eqs. (52)-(53). Verified against independent implementations.
// u_z = C d F / R^3, u_r = C r F / R^3, C = (1 - nu) dP a^3 / G, F = McTigue factor (or 1).
// ---------------------------------------------------------------------------------------------

namespace {
// McTigue factor written as F = F0 + F2 d^2 / R^2.
struct McTigueTerms {
  double f0 = 1.0, f2 = 0.0;
};
McTigueTerms mctigue_terms(const SphereSource& s) {
  if (!s.mctigue_correction) return {};
  const double nu = s.poisson;
  const double e3 = std::pow(s.radius_m / s.depth_m, 3);
  const double a_term = (1.0 + nu) / (2.0 * (7.0 - 5.0 * nu));
  const double b_term = 15.0 * (2.0 - nu) / (4.0 * (7.0 - 5.0 * nu));
  return {1.0 - e3 * a_term, e3 * b_term};
}
}  // namespace

double mctigue_factor(const SphereSource& s, double r_m) {
  SphereSource on = s;
  on.mctigue_correction = true;
  const McTigueTerms t = mctigue_terms(on);
  return t.f0 + t.f2 * sq(s.depth_m) / (sq(r_m) + sq(s.depth_m));
}

AxisymmetricSurfacePoint mogi_surface(const SphereSource& s, double r_m) {
  const double d = s.depth_m, r = r_m;
  const double c = (1.0 - s.poisson) * s.pressure_change_pa * std::pow(s.radius_m, 3) /
                   s.shear_modulus_pa;
  const double rr2 = r * r + d * d, rr = std::sqrt(rr2);
  const double rr3 = rr2 * rr, rr5 = rr3 * rr2;
  const McTigueTerms t = mctigue_terms(s);
  const double f = t.f0 + t.f2 * d * d / rr2;
  const double df_dr = -2.0 * t.f2 * d * d * r / (rr2 * rr2);

  AxisymmetricSurfacePoint p;
  p.uz_m = c * d * f / rr3;
  p.ur_m = c * r * f / rr3;
  p.tilt_rad = c * d * (-3.0 * r / rr5 * f + df_dr / rr3);
  p.err = c * ((d * d - 2.0 * r * r) / rr5 * f + r * df_dr / rr3);
  p.ett = c * f / rr3;
  return p;
}

double mogi_cavity_volume_change_m3(const SphereSource& s) {
  return pi * std::pow(s.radius_m, 3) * s.pressure_change_pa / s.shear_modulus_pa;
}

// ---------------------------------------------------------------------------------------------
// Verruijt & Booker (1996), form from memory, checked mathematically. The publication's frame
// has z as depth and u_z positive downward; here z_project = -z and u_z,project = -u_z.
// The factor m = 1/(1 - 2 nu) is carried as its inverse so that nu = 1/2 is allowed.
// ---------------------------------------------------------------------------------------------

PlaneSurfacePoint verruijt_booker_surface(const TunnelCase& t, double x_m) {
  const double x = x_m, h = t.depth_m, r2 = t.radius_m * t.radius_m, nu = t.poisson;
  const double q = x * x + h * h, q2 = q * q, q3 = q2 * q;
  const double ge = 4.0 * t.epsilon * r2 * (1.0 - nu);  // ground-loss amplitude
  const double gd = 2.0 * t.delta * r2;                 // ovalisation amplitude

  // Publication signs: settlement positive downward.
  const double w = ge * h / q - gd * h * (x * x - h * h) / q2;
  const double dw_dx = -2.0 * ge * h * x / q2 - 2.0 * gd * h * x * (3.0 * h * h - x * x) / q3;
  const double ux = -ge * x / q + gd * x * (x * x - h * h) / q2;
  const double dux_dx = -ge * (h * h - x * x) / q2 +
                        gd * (-x * x * x * x + 6.0 * x * x * h * h - h * h * h * h) / q3;

  PlaneSurfacePoint p;
  p.ux_m = ux;
  p.uz_m = -w;
  p.tilt_rad = -dw_dx;
  p.strain_xx = dux_dx;
  return p;
}

Displacement2 verruijt_booker_field(const TunnelCase& t, double x_m, double z_m) {
  const double x = x_m, z = -z_m, h = t.depth_m;  // z: depth, positive down
  const double r2 = t.radius_m * t.radius_m, nu = t.poisson;
  const double eps = t.epsilon, del = t.delta;
  const double inv_m = 1.0 - 2.0 * nu;  // 1/m
  const double k = nu / (1.0 - nu);
  const double z1 = z - h, z2 = z + h;
  const double a1 = x * x + z1 * z1, a2 = x * x + z2 * z2;  // r1^2, r2^2
  const double a1s = a1 * a1, a2s = a2 * a2, a2c = a2s * a2;

  const double ux =
      -eps * r2 * (x / a1 + x / a2) +
      del * r2 * (x * (x * x - k * z1 * z1) / a1s + x * (x * x - k * z2 * z2) / a2s) -
      2.0 * eps * r2 * x * (inv_m / a2 - 2.0 * z * z2 / a2s) -
      4.0 * del * r2 * x * h *
          ((inv_m / (1.0 + inv_m)) * z2 / a2s +
           (1.0 / (1.0 + inv_m)) * z * (x * x - 3.0 * z2 * z2) / a2c);
  const double uz =
      -eps * r2 * (z1 / a1 + z2 / a2) +
      del * r2 * (z1 * (k * x * x - z1 * z1) / a1s + z2 * (k * x * x - z2 * z2) / a2s) +
      2.0 * eps * r2 * ((1.0 + inv_m) * z2 / a2 - z * (x * x - z2 * z2) / a2s) -
      2.0 * del * r2 * h *
          ((x * x - z2 * z2) / a2s +
           (1.0 / (1.0 + inv_m)) * 2.0 * z * z2 * (3.0 * x * x - z2 * z2) / a2c);
  return {ux, -uz};
}

double verruijt_booker_epsilon(double volume_loss_ratio) { return volume_loss_ratio / 2.0; }

// ---------------------------------------------------------------------------------------------
// Boussinesq (1885). Publication frame: w positive in the load direction (down), z depth.
// std::comp_ellint_1/2 take the modulus k (not the parameter m = k^2), as the formulas do.
// ---------------------------------------------------------------------------------------------

AxisymmetricDisplacement boussinesq_point_load(double load_n, double young_pa, double poisson,
                                               double r_m, double z_m) {
  const double g = shear_modulus(young_pa, poisson);
  const double depth = -z_m, r = r_m;
  const double big_r = std::hypot(r, depth);
  const double f = load_n / (4.0 * pi * g * big_r);
  const double w = f * (2.0 * (1.0 - poisson) + depth * depth / (big_r * big_r));
  const double ur = f * (r * depth / (big_r * big_r) - (1.0 - 2.0 * poisson) * r / (big_r + depth));
  return {-w, ur};
}

double circular_load_surface_uz(double pressure_pa, double load_radius_m, double young_pa,
                                double poisson, double r_m) {
  const double a = load_radius_m, r = std::abs(r_m), q = pressure_pa;
  const double scale = 4.0 * q * (1.0 - poisson * poisson) / (pi * young_pa);
  double w = 0;
  if (r <= a) {
    w = scale * a * std::comp_ellint_2(r / a);
  } else {
    const double k = a / r;
    w = scale * r * (std::comp_ellint_2(k) - (1.0 - k * k) * std::comp_ellint_1(k));
  }
  return -w;
}

double circular_load_mean_uz(double pressure_pa, double load_radius_m, double young_pa,
                             double poisson) {
  return -16.0 * pressure_pa * load_radius_m * (1.0 - poisson * poisson) / (3.0 * pi * young_pa);
}

// ---------------------------------------------------------------------------------------------
// Lithostatic column.
// ---------------------------------------------------------------------------------------------

LithostaticStress lithostatic_stress(std::span<const ColumnLayer> layers, double z_m,
                                     double gravity_m_s2) {
  if (layers.empty()) throw std::invalid_argument("lithostatic_stress: empty layer column");
  const double depth = -z_m;
  if (depth <= 0) return {};
  double top = 0, weight = 0;  // depth of the current layer's top; overburden there [Pa]
  for (std::size_t i = 0; i < layers.size(); ++i) {
    const ColumnLayer& l = layers[i];
    const double base = top + l.thickness_m;
    if (depth <= base || i + 1 == layers.size()) {
      const double szz = -(weight + l.density_kg_m3 * gravity_m_s2 * (depth - top));
      return {szz, l.k0 * szz};
    }
    weight += l.density_kg_m3 * gravity_m_s2 * l.thickness_m;
    top = base;
  }
  return {};  // not reached
}

// ---------------------------------------------------------------------------------------------
// Inglis (1913).
// ---------------------------------------------------------------------------------------------

double inglis_max_stress(double remote_pa, double semi_axis_a_m, double semi_axis_b_m) {
  return remote_pa * (1.0 + 2.0 * semi_axis_a_m / semi_axis_b_m);
}

InglisBiaxial inglis_biaxial(double remote_pa, double k_ratio, double semi_axis_a_m,
                             double semi_axis_b_m) {
  const double a = semi_axis_a_m, b = semi_axis_b_m, s = remote_pa, ks = k_ratio * remote_pa;
  return {s * (1.0 + 2.0 * a / b) - ks, ks * (1.0 + 2.0 * b / a) - s};
}

double inglis_boundary_hoop_stress(double remote_pa, double beta_rad, double semi_axis_a_m,
                                   double semi_axis_b_m, double t_rad) {
  const double m = (semi_axis_a_m - semi_axis_b_m) / (semi_axis_a_m + semi_axis_b_m);
  const double num = 1.0 - m * m + 2.0 * m * std::cos(2.0 * beta_rad) -
                     2.0 * std::cos(2.0 * (t_rad - beta_rad));
  const double den = 1.0 - 2.0 * m * std::cos(2.0 * t_rad) + m * m;
  return remote_pa * num / den;
}

// ---------------------------------------------------------------------------------------------
// Gaussian trough: Peck (1969), O'Reilly & New (1982); common practice rules.
// ---------------------------------------------------------------------------------------------

double trough_width(double k, double axis_depth_m) { return k * axis_depth_m; }

double trough_volume_per_metre(double volume_loss_ratio, double diameter_m) {
  return volume_loss_ratio * pi * diameter_m * diameter_m / 4.0;
}

double trough_max_settlement(double volume_per_metre_m3, double width_i_m) {
  return volume_per_metre_m3 / (std::sqrt(2.0 * pi) * width_i_m);
}

GaussianTrough gaussian_trough(double volume_loss_ratio, double diameter_m, double k,
                               double axis_depth_m) {
  const double i = trough_width(k, axis_depth_m);
  const double vs = trough_volume_per_metre(volume_loss_ratio, diameter_m);
  return {trough_max_settlement(vs, i), i, axis_depth_m};
}

TroughPoint gaussian_trough_at(const GaussianTrough& t, double x_m) {
  const double i2 = t.width_i_m * t.width_i_m, x2 = x_m * x_m;
  const double s = t.smax_m * std::exp(-x2 / (2.0 * i2));
  TroughPoint p;
  p.settlement_m = s;
  p.uz_m = -s;
  p.ux_m = -(x_m / t.axis_depth_m) * s;
  p.tilt_rad = s * x_m / i2;
  p.strain_xx = (s / t.axis_depth_m) * (x2 / i2 - 1.0);
  p.curvature_per_m = (s / i2) * (1.0 - x2 / i2);
  return p;
}

TroughExtremes gaussian_trough_extremes(const GaussianTrough& t) {
  const double i = t.width_i_m, s = t.smax_m, z0 = t.axis_depth_m;
  TroughExtremes e;
  e.max_slope = s * std::exp(-0.5) / i;
  e.max_slope_at_m = i;
  e.max_compression = -s / z0;
  e.max_tension = 2.0 * std::exp(-1.5) * s / z0;
  e.max_tension_at_m = std::sqrt(3.0) * i;
  e.axis_curvature_per_m = s / (i * i);
  return e;
}

}  // namespace voidsign::solver::analytic
