// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/run_report.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "cli/commands/model_setup.hpp"
#include "cli/output/output_dir.hpp"
#include "cli/report/html.hpp"
#include "cli/report/section_svg.hpp"
#include "cli/report/svg_chart.hpp"
#include "cli/report/text.hpp"
#include "solver/signals/instrument.hpp"
#include "solver/signals/noise_model.hpp"

namespace voidsign::cli {

namespace fs = std::filesystem;
using namespace report;

namespace {

constexpr double pi = std::numbers::pi;

// The outline of a void in the section's (x, z) plane; 3d voids are cut (sphere) or projected
// (box, tunnel) on the vertical plane y = y_section.
SectionVoid outline_of(const Void& v, std::size_t k, double y_section) {
  SectionVoid out;
  out.label = "void " + std::to_string(k);
  auto ellipse = [&](double cx, double cz, double a, double b, double angle_deg) {
    const double c = std::cos(angle_deg * pi / 180), s = std::sin(angle_deg * pi / 180);
    for (int i = 0; i < 72; ++i) {
      const double t = 2 * pi * i / 72, x = a * std::cos(t), z = b * std::sin(t);
      out.outline.push_back({cx + c * x - s * z, cz + s * x + c * z});
    }
  };
  auto rectangle = [&](double cx, double cz, double w, double h, double angle_deg) {
    const double c = std::cos(angle_deg * pi / 180), s = std::sin(angle_deg * pi / 180);
    for (const auto& [x, z] : std::vector<std::pair<double, double>>{{-w / 2, -h / 2}, {w / 2, -h / 2}, {w / 2, h / 2}, {-w / 2, h / 2}})
      out.outline.push_back({cx + c * x - s * z, cz + s * x + c * z});
  };
  switch (v.shape) {
    case Void::Shape::circle: ellipse(v.x, -v.depth, v.radius, v.radius, 0); break;
    case Void::Shape::ellipse: ellipse(v.x, -v.depth, v.axes[0], v.axes[1], v.angle); break;
    case Void::Shape::rectangle: rectangle(v.x, -v.depth, v.width, v.height, v.angle); break;
    case Void::Shape::polygon:
      for (const auto& p : v.points) out.outline.push_back({p[0], -p[1]});
      break;
    case Void::Shape::sphere: {
      const double dy = y_section - v.y, r2 = v.radius * v.radius - dy * dy;
      ellipse(v.x, -v.depth, r2 > 0 ? std::sqrt(r2) : v.radius, r2 > 0 ? std::sqrt(r2) : v.radius, 0);
      if (!(r2 > 0)) out.label += " (projected)";
      break;
    }
    case Void::Shape::box: {
      const double c = std::abs(std::cos(v.yaw * pi / 180)), s = std::abs(std::sin(v.yaw * pi / 180));
      rectangle(v.x, -v.depth, v.size[0] * c + v.size[1] * s, v.size[2], 0);
      out.label += " (projected)";
      break;
    }
    case Void::Shape::tunnel: {
      const double dx = v.to[0] - v.from[0], dz = -(v.to[2] - v.from[2]);
      const double len = std::hypot(dx, dz);
      if (len < v.radius) {  // along y: the cross-section
        ellipse(0.5 * (v.from[0] + v.to[0]), -0.5 * (v.from[2] + v.to[2]), v.radius, v.radius, 0);
      } else {  // a band of width 2r along the projected axis
        const double nx = -dz / len * v.radius, nz = dx / len * v.radius;
        out.outline = {{v.from[0] + nx, -v.from[2] + nz}, {v.to[0] + nx, -v.to[2] + nz}, {v.to[0] - nx, -v.to[2] - nz},
                       {v.from[0] - nx, -v.from[2] - nz}};
      }
      out.label += " (projected)";
      break;
    }
  }
  return out;
}

Section ground_section(const ReportInputs& in) {
  const Scenario& s = *in.scenario;
  const mesh::Mesh& m = *in.base->mesh;
  Section sec;
  sec.id = "ground-section";
  sec.title = s.model == Model::three_d ? "Vertical section at y = " + fixed(y_centre_of(s), 1) + " m" : "Vertical section";
  sec.x_min_m = m.x_min;
  sec.x_max_m = m.x_max;
  sec.depth_m = s.domain.depth;
  if (s.model == Model::axisymmetric) sec.x_label = "Radius r";
  double top = 0;
  for (const Layer& l : s.layers) {
    const double bottom = l.thickness > 0 ? top + l.thickness : s.domain.depth;
    const Material& mat = s.materials.at(l.material);
    sec.layers.push_back({l.material, "E " + format_quantity(mat.young, "Pa"), top, std::min(bottom, s.domain.depth), -1});
    top = bottom;
  }
  for (std::size_t k = 0; k < s.voids.size(); ++k) sec.voids.push_back(outline_of(s.voids[k], k, y_centre_of(s)));
  for (const SurfaceLoad& l : s.loads.surface) sec.loads.push_back({format_quantity(l.pressure, "Pa") , l.from, l.to});
  if (in.detectability)
    for (const Verdict& v : in.detectability->rows)
      if (v.analysis == "static") sec.sensors.push_back({v.sensor, v.x});
  return sec;
}

// Noise bands ±σ at the sensors' noise level, across the profile.
void add_noise_band(Chart& c, const std::vector<double>& x, double sigma, const std::string& label, int style) {
  c.bands.push_back(band(label, {x.front(), x.back()}, {-sigma, -sigma}, {sigma, sigma}, style));
}

struct Plot {
  std::string id, file, caption, svg;
};

std::vector<Plot> static_plots(const ReportInputs& in) {
  std::vector<Plot> out;
  const Scenario& s = *in.scenario;
  const StaticRun& run = *in.base;
  std::vector<double> x, uz, uz_ref, duz, tilt, strain, dux;
  if (run.mesh->dim() == 2) {
    for (const auto& r : run.profile) {
      x.push_back(r.x);
      uz.push_back(r.uz);
      uz_ref.push_back(r.uz_ref);
      duz.push_back(r.duz_rel);
      dux.push_back(r.dux);
      tilt.push_back(r.tilt);
      strain.push_back(r.strain);
    }
  } else {
    // The row of surface points nearest the line y = y_centre, as a profile along x.
    const double yc = y_centre_of(s);
    double best = INFINITY;
    for (const auto& p : run.map.points) best = std::min(best, std::abs(p.y - yc));
    for (const auto& p : run.map.points)
      if (std::abs(std::abs(p.y - yc) - best) < 1e-9) {
        x.push_back(p.x);
        uz.push_back(p.u[2]);
        uz_ref.push_back(p.u_ref[2]);
        duz.push_back(p.duz_rel);
        dux.push_back(p.du[0]);
        tilt.push_back(p.tilt_x);
        strain.push_back(p.strain_xx);
      }
  }
  if (x.size() < 2) return out;
  const bool three_d = run.mesh->dim() == 3;
  const std::string where = three_d ? " (along x at the surface points nearest y = " + fixed(y_centre_of(s), 1) + " m)" : "";
  const Detectability* d = in.detectability;
  int hatch = 0;

  Chart v;
  v.id = "chart-settlement";
  v.title = "Vertical displacement at the ground surface" + where;
  v.x = linear_axis(s.model == Model::axisymmetric ? "Radius r" : "Horizontal position x", "m");
  v.y = linear_axis("Vertical displacement (z up, settlement negative)", "m");
  v.y.include_zero = true;
  v.series.push_back(line_series("with voids", x, uz, 1));
  v.series.push_back(line_series("without voids", x, uz_ref, 2));
  v.series.push_back(line_series("anomaly: with minus without, relative to the far field", x, duz, 0));
  if (d)
    for (const Verdict& r : d->rows)
      if (r.analysis == "static" && (r.quantity == "los_displacement" || r.quantity == "vertical_displacement"))
        add_noise_band(v, x, r.noise, r.sensor + " noise, ±1σ = " + format_quantity(r.noise, "m"), hatch++ % 4);
  for (const SensorUse& u : s.sensors)
    if (u.spec.kind == solver::SensorKind::radar_los && !three_d) {
      const auto g = solver::radar_geometry(u.spec);
      std::vector<double> los(x.size());
      for (std::size_t i = 0; i < x.size(); ++i) los[i] = solver::los_displacement_profile(g, dux[i], duz[i], u.profile_bearing_deg);
      const double p = u.spec.footprint_m ? u.spec.footprint_m->value : 0;
      v.series.push_back(line_series(u.label + ": anomaly as recorded (line of sight" + (p > 0 ? ", " + fixed(p, 0) + " m pixels)" : ")"), x,
                                     p > 0 ? solver::pixel_average(x, los, p) : los, 3 + static_cast<int>(v.series.size() % 3)));
    }
  v.notes.push_back("Hatched bands: each sensor's one-sigma noise around zero; a signal must stand well outside its band "
                    "(SNR ≥ " + fixed(d ? d->threshold : 3, 1) + ") to count as detected.");
  // The same anomaly on its own scale, with the noise levels as lines where they fall inside it.
  Chart z;
  z.id = "chart-anomaly";
  z.title = "The anomaly on its own scale" + where;
  z.x = v.x;
  z.y = linear_axis("Vertical displacement anomaly", "m");
  z.y.include_zero = true;
  z.series.push_back(v.series[2]);
  for (std::size_t k = 3; k < v.series.size(); ++k) z.series.push_back(v.series[k]);
  if (d)
    for (const Verdict& r : d->rows)
      if (r.analysis == "static" && (r.quantity == "los_displacement" || r.quantity == "vertical_displacement")) {
        RefLine line = horizontal_line(-r.noise, r.sensor + " −1σ");
        line.include_in_range = false;
        z.lines.push_back(line);
      }
  z.notes.push_back("Noise levels that lie outside this range are off the scale: the signal is smaller than them.");
  out.push_back({"fig-settlement", "plots/settlement.svg",
                 "Vertical displacement of the ground surface with and without the voids, and the anomaly (the void's "
                 "signature), with the noise of each sensor that measures vertical or line-of-sight displacement.",
                 chart_svg_element(v)});

  out.push_back({"fig-anomaly", "plots/anomaly.svg",
                 "The vertical anomaly alone, on a scale that shows its shape, with each sensor's −1σ level where it falls "
                 "inside the range.",
                 chart_svg_element(z)});

  Chart t;
  t.id = "chart-tilt";
  t.title = "Tilt of the anomaly" + where;
  t.x = v.x;
  t.y = linear_axis("Tilt d(Δu_z)/dx", "rad");
  t.y.include_zero = true;
  t.series.push_back(line_series("tilt of the anomaly", x, tilt, 0));
  Chart e;
  e.id = "chart-strain";
  e.title = "Horizontal strain of the anomaly" + where;
  e.x = v.x;
  e.y = linear_axis("Horizontal strain d(Δu_x)/dx (extension positive)", "");
  e.y.include_zero = true;
  e.series.push_back(line_series("horizontal strain of the anomaly", x, strain, 0));
  if (d)
    for (const Verdict& r : d->rows) {
      if (r.analysis != "static") continue;
      if (r.quantity == "tilt") add_noise_band(t, x, r.noise, r.sensor + " noise, ±1σ = " + format_quantity(r.noise, "rad"), 0);
      if (r.quantity == "horizontal_strain") add_noise_band(e, x, r.noise, r.sensor + " noise, ±1σ = " + format_quantity(r.noise, ""), 1);
    }
  out.push_back({"fig-tilt", "plots/tilt.svg", "Tilt of the void's surface signature, with each tiltmeter's noise.", chart_svg_element(t)});
  out.push_back({"fig-strain", "plots/strain.svg", "Horizontal strain of the void's surface signature, with each strainmeter's noise.",
                 chart_svg_element(e)});
  return out;
}

std::vector<Plot> ambient_plots(const ReportInputs& in) {
  std::vector<Plot> out;
  const AmbientRun& a = *in.ambient;
  const Scenario& s = *in.scenario;
  Chart c;
  c.id = "chart-ambient";
  c.title = "Vertical ground velocity spectra at the point of largest anomaly";
  c.x = log_axis("Frequency", "Hz");
  c.y = log_axis("Vertical velocity PSD", "(m/s)²/Hz");
  // The standard noise models as a band, over the analysis band (they end at 10 Hz).
  const double lo = a.frequencies_hz.front(), hi = std::min(a.frequencies_hz.back(), 10.0);
  if (hi > lo) {
    std::vector<double> grid;
    for (int k = 0; k <= 200; ++k) grid.push_back(lo * std::pow(hi / lo, k / 200.0));
    grid.back() = hi;
    const auto fl = solver::peterson_psd(solver::NoiseModel::low, grid, solver::PsdQuantity::velocity);
    const auto fh = solver::peterson_psd(solver::NoiseModel::high, grid, solver::PsdQuantity::velocity);
    c.bands.push_back(band("between Peterson's (1993) low and high noise models", grid, fl.value, fh.value, 1));
  }
  std::vector<double> target(a.frequencies_hz.size());
  for (std::size_t k = 0; k < target.size(); ++k) target[k] = a.target_z[k] * std::pow(2 * pi * a.frequencies_hz[k], 2);
  c.series.push_back(line_series("the noise assumed: " + a.noise_name, a.frequencies_hz, target, 2));
  int style = 0;
  const std::size_t d = static_cast<std::size_t>(a.d);
  for (const AmbientWavefield& w : a.fields) {
    std::vector<double> anom(a.frequencies_hz.size());
    const std::size_t z = w.peak_point * d + d - 1;
    for (std::size_t k = 0; k < anom.size(); ++k) anom[k] = w.psd.anomaly[k][z] * std::pow(2 * pi * a.frequencies_hz[k], 2);
    c.series.push_back(line_series("anomaly, " + w.name + " (x = " + fixed(in.base->mesh->nodes[static_cast<std::size_t>(a.points[w.peak_point])][0], 1) + " m)",
                                   a.frequencies_hz, anom, style == 0 ? 0 : 3));
    ++style;
  }
  int sensor_style = 4;
  for (const SensorUse& u : s.sensors)
    if (u.spec.self_noise)
      c.series.push_back(line_series(u.label + " self-noise", u.spec.self_noise->psd.f_hz, u.spec.self_noise->psd.value, sensor_style++));
  c.notes.push_back("The ambient motion without voids equals the assumed noise at the matching point x = " +
                    fixed(in.base->mesh->nodes[static_cast<std::size_t>(a.points[a.scale_point])][0], 1) +
                    " m by construction; the anomaly is what the voids add to it.");
  out.push_back({"fig-ambient", "plots/ambient.svg",
                 "The void's dynamic signature in ambient noise: power spectral density of the vertical velocity anomaly, "
                 "against the standard noise models and each seismic sensor's self-noise.",
                 chart_svg_element(c)});
  return out;
}

std::vector<Plot> harmonic_plots(const ReportInputs& in) {
  const auto peaks = harmonic_peaks(*in.harmonic, *in.base->mesh);
  Chart c;
  c.id = "chart-harmonic";
  c.title = "Largest surface anomaly per frequency (harmonic analysis)";
  c.x = log_axis("Frequency", "Hz");
  c.y = log_axis("Displacement amplitude", "m");
  Series an = line_series("|anomaly|, largest over the surface", {}, {}, 0), ref = line_series("motion without voids there", {}, {}, 1);
  for (const auto& p : peaks) {
    an.x.push_back(p.f_hz);
    an.y.push_back(p.anomaly);
    ref.x.push_back(p.f_hz);
    ref.y.push_back(p.reference);
  }
  c.series = {an, ref};
  return {{"fig-harmonic", "plots/harmonic.svg", "The harmonic analysis: the largest surface anomaly at each frequency and the motion "
                                                 "of the ground without voids at the same point.",
           chart_svg_element(c)}};
}

std::vector<Plot> transient_plots(const ReportInputs& in) {
  const TransientRun& t = *in.transient;
  const TransientPeak pk = transient_peak(t, *in.base->mesh);
  const auto& r = t.result;
  const std::size_t d = in.base->mesh->dim() == 3 ? 3 : 2, nr = r.receivers.size();
  std::size_t q = 0;
  for (std::size_t k = 0; k < nr; ++k) {
    const auto& x = in.base->mesh->nodes[static_cast<std::size_t>(r.receivers[k])];
    if (std::abs(x[0] - pk.x) < 1e-9 && std::abs(x[1] - pk.y) < 1e-9) q = k;
  }
  Chart c;
  c.id = "chart-transient";
  c.title = "Vertical seismogram at x = " + fixed(pk.x, 1) + " m, where the anomaly is largest";
  c.x = linear_axis("Time", "s");
  c.y = linear_axis("Vertical displacement", "m");
  Series a = line_series("with voids", {}, {}, 1), b = line_series("without voids", {}, {}, 2), dd = line_series("anomaly", {}, {}, 0);
  for (std::size_t smp = 0; smp < r.reference.time_s.size(); ++smp) {
    const std::size_t i = (smp * nr + q) * d + d - 1;
    for (Series* s : {&a, &b, &dd}) s->x.push_back(r.reference.time_s[smp]);
    a.y.push_back(r.voided.u[i]);
    b.y.push_back(r.reference.u[i]);
    dd.y.push_back(r.difference[i]);
  }
  c.series = {a, b, dd};
  return {{"fig-transient", "plots/transient.svg", "The transient analysis: vertical surface motion at the receiver of largest anomaly.",
           chart_svg_element(c)}};
}

Table detect_table(const Detectability& d) {
  Table t;
  t.id = "verdict-table";
  t.caption = "Could each sensor record the void's signature? (detectable when SNR ≥ " + fixed(d.threshold, 1) + ")";
  t.header = {"Analysis", "Sensor", "Measures", "Signal", "Noise", "SNR", "Verdict"};
  for (const Verdict& v : d.rows) {
    std::string verdict = v.detectable ? "detectable, margin ×" + fixed(v.factor, v.factor < 10 ? 2 : 0)
                                       : (std::isfinite(v.factor) ? "not detectable, misses by ×" + format_quantity(v.factor, "", 2)
                                                                  : "not detectable, no signal");
    t.rows.push_back({text_cell(v.analysis), text_cell(v.sensor), text_cell(v.quantity), number_cell(v.signal, v.unit),
                      number_cell(v.noise, v.unit), number_cell(format_quantity(v.snr, "", 3)),
                      marked_cell(v.detectable ? Mark::positive : Mark::negative, verdict)});
  }
  t.note = "Signal: the void's anomaly as the sensor would record it (projection, footprint, time window, benchmark spacing); "
           "static noise: the sensor's one-sigma precision; dynamic noise: the ambient motion without voids and the sensor's "
           "self-noise, in quadrature (docs/detectability.md).";
  return t;
}

}  // namespace

void write_report(const ReportInputs& in, const fs::path& dir) {
  const Scenario& s = *in.scenario;
  fs::create_directories(dir / "plots");
  Document doc("voidsign report: " + (s.title.empty() ? s.file.filename().string() : s.title),
               std::string("voidsign ") + VOIDSIGN_VERSION);
  doc.paragraph("This report compares the ground of the scenario with and without its voids, solved as linear elastic "
                "ground on one finite-element mesh, and asks for each sensor whether the difference (the void's signature "
                "at the surface) could be measured. Units are SI; z is up and settlement is negative.");
  doc.caution("Caution", caution_text);

  std::vector<Plot> plots;
  auto add_figure = [&](const Plot& p) {
    write_text_atomic(dir / p.file, svg_document(p.svg));
    doc.figure(p.id, p.svg, p.caption, p.file);
  };

  doc.section("verdict", "Verdict per sensor");
  if (in.detectability && !in.detectability->rows.empty()) {
    const Detectability& d = *in.detectability;
    std::size_t yes = 0;
    for (const Verdict& v : d.rows) yes += v.detectable ? 1 : 0;
    doc.paragraph(std::to_string(yes) + " of " + std::to_string(d.rows.size()) + " sensor–analysis pairs would record the "
                  "signature at SNR ≥ " + fixed(d.threshold, 1) + ".");
    doc.table(detect_table(d));
    std::vector<std::string> how;
    for (const Verdict& v : d.rows) how.push_back(v.analysis + ", " + v.sensor + ": " + v.how);
    for (const NoVerdict& n : d.skipped) how.push_back(n.analysis + ", " + n.sensor + ": no verdict, " + n.reason);
    doc.subsection("verdict-how", "How each signal was recorded");
    doc.list(how);
  } else {
    doc.paragraph("The scenario lists no sensors (or no analysis gave a verdict): add a 'sensors' list to get one.");
  }
  if (in.thresholds && !in.thresholds->empty()) {
    doc.subsection("threshold", "Smallest detectable void");
    Table t;
    t.id = "threshold-table";
    t.caption = "Smallest size of void 0 at its depth that each sensor would detect (the model re-run at each size tried)";
    t.header = {"Analysis", "Sensor", "Parameter", "Scenario", "Threshold", "SNR there", "Status"};
    for (const auto& r : *in.thresholds) {
      const char* status = r.status == ThresholdResult::Status::found         ? "found"
                           : r.status == ThresholdResult::Status::below_range ? "detectable at the smallest size tried"
                                                                              : "not detectable at the largest size that fits";
      const std::string unit = r.parameter == "radius" ? "m" : "";
      t.rows.push_back({text_cell(r.analysis), text_cell(r.sensor), text_cell(r.parameter), number_cell(r.base, unit),
                        number_cell(r.value, unit), number_cell(format_quantity(r.snr, "", 3)), text_cell(status)});
    }
    doc.table(t);
  }

  doc.section("ground", "The ground and the voids");
  const Section sec = ground_section(in);
  const std::string sec_svg = section_svg_element(sec);
  write_text_atomic(dir / "plots/section.svg", svg_document(sec_svg));
  doc.figure("fig-section", sec_svg, "The modelled block with its layers and voids" +
                                         std::string(in.detectability && !in.detectability->rows.empty()
                                                         ? ", and where each static sensor records its largest signal."
                                                         : "."),
             "plots/section.svg");
  std::vector<Definition> layers;
  for (const Layer& l : s.layers) {
    const Material& m = s.materials.at(l.material);
    layers.push_back({l.material + (l.thickness > 0 ? ", " + fixed(l.thickness, 1) + " m" : ", to the bottom"),
                      "E " + format_quantity(m.young, "Pa") + ", ν " + fixed(m.poisson, 2) + ", ρ " + fixed(m.density, 0) +
                          " kg/m³, damping " + fixed(100 * m.damping, 1) + " %" + (m.source.empty() ? "" : "; " + m.source),
                      false});
  }
  doc.definitions(layers);

  if (in.static_ran) {
    doc.section("static", "Static signature");
    const solver::Anomaly& a = in.base->anomaly;
    doc.paragraph("Largest settlement " + format_quantity(a.uz_min, "m") + " (relative to the far field " +
                  format_quantity(a.rel_uz_min, "m") + "), largest tilt " + format_quantity(a.tilt_absmax, "rad") +
                  ", largest horizontal strain " + format_quantity(a.strain_absmax, "") + "; solve residual " +
                  format_quantity(std::max(in.base->result.reference.residual, in.base->result.voided.residual), "", 2) + ".");
    for (const Plot& p : static_plots(in)) add_figure(p);
    doc.subsection("stability", "Stability screen");
    const auto& st = in.base->stability;
    std::vector<std::string> items;
    for (std::size_t k = 0; k < st.voids.size(); ++k) {
      const auto& v = st.voids[k];
      items.push_back("void " + std::to_string(k) + ": " +
                      (v.evaluated ? "smallest strength ratio in the roof " + fixed(v.min_strength_ratio, 2) +
                                         (v.tension_in_roof ? "; the roof is in tension beyond the tensile strength — the elastic "
                                                              "result is not realistic"
                                                            : "; no tension beyond the tensile strength")
                                   : std::string("the roof material has no strength data (soil or fill: such roofs ravel)")));
    }
    items.push_back("smallest strength ratio anywhere in the model with voids: " + fixed(st.min_strength_ratio, 2) +
                    " (1 = at the Mohr–Coulomb strength; below 1 the elastic model no longer holds there)");
    doc.list(items);
  }

  if (in.ambient || in.harmonic || in.transient || in.modal) {
    doc.section("dynamic", "Dynamic signature");
    if (in.ambient) {
      doc.paragraph("Ambient noise (" + in.ambient->noise_name + ") carried through the transfer functions of both models, "
                    "under two wavefield assumptions (vertically incident body waves; surface waves from both sides).");
      for (const Plot& p : ambient_plots(in)) add_figure(p);
    }
    if (in.harmonic)
      for (const Plot& p : harmonic_plots(in)) add_figure(p);
    if (in.transient)
      for (const Plot& p : transient_plots(in)) add_figure(p);
    if (in.modal) {
      Table t;
      t.id = "modes-table";
      t.caption = "Natural frequencies with and without voids";
      t.header = {"Mode", "With voids", "Without voids (matched)", "Match", "Localised at a void"};
      const ModalRun& m = *in.modal;
      for (std::size_t j = 0; j < m.voided.freq_hz.size(); ++j) {
        const int r = m.match[j];
        t.rows.push_back({number_cell(std::to_string(j + 1)), number_cell(m.voided.freq_hz[j], "Hz", 5),
                          r >= 0 ? number_cell(m.reference.freq_hz[static_cast<std::size_t>(r)], "Hz", 5) : text_cell("-"),
                          text_cell(m.by_shape[j] ? "by shape, MAC " + fixed(m.mac[j], 2) : "by order"),
                          marked_cell(m.localised[j] ? Mark::positive : Mark::none, m.localised[j] ? "yes" : "no")});
      }
      doc.table(t);
    }
  }

  if (!in.warnings.empty()) {
    doc.section("warnings", "Warnings");
    doc.list(in.warnings);
  }

  doc.section("provenance", "Where these results come from");
  const mesh::Mesh& m = *in.base->mesh;
  doc.definitions({{"Tool", std::string("voidsign ") + VOIDSIGN_VERSION, false},
                   {"Input file", s.file.string(), true},
                   {"Input SHA-256", s.sha256, true},
                   {"Date (UTC)", in.date_utc, false},
                   {"Model", s.model == Model::three_d ? "3d" : s.model == Model::axisymmetric ? "axisymmetric" : "plane strain", false},
                   {"Mesh", std::to_string(m.n_nodes()) + " nodes, " + std::to_string(m.n_cells()) + " elements of order " +
                                std::to_string(s.mesh.order) + ", worst shape " + fixed(in.base->quality.min_quality, 2),
                    false}});
  doc.section("cautions", "Cautions");
  doc.list({caution_text,
            "Linear elasticity: no plasticity, no time-dependent creep or consolidation, no water flow; the stability screen only "
            "flags where that assumption fails.",
            "A sensor's verdict depends on its stated noise and on the assumptions listed with each row; treat a verdict near the "
            "threshold as undecided.",
            "The ambient verdict compares the anomaly with the ambient motion in a single record; long records and array "
            "processing can do better, and the instrument-only ratio is given in summary.json."});
  doc.write(dir / "report.html");
}

}  // namespace voidsign::cli
