// SPDX-License-Identifier: GPL-3.0-or-later
// The HTML report's pieces: nice ticks, labels and escaping, charts (gaps, empty data, log axes),
// the ground section's scale, and the HTML builder. Every SVG and the page itself are parsed
// as XML with VTK's parser (expat) to prove them well-formed.
#include <doctest/doctest.h>
#include <unistd.h>
#include <vtkNew.h>
#include <vtkObjectFactory.h>
#include <vtkXMLParser.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <limits>
#include <map>
#include <stdexcept>
#include <string>
#include <vector>

#include "cli/report/html.hpp"
#include "cli/report/section_svg.hpp"
#include "cli/report/svg_chart.hpp"
#include "cli/report/text.hpp"

namespace fs = std::filesystem;
using namespace voidsign::cli::report;

namespace {

struct XmlElement {
  std::string name;
  std::map<std::string, std::string> attrs;
  std::string text;  // character data directly inside
};

/// Collects every element with its attributes and text while expat parses.
class XmlCollector : public vtkXMLParser {
 public:
  static XmlCollector* New();
  vtkTypeMacro(XmlCollector, vtkXMLParser) std::vector<XmlElement> elements;

 protected:
  XmlCollector() = default;
  void StartElement(const char* name, const char** atts) override {
    XmlElement e;
    e.name = name;
    for (int i = 0; atts && atts[i]; i += 2) e.attrs[atts[i]] = atts[i + 1];
    open_.push_back(elements.size());
    elements.push_back(std::move(e));
  }
  void EndElement(const char*) override { open_.pop_back(); }
  void CharacterDataHandler(const char* data, int length) override {
    if (!open_.empty()) elements[open_.back()].text.append(data, static_cast<std::size_t>(length));
  }

 private:
  std::vector<std::size_t> open_;
};
vtkStandardNewMacro(XmlCollector)

    struct Parsed {
  bool ok = false;
  std::vector<XmlElement> elements;
  std::vector<const XmlElement*> named(const std::string& n) const {
    std::vector<const XmlElement*> out;
    for (const auto& e : elements)
      if (e.name == n) out.push_back(&e);
    return out;
  }
  bool has_text(const std::string& t) const {
    return std::any_of(elements.begin(), elements.end(),
                       [&](const XmlElement& e) { return e.text.find(t) != std::string::npos; });
  }
  const XmlElement* by_id(const std::string& id) const {
    for (const auto& e : elements) {
      const auto it = e.attrs.find("id");
      if (it != e.attrs.end() && it->second == id) return &e;
    }
    return nullptr;
  }
};

Parsed parse_xml(const std::string& text, bool quiet = false) {
  vtkNew<XmlCollector> p;
  const int was = vtkObject::GetGlobalWarningDisplay();
  if (quiet) vtkObject::GlobalWarningDisplayOff();
  Parsed r;
  r.ok = p->Parse(text.c_str(), static_cast<unsigned>(text.size())) == 1;
  vtkObject::SetGlobalWarningDisplay(was);
  r.elements = p->elements;
  return r;
}

std::size_t count(const std::string& s, const std::string& what) {
  std::size_t n = 0;
  for (auto p = s.find(what); p != std::string::npos; p = s.find(what, p + what.size())) ++n;
  return n;
}

/// No attribute of any element holds "nan" or "inf" (a non-finite number leaking into SVG).
bool all_attributes_finite(const Parsed& doc) {
  for (const auto& e : doc.elements)
    for (const auto& [k, v] : e.attrs) {
      std::string low = v;
      std::transform(low.begin(), low.end(), low.begin(),
                     [](unsigned char c) { return std::tolower(c); });
      if (k != "id" && k != "aria-labelledby" && k != "fill" &&
          (low.find("nan") != std::string::npos || low.find("inf") != std::string::npos))
        return false;
    }
  return true;
}

bool is_125_step(double step) {
  const double m = step / std::pow(10.0, std::floor(std::log10(step) + 1e-9));
  return std::abs(m - 1) < 1e-9 || std::abs(m - 2) < 1e-9 || std::abs(m - 5) < 1e-9;
}

/// The paths that are series lines (unfilled, round joins): not grid, bands or markers.
std::vector<const XmlElement*> series_paths(const Parsed& doc) {
  std::vector<const XmlElement*> out;
  for (const auto* e : doc.named("path")) {
    const auto f = e->attrs.find("fill"), j = e->attrs.find("stroke-linejoin");
    if (f != e->attrs.end() && f->second == "none" && j != e->attrs.end()) out.push_back(e);
  }
  return out;
}

Chart profile_chart() {
  Chart c;
  c.id = "profile";
  c.title = "Settlement anomaly";
  c.x = linear_axis("Distance from the void axis", "m");
  c.y = linear_axis("Vertical displacement anomaly", "m");
  Series s;
  s.label = "with void minus without";
  for (int i = -20; i <= 20; ++i) {
    s.x.push_back(i * 2.5);
    s.y.push_back(-0.0123 * std::exp(-std::pow(i * 2.5 / 15.0, 2) / 2) + 0.0004);
  }
  c.series.push_back(s);
  return c;
}

}  // namespace

