// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The scenario (input contract, scenario-v1) as typed values. Parsed and validated by
/// `load_scenario`; after that every value is in SI units and z is up (void positions are
/// kept as the positive `depth` the user wrote, and converted where geometry is built).
#include <array>
#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "solver/signals/noise_model.hpp"
#include "solver/signals/sensor_catalogue.hpp"

namespace voidsign::cli {

/// Where a value came from in the YAML file, for messages after parsing (1-based).
struct SourceLoc {
  int line = 0, column = 0;
  std::string key;  ///< key path, e.g. "voids.1.radius"
};

enum class Model { plane_strain, axisymmetric, three_d };

/// Isotropic elastic material with strength and damping.
struct Material {
  std::string name;
  double density = 0;   ///< kg/m^3
  double young = 0;     ///< Pa
  double poisson = 0;   ///< -
  double damping = 0;   ///< small-strain damping ratio, -
  double ucs = 0;       ///< uniaxial compressive strength, Pa (0 = not given)
  double tensile = 0;   ///< tensile strength, Pa (0 = none)
  std::string source;   ///< provenance note ("scenario file", or the catalogue's citation)
};

struct Layer {
  std::string material;
  double thickness = 0;  ///< m; 0 for the last layer (runs to the bottom)
  SourceLoc loc;
};

enum class Contents { empty, water, pressure };

struct Void {
  enum class Shape { circle, ellipse, rectangle, polygon, sphere, box, tunnel };
  Shape shape = Shape::circle;
  double x = 0, depth = 0;      ///< centre, m (depth positive down)
  double y = 0;                 ///< 3d: centre y, m (sphere, box)
  std::array<double, 3> size{0, 0, 0};  ///< 3d box: edge lengths [lx, ly, lz], m
  double yaw = 0;               ///< 3d box: rotation about the vertical, degrees anticlockwise from +x
  std::array<double, 3> from{0, 0, 0};  ///< 3d tunnel: axis start [x, y, depth], m
  std::array<double, 3> to{0, 0, 0};    ///< 3d tunnel: axis end [x, y, depth], m
  double radius = 0;            ///< circle, m
  std::array<double, 2> axes{0, 0};  ///< ellipse semi-axes, m
  double angle = 0;             ///< ellipse / rectangle rotation, degrees anticlockwise from +x
  double width = 0, height = 0; ///< rectangle, m
  std::vector<std::array<double, 2>> points;  ///< polygon (x, depth) pairs, m
  Contents contents = Contents::empty;
  double pressure = 0;          ///< Pa, for Contents::pressure
  /// For Contents::water: depth of the void's own water table [m]; default = the crown.
  std::optional<double> water_table_depth;
  SourceLoc loc;
};

struct SurfaceLoad {
  double from = 0, to = 0;  ///< x range, m (axisymmetric: r range; 3d: the x: [a, b] pair)
  double y_from = 0, y_to = 0;  ///< 3d: the y: [c, d] pair, m
  double pressure = 0;      ///< Pa, positive pushing down
  SourceLoc loc;
};

struct GroundLoss {
  int void_index = 0;
  double percent = 0;       ///< volume loss, % of the void's area (2D) or volume (axisymmetric)
  SourceLoc loc;
};

struct Loads {
  bool gravity = false;
  std::optional<double> k0;  ///< empty = auto, nu/(1-nu) per layer
  std::vector<SurfaceLoad> surface;
  std::vector<GroundLoss> ground_loss;
};

enum class Boundary { roller, fixed };

struct Domain {
  double width = 0, depth = 0, length = 0;  ///< m
  Boundary sides = Boundary::roller, bottom = Boundary::fixed;
};

struct MeshControls {
  int order = 2;
  double size = 0;        ///< far-field element size, m (0 = choose from the domain)
  double near_void = 0;   ///< m (0 = choose from the voids)
  double surface = 0;     ///< m (0 = choose)
};

/// `analyses.modal`: the lowest natural modes of both models.
struct ModalAnalysis {
  int modes = 10;        ///< modes wanted per model
  double shift_hz = 0;   ///< `above-hz`: the modes found are the lowest above this frequency [Hz]
  SourceLoc loc;
};

/// An incident plane wave: keys `wave`, `incidence`, `azimuth` and `polarization`.
struct WaveSpec {
  bool p_wave = false;       ///< P instead of S
  int polarization = 0;      ///< S: 0 = SV (motion in the vertical plane of travel), 1 = SH (3d)
  double incidence_deg = 0;  ///< from the vertical in the rock; plane strain: signed, > 0 travelling toward +x
  double azimuth_deg = 0;    ///< 3d: the horizontal direction of travel, anticlockwise from +x
  /// "P", "SV" or "SH" ("S" at vertical incidence in plane strain).
  std::string name() const;
  /// E.g. "vertically incident plane S wave" or "plane SV wave at 20 deg from the vertical".
  std::string describe(bool three_d) const;
};

/// `analyses.harmonic`: steady-state response over a list of frequencies.
struct HarmonicAnalysis {
  std::vector<double> frequencies_hz;  ///< ascending, each > 0
  enum class Excitation { wave, source } excitation = Excitation::wave;
  WaveSpec wave;             ///< wave: what enters from below
  double amplitude = 1e-6;   ///< wave: twice the incident amplitude (vertical incidence: the bedrock outcrop motion) [m]
  double source_x = 0, source_y = 0, source_depth = 0;  ///< source position [m], depth positive down
  double force = 0;          ///< source amplitude [N/m plane strain, N in 3d]
  std::array<double, 3> direction{0, 0, -1};  ///< source direction (x, y, z), z up, unit length
  double absorbing = 0;      ///< thickness of the absorbing band [m] (0 = choose)
  double elements_per_wavelength = 0;  ///< at the highest frequency, slowest S wave, far-field size
  SourceLoc loc;
};

/// `analyses.transient`: wave propagation in time from a Ricker-wavelet point (2D: line) force or
/// a plane-wave pulse entering from below.
struct TransientAnalysis {
  double duration_s = 1;      ///< simulated time [s]
  double time_step_s = 0;     ///< [s]; 0 = 0.9 x the stable step computed from the mesh
  std::optional<WaveSpec> wave;  ///< `excitation`: a plane-wave pulse instead of the force
  double amplitude = 0;       ///< wave: twice the incident pulse's peak displacement [m]
  double source_x = 0, source_y = 0, source_depth = 0;  ///< m, depth positive down
  double peak_hz = 10;        ///< the Ricker wavelet's peak frequency [Hz]
  double force = 0;           ///< its peak amplitude [N/m plane strain, N/rad axisymmetric, N in 3d]
  /// Time of the wavelet's central peak [s] (wave: as it passes the top of the rock at x = y = 0);
  /// 0 = 1.5 / peak_hz (wave: chosen so that the pulse enters the model after t = 0).
  double delay_s = 0;
  std::array<double, 3> direction{0, 0, -1};  ///< unit vector (x, y, z), z up
  double snapshot_interval_s = 0;  ///< [s]; 0 = no snapshots
  double record_interval_s = 0;    ///< seismogram sample interval [s]; 0 = about 1/(20 peak_hz)
  double receiver_spacing = 0;     ///< m; 0 = every surface node
  bool mass_damping = false;       ///< `damping: mass-proportional` instead of Rayleigh
  double elements_per_wavelength = 0;  ///< at 2.5 x peak_hz, slowest S wave, far-field size
  SourceLoc loc, time_step_loc;  ///< of the block and of its time-step value
};

/// `analyses.ambient`: ambient ground motion through the harmonic transfer functions.
struct AmbientAnalysis {
  enum class Noise { high, low, table } noise = Noise::high;  ///< Peterson (1993) NHNM, NLNM, or a user table
  solver::Psd table;            ///< noise = table: the PSD as read (any quantity, SI)
  std::filesystem::path table_file;
  double band_lo_hz = 0.1, band_hi_hz = 10;  ///< the analysis band [Hz]
  bool body_waves = true;       ///< vertically incident P and S waves
  bool surface_waves = true;    ///< surface sources on both sides (3d: around the voids)
  int per_octave = 6;           ///< frequencies per octave over the band
  double absorbing = 0;         ///< absorbing band thickness [m] (0 = choose, as for harmonic)
  double elements_per_wavelength = 0;  ///< at band_hi_hz
  std::vector<double> frequencies_hz;  ///< log-spaced over the band, both ends included
  bool extrapolated = false;    ///< the band reaches above 10 Hz, where Peterson's tables end
  SourceLoc loc;
};

struct Analyses {
  bool static_ = false;
  std::optional<ModalAnalysis> modal;
  std::optional<HarmonicAnalysis> harmonic;
  std::optional<TransientAnalysis> transient;
  std::optional<AmbientAnalysis> ambient;
};

/// One entry of `sensors`: a catalogue instrument, possibly with overrides, or an explicit spec.
struct SensorUse {
  solver::SensorSpec spec;   ///< resolved: every value the verdict needs is set
  std::string label;         ///< as shown in tables: the catalogue name, or "kind #k" for explicit specs
  double profile_bearing_deg = 90;  ///< 2D: azimuth of the model's +x, degrees clockwise from north
  double origin_m = 0;       ///< levelling/GNSS: x (3d: along x at the voids' y) of one benchmark, m
  SourceLoc loc;
};

struct Scenario {
  std::filesystem::path file;      ///< absolute path of the scenario file
  std::string sha256;              ///< of the file's bytes
  int format = 1;
  std::string title;
  Model model = Model::plane_strain;
  Domain domain;
  std::map<std::string, Material> materials;  ///< every material the layers use, resolved
  std::vector<Layer> layers;
  std::vector<Void> voids;
  Loads loads;
  Analyses analyses;
  MeshControls mesh;
  std::vector<SensorUse> sensors;
  std::filesystem::path output_dir;  ///< resolved against the file's folder; may be empty
  std::vector<std::string> warnings;
};

/// Reads, parses and validates a scenario file. Throws InputError with file:line:column and
/// the key path on any mistake; unknown keys name the nearest valid key.
Scenario load_scenario(const std::filesystem::path& file);

/// Same, from YAML text (`file` is used for messages and relative paths only).
Scenario parse_scenario(const std::string& yaml_text, const std::filesystem::path& file);

}  // namespace voidsign::cli
