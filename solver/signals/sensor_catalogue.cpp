// SPDX-License-Identifier: GPL-3.0-or-later
#include "solver/signals/sensor_catalogue.hpp"

#include <cmath>
#include <stdexcept>
#include <utility>

namespace voidsign::solver {

namespace {

using S = SourceStatus;

constexpr double day_s = 86400;
constexpr double mm = 1e-3;

Sourced val(double v, SourceStatus s, std::string src) { return {v, s, std::move(src)}; }

// ---- C-band radar inputs shared by the radar entries -------------------------------------
// Centre frequency 5.405 GHz: space-agency user documentation (verified).
constexpr double c_band_hz = 5.405e9;
// Centre slant range 878.8 km of an example wide-swath product (a data centre's product
// parameter file, verified); single-look azimuth resolution 20 m in wide-swath mode (agency
// user documentation, verified); platform speed 7.5 km/s (the worked example of a secondary
// source on synthetic-aperture time).
constexpr double c_band_slant_range_m = 878.8e3;
constexpr double c_band_azimuth_resolution_m = 20;
constexpr double platform_speed_m_s = 7.5e3;

Sourced c_band_wavelength() {
  return val(speed_of_light_m_s / c_band_hz, S::derived,
             "λ = c/f with f = 5.405 GHz (C-band mission, space-agency user documentation, verified)");
}

Sourced c_band_window() {
  const double t = synthetic_aperture_time(speed_of_light_m_s / c_band_hz, c_band_slant_range_m,
                                           c_band_azimuth_resolution_m, platform_speed_m_s);
  return val(t, S::derived,
             "dwell time T = λR/(2ρv): λ = c/5.405 GHz, R = 878.8 km centre slant range (example "
             "product parameter file, verified), ρ = 20 m wide-swath azimuth resolution (agency "
             "documentation, verified), v = 7.5 km/s (secondary source)");
}

Sourced c_band_repeat() {
  return val(12 * day_s, S::verified, "12-day repeat cycle of one C-band satellite (agency user documentation)");
}

Sourced c_band_incidence() {
  return val(40, S::secondary, "typical processing default for the C-band wide-swath mode, ascending "
                               "(secondary source; sub-swath centres 32.9°, 38.3° and 43.1°)");
}

Sourced c_band_heading() {
  return val(-12, S::secondary, "typical ascending heading used with open-source radar time-series code "
                                "(secondary source); an example scene has −13.02° (verified)");
}

SensorSpec radar_typical() {
  SensorSpec s;
  s.name = "radar-typical";
  s.description = "radar interferometry, one C-band interferogram (single pair)";
  s.kind = SensorKind::radar_los;
  s.quantity = MeasuredQuantity::los_displacement;
  s.sigma = val(10 * mm, S::from_memory,
                "R. F. Hanssen (2001), Radar Interferometry: Data Interpretation and Error Analysis: "
                "σ ≈ 5–10 mm for one interferogram over a few km (from memory); upper end taken, in "
                "line with the centimetre-scale change one C-band interferogram detects (data-centre "
                "user guide, verified)");
  s.footprint_m = val(40, S::verified, "40 m pixel spacing of on-demand interferometric products of a "
                                       "space-agency data centre (80 m also offered)");
  s.window_s = c_band_window();
  s.repeat_s = c_band_repeat();
  s.incidence_deg = c_band_incidence();
  s.heading_deg = c_band_heading();
  s.wavelength_m = c_band_wavelength();
  return s;
}

SensorSpec radar_stack() {
  SensorSpec s = radar_typical();
  s.name = "radar-stack";
  s.description = "radar interferometry, persistent-scatterer or small-baseline stack of 30+ C-band "
                  "images (best case)";
  s.sigma = val(2 * mm, S::from_memory,
                "M. Crosetto et al. (2016), Persistent scatterer interferometry: a review, ISPRS J. "
                "Photogramm. Remote Sens. 115, 78–89: single-epoch σ ≈ 2–5 mm (from memory); best "
                "case taken; 'millimetric' detection: A. Ferretti, C. Prati & F. Rocca (2001), IEEE "
                "TGRS 39(1), 8–20 (verified, abstract)");
  s.footprint_m = val(20, S::verified, "measurement points on a 20 m grid of a continental-scale "
                                       "ground-motion service (agency product metadata)");
  return s;
}

SensorSpec levelling() {
  SensorSpec s;
  s.name = "levelling";
  s.description = "precise levelling, first order class I, double run";
  s.kind = SensorKind::levelling;
  s.quantity = MeasuredQuantity::vertical_displacement;
  s.sigma_per_sqrt_km = val(0.5 * mm, S::verified,
                            "b = 0.5 mm/√km for first order class I levelling (a national geodetic "
                            "agency's published levelling standards)");
  // No benchmark spacing: no source gives one. The scenario states it.
  return s;
}

SensorSpec gnss_vertical() {
  SensorSpec s;
  s.name = "gnss";
  s.description = "GNSS static campaign, 24 h sessions, relative positioning, vertical";
  s.kind = SensorKind::gnss;
  s.quantity = MeasuredQuantity::vertical_displacement;
  s.sigma = val(6.2 * mm, S::verified,
                "formal σ_U = 6.2 mm of 24 h static relative positioning on a 46-point network: "
                "R. Ebner & W. E. Featherstone (2008), J. Appl. Geodesy 2, 149–157");
  s.window_s = val(day_s, S::verified, "24 h sessions (Ebner & Featherstone 2008)");
  return s;
}

SensorSpec gnss_horizontal() {
  SensorSpec s = gnss_vertical();
  s.name = "gnss-horizontal";
  s.description = "GNSS static campaign, 24 h sessions, relative positioning, horizontal";
  s.quantity = MeasuredQuantity::horizontal_displacement;
  s.sigma = val(1.2 * mm, S::verified,
                "formal σ_N = 1.2 mm (σ_E = 1.0 mm; the larger taken) of 24 h static relative "
                "positioning: R. Ebner & W. E. Featherstone (2008), J. Appl. Geodesy 2, 149–157");
  return s;
}

SensorSpec tiltmeter() {
  SensorSpec s;
  s.name = "tiltmeter";
  s.description = "borehole tiltmeter (observatory grade)";
  s.kind = SensorKind::tiltmeter;
  s.quantity = MeasuredQuantity::tilt;
  s.sigma = val(5e-9, S::secondary,
                "borehole tiltmeters of a geodetic observatory network resolve about 5 nrad "
                "(secondary source); M. L. Kohl & J. Levine (1993), J. Res. NIST 98(2), 191–202: a "
                "sensitivity of a few nrad (verified)");
  return s;
}

SensorSpec tiltmeter_geotechnical() {
  SensorSpec s = tiltmeter();
  s.name = "tiltmeter-geotechnical";
  s.description = "geotechnical (electrolytic or MEMS) tiltmeter";
  s.sigma = val(1e-6, S::from_memory,
                "resolution 0.1–1 µrad, long-term stability about 1–10 µrad (from memory); the "
                "coarser resolution taken");
  return s;
}

SensorSpec strainmeter() {
  SensorSpec s;
  s.name = "strainmeter";
  s.description = "borehole strainmeter, grouted 150–250 m deep";
  s.kind = SensorKind::strainmeter;
  s.quantity = MeasuredQuantity::horizontal_strain;
  s.sigma = val(1e-9, S::secondary,
                "borehole strainmeters resolve 1e-9 to 1e-10 strain over periods from seconds to "
                "weeks (secondary source); the coarser end taken; practical noise about 1 "
                "nanostrain over hours to days (from memory) agrees");
  s.band_lo_hz = val(1 / (7 * day_s), S::secondary, "'periods from seconds to weeks' (secondary source): the longest period read as one week");
  s.band_hi_hz = val(1, S::secondary, "'periods from seconds to weeks' (secondary source): the shortest period read as 1 s");
  return s;
}

/// A seismometer whose self-noise is known only as "at or near the NLNM" over a band: the
/// NLNM itself stands in for the self-noise there, as velocity.
SensorSpec seismometer_near_nlnm(std::string name, std::string description, double f_lo, double f_hi,
                                 const std::string& statement) {
  SensorSpec s;
  s.name = std::move(name);
  s.description = std::move(description);
  s.kind = SensorKind::seismometer;
  s.quantity = MeasuredQuantity::vertical_velocity;
  s.self_noise = SourcedPsd{
      peterson_breakpoints_psd(NoiseModel::low, f_lo, f_hi, PsdQuantity::velocity), S::from_memory,
      statement + " (from memory); encoded as the NLNM of J. Peterson (1993), USGS OFR 93-322, "
                  "as velocity: not a measured self-noise model (for those see A. T. Ringler & "
                  "C. R. Hutt (2010), Seismol. Res. Lett. 81(6), 972–983)"};
  s.band_lo_hz = val(f_lo, S::from_memory, statement + " (from memory)");
  s.band_hi_hz = val(f_hi, S::from_memory, statement + " (from memory)");
  return s;
}

SensorSpec geophone() {
  // Typical 10 Hz exploration geophone (manufacturer datasheet, secondary source): coil
  // 375 Ω, 28.8 V/(m/s) open circuit, natural frequency 10 Hz, spurious resonance ≥ 240 Hz.
  constexpr double coil_ohm = 375, sensitivity = 28.8, room_k = 293;
  constexpr double real_system_db = 10;  // from memory: real systems are 10–20 dB worse
  const double floor = coil_thermal_velocity_psd(coil_ohm, room_k, sensitivity) * std::pow(10.0, real_system_db / 10);
  SensorSpec s;
  s.name = "geophone";
  s.description = "10 Hz exploration geophone, above its natural frequency";
  s.kind = SensorKind::geophone;
  s.quantity = MeasuredQuantity::vertical_velocity;
  s.self_noise = SourcedPsd{
      Psd{{10, 240}, {floor, floor}, PsdQuantity::velocity}, S::from_memory,
      "coil thermal noise 4kTR/S² with R = 375 Ω, S = 28.8 V/(m/s) (datasheet, secondary source) at "
      "293 K (derived: 8.6e-11 m/s/√Hz), raised by 10 dB because amplifier and digitiser make real "
      "systems 10–20 dB worse (from memory)"};
  s.band_lo_hz = val(10, S::secondary, "natural frequency 10 Hz (datasheet, secondary source); velocity "
                                       "response is flat only above it");
  s.band_hi_hz = val(240, S::secondary, "spurious resonance at 240 Hz or above (datasheet, secondary source)");
  return s;
}

}  // namespace

std::string_view status_name(SourceStatus s) {
  switch (s) {
    case SourceStatus::verified: return "verified";
    case SourceStatus::secondary: return "secondary";
    case SourceStatus::derived: return "derived";
    case SourceStatus::common_practice: return "common practice";
    case SourceStatus::from_memory: return "from memory";
  }
  return "";
}

std::string_view kind_name(SensorKind k) {
  switch (k) {
    case SensorKind::radar_los: return "radar-los";
    case SensorKind::levelling: return "levelling";
    case SensorKind::gnss: return "gnss";
    case SensorKind::tiltmeter: return "tiltmeter";
    case SensorKind::strainmeter: return "strainmeter";
    case SensorKind::seismometer: return "seismometer";
    case SensorKind::geophone: return "geophone";
  }
  return "";
}

double coil_thermal_velocity_psd(double resistance_ohm, double temperature_k, double sensitivity) {
  if (!(resistance_ohm > 0 && temperature_k > 0 && sensitivity > 0))
    throw std::invalid_argument("coil_thermal_velocity_psd: every input must be positive");
  return 4 * boltzmann_j_per_k * temperature_k * resistance_ohm / (sensitivity * sensitivity);
}

std::vector<SensorSpec> sensor_catalogue() {
  return {
      radar_typical(),
      radar_stack(),
      levelling(),
      gnss_vertical(),
      gnss_horizontal(),
      tiltmeter(),
      tiltmeter_geotechnical(),
      strainmeter(),
      seismometer_near_nlnm("seismometer-broadband", "very-broadband or observatory seismometer (120–360 s class)",
                            0.01, 10, "self-noise at or below the NLNM over about 0.01–10 Hz"),
      seismometer_near_nlnm("seismometer-compact", "compact broadband seismometer (120 s class)", 0.05, 10,
                            "self-noise near the NLNM over about 0.05–10 Hz"),
      seismometer_near_nlnm("seismometer-short-period", "short-period 1 Hz seismometer", 1, 10,
                            "self-noise near the NLNM over 1–10 Hz, rising steeply below the 1 Hz natural "
                            "frequency"),
      geophone(),
  };
}

std::optional<SensorSpec> find_sensor(std::string_view name) {
  for (auto& s : sensor_catalogue())
    if (s.name == name) return s;
  return std::nullopt;
}

std::vector<std::string> sensor_names() {
  std::vector<std::string> out;
  for (const auto& s : sensor_catalogue()) out.push_back(s.name);
  return out;
}

bool is_dynamic(const SensorSpec& s) { return s.self_noise.has_value(); }

double static_sigma(const SensorSpec& s, double distance_m) {
  if (!(distance_m >= 0)) throw std::invalid_argument("static_sigma: distance must be ≥ 0");
  if (s.sigma_per_sqrt_km) return s.sigma_per_sqrt_km->value * std::sqrt(distance_m / 1000);
  if (s.sigma) return s.sigma->value;
  throw std::invalid_argument("sensor '" + s.name + "' has no static precision (it is characterised by a self-noise spectrum)");
}

RadarGeometry radar_geometry(const SensorSpec& s) {
  if (s.kind != SensorKind::radar_los || !s.incidence_deg || !s.heading_deg)
    throw std::invalid_argument("sensor '" + s.name + "' is not a radar with a default geometry");
  return {s.incidence_deg->value, s.heading_deg->value, s.look};
}

}  // namespace voidsign::solver