TEST_CASE("report: linear ticks of a settlement range are 1-2-5 steps covering it") {
  const LinearTicks t = nice_linear_ticks(-0.0123, 0.0004);
  REQUIRE(t.values.size() >= 3);
  CHECK(t.values.size() <= 9);
  CHECK(t.values.front() <= -0.0123);
  CHECK(t.values.back() >= 0.0004);
  CHECK(t.step == doctest::Approx(0.002));
  CHECK(is_125_step(t.step));
  for (std::size_t i = 1; i < t.values.size(); ++i)
    CHECK(t.values[i] - t.values[i - 1] == doctest::Approx(t.step));
  CHECK(std::find(t.values.begin(), t.values.end(), 0.0) != t.values.end());  // zero exactly
  CHECK(t.lo == t.values.front());
  CHECK(t.hi == t.values.back());
}

TEST_CASE("report: linear ticks in other cases") {
  const LinearTicks unit = nice_linear_ticks(0, 1);
  CHECK(unit.step == doctest::Approx(0.2));
  CHECK(unit.values.front() == 0);
  CHECK(unit.values.back() == doctest::Approx(1));

  const LinearTicks reversed = nice_linear_ticks(40, -60);  // either order
  CHECK(reversed.values.front() <= -60);
  CHECK(reversed.values.back() >= 40);
  CHECK(is_125_step(reversed.step));

  const LinearTicks flat = nice_linear_ticks(3, 3);  // a constant: widened, not degenerate
  CHECK(flat.lo < 3);
  CHECK(flat.hi > 3);
  const LinearTicks zero = nice_linear_ticks(0, 0);
  CHECK(zero.lo < 0);
  CHECK(zero.hi > 0);
  const LinearTicks bad = nice_linear_ticks(std::nan(""), 1);
  CHECK(bad.lo == 0);
  CHECK(bad.hi == doctest::Approx(1));

  const LinearTicks fixed_range = fixed_linear_ticks(-0.013, 0.001);  // ends kept as given
  CHECK(fixed_range.lo == -0.013);
  CHECK(fixed_range.hi == 0.001);
  for (const double v : fixed_range.values) {
    CHECK(v >= -0.013 - 1e-12);
    CHECK(v <= 0.001 + 1e-12);
  }
}

TEST_CASE("report: log ticks are whole decades with minor ticks") {
  const LogTicks t = nice_log_ticks(1e-9, 3e-6);
  CHECK(t.lo_exp == -9);
  CHECK(t.hi_exp == -5);
  REQUIRE(t.decades.size() == 5);
  CHECK(t.decades.front() == doctest::Approx(1e-9));
  CHECK(t.decades.back() == doctest::Approx(1e-5));
  CHECK(t.minor.size() == 4 * 8);
  CHECK(t.minor.front() == doctest::Approx(2e-9));
  CHECK(t.label_every == 1);

  const LogTicks inside = nice_log_ticks(2e-6, 5e-6);  // within one decade
  CHECK(inside.lo_exp == -6);
  CHECK(inside.hi_exp == -5);

  const LogTicks wide = nice_log_ticks(1e-12, 1e3, 8);  // 15 decades: fewer labels, no minors
  CHECK(wide.minor.empty());
  CHECK(wide.label_every == 2);

  const LogTicks nonpositive = nice_log_ticks(-1, 0);
  CHECK(nonpositive.lo_exp == 0);
  CHECK(nonpositive.hi_exp == 1);
}

