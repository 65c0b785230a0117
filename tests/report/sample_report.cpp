// SPDX-License-Identifier: GPL-3.0-or-later
// Writes an example report built with the report pieces (cli/report/) for the browser check
// (browser_check.sh): a ground section, two charts, a table, a caution and the provenance.
// Every number is invented for the demonstration: the ground, the void, the instruments and
// their noise are fictitious, and nothing here was computed by the solver.
//
// Usage: report_sample OUT_DIR   →   OUT_DIR/report.html and OUT_DIR/plots/*.svg
#include <cmath>
#include <exception>
#include <filesystem>
#include <iostream>
#include <numbers>
#include <string>
#include <vector>

#include "cli/output/output_dir.hpp"
#include "cli/report/html.hpp"
#include "cli/report/section_svg.hpp"
#include "cli/report/svg_chart.hpp"
#include "cli/scenario/sha256.hpp"

namespace fs = std::filesystem;
using namespace voidsign::cli;
using namespace voidsign::cli::report;

namespace {

/// The invented scenario text whose hash the provenance shows.
constexpr const char* demo_input = "title: fictitious gallery under a farm track\n";

Section demo_section() {
  Section s;
  s.id = "ground-drawing";
  s.x_min_m = -60;
  s.x_max_m = 60;
  s.depth_m = 36;
  s.layers = {{"Made ground", "silty fill", 0, 1.5, -1},
              {"Upper chalk", "chalk, weathered", 1.5, 9, -1},
              {"Chalk", "chalk, sound", 9, 28, -1},
              {"Marl", "marl, stiff", 28, 36, -1}};
  SectionVoid gallery{"Gallery, 4 m span", {}};
  for (int k = 0; k <= 12; ++k) {  // an arched roof over straight walls
    const double a = std::numbers::pi * k / 12;
    gallery.outline.push_back({2 * std::cos(a), -12 + 2 * std::sin(a)});
  }
  gallery.outline.push_back({-2, -15});
  gallery.outline.push_back({2, -15});
  s.voids.push_back(gallery);
  s.loads.push_back({"Farm track, 15 kPa", -4, 4});
  for (int k = -5; k <= 5; ++k) {
    std::string name = "L";  // not "L" + …: GCC 12 raises a false -Wrestrict on that
    name += std::to_string(k + 6);
    s.sensors.push_back({name, 10.0 * k});
  }
  return s;
}

Chart demo_profile() {
  Chart c;
  c.id = "profile";
  c.title = "Vertical displacement anomaly along the surface";
  c.x = linear_axis("Horizontal position x", "m");
  c.y = linear_axis("Vertical displacement anomaly", "m");
  Series trough = line_series("Anomaly: with void minus without", {}, {}, 0);
  Series shallow = line_series("Same gallery 4 m shallower", {}, {}, 1);
  for (int i = -60; i <= 60; ++i) {
    const double x = i;
    trough.x.push_back(x);
    shallow.x.push_back(x);
    trough.y.push_back(-0.0118 * std::exp(-x * x / (2 * 11.0 * 11.0)));
    shallow.y.push_back(-0.0195 * std::exp(-x * x / (2 * 7.5 * 7.5)));
  }
  // A stretch the radar could not see (a hedge): no data, the curve is broken there.
  for (int i = 80; i < 84; ++i) trough.y[static_cast<std::size_t>(i)] = std::nan("");
  c.series = {trough, shallow};
  c.bands.push_back(
      band("Radar interferometry noise, \xC2\xB1"
           "1\xCF\x83 = 3 mm",
           {-60, 60}, {-0.003, -0.003}, {0.003, 0.003}, 0));
  c.lines.push_back(horizontal_line(-0.001, "levelling, 2\xCF\x83 = 1 mm"));
  c.notes.push_back("Demonstration numbers only. Settlement is negative (z up).");
  return c;
}

Chart demo_spectrum() {
  Chart c;
  c.id = "spectrum";
  c.title = "Vertical ground motion at the surface above the void";
  c.x = log_axis("Frequency", "Hz");
  c.y = log_axis("Displacement amplitude", "m");
  Series anomaly = line_series("Anomaly: with void minus without", {}, {}, 0);
  Band noise = band("Ambient noise, between the quiet and the busy model", {}, {}, {}, 1);
  for (int k = 0; k <= 60; ++k) {
    const double f = 0.2 * std::pow(10.0, k / 30.0);  // 0.2 … 20 Hz
    const double peak = 1.0 / std::sqrt(std::pow(1 - std::pow(f / 7.0, 2), 2) + 0.04 * f * f / 49);
    anomaly.x.push_back(f);
    anomaly.y.push_back(4e-11 * peak * f);
    noise.x.push_back(f);
    noise.lo.push_back(2e-11 * (1 + 1 / (f * f)));
    noise.hi.push_back(6e-9 * (1 + 1 / std::pow(f, 1.5)));
  }
  c.series.push_back(anomaly);
  c.bands.push_back(noise);
  c.lines.push_back(vertical_line(7.0, "first mode, 7 Hz"));
  return c;
}

Table demo_table() {
  Table t;
  t.id = "verdict-table";
  t.caption = "Could each instrument see the anomaly? (invented noise levels)";
  t.header = {"Instrument", "Quantity", "Peak anomaly", "Noise (1\xCF\x83)", "Ratio", "Verdict"};
  t.rows.push_back({text_cell("Precise levelling"), text_cell("settlement"),
                    number_cell(-0.0118, "m"), number_cell(0.0005, "m"), number_cell("23.6"),
                    marked_cell(Mark::positive, "detectable")});
  t.rows.push_back({text_cell("Radar interferometry"), text_cell("line-of-sight displacement"),
                    number_cell(-0.0104, "m"), number_cell(0.003, "m"), number_cell("3.5"),
                    marked_cell(Mark::positive, "detectable")});
  t.rows.push_back({text_cell("GNSS, vertical"), text_cell("settlement"), number_cell(-0.0118, "m"),
                    number_cell(0.006, "m"), number_cell("2.0"),
                    marked_cell(Mark::uncertain, "marginal")});
  t.rows.push_back({text_cell("Tiltmeter"), text_cell("tilt"), number_cell(6.4e-4, "rad"),
                    number_cell(1e-7, "rad"), number_cell("6400"),
                    marked_cell(Mark::positive, "detectable")});
  t.rows.push_back({text_cell("Seismometer"), text_cell("amplitude at 7 Hz"),
                    number_cell(1.5e-9, "m"), number_cell(4e-9, "m"), number_cell("0.4"),
                    marked_cell(Mark::negative, "not detectable")});
  t.note =
      "A ratio above 3 counts as detectable here, from 2 to 3 as marginal; the rule is part "
      "of the demonstration.";
  return t;
}

void write_plot(const fs::path& dir, const std::string& name, const std::string& element) {
  write_text_atomic(dir / "plots" / name, svg_document(element));
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) {
    std::cerr << "usage: report_sample OUT_DIR\n";
    return 2;
  }
  try {
    const fs::path out = argv[1];
    fs::create_directories(out / "plots");
    const Section section = demo_section();
    const Chart profile = demo_profile(), spectrum = demo_spectrum();
    const std::string section_svg = section_svg_element(section);
    const std::string profile_svg = chart_svg_element(profile);
    const std::string spectrum_svg = chart_svg_element(spectrum);
    write_plot(out, "section.svg", section_svg);
    write_plot(out, "profile.svg", profile_svg);
    write_plot(out, "spectrum.svg", spectrum_svg);

    Document d("Would this void show at the surface? A worked example", "voidsign report sample");
    d.paragraph(
        "This page shows every part a report can hold, filled with invented numbers. It "
        "compares the ground with and without a void and asks, instrument by "
        "instrument, whether the difference could be measured.");
    d.caution("Demonstration data",
              "The ground, the gallery, the instruments and every number on this page are "
              "fictitious. Nothing here describes a real place.");
    d.section("summary", "In short");
    d.paragraph(
        "Levelling, radar interferometry and a tiltmeter would see the settlement trough "
        "above the gallery; a seismometer would not pick out its dynamic signature from "
        "the ambient noise.");
    d.table(demo_table());
    d.section("ground", "The ground and the void");
    d.figure("fig-section", section_svg,
             "Cross-section through the gallery: layers, the void, the load on the surface "
             "and the levelling points L1 to L11.",
             "plots/section.svg");
    d.section("signature", "Static signature at the surface");
    d.figure("fig-profile", profile_svg,
             "Vertical displacement anomaly with the radar noise band and the levelling "
             "threshold. The gap near x = 20 m is a stretch without data.",
             "plots/profile.svg");
    d.section("dynamics", "Dynamic signature");
    d.figure("fig-spectrum", spectrum_svg,
             "Amplitude of the anomaly against the band of ambient ground noise.",
             "plots/spectrum.svg");
    d.section("provenance", "Where these results come from");
    d.definitions({{"Tool", "voidsign report sample", false},
                   {"Input SHA-256", sha256_hex(demo_input), true},
                   {"Date", "2000-01-01 (fixed for the example)", false}});
    const std::string html = d.render();
    if (const auto dup = duplicate_ids(html); !dup.empty()) {
      std::cerr << "report_sample: duplicate id '" << dup.front() << "'\n";
      return 1;
    }
    d.write(out / "report.html");
  } catch (const std::exception& e) {
    std::cerr << "report_sample: " << e.what() << "\n";
    return 1;
  }
  return 0;
}
