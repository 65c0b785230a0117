// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The built-in sensor catalogue: what each kind of instrument measures and how well, each
/// value with its source and status (verified, secondary source, derived, common practice or
/// from memory). docs/instruments.md shows the same table.
///
/// Static sensors (radar, levelling, GNSS, tiltmeter, strainmeter) carry a one-sigma precision
/// in the SI unit of their quantity (m, rad, strain); dynamic sensors (seismometers,
/// geophones) carry a one-sided self-noise PSD of the quantity they measure ((m/s)²/Hz for
/// velocity), in the convention of noise_model.hpp.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "solver/signals/instrument.hpp"
#include "solver/signals/noise_model.hpp"

namespace voidsign::solver {

/// How far a catalogue value can be trusted.
enum class SourceStatus {
  verified,         ///< read in the publication or agency documentation named
  secondary,        ///< read only in a secondary source (web page, vendor document, course notes)
  derived,          ///< computed from other tagged values by the formula stated
  common_practice,  ///< a rule of thumb of the trade
  from_memory       ///< unconfirmed best value
};

/// "verified", "secondary", "derived", "common practice" or "from memory".
std::string_view status_name(SourceStatus s);

/// A catalogue number with its provenance.
struct Sourced {
  double value = 0;                              ///< in the unit stated by the field
  SourceStatus status = SourceStatus::from_memory;
  std::string source;                            ///< publication and/or reasoning, one line
};

/// A self-noise spectrum with its provenance.
struct SourcedPsd {
  Psd psd;
  SourceStatus status = SourceStatus::from_memory;
  std::string source;
};

/// The instrument families; `kind_name` gives the scenario's spelling.
enum class SensorKind { radar_los, levelling, gnss, tiltmeter, strainmeter, seismometer, geophone };

/// "radar-los", "levelling", "gnss", "tiltmeter", "strainmeter", "seismometer" or "geophone".
std::string_view kind_name(SensorKind k);

/// One catalogue instrument. A field that does not apply to the instrument is empty.
struct SensorSpec {
  std::string name;         ///< catalogue id, lower-case kebab (e.g. "radar-typical")
  std::string description;  ///< one line
  SensorKind kind = SensorKind::radar_los;
  MeasuredQuantity quantity = MeasuredQuantity::los_displacement;
  std::optional<Sourced> sigma;              ///< static one-sigma precision, unit of `quantity`
  std::optional<Sourced> sigma_per_sqrt_km;  ///< levelling: b [m/√km], σ(d) = b·√(d / 1 km)
  std::optional<SourcedPsd> self_noise;      ///< dynamic: self-noise PSD of `quantity`
  std::optional<Sourced> footprint_m;        ///< pixel width one reading averages over, m
  std::optional<Sourced> spacing_m;          ///< benchmark or station spacing, m
  std::optional<Sourced> window_s;           ///< time one reading averages over, s
  std::optional<Sourced> repeat_s;           ///< interval between repeated readings, s
  std::optional<Sourced> band_lo_hz;         ///< dynamic: lower end of the band the noise figure covers, Hz
  std::optional<Sourced> band_hi_hz;         ///< dynamic: upper end, Hz
  std::optional<Sourced> incidence_deg;      ///< radar: default incidence angle, degrees from vertical
  std::optional<Sourced> heading_deg;        ///< radar: default flight heading, degrees clockwise from north
  std::optional<Sourced> wavelength_m;       ///< radar: carrier wavelength, m
  LookSide look = LookSide::right;           ///< radar: look side
};

/// Every catalogue instrument, in a fixed order (radar, geodetic, tilt and strain, seismic).
std::vector<SensorSpec> sensor_catalogue();

/// The entry named `name` (exact, case-sensitive), or nothing.
std::optional<SensorSpec> find_sensor(std::string_view name);

/// The catalogue's names in catalogue order, for suggestions and listings.
std::vector<std::string> sensor_names();

/// True when the instrument is characterised by a self-noise spectrum (seismic sensors).
bool is_dynamic(const SensorSpec& s);

/// The one-sigma precision of a static reading [unit of s.quantity]. For levelling it grows
/// with the distance along the line from the datum benchmark, σ = b·√(d / 1 km); otherwise
/// it is s.sigma and `distance_m` is ignored. Throws std::invalid_argument if the instrument
/// has neither figure (a dynamic sensor) or distance_m < 0.
double static_sigma(const SensorSpec& s, double distance_m = 0);

/// The default viewing geometry of a radar entry. Throws std::invalid_argument for others.
RadarGeometry radar_geometry(const SensorSpec& s);

/// Thermal (Johnson–Nyquist) noise of a moving-coil sensor referred to ground velocity:
/// the coil's voltage noise PSD 4kTR [V²/Hz] divided by the squared sensitivity S²
/// [(V/(m/s))²], in (m/s)²/Hz, flat in frequency above the natural frequency. R [Ω], T [K],
/// S [V/(m/s)], all > 0. An ideal lower bound: amplifiers and digitisers add to it.
double coil_thermal_velocity_psd(double resistance_ohm, double temperature_k, double sensitivity_v_per_m_s);

/// Boltzmann constant [J/K] (exact, SI definition).
constexpr double boltzmann_j_per_k = 1.380649e-23;

}  // namespace voidsign::solver