TEST_CASE("report: labels, units and quantities") {
  CHECK(tick_label(-12, 2) ==
        "\xE2\x88\x92"
        "12");  // U+2212
  CHECK(tick_label(0.5, 0.5) == "0.5");
  CHECK(tick_label(-1e-17, 0.2) == "0.0");  // never "−0.0"
  CHECK(tick_label(1500, 500) == "1500");
  CHECK(power_of_ten(-6) == "10\xE2\x81\xBB\xE2\x81\xB6");  // 10⁻⁶
  CHECK(power_of_ten(12) == "10\xC2\xB9\xC2\xB2");          // 10¹²
  CHECK(engineering_exponent(0.0123) == -3);
  CHECK(engineering_exponent(0.001) == -3);
  CHECK(engineering_exponent(950) == 0);
  CHECK(engineering_exponent(0) == 0);
  CHECK(takes_prefix("m"));
  CHECK(takes_prefix("m/s\xC2\xB2"));
  CHECK(takes_prefix("rad"));
  CHECK_FALSE(takes_prefix("m\xC2\xB2"));
  CHECK_FALSE(takes_prefix("m\xC2\xB3/m"));
  CHECK_FALSE(takes_prefix(""));
  CHECK(scaled_unit("m", -3) == "mm");
  CHECK(scaled_unit("m/m", -6) == "\xC2\xB5m/m");
  CHECK(scaled_unit("m\xC2\xB2", -3) ==
        "\xC3\x97"
        "10\xE2\x81\xBB\xC2\xB3 m\xC2\xB2");
  CHECK(scaled_unit("", -6) ==
        "\xC3\x97"
        "10\xE2\x81\xBB\xE2\x81\xB6");
  CHECK(scaled_unit("Pa", 0) == "Pa");
  CHECK(format_quantity(-0.01234, "m") ==
        "\xE2\x88\x92"
        "12.3 mm");
  CHECK(format_quantity(7, "m") == "7.00 m");
  CHECK(format_quantity(999.96, "m") == "1.00 km");
  CHECK(format_quantity(0.5, "m\xC2\xB2") == "0.500 m\xC2\xB2");
  CHECK(format_quantity(3.2e-7, "") ==
        "3.20\xC3\x97"
        "10\xE2\x81\xBB\xE2\x81\xB7");
  CHECK(format_quantity(2.5e-6, "rad") == "2.50 \xC2\xB5rad");
  CHECK(format_quantity(std::nan(""), "m") == "n/a");
  CHECK(format_quantity(0, "m") == "0 m");
  CHECK(fixed(-0.001) == "0.00");
  CHECK(fixed(std::numeric_limits<double>::infinity()) == "0");
}

TEST_CASE("report: text is escaped for XML") {
  CHECK(xml_escape("a < b & c > d") == "a &lt; b &amp; c &gt; d");
  CHECK(xml_escape("\"quoted\" 'single'") == "&quot;quoted&quot; &#39;single&#39;");
  CHECK(xml_escape("\xC2\xB5m, \xCE\x94u, \xE2\x89\xA4") == "\xC2\xB5m, \xCE\x94u, \xE2\x89\xA4");
  CHECK(xml_escape("bell\x07") == "bell\xEF\xBF\xBD");                  // control character
  CHECK(xml_escape("bad \xFF byte") == "bad \xEF\xBF\xBD byte");        // not UTF-8
  CHECK(xml_escape("cut \xE2\x88") == "cut \xEF\xBF\xBD\xEF\xBF\xBD");  // truncated sequence
  CHECK(xml_escape("tab\tnewline\n") == "tab\tnewline\n");
  CHECK(utf8_length("\xC2\xB5m") == 2);

  Chart c = profile_chart();
  c.title = "Trough <\"A\"> & 'B' \x01";
  c.series[0].label = "x < y & z";
  const Parsed doc = parse_xml(chart_svg_document(c));
  REQUIRE(doc.ok);
  CHECK(doc.has_text("Trough <\"A\"> & 'B' \xEF\xBF\xBD"));
  CHECK(doc.has_text("x < y & z"));
}

TEST_CASE("report: a chart is a well-formed standalone SVG with units on its axes") {
  const Chart c = profile_chart();
  const std::string svg = chart_svg_document(c);
  CHECK(svg.rfind("<?xml version=\"1.0\"", 0) == 0);
  const Parsed doc = parse_xml(svg);
  REQUIRE(doc.ok);
  REQUIRE(!doc.elements.empty());
  const XmlElement& root = doc.elements.front();
  CHECK(root.name == "svg");
  CHECK(root.attrs.at("xmlns") == "http://www.w3.org/2000/svg");
  CHECK(root.attrs.at("width") == "680");
  CHECK(root.attrs.count("height") == 1);
  CHECK(root.attrs.at("viewBox").rfind("0 0 680 ", 0) == 0);
  CHECK(doc.has_text("Vertical displacement anomaly [mm]"));  // 10⁻³ moved into the unit
  CHECK(doc.has_text("Distance from the void axis [m]"));
  CHECK(
      doc.has_text("\xE2\x88\x92"
                   "12"));  // a tick at −12 mm
  CHECK(doc.has_text("with void minus without"));
  CHECK(all_attributes_finite(doc));

  const std::string inline_svg = chart_svg_element(c);
  CHECK(inline_svg.rfind("<svg ", 0) == 0);
  CHECK(parse_xml(inline_svg).ok);
}

TEST_CASE("report: NaN and infinite points break the curve") {
  Chart c = profile_chart();
  c.series[0].y[10] = std::nan("");
  c.series[0].y[25] = std::numeric_limits<double>::infinity();
  const Parsed doc = parse_xml(chart_svg_element(c));
  REQUIRE(doc.ok);
  const auto paths = series_paths(doc);
  REQUIRE(paths.size() == 1);
  CHECK(count(paths[0]->attrs.at("d"), "M") == 3);
  CHECK(all_attributes_finite(doc));

  // A point alone between two gaps still shows, as a dot.
  Chart lone = profile_chart();
  lone.series[0].y[9] = std::nan("");
  lone.series[0].y[11] = std::nan("");
  const Parsed d2 = parse_xml(chart_svg_element(lone));
  REQUIRE(d2.ok);
  CHECK(d2.named("circle").size() >= 1);
}

TEST_CASE("report: an empty chart still draws its axes and says there is no data") {
  Chart c;
  c.id = "empty";
  c.x = log_axis("Frequency", "Hz");
  c.y = linear_axis("Amplitude", "m");
  c.series.push_back(line_series("nothing", {}, {}));
  const Parsed doc = parse_xml(chart_svg_element(c));
  REQUIRE(doc.ok);
  CHECK(doc.has_text("no data"));
  CHECK(doc.has_text("nothing (no data)"));
  CHECK(doc.has_text("Frequency [Hz]"));
  CHECK(doc.named("line").size() > 4);  // ticks and grid
  CHECK(all_attributes_finite(doc));
}

TEST_CASE("report: a log axis drops values that are not positive and says so") {
  Chart c;
  c.id = "logaxis";
  c.x = log_axis("Frequency", "Hz");
  c.y = log_axis("Displacement amplitude", "m");
  c.series.push_back(
      line_series("anomaly", {0.1, 0.5, 1, 2, 5, 10}, {3e-9, 1e-8, -2e-8, 0, 2e-7, 3e-6}, 1));
  c.bands.push_back(band("noise between the low and high models", {0.1, 1, 10}, {1e-9, 2e-9, 1e-9},
                         {1e-7, 3e-7, 1e-7}));
  c.lines.push_back(vertical_line(1.0, "1 Hz"));
  const std::string svg = chart_svg_element(c);
  const Parsed doc = parse_xml(svg);
  REQUIRE(doc.ok);
  CHECK(doc.has_text("2 values \xE2\x89\xA4 0 not shown: the y axis is logarithmic."));
  CHECK(doc.has_text("10\xE2\x81\xBB\xE2\x81\xB9"));  // 10⁻⁹ labels the lowest decade
  CHECK(doc.has_text("10\xE2\x81\xBB\xE2\x81\xB5"));  // 10⁻⁵ the highest
  CHECK(doc.has_text("1 Hz"));
  const auto paths = series_paths(doc);
  REQUIRE(paths.size() >= 1);
  CHECK(count(paths.back()->attrs.at("d"), "M") == 2);  // the dropped points break the line
  CHECK(doc.by_id("logaxis-hatch-0") != nullptr);       // the band's hatching
  CHECK(all_attributes_finite(doc));
}

TEST_CASE("report: styles differ by dash pattern, the legend shows samples") {
  Chart c = profile_chart();
  for (int k = 1; k < 6; ++k) {
    Series s = c.series[0];
    s.label = "style " + std::to_string(k);
    for (double& y : s.y) y *= 1 + 0.1 * k;
    s.style = k;
    c.series.push_back(s);
  }
  const Parsed doc = parse_xml(chart_svg_element(c));
  REQUIRE(doc.ok);
  std::vector<std::string> dashes;
  for (const auto* p : series_paths(doc)) {
    const auto it = p->attrs.find("stroke-dasharray");
    dashes.push_back(it == p->attrs.end() ? "solid" : it->second);
  }
  REQUIRE(dashes.size() == 6);
  std::sort(dashes.begin(), dashes.end());
  CHECK(std::unique(dashes.begin(), dashes.end()) == dashes.end());  // six distinct patterns
  for (int k = 1; k < 6; ++k) CHECK(doc.has_text("style " + std::to_string(k)));
}

TEST_CASE("report: fixed ranges and reference lines") {
  Chart c = profile_chart();
  c.y.min = -0.02;
  c.y.max = 0.005;
  c.lines.push_back(horizontal_line(-0.005, "levelling threshold"));
  c.lines.push_back(horizontal_line(1.0, "off the chart"));  // outside the fixed range: left out
  const Parsed doc = parse_xml(chart_svg_element(c));
  REQUIRE(doc.ok);
  CHECK(doc.has_text("levelling threshold"));
  CHECK_FALSE(doc.has_text("off the chart"));
  CHECK(
      doc.has_text("\xE2\x88\x92"
                   "20"));  // the fixed lower end −20 mm is a tick
}

TEST_CASE("report: the ground section is drawn to scale") {
  Section s;
  s.x_min_m = -50;
  s.x_max_m = 50;
  s.depth_m = 30;
  s.width_px = 600;
  s.layers = {{"Topsoil", "loam", 0, 2, -1},
              {"Upper chalk", "chalk, weathered", 2, 12, -1},
              {"Chalk", "chalk", 12, 30, -1}};
  s.voids.push_back({"Gallery", {{-2, -8}, {2, -8}, {2, -11}, {-2, -11}}});
  s.loads.push_back({"Road 20 kPa", -10, 10});
  s.sensors = {{"B1", -20}, {"B2", 0}, {"B3", 20}};

  const SectionScale sc = section_scale(s);
  CHECK(sc.px_per_m_x == doctest::Approx(6.0));
  CHECK(sc.px_per_m_z == doctest::Approx(6.0));
  CHECK(sc.exaggeration == 1);
  CHECK(sc.block_width_px == doctest::Approx(600));
  CHECK(sc.block_height_px == doctest::Approx(180));

  const Parsed doc = parse_xml(section_svg_document(s));
  REQUIRE(doc.ok);
  const XmlElement* block = doc.by_id("section-block");
  REQUIRE(block != nullptr);
  CHECK(block->attrs.at("width") == "600.00");  // 100 m at 6 px/m
  CHECK(block->attrs.at("height") == "180.00");
  CHECK(doc.has_text("True scale"));
  CHECK(doc.has_text("Upper chalk (chalk, weathered)"));
  CHECK_FALSE(doc.has_text("Chalk (chalk)"));  // the material repeats the name: said once
  CHECK(doc.has_text("Gallery"));
  CHECK(doc.has_text("Road 20 kPa"));
  CHECK(doc.has_text("B2"));
  CHECK(doc.has_text("Depth below surface [m]"));

  // The void: a white polygon 4 m × 3 m = 24 × 18 px.
  const auto polys = doc.named("polygon");
  REQUIRE(polys.size() == 1);
  CHECK(polys[0]->attrs.at("fill") == "#ffffff");
  // Each layer fills with its own pattern.
  std::vector<std::string> fills;
  for (const auto* r : doc.named("rect")) {
    const auto f = r->attrs.find("fill");
    if (f != r->attrs.end() && f->second.rfind("url(#section-layer-", 0) == 0 &&
        r->attrs.at("width") == "600.00")
      fills.push_back(f->second);
  }
  REQUIRE(fills.size() == 3);
  std::sort(fills.begin(), fills.end());
  CHECK(std::unique(fills.begin(), fills.end()) == fills.end());
  CHECK(doc.named("pattern").size() == 8);
}

TEST_CASE("report: a wide, shallow block gets a stated vertical exaggeration") {
  Section wide;
  wide.x_min_m = 0;
  wide.x_max_m = 2000;
  wide.depth_m = 40;
  wide.width_px = 600;  // 0.3 px/m: 12 px deep at true scale
  const SectionScale sc = section_scale(wide);
  CHECK(sc.px_per_m_x == doctest::Approx(0.3));
  CHECK(sc.exaggeration == 20);
  CHECK(sc.block_height_px == doctest::Approx(240));
  const Parsed doc = parse_xml(section_svg_element(wide));
  REQUIRE(doc.ok);
  CHECK(
      doc.has_text("Vertical exaggeration \xC3\x97"
                   "20"));

  Section deep;  // deep and narrow: shrunk to the maximum height, still true scale
  deep.x_min_m = 0;
  deep.x_max_m = 20;
  deep.depth_m = 200;
  const SectionScale sd = section_scale(deep);
  CHECK(sd.block_height_px == doctest::Approx(deep.max_height_px));
  CHECK(sd.exaggeration == 1);
  CHECK(sd.block_width_px == doctest::Approx(20 * deep.max_height_px / 200));

  Section none;
  none.x_max_m = none.x_min_m;
  CHECK_THROWS_AS(section_scale(none), std::invalid_argument);
}

TEST_CASE("report: the HTML page is well-formed, self-contained and has what was put in") {
  Document d("Signature of a fictitious gallery", "voidsign test");
  d.paragraph("Before the first section & <no tags>.");
  d.section("ground", "Ground and void");
  Section s;
  s.layers = {{"Clay", "", 0, 30, -1}};
  d.figure("fig-ground", section_svg_element(s), "The section.", "plots/section.svg");
  d.section("signature", "Surface signature");
  d.subsection("signature-profile", "Profile");
  d.figure("fig-profile", chart_svg_element(profile_chart()), "The profile.");
  Table t;
  t.id = "verdicts";
  t.caption = "Instruments";
  t.header = {"Instrument", "Peak anomaly", "Verdict"};
  t.rows.push_back({text_cell("Levelling"), number_cell(-0.0123, "m"),
                    marked_cell(Mark::positive, "detectable")});
  t.rows.push_back({text_cell("Tiltmeter"), number_cell("3.1 \xC2\xB5rad"),
                    marked_cell(Mark::negative, "not detectable")});
  t.rows.push_back({text_cell("GNSS")});  // short row: padded
  CHECK(d.table(t) == 1);
  d.caution("Screening only", "An elastic model.");
  d.section("provenance", "Provenance");
  d.definitions({{"Tool", "voidsign 0.1.0", false}, {"Input SHA-256", std::string(64, 'a'), true}});
  d.list({"one", "two"});

  const std::string html = d.render();
  CHECK(html.rfind("<!DOCTYPE html>", 0) == 0);
  CHECK(html.find("<script") == std::string::npos);
  CHECK(html.find("Content-Security-Policy") != std::string::npos);
  CHECK(html.find("http://") == html.find("http://www.w3.org/2000/svg"));  // only namespaces
  CHECK(html.find("https://") == std::string::npos);
  CHECK(duplicate_ids(html).empty());
  const Parsed doc = parse_xml(html);
  REQUIRE(doc.ok);
  for (const char* id : {"ground", "signature", "signature-profile", "provenance", "fig-ground",
                         "fig-profile", "verdicts"})
    CHECK_MESSAGE(doc.by_id(id) != nullptr, id);
  CHECK(doc.named("svg").size() == 2);
  CHECK(doc.named("section").size() == 3);
  CHECK(doc.named("nav").size() == 1);    // the contents list
  CHECK(doc.named("a").size() == 3 + 1);  // three contents links, one standalone drawing
  CHECK(doc.has_text("Before the first section & <no tags>."));
  CHECK(doc.has_text("Figure 2."));
  CHECK(doc.has_text("Table 1."));
  // Marks read without colour: a symbol and the words.
  CHECK(html.find("<td class=\"mark-pos\"><span aria-hidden=\"true\">\xE2\x9C\x94</span> "
                  "detectable</td>") != std::string::npos);
  CHECK(html.find("\xE2\x9C\x98</span> not detectable") != std::string::npos);
  CHECK(html.find("<td class=\"num\">\xE2\x88\x92"
                  "12.3 mm</td>") != std::string::npos);
  CHECK(html.find("<th scope=\"col\" class=\"num\">Peak anomaly</th>") != std::string::npos);
  CHECK(doc.named("td").size() == 9);  // 3 × 3, the short row padded
  CHECK(doc.has_text("Screening only"));
  CHECK(doc.named("code").size() == 1);
}

TEST_CASE("report: ids in the page must be valid and unique") {
  Document d("ids");
  d.section("one", "One");
  CHECK_THROWS_AS(d.section("one", "Again"), std::invalid_argument);
  CHECK_THROWS_AS(d.section("2nd", "Digit first"), std::invalid_argument);
  CHECK_THROWS_AS(d.section("has space", "Space"), std::invalid_argument);
  // Two charts with the same id prefix would share clip paths and patterns: refused.
  d.figure("fig-a", chart_svg_element(profile_chart()), "A");
  CHECK_THROWS_AS(d.figure("fig-b", chart_svg_element(profile_chart()), "B"),
                  std::invalid_argument);
  Chart other = profile_chart();
  other.id = "profile-2";
  CHECK_NOTHROW(d.figure("fig-c", chart_svg_element(other), "C"));
  CHECK(duplicate_ids(d.render()).empty());

  CHECK(duplicate_ids("<a id=\"x\"/><b id=\"y\"/><c id=\"x\"/><d data-id=\"y\"/>") ==
        std::vector<std::string>{"x"});
  CHECK(svg_id("3 charts") == "svg-3-charts");
}

TEST_CASE("report: the page is written atomically") {
  const fs::path dir = fs::temp_directory_path() / ("voidsign-report-" + std::to_string(getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  Document d("written");
  d.paragraph("text");
  d.write(dir / "report.html");
  std::ifstream in(dir / "report.html");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  CHECK(text == d.render());
  std::size_t n_files = 0;
  for (const auto& e : fs::directory_iterator(dir)) {
    ++n_files;
    CHECK(e.path().filename() == "report.html");  // no temporary file left behind
  }
  CHECK(n_files == 1);
  fs::remove_all(dir);
}

TEST_CASE("report: the XML check itself rejects broken markup") {
  CHECK_FALSE(parse_xml("<svg><g></svg>", true).ok);
  CHECK_FALSE(parse_xml("<p>a & b</p>", true).ok);
}
