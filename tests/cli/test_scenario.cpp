// SPDX-License-Identifier: GPL-3.0-or-later
// Scenario reader: every rejected input names the file, the line and column of the offending
// key or value, its key path and a hint; valid input parses to the expected values.
#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>
#include <unistd.h>

#include "cli/errors.hpp"
#include "cli/scenario/catalogue.hpp"
#include "cli/scenario/scenario.hpp"
#include "cli/scenario/sha256.hpp"
#include "cli/scenario/suggest.hpp"

using namespace voidsign::cli;

namespace {

const std::string k_file = "case.yaml";

// Two layers in a 100 m × 50 m block: a valid start for most cases (5 lines).
const std::string k_head =
    "format: 1\n"
    "domain: {width: 100, depth: 50}\n"
    "layers:\n"
    "  - {material: chalk, thickness: 10}\n"
    "  - {material: limestone-strong}\n";
const std::string k_gravity = "loads: {gravity: {k0: auto}}\n";

std::string with_voids(const std::string& items) { return k_head + "voids:\n" + items; }

std::string error_of(const std::string& yaml) {
  try {
    parse_scenario(yaml, k_file);
  } catch (const InputError& e) {
    return e.what();
  }
  return "(accepted without error)";
}

bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

// "case.yaml:LINE:COL:" of the `nth` occurrence of `token` in `text` (-1: the last one).
std::string at(const std::string& text, const std::string& token, int nth) {
  std::size_t pos = nth < 0 ? text.rfind(token) : text.find(token);
  for (int k = 0; k < nth && pos != std::string::npos; ++k) pos = text.find(token, pos + 1);
  REQUIRE_MESSAGE(pos != std::string::npos, "token not in the test text: " << token);
  int line = 1;
  std::size_t line_start = 0;
  for (std::size_t i = 0; i < pos; ++i)
    if (text[i] == '\n') {
      ++line;
      line_start = i + 1;
    }
  return k_file + ":" + std::to_string(line) + ":" + std::to_string(pos - line_start + 1) + ":";
}

// The error message of `yaml` starts at `token` (its nth occurrence, by default the last),
// names `key` and contains `hint`.
void expect_error(const std::string& yaml, const std::string& token, const std::string& key,
                  const std::string& hint, int nth = -1) {
  const std::string msg = error_of(yaml);
  INFO("yaml:\n" << yaml << "\nmessage: " << msg);
  CHECK(msg.rfind(at(yaml, token, nth), 0) == 0);
  CHECK(has(msg, "key '" + key + "': "));
  CHECK(has(msg, hint));
}

bool any_warning(const Scenario& sc, const std::string& part) {
  for (const auto& w : sc.warnings)
    if (has(w, part)) return true;
  return false;
}

}  // namespace

TEST_CASE("edit distance and suggestions") {
  CHECK(edit_distance("radius", "radius") == 0);
  CHECK(edit_distance("raduis", "radius") == 1);  // adjacent swap
  CHECK(edit_distance("near_void", "near-void") == 0);
  CHECK(edit_distance("Depth", "depth") == 0);
  CHECK(edit_distance("kitten", "sitting") == 3);
  CHECK(edit_distance("", "abc") == 3);
  const std::vector<std::string> keys = {"shape", "x", "depth", "radius", "contents"};
  CHECK(nearest_word("raduis", keys) == "radius");
  CHECK(nearest_word("dept", keys) == "depth");
  CHECK_FALSE(nearest_word("colour", keys).has_value());
  CHECK(suggestion_hint("raduis", keys) == "did you mean 'radius'?");
  CHECK(suggestion_hint("colour", keys) == "expected one of: shape, x, depth, radius, contents");
  const std::vector<std::string> names = {"chalk", "stiff-clay", "soft-clay", "dense-sand"};
  CHECK(suggestion_hint("clay", names) == "did you mean 'stiff-clay' or 'soft-clay'?");
  CHECK(suggestion_hint("sand", names) == "did you mean 'dense-sand'?");
  CHECK(suggestion_hint("basalt", names) == "expected one of: chalk, stiff-clay, soft-clay, dense-sand");
}

TEST_CASE("sha256 test vectors") {
  CHECK(sha256_hex("abc") ==
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  CHECK(sha256_hex("") == "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  CHECK(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq") ==
        "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  CHECK(sha256_hex(std::string(1000000, 'a')) ==
        "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST_CASE("material catalogue") {
  const auto& cat = material_catalogue();
  CHECK(cat.size() >= 10);
  for (const auto& e : cat) {
    INFO(e.m.name);
    CHECK(e.m.density > 0);
    CHECK(e.m.young > 0);
    CHECK(e.m.poisson > -1);
    CHECK(e.m.poisson < 0.5);
    CHECK(e.m.damping > 0);
    CHECK(e.m.ucs >= 0);
    CHECK(e.m.tensile >= 0);
    CHECK(e.vp > e.vs);
    CHECK(e.vs > 0);
    CHECK_FALSE(e.description.empty());
    CHECK_FALSE(e.m.source.empty());
    for (const auto* s : {&e.src_density, &e.src_young, &e.src_poisson, &e.src_damping,
                          &e.src_ucs, &e.src_tensile, &e.src_vp, &e.src_vs})
      CHECK_FALSE(s->empty());
    CHECK(e.m.name.find_first_not_of("abcdefghijklmnopqrstuvwxyz-") == std::string::npos);
    CHECK(find_material(e.m.name) == &e);
  }
  CHECK(find_material("no-such-rock") == nullptr);
  // The plain name used in the format's own example is the strong limestone.
  REQUIRE(find_material("limestone") != nullptr);
  CHECK(find_material("limestone")->m.young == find_material("limestone-strong")->m.young);
  // Rocks have a strength; uncemented soils have none (0), said so in the note.
  CHECK(find_material("granite")->m.ucs > 0);
  CHECK(find_material("dense-sand")->m.ucs == 0);
  CHECK(has(find_material("dense-sand")->src_ucs, "0 is used"));
  CHECK(has(find_material("limestone-weak")->src_young, "from memory"));
  CHECK(has(find_material("granite")->src_density, "secondary source"));
  CHECK(has(find_material("granite")->src_damping, "derived"));
  CHECK(has(find_material("basalt")->src_young, "verified"));
  // The basalt shear-wave speed is derived from its verified E and nu: recompute it.
  const auto& b = find_material("basalt")->m;
  const double vs = std::sqrt(b.young / (2 * (1 + b.poisson)) / b.density);
  CHECK(vs == doctest::Approx(find_material("basalt")->vs).epsilon(0.002));
}

TEST_CASE("a full valid scenario parses to the expected values") {
  const std::string yaml = R"(format: 1
title: Test gallery under an invented orchard
model: plane-strain
domain:
  width: 200
  depth: 80
  boundaries: {sides: fixed, bottom: roller}
materials:
  cap-silt:
    density: 1700
    vp: 600
    vs: 250
  weak-chalk:
    density: 1800
    young: 4.0e9
    poisson: 0.28
    damping: 0.02
    ucs: 5.0e6
    tensile: 0.3e6
layers:
  - {material: cap-silt, thickness: 3}
  - {material: weak-chalk, thickness: 40}
  - {material: granite}
voids:
  - {shape: circle, x: 0, depth: 15, radius: 2.5}
  - {shape: rectangle, x: 30, depth: 20, width: 6, height: 2.5, contents: water}
  - {shape: ellipse, x: -40, depth: 25, axes: [4, 1.5], angle: 20, contents: {pressure: -2.0e4}}
  - {shape: polygon, points: [[-5, 30], [5, 30], [5, 34], [-5, 34]], contents: {water: {table-depth: 31}}}
loads:
  gravity: {k0: 0.6}
  surface:
    - {from: -5, to: 5, pressure: 50.0e3}
  ground-loss:
    - {void: 0, percent: 1.0}
analyses:
  static: {}
mesh: {order: 1, size: 4, near-void: 0.2, surface: 1}
output: {dir: out/gallery}
)";
  const Scenario sc = parse_scenario(yaml, "/tmp/voidsign-test/site.yaml");
  INFO("warnings: " << sc.warnings.size() << (sc.warnings.empty() ? "" : sc.warnings[0]));
  CHECK(sc.warnings.empty());
  CHECK(sc.file == std::filesystem::path("/tmp/voidsign-test/site.yaml"));
  CHECK(sc.sha256 == sha256_hex(yaml));
  CHECK(sc.format == 1);
  CHECK(sc.title == "Test gallery under an invented orchard");
  CHECK(sc.model == Model::plane_strain);
  CHECK(sc.domain.width == 200);
  CHECK(sc.domain.depth == 80);
  CHECK(sc.domain.sides == Boundary::fixed);
  CHECK(sc.domain.bottom == Boundary::roller);

  REQUIRE(sc.materials.size() == 3);
  const Material& silt = sc.materials.at("cap-silt");
  const double g = 1700.0 * 250 * 250;
  const double nu = (600.0 * 600 - 2 * 250.0 * 250) / (2 * (600.0 * 600 - 250.0 * 250));
  CHECK(silt.poisson == doctest::Approx(nu));
  CHECK(silt.poisson == doctest::Approx(0.394958).epsilon(1e-5));
  CHECK(silt.young == doctest::Approx(2 * g * (1 + nu)));
  CHECK(silt.damping == 0);
  CHECK(has(silt.source, "vp and vs"));
  CHECK(has(silt.source, "damping"));
  const Material& chalk = sc.materials.at("weak-chalk");
  CHECK(chalk.young == 4.0e9);
  CHECK(chalk.poisson == 0.28);
  CHECK(chalk.damping == 0.02);
  CHECK(chalk.ucs == 5.0e6);
  CHECK(chalk.tensile == 0.3e6);
  CHECK(chalk.source == "scenario file");
  CHECK(sc.materials.at("granite").young == find_material("granite")->m.young);
  CHECK(has(sc.materials.at("granite").source, "catalogue"));

  REQUIRE(sc.layers.size() == 3);
  CHECK(sc.layers[0].material == "cap-silt");
  CHECK(sc.layers[0].thickness == 3);
  CHECK(sc.layers[1].thickness == 40);
  CHECK(sc.layers[2].thickness == 0);
  CHECK(sc.layers[1].loc.line == 22);
  CHECK(sc.layers[1].loc.key == "layers.1");

  REQUIRE(sc.voids.size() == 4);
  const Void& c = sc.voids[0];
  CHECK(c.shape == Void::Shape::circle);
  CHECK(c.x == 0);
  CHECK(c.depth == 15);
  CHECK(c.radius == 2.5);
  CHECK(c.contents == Contents::empty);
  CHECK(c.loc.line == 25);
  CHECK(c.loc.column == 5);
  CHECK(c.loc.key == "voids.0");
  const Void& r = sc.voids[1];
  CHECK(r.shape == Void::Shape::rectangle);
  CHECK(r.width == 6);
  CHECK(r.height == 2.5);
  CHECK(r.angle == 0);
  CHECK(r.contents == Contents::water);
  CHECK_FALSE(r.water_table_depth.has_value());
  const Void& e = sc.voids[2];
  CHECK(e.shape == Void::Shape::ellipse);
  CHECK(e.axes[0] == 4);
  CHECK(e.axes[1] == 1.5);
  CHECK(e.angle == 20);
  CHECK(e.contents == Contents::pressure);
  CHECK(e.pressure == -2.0e4);  // a negative gauge pressure is allowed
  const Void& p = sc.voids[3];
  CHECK(p.shape == Void::Shape::polygon);
  REQUIRE(p.points.size() == 4);
  CHECK(p.points[2][0] == 5);
  CHECK(p.points[2][1] == 34);
  CHECK(p.x == doctest::Approx(0));  // area centroid
  CHECK(p.depth == doctest::Approx(32));
  CHECK(p.contents == Contents::water);
  CHECK(p.water_table_depth == 31);

  CHECK(sc.loads.gravity);
  CHECK(sc.loads.k0 == 0.6);
  REQUIRE(sc.loads.surface.size() == 1);
  CHECK(sc.loads.surface[0].from == -5);
  CHECK(sc.loads.surface[0].to == 5);
  CHECK(sc.loads.surface[0].pressure == 50.0e3);
  REQUIRE(sc.loads.ground_loss.size() == 1);
  CHECK(sc.loads.ground_loss[0].void_index == 0);
  CHECK(sc.loads.ground_loss[0].percent == 1.0);

  CHECK(sc.analyses.static_);
  CHECK_FALSE(sc.analyses.ambient);
  CHECK(sc.mesh.order == 1);
  CHECK(sc.mesh.size == 4);
  CHECK(sc.mesh.near_void == 0.2);
  CHECK(sc.mesh.surface == 1);
  CHECK(sc.sensors.empty());
  CHECK(sc.output_dir == std::filesystem::path("/tmp/voidsign-test/out/gallery"));
}

TEST_CASE("defaults") {
  const Scenario sc = parse_scenario(
      with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n") + k_gravity,
      "/tmp/voidsign-test/quiet-field.yaml");
  CHECK(sc.title == "quiet-field");
  CHECK(sc.model == Model::plane_strain);
  CHECK(sc.domain.sides == Boundary::roller);
  CHECK(sc.domain.bottom == Boundary::fixed);
  CHECK(sc.loads.gravity);
  CHECK_FALSE(sc.loads.k0.has_value());  // auto
  CHECK(sc.analyses.static_);            // no analyses block: static
  CHECK(sc.mesh.order == 2);
  CHECK(sc.mesh.size == doctest::Approx(2.5));       // min(50, 100) / 20
  CHECK(sc.mesh.near_void == doctest::Approx(0.25));  // radius / 8
  CHECK(sc.mesh.surface == doctest::Approx(2.5 / 3));
  CHECK(sc.output_dir.empty());
  CHECK(sc.warnings.empty());
  CHECK(sc.materials.size() == 2);
  CHECK(sc.materials.at("chalk").density == find_material("chalk")->m.density);

  // near-void: the smallest feature over the voids / 8, but at least size / 200.
  const Scenario two = parse_scenario(
      with_voids("  - {shape: ellipse, x: -20, depth: 15, axes: [4, 1.6]}\n"
                 "  - {shape: rectangle, x: 20, depth: 15, width: 6, height: 2}\n"),
      k_file);
  CHECK(two.mesh.near_void == doctest::Approx(1.0 / 8));  // rectangle: height/2 / 8
  const Scenario tiny =
      parse_scenario(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 0.04}\n"), k_file);
  CHECK(tiny.mesh.near_void == doctest::Approx(2.5 / 200));
  const Scenario poly = parse_scenario(
      with_voids("  - {shape: polygon, points: [[0, 10], [8, 10], [8, 14], [0, 14]]}\n"), k_file);
  CHECK(poly.mesh.near_void == doctest::Approx(2.0 / 8));  // bbox 8 × 4: 4/2 / 8
}

TEST_CASE("load_scenario reads a file and resolves the output folder next to it") {
  const auto dir = std::filesystem::temp_directory_path() /
                   ("voidsign-scn-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const auto file = dir / "scn.yaml";
  const std::string text =
      with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n") + "output: {dir: res}\n";
  {
    std::ofstream(file, std::ios::binary) << text;
  }
  const Scenario sc = load_scenario(file);
  CHECK(sc.file == std::filesystem::absolute(file));
  CHECK(sc.sha256 == sha256_hex(text));
  CHECK(sc.output_dir == dir / "res");
  std::filesystem::remove_all(dir);

  const std::string absolute_out = with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n") +
                                   "output: {dir: /srv/results/x}\n";
  CHECK(parse_scenario(absolute_out, "/a/b.yaml").output_dir == "/srv/results/x");
}

TEST_CASE("missing file") {
  try {
    load_scenario("/nonexistent-voidsign/nofile.yaml");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(has(e.what(), "/nonexistent-voidsign/nofile.yaml"));
    CHECK(has(e.what(), "no such scenario file"));
  }
}

TEST_CASE("YAML syntax errors carry the position") {
  const std::string yaml = "format: 1\ndomain: {width: 100, depth: 50\nlayers: []\n";
  const std::string msg = error_of(yaml);
  CHECK(has(msg, "case.yaml:3:"));
  CHECK(has(msg, "YAML syntax error"));
  const std::string tab = "format: 1\ndomain:\n  width: 100\n   depth: 50\n";
  CHECK(has(error_of(tab), "case.yaml:4:"));
  CHECK(has(error_of(""), "case.yaml:1:1: the scenario is empty"));
  CHECK(has(error_of("- a\n- b\n"), "must be a mapping"));
  CHECK(has(error_of(k_head + "---\nformat: 1\n"), "case.yaml:7:1:"));
}

TEST_CASE("unknown keys name the nearest valid key") {
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, raduis: 2}\n"), "raduis",
               "voids.0.raduis", "unknown key 'raduis' (did you mean 'radius'?)");
  expect_error(k_head + "meshh: {size: 2}\n", "meshh", "meshh",
               "unknown key 'meshh' (did you mean 'mesh'?)");
  expect_error(k_head + "mesh: {near_void: 2}\n", "near_void", "mesh.near_void",
               "did you mean 'near-void'?");
  expect_error(k_head + "mesh: {colour: red}\n", "colour", "mesh.colour",
               "expected one of: order, size, near-void, surface");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2, angle: 10}\n"),
               "angle", "voids.0.angle", "unknown key 'angle'");
  expect_error(k_head + "analyses: {static: {tolerance: 1}}\n", "tolerance",
               "analyses.static.tolerance", "no keys are valid here");
  expect_error(k_head + "mesh: {size: 2, size: 3}\n", "size", "mesh.size",
               "duplicate key (first given at line 6)");
  expect_error(k_head + "model: plane-stress\n", "plane-stress", "model",
               "unknown model 'plane-stress' (did you mean 'plane-strain'?)");
  expect_error(with_voids("  - {shape: circel, x: 0, depth: 15, radius: 2}\n"), "circel",
               "voids.0.shape", "did you mean 'circle'?");
}

TEST_CASE("wrong types") {
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: big}\n"), "big",
               "voids.0.radius", "expected a number, found the value 'big'");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: \"2\"}\n"), "\"2\"",
               "voids.0.radius", "remove the quotes");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: .inf, radius: 2}\n"), ".inf",
               "voids.0.depth", "expected a finite number");
  const std::string list_for_map =
      "format: 1\ndomain: [100, 50]\nlayers:\n  - {material: chalk}\n";
  expect_error(list_for_map, "[100", "domain", "expected a mapping, found a list");
  const std::string map_for_list =
      "format: 1\ndomain: {width: 100, depth: 50}\nlayers: {material: chalk}\n";
  expect_error(map_for_list, "{material", "layers", "expected a list, found a mapping");
  expect_error(with_voids("  - {shape: ellipse, x: 0, depth: 15, axes: 4}\n"), "4}",
               "voids.0.axes", "expected a list, found the value '4'");
  expect_error(with_voids("  - {shape: ellipse, x: 0, depth: 15, axes: [4, 2, 1]}\n"), "[4",
               "voids.0.axes", "expected two semi-axes");
  expect_error(k_head + "mesh: {order: 1.5}\n", "1.5", "mesh.order", "expected a whole number");
  expect_error(k_head + "mesh: {order: 3}\n", "3}", "mesh.order", "must be 1 (linear) or 2");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2, contents: air}\n"),
               "air", "voids.0.contents", "unknown contents 'air'");
  expect_error(k_head + "sensors: {kind: levelling}\n", "{kind", "sensors", "expected a list");
  expect_error(k_head + "loads: {gravity: {k0: sometimes}}\n", "sometimes", "loads.gravity.k0",
               "expected 'auto' or a number greater than 0");
}

TEST_CASE("missing required keys") {
  const std::string yaml = with_voids("  - {shape: circle, x: 0, depth: 15}\n");
  expect_error(yaml, "{shape", "voids.0.radius", "required key is missing");
  expect_error("domain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n", "domain",
               "format", "required key is missing (write 'format: 1')");
  expect_error("format: 1\ndomain: {depth: 50}\nlayers:\n  - {material: chalk}\n", "{depth",
               "domain.width", "required key is missing");
  expect_error("format: 1\ndomain: {width: 100, depth: 50}\n", "format", "layers",
               "required key is missing");
  expect_error(
      "format: 1\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n"
      "  - {material: granite}\n",
      "{material: chalk", "layers.0.thickness", "every layer but the last needs one");
  expect_error(
      "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  rock-a: {density: 2000, "
      "young: 1.0e9}\nlayers:\n  - {material: rock-a}\n",
      "{density", "materials.rock-a.poisson", "required key is missing");
  expect_error(
      "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  rock-a: {density: 2000}\n"
      "layers:\n  - {material: rock-a}\n",
      "{density", "materials.rock-a", "needs young and poisson, or the wave speeds vp and vs");
  expect_error(
      "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  rock-a: {density: 2000, "
      "young: 1.0e9, poisson: 0.3, vs: 300}\nlayers:\n  - {material: rock-a}\n",
      "300", "materials.rock-a.vs", "not both");
  expect_error(with_voids("  - {x: 0, depth: 15, radius: 2}\n"), "{x", "voids.0.shape",
               "required key is missing");
}

namespace {
std::string with_material(const std::string& spec) {
  return "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  rock-a: " + spec +
         "\nlayers:\n  - {material: rock-a}\n";
}
}  // namespace

TEST_CASE("material values") {
  expect_error(with_material("{density: 2000, young: 1.0e9, poisson: 0.5}"), "0.5",
               "materials.rock-a.poisson", "between -1 and 0.5");
  expect_error(with_material("{density: 2000, young: 1.0e9, poisson: -1}"), "-1",
               "materials.rock-a.poisson", "between -1 and 0.5");
  expect_error(with_material("{density: 2000, young: -1.0e9, poisson: 0.3}"), "-1.0e9",
               "materials.rock-a.young", "must be greater than 0");
  expect_error(with_material("{density: 0, young: 1.0e9, poisson: 0.3}"), "0,",
               "materials.rock-a.density", "must be greater than 0");
  expect_error(with_material("{density: 2000, vp: 1000, vs: 1000}"), "1000}",
               "materials.rock-a.vs", "must be smaller than vp");
  expect_error(with_material("{density: 2000, vp: 1100, vs: 1000}"), "1000}",
               "materials.rock-a.vs", "outside (-1, 0.5)");
  expect_error(with_material("{density: 2000, vp: 1000, vs: 0}"), "0}", "materials.rock-a.vs",
               "must be greater than 0");
  expect_error(with_material("{density: 2000, young: 1.0e9, poisson: 0.3, damping: -0.1}"),
               "-0.1", "materials.rock-a.damping", "must be 0 or more");
  // vp/vs between 2/sqrt(3) and sqrt(2): a negative but valid Poisson's ratio, with a warning.
  const Scenario sc = parse_scenario(with_material("{density: 2000, vp: 1300, vs: 1000}"), k_file);
  CHECK(sc.materials.at("rock-a").poisson < 0);
  CHECK(any_warning(sc, "negative Poisson's ratio"));
  // An explicit material replaces a catalogue entry of the same name.
  const Scenario over = parse_scenario(
      "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  chalk: {density: 1500, "
      "young: 1.0e9, poisson: 0.2}\nlayers:\n  - {material: chalk}\n",
      k_file);
  CHECK(over.materials.at("chalk").density == 1500);
  // An unused explicit material is worth a warning.
  const Scenario unused = parse_scenario(
      "format: 1\ndomain: {width: 100, depth: 50}\nmaterials:\n  spare: {density: 1500, "
      "young: 1.0e9, poisson: 0.2}\nlayers:\n  - {material: chalk}\n",
      k_file);
  CHECK(any_warning(unused, "no layer uses it"));
  CHECK(unused.materials.count("spare") == 0);
}

TEST_CASE("unknown material names suggest the nearest") {
  const std::string yaml =
      "format: 1\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalky, thickness: "
      "5}\n  - {material: granite}\n";
  expect_error(yaml, "chalky", "layers.0.material", "did you mean 'chalk'?");
  expect_error(yaml, "chalky", "layers.0.material", "unknown material 'chalky'");
}

TEST_CASE("non-positive sizes") {
  struct Case {
    std::string yaml, token, key;
  };
  const std::string layers = "layers:\n  - {material: chalk}\n";
  const std::string circle = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  const std::vector<Case> cases = {
      {"format: 1\ndomain: {width: -100, depth: 50}\n" + layers, "-100", "domain.width"},
      {"format: 1\ndomain: {width: 100, depth: 0}\n" + layers, "0}", "domain.depth"},
      {k_head + "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 0}\n", "0}",
       "voids.0.radius"},
      {k_head + "voids:\n  - {shape: ellipse, x: 0, depth: 15, axes: [4, 0]}\n", "0]",
       "voids.0.axes.1"},
      {k_head + "voids:\n  - {shape: rectangle, x: 0, depth: 15, width: 4, height: -1}\n", "-1",
       "voids.0.height"},
      {"format: 1\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk, thickness: "
       "0}\n  - {material: granite}\n",
       "0}", "layers.0.thickness"},
      {k_head + circle + "mesh: {size: 0}\n", "0}", "mesh.size"},
      {k_head + circle + "mesh: {near-void: -0.1}\n", "-0.1", "mesh.near-void"},
      {k_head + circle + "mesh: {surface: 0}\n", "0}", "mesh.surface"},
  };
  for (const auto& c : cases) expect_error(c.yaml, c.token, c.key, "must be greater than 0");
}

TEST_CASE("k0") {
  expect_error(k_head + "loads: {gravity: {k0: -0.5}}\n", "-0.5", "loads.gravity.k0",
               "k0 must be greater than 0");
  expect_error(k_head + "loads: {gravity: {k0: 0}}\n", "0}", "loads.gravity.k0",
               "k0 must be greater than 0");
}

TEST_CASE("layer thicknesses against the domain depth") {
  const std::string start = "format: 1\ndomain: {width: 100, depth: 50}\nlayers:\n";
  // The last layer runs to the bottom: the others must end above it.
  expect_error(start + "  - {material: chalk, thickness: 10}\n  - {material: shale, thickness: "
                       "40}\n  - {material: granite}\n",
               "40", "layers.1.thickness", "at or below the bottom of the domain");
  // Every layer has a thickness: their sum may reach, not pass, the bottom.
  expect_error(start + "  - {material: chalk, thickness: 10}\n  - {material: granite, "
                       "thickness: 45}\n",
               "45", "layers.1.thickness", "below the bottom of the domain");
  const Scenario exact = parse_scenario(
      start + "  - {material: chalk, thickness: 10}\n  - {material: granite, thickness: 40}\n",
      k_file);
  CHECK(exact.layers.back().thickness == 0);
  CHECK_FALSE(any_warning(exact, "last layer"));
  const Scenario shorter = parse_scenario(
      start + "  - {material: chalk, thickness: 10}\n  - {material: granite, thickness: 20}\n",
      k_file);
  CHECK(any_warning(shorter, "the last layer runs to the bottom of the domain: 40 m thick"));
  CHECK(shorter.layers.back().thickness == 0);
}

TEST_CASE("voids inside the domain") {
  expect_error(with_voids("  - {shape: circle, x: 49, depth: 15, radius: 2}\n"), "49",
               "voids.0.x", "right side");
  expect_error(with_voids("  - {shape: circle, x: -49, depth: 15, radius: 2}\n"), "-49",
               "voids.0.x", "left side");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 49, radius: 2}\n"), "49",
               "voids.0.depth", "below the bottom of the domain");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 40], [3, 40], [3, 52]]}\n"),
               "[3, 52]", "voids.0.points.2", "below the bottom of the domain");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 40], [52, 40], [3, 45]]}\n"),
               "[52, 40]", "voids.0.points.1", "right side");
}

TEST_CASE("voids breaking the surface") {
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 1.5, radius: 2}\n"), "1.5",
               "voids.0.depth", "breaks the ground surface");
  // An ellipse 8 m × 2 m at 3 m depth fits lying down, not standing up.
  CHECK_NOTHROW(parse_scenario(with_voids("  - {shape: ellipse, x: 0, depth: 3, axes: [4, 1]}\n"),
                               k_file));
  expect_error(with_voids("  - {shape: ellipse, x: 0, depth: 3, axes: [4, 1], angle: 90}\n"), "3,",
               "voids.0.depth", "its top is at depth -1 m");
  // A rectangle 8 m × 1 m at 3 m depth: flat it fits; turned by 45° its corner is at 0.18 m.
  CHECK_NOTHROW(parse_scenario(
      with_voids("  - {shape: rectangle, x: 0, depth: 3, width: 8, height: 1}\n"), k_file));
  expect_error(with_voids("  - {shape: rectangle, x: 0, depth: 3, width: 8, height: 1, angle: 45}\n"),
               "3,", "voids.0.depth", "breaks the ground surface");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 5], [2, -0.5], [4, 5]]}\n"),
               "[2, -0.5]", "voids.0.points.1", "breaks the ground surface");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 5], [2, 0], [4, 5]]}\n"), "[2, 0]",
               "voids.0.points.1", "breaks the ground surface");
}

TEST_CASE("voids close to the boundaries are a warning") {
  const Scenario sc =
      parse_scenario(with_voids("  - {shape: circle, x: 0, depth: 2.1, radius: 2}\n"), k_file);
  CHECK(any_warning(sc, "closer to the ground surface"));
  CHECK(any_warning(sc, "case.yaml:7:5: key 'voids.0'"));
  const Scenario side =
      parse_scenario(with_voids("  - {shape: circle, x: 47.9, depth: 15, radius: 2}\n"), k_file);
  CHECK(any_warning(side, "closer to a side"));
  const Scenario bottom =
      parse_scenario(with_voids("  - {shape: circle, x: 0, depth: 47.9, radius: 2}\n"), k_file);
  CHECK(any_warning(bottom, "closer to the bottom"));
}

TEST_CASE("overlapping voids") {
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n"
                          "  - {shape: rectangle, x: 3, depth: 15, width: 4, height: 1}\n"),
               "{shape: rectangle", "voids.1", "voids 0 and 1 overlap");
  // A small circle wholly inside an ellipse.
  expect_error(with_voids("  - {shape: ellipse, x: 0, depth: 15, axes: [6, 3]}\n"
                          "  - {shape: circle, x: 10, depth: 30, radius: 1}\n"
                          "  - {shape: circle, x: 1, depth: 15, radius: 0.5}\n"),
               "{shape: circle, x: 1,", "voids.2", "voids 0 and 2 overlap");
  // A polygon crossing a circle.
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n"
                          "  - {shape: polygon, points: [[1, 10], [2, 10], [2, 20], [1, 20]]}\n"),
               "{shape: polygon", "voids.1", "voids 0 and 1 overlap");
  // Bounding boxes overlap but the circles do not (centres 4.95 m apart, radii 2 m).
  CHECK_NOTHROW(parse_scenario(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2}\n"
                                          "  - {shape: circle, x: 3.5, depth: 18.5, radius: 2}\n"),
                               k_file));
}

TEST_CASE("polygons") {
  expect_error(with_voids("  - {shape: polygon, points: [[0, 10], [4, 10]]}\n"), "[[0",
               "voids.0.points", "at least 3 points, found 2");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 10], [4, 14], [4, 10], [0, 14]]}\n"),
               "[[0", "voids.0.points", "crosses itself: edges 0-1 and 2-3");
  expect_error(
      with_voids("  - {shape: polygon, points: [[0, 10], [4, 10], [4, 14], [0, 14], [0, 10]]}\n"),
      "[0, 10]]", "voids.0.points.4", "the last point repeats the first");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 10], [4, 10], [8, 10]]}\n"), "[[0",
               "voids.0.points", "no area");
  expect_error(with_voids("  - {shape: polygon, points: [[0, 10], [4, 10, 1], [4, 14]]}\n"),
               "[4, 10, 1]", "voids.0.points.1", "expected a pair [x, depth]");
  // Stored as given, in the given order (here clockwise on screen).
  const Scenario sc = parse_scenario(
      with_voids("  - {shape: polygon, points: [[0, 10], [0, 14], [6, 14], [6, 10], [3, 12]]}\n"),
      k_file);
  REQUIRE(sc.voids[0].points.size() == 5);
  CHECK(sc.voids[0].points[4][0] == 3);
  CHECK(sc.voids[0].points[4][1] == 12);
}

TEST_CASE("void contents") {
  const Scenario sc = parse_scenario(
      with_voids("  - {shape: circle, x: -20, depth: 15, radius: 2, contents: {pressure: -5.0e3}}\n"
                 "  - {shape: circle, x: 0, depth: 15, radius: 2, contents: water}\n"
                 "  - {shape: circle, x: 20, depth: 15, radius: 2, contents: {water: {table-depth: 14}}}\n"
                 "  - {shape: circle, x: 40, depth: 15, radius: 2, contents: empty}\n"),
      k_file);
  CHECK(sc.voids[0].contents == Contents::pressure);
  CHECK(sc.voids[0].pressure == -5.0e3);
  CHECK(sc.voids[1].contents == Contents::water);
  CHECK_FALSE(sc.voids[1].water_table_depth);
  CHECK(sc.voids[2].water_table_depth == 14);
  CHECK(sc.voids[3].contents == Contents::empty);
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2, contents: {pressure: .nan}}\n"),
               ".nan", "voids.0.contents.pressure", "finite");
  expect_error(with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2, contents: {water: "
                          "{table-depth: -1}}}\n"),
               "-1", "voids.0.contents.water.table-depth", "must be 0 or more");
  const Scenario dry = parse_scenario(
      with_voids("  - {shape: circle, x: 0, depth: 15, radius: 2, contents: {water: {table-depth: 20}}}\n"),
      k_file);
  CHECK(any_warning(dry, "holds no water"));
}

TEST_CASE("surface loads") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  expect_error(k_head + v + "loads:\n  surface:\n    - {from: 5, to: 5, pressure: 1.0e3}\n", "5, p",
               "loads.surface.0.to", "must be greater than 'from'");
  expect_error(k_head + v + "loads:\n  surface:\n    - {from: -60, to: 5, pressure: 1.0e3}\n",
               "-60", "loads.surface.0.from", "outside the domain");
  expect_error(k_head + v + "loads:\n  surface:\n    - {from: 0, to: 60, pressure: 1.0e3}\n", "60",
               "loads.surface.0.to", "outside the domain (x from -50 to 50 m)");
  const Scenario two = parse_scenario(
      k_head + v + "loads:\n  surface:\n    - {from: -50, to: 0, pressure: 1.0e3}\n"
                   "    - {from: -10, to: 50, pressure: -2.0e3}\n",
      k_file);
  CHECK(two.loads.surface.size() == 2);
  CHECK(two.loads.surface[1].pressure == -2.0e3);
  expect_error(k_head + v + "loads:\n  surface:\n    - {from: 0, to: 6, pressure: lots}\n", "lots",
               "loads.surface.0.pressure", "expected a number");
}

TEST_CASE("ground loss") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  expect_error(k_head + v + "loads:\n  ground-loss:\n    - {void: 1, percent: 1}\n", "1,",
               "loads.ground-loss.0.void", "out of range: the voids are numbered 0 to 0");
  expect_error(k_head + v + "loads:\n  ground-loss:\n    - {void: 0, percent: 0}\n", "0}",
               "loads.ground-loss.0.percent", "between 0 and 100");
  expect_error(k_head + v + "loads:\n  ground-loss:\n    - {void: 0, percent: 100}\n", "100",
               "loads.ground-loss.0.percent", "between 0 and 100");
  expect_error(k_head + v + "loads:\n  ground-loss:\n    - {void: 0, percent: 1}\n    - {void: 0, "
                            "percent: 2}\n",
               "0, percent: 2", "loads.ground-loss.1.void", "already has a ground loss");
  const Scenario big = parse_scenario(
      k_head + v + "loads:\n  ground-loss:\n    - {void: 0, percent: 8}\n", k_file);
  CHECK(any_warning(big, "far above usual"));
}

TEST_CASE("axisymmetric model") {
  const std::string head =
      "format: 1\nmodel: axisymmetric\ndomain: {width: 40, depth: 50}\nlayers:\n"
      "  - {material: chalk}\n";
  const Scenario ok = parse_scenario(
      head + "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n"
             "  - {shape: ellipse, x: 0, depth: 25, axes: [4, 2], angle: 90}\n"
             "  - {shape: polygon, points: [[-3, 32], [3, 32], [2, 36], [-2, 36]]}\n"
             "loads: {gravity: {}}\n",
      k_file);
  CHECK(ok.model == Model::axisymmetric);
  CHECK(ok.loads.gravity);
  CHECK_FALSE(ok.loads.k0);
  expect_error(head + "voids:\n  - {shape: circle, x: 5, depth: 15, radius: 2}\n", "5, depth",
               "voids.0.x", "centred on the axis (x: 0)");
  expect_error(head + "voids:\n  - {shape: ellipse, x: 0, depth: 15, axes: [4, 2], angle: 20}\n",
               "{shape", "voids.0", "multiple of 90 degrees");
  expect_error(head + "voids:\n  - {shape: polygon, points: [[-3, 32], [3, 32], [2, 36], [-1, 36]]}\n",
               "[2, 36]", "voids.0.points.2", "symmetric about the axis");
  expect_error(head + "voids:\n  - {shape: circle, x: 0, depth: 25, radius: 21}\n", "0,",
               "voids.0.x", "outer edge");
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  expect_error(head + v + "loads:\n  surface:\n    - {from: -1, to: 5, pressure: 1.0e3}\n", "-1",
               "loads.surface.0.from", "axisymmetric model: 'from' is a radius");
}

TEST_CASE("model and format") {
  // A 3d model needs the block's length along y.
  expect_error(k_head + "model: 3d\n", "{width", "domain.length", "required in 3d");
  expect_error(with_voids("  - {shape: sphere, x: 0, depth: 15, radius: 2}\n"), "sphere",
               "voids.0.shape", "3d models");
  const std::string two = "format: 2\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n";
  expect_error(two, "2", "format", "format 2 is not supported; this version reads format 1");
}

TEST_CASE("analyses, sensors and mesh warnings") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  const Scenario sc = parse_scenario(
      k_head + v +
          "analyses:\n  static: {}\n  modal: {modes: 10}\n  ambient:\n    noise: high\n"
          "sensors:\n  - radar-typical\n  - {kind: levelling, precision: 0.5e-3, spacing: 10}\n"
          "mesh: {size: 1, near-void: 2}\n",
      k_file);
  CHECK(sc.analyses.static_);
  REQUIRE(sc.analyses.ambient);
  CHECK(sc.analyses.ambient->noise == AmbientAnalysis::Noise::high);
  REQUIRE(sc.analyses.modal);
  CHECK(sc.analyses.modal->modes == 10);
  REQUIRE(sc.sensors.size() == 2);
  CHECK(sc.sensors[0].label == "radar-typical");
  CHECK(sc.sensors[1].spec.sigma->value == 0.5e-3);
  CHECK(sc.sensors[1].spec.spacing_m->value == 10);
  CHECK(any_warning(sc, "near-void 2 m is coarser than the far-field size 1 m"));
  CHECK(any_warning(sc, "coarse for this void"));
  const Scenario modal_only = parse_scenario(k_head + v + "analyses: {modal: {}}\n", k_file);
  CHECK_FALSE(modal_only.analyses.static_);
  CHECK(modal_only.analyses.modal);
  CHECK_FALSE(any_warning(modal_only, "requests no analysis"));
  const Scenario none = parse_scenario(k_head + v + "analyses: {}\n", k_file);
  CHECK(any_warning(none, "requests no analysis"));
  expect_error(k_head + v + "analyses: {modal: 10}\n", "10", "analyses.modal",
               "expected a mapping");
  expect_error(k_head + v + "analyses: {statics: {}}\n", "statics", "analyses.statics",
               "did you mean 'static'?");
}

TEST_CASE("the example in docs/scenario-format.md parses") {
  std::ifstream in(std::string(VOIDSIGN_SOURCE_DIR) + "/docs/scenario-format.md");
  REQUIRE(in);
  std::string line, yaml;
  bool inside = false;
  while (std::getline(in, line)) {
    if (!inside && line == "```yaml") {
      inside = true;
    } else if (inside && line == "```") {
      break;
    } else if (inside) {
      yaml += line + "\n";
    }
  }
  REQUIRE_FALSE(yaml.empty());
  const Scenario sc = parse_scenario(yaml, "/tmp/voidsign-test/orchard.yaml");
  INFO((sc.warnings.empty() ? std::string() : sc.warnings[0]));
  CHECK(sc.warnings.empty());
  CHECK(sc.voids.size() == 4);
  CHECK(sc.materials.count("limestone") == 1);
}

TEST_CASE("the format's reference example parses, skipping what this version does not run") {
  const std::string yaml = R"(format: 1
title: Chalk gallery under a farm track
model: plane-strain
domain:
  width: 300
  depth: 120
  length: 300
  boundaries: {sides: roller, bottom: fixed}
materials:
  chalk-soft:
    density: 1800
    young: 4.0e9
    poisson: 0.28
    damping: 0.02
    ucs: 5.0e6
    tensile: 0.3e6
layers:
  - {material: loess, thickness: 3}
  - {material: chalk-soft, thickness: 40}
  - {material: limestone}
voids:
  - {shape: circle, x: 0, depth: 15, radius: 2.5}
  - {shape: rectangle, x: 30, depth: 20, width: 6, height: 2.5}
  - {shape: ellipse, x: -40, depth: 25, axes: [4, 1.5], angle: 20}
  - {shape: polygon, points: [[-5, 30], [5, 30], [5, 34], [-5, 34]]}
loads:
  gravity: {k0: auto}
  surface:
    - {from: -5, to: 5, pressure: 50.0e3}
  ground-loss:
    - {void: 0, percent: 1.0}
analyses:
  static: {}
  modal: {modes: 10}
  harmonic:
    frequencies: {min: 0.1, max: 0.5, count: 60, spacing: log}   # 20 Hz is not resolved by size 5 in loess
    excitation: {wave: S, incidence: 0, amplitude: 1.0e-6}
  transient:
    duration: 12.0
    source: {x: -50, depth: 0, peak-frequency: 0.3, force: 1.0e6}   # 8 Hz is not resolved either
  ambient:
    noise: high
    band: [0.1, 0.5]   # as for harmonic
mesh:
  order: 2
  size: 5
  near-void: 0.25
  surface: 1.0
sensors:
  - radar-typical
  - {kind: radar-los, precision: 1.0e-3, pixel: 20, incidence: 39, heading: -12, window: 3}
  - {kind: levelling, precision: 0.5e-3, spacing: 10}
output:
  dir: results/gallery
)";
  const Scenario sc = parse_scenario(yaml, "/tmp/voidsign-test/gallery.yaml");
  CHECK(sc.analyses.static_);
  REQUIRE(sc.analyses.ambient);
  CHECK_FALSE(sc.analyses.ambient->extrapolated);
  CHECK(sc.analyses.ambient->frequencies_hz.size() == 15);  // 6 per octave over 2.32 octaves
  REQUIRE(sc.analyses.transient);
  CHECK(sc.analyses.transient->delay_s == doctest::Approx(1.5 / 0.3));
  REQUIRE(sc.analyses.harmonic);
  CHECK(sc.analyses.harmonic->frequencies_hz.size() == 60);
  CHECK(sc.sensors.size() == 3);
  CHECK(sc.domain.length == 300);
  CHECK(any_warning(sc, "key 'domain.length'"));
  CHECK(sc.mesh.near_void == 0.25);
  CHECK(sc.output_dir == std::filesystem::path("/tmp/voidsign-test/results/gallery"));
  CHECK(sc.warnings.size() == 1);  // length
}

// ---------------------------------------------------------------------------------------------
// 3d models

namespace {

// A 100 m × 80 m × 50 m block (x ±50, y ±40): a valid start for most 3d cases (6 lines).
const std::string k_head_3d =
    "format: 1\n"
    "model: 3d\n"
    "domain: {width: 100, length: 80, depth: 50}\n"
    "layers:\n"
    "  - {material: chalk, thickness: 10}\n"
    "  - {material: limestone-strong}\n";

std::string with_voids_3d(const std::string& items) { return k_head_3d + "voids:\n" + items; }

void expect_accepted(const std::string& yaml) {
  INFO("yaml:\n" << yaml);
  CHECK(error_of(yaml) == "(accepted without error)");
}

void expect_overlap(const std::string& items, const std::string& token, const std::string& key,
                    const std::string& pair) {
  expect_error(with_voids_3d(items), token, key, "voids " + pair + " overlap or touch");
}

}  // namespace

TEST_CASE("3d: a full valid scenario parses to the expected values") {
  const std::string yaml = R"(format: 1
title: Invented brickfield with three cavities
model: 3d
domain:
  width: 240
  length: 200
  depth: 60
  boundaries: {sides: fixed, bottom: roller}
materials:
  brick-clay:
    density: 1950
    young: 6.0e7
    poisson: 0.35
layers:
  - {material: brick-clay, thickness: 4}
  - {material: chalk, thickness: 30}
  - {material: limestone}
voids:
  - {shape: sphere, x: -40, y: 20, depth: 12, radius: 3, contents: {water: {table-depth: 10}}}
  - {shape: box, x: 30, y: -10, depth: 15, size: [8, 4, 3], yaw: 30, contents: water}
  - {shape: tunnel, from: [-20, -25, 18], to: [10, 35, 22], radius: 2.5, contents: {pressure: 1.0e5}}
loads:
  gravity: {k0: auto}
  surface:
    - {x: [-10, 10], y: [-5, 5], pressure: 40.0e3}
    - {x: [-120, 0], y: [0, 100], pressure: -1.5e3}
  ground-loss:
    - {void: 2, percent: 0.8}
analyses:
  static: {}
mesh: {order: 1}
)";
  const Scenario sc = parse_scenario(yaml, "/tmp/voidsign-test/brickfield.yaml");
  INFO("warnings: " << sc.warnings.size() << (sc.warnings.empty() ? "" : sc.warnings[0]));
  CHECK(sc.warnings.empty());
  CHECK(sc.model == Model::three_d);
  CHECK(sc.title == "Invented brickfield with three cavities");
  CHECK(sc.domain.width == 240);
  CHECK(sc.domain.length == 200);
  CHECK(sc.domain.depth == 60);
  CHECK(sc.domain.sides == Boundary::fixed);
  CHECK(sc.domain.bottom == Boundary::roller);
  REQUIRE(sc.layers.size() == 3);
  CHECK(sc.materials.at("brick-clay").young == 6.0e7);

  REQUIRE(sc.voids.size() == 3);
  const Void& s = sc.voids[0];
  CHECK(s.shape == Void::Shape::sphere);
  CHECK(s.x == -40);
  CHECK(s.y == 20);
  CHECK(s.depth == 12);
  CHECK(s.radius == 3);
  CHECK(s.contents == Contents::water);
  CHECK(s.water_table_depth == 10);
  CHECK(s.loc.line == 19);
  CHECK(s.loc.column == 5);
  CHECK(s.loc.key == "voids.0");
  const Void& b = sc.voids[1];
  CHECK(b.shape == Void::Shape::box);
  CHECK(b.x == 30);
  CHECK(b.y == -10);
  CHECK(b.depth == 15);
  CHECK(b.size == std::array<double, 3>{8, 4, 3});
  CHECK(b.yaw == 30);
  CHECK(b.contents == Contents::water);
  CHECK_FALSE(b.water_table_depth.has_value());
  const Void& t = sc.voids[2];
  CHECK(t.shape == Void::Shape::tunnel);
  CHECK(t.from == std::array<double, 3>{-20, -25, 18});
  CHECK(t.to == std::array<double, 3>{10, 35, 22});
  CHECK(t.radius == 2.5);
  CHECK(t.x == -5);  // the centre is the midpoint of the axis
  CHECK(t.y == 5);
  CHECK(t.depth == 20);
  CHECK(t.contents == Contents::pressure);
  CHECK(t.pressure == 1.0e5);
  CHECK(t.loc.key == "voids.2");

  CHECK(sc.loads.gravity);
  CHECK_FALSE(sc.loads.k0.has_value());
  REQUIRE(sc.loads.surface.size() == 2);
  CHECK(sc.loads.surface[0].from == -10);
  CHECK(sc.loads.surface[0].to == 10);
  CHECK(sc.loads.surface[0].y_from == -5);
  CHECK(sc.loads.surface[0].y_to == 5);
  CHECK(sc.loads.surface[0].pressure == 40.0e3);
  CHECK(sc.loads.surface[1].from == -120);  // a load may reach the block's edges
  CHECK(sc.loads.surface[1].y_to == 100);
  CHECK(sc.loads.surface[1].pressure == -1.5e3);
  CHECK(sc.loads.surface[1].loc.line == 26);
  REQUIRE(sc.loads.ground_loss.size() == 1);
  CHECK(sc.loads.ground_loss[0].void_index == 2);
  CHECK(sc.loads.ground_loss[0].percent == 0.8);

  // Mesh defaults in 3d: size min(240, 200, 60)/15; near-void the smallest void size (half
  // the box's 3 m edge) / 6; surface size/3.
  CHECK(sc.mesh.order == 1);
  CHECK(sc.mesh.size == doctest::Approx(4));
  CHECK(sc.mesh.near_void == doctest::Approx(1.5 / 6));
  CHECK(sc.mesh.surface == doctest::Approx(4.0 / 3));
}

TEST_CASE("3d: mesh defaults") {
  const Scenario sc =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n"), k_file);
  CHECK(sc.mesh.size == doctest::Approx(50.0 / 15));
  CHECK(sc.mesh.near_void == doctest::Approx(2.0 / 6));
  CHECK(sc.mesh.surface == doctest::Approx(50.0 / 45));
  // At least size/100.
  const Scenario tiny =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 0.1}\n"), k_file);
  CHECK(tiny.mesh.near_void == doctest::Approx(50.0 / 15 / 100));
  // Tunnel: its radius; box: half its smallest edge.
  const Scenario two = parse_scenario(
      with_voids_3d("  - {shape: tunnel, from: [-10, 0, 15], to: [10, 0, 15], radius: 1.8}\n"
                    "  - {shape: box, x: 0, y: 20, depth: 15, size: [6, 4, 3]}\n"),
      k_file);
  CHECK(two.mesh.near_void == doctest::Approx(1.5 / 6));
  // Without voids.
  const Scenario none = parse_scenario(k_head_3d, k_file);
  CHECK(none.mesh.near_void == doctest::Approx(50.0 / 15 / 6));
  // Explicit values win.
  const Scenario given = parse_scenario(
      with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n") +
          "mesh: {size: 5, near-void: 0.4, surface: 2}\n",
      k_file);
  CHECK(given.mesh.size == 5);
  CHECK(given.mesh.near_void == 0.4);
  CHECK(given.mesh.surface == 2);
}

TEST_CASE("3d: domain, shapes and keys") {
  expect_error("format: 1\nmodel: 3d\ndomain: {width: 100, depth: 50}\nlayers:\n"
               "  - {material: chalk}\n",
               "{width", "domain.length", "required key is missing");
  expect_error("format: 1\nmodel: 3d\ndomain: {width: 100, length: -80, depth: 50}\nlayers:\n"
               "  - {material: chalk}\n",
               "-80", "domain.length", "must be greater than 0");
  // 2D shapes in 3d and 3d shapes in 2D say which model they belong to.
  expect_error(with_voids_3d("  - {shape: circle, x: 0, depth: 15, radius: 2}\n"), "circle",
               "voids.0.shape", "'circle' belongs to the 2D models (plane-strain, axisymmetric)");
  expect_error(with_voids_3d("  - {shape: polygon, points: [[0, 10], [4, 10], [4, 14]]}\n"),
               "polygon", "voids.0.shape", "a 3d model takes sphere, box or tunnel");
  expect_error(with_voids("  - {shape: box, x: 0, y: 0, depth: 15, size: [2, 2, 2]}\n"), "box",
               "voids.0.shape", "'box' belongs to 3d models; this scenario's model is plane-strain");
  expect_error("format: 1\nmodel: axisymmetric\ndomain: {width: 40, depth: 50}\nlayers:\n"
               "  - {material: chalk}\nvoids:\n"
               "  - {shape: tunnel, from: [0, 0, 10], to: [0, 5, 10], radius: 1}\n",
               "tunnel", "voids.0.shape", "belongs to 3d models; this scenario's model is axisymmetric");
  expect_error(with_voids_3d("  - {shape: cube, x: 0, y: 0, depth: 15}\n"), "cube",
               "voids.0.shape", "unknown shape 'cube'");
  // Keys of each shape.
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, depth: 15, radius: 2}\n"), "{shape",
               "voids.0.y", "required key is missing");
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2, yaw: 10}\n"),
               "yaw", "voids.0.yaw", "unknown key 'yaw'");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [2, 2, 2], angle: 10}\n"),
               "angle", "voids.0.angle", "unknown key 'angle'");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15}\n"), "{shape",
               "voids.0.size", "required key is missing");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, 10], radius: 1}\n"), "{shape",
               "voids.0.to", "required key is missing");
  expect_error(with_voids_3d("  - {shape: tunnel, x: 0, from: [0, 0, 10], to: [0, 5, 10], radius: 1}\n"),
               "x:", "voids.0.x", "unknown key 'x'");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [2, 2, 2], yaw: east}\n"),
               "east", "voids.0.yaw", "expected a number");
}

TEST_CASE("3d: sizes, radii and tunnel length") {
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: -1}\n"), "-1",
               "voids.0.radius", "must be greater than 0");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, 10], to: [0, 5, 10], radius: 0}\n"),
               "0}", "voids.0.radius", "must be greater than 0");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 0, 2]}\n"), "0, 2]",
               "voids.0.size.1", "must be greater than 0");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 2, -2]}\n"), "-2]",
               "voids.0.size.2", "must be greater than 0");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 2]}\n"), "[4",
               "voids.0.size", "expected three edge lengths [lx, ly, lz], found 2 values");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: 4}\n"), "4}",
               "voids.0.size", "expected a list");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, 15], to: [0, 0, 15], radius: 2}\n"),
               "[0, 0, 15]", "voids.0.to", "the tunnel has zero length");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0], to: [0, 5, 15], radius: 2}\n"),
               "[0, 0]", "voids.0.from", "expected a point [x, y, depth], found 2 values");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, deep], to: [0, 5, 15], radius: 2}\n"),
               "deep", "voids.0.from.2", "expected a number");
}

TEST_CASE("3d: voids leaving the block say through which face and by how much") {
  // Sphere: x sides, y sides, bottom.
  expect_error(with_voids_3d("  - {shape: sphere, x: 49, y: 0, depth: 15, radius: 2}\n"), "49",
               "voids.0.x",
               "the sphere leaves the block through the side x = 50 m: it reaches x = 51 m, "
               "1 m beyond it (domain.width = 100 m)");
  expect_error(with_voids_3d("  - {shape: sphere, x: -48, y: 0, depth: 15, radius: 2}\n"), "-48",
               "voids.0.x", "through the side x = -50 m: it reaches x = -50 m, on it");
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: -39, depth: 15, radius: 2}\n"), "-39",
               "voids.0.y",
               "through the side y = -40 m: it reaches y = -41 m, 1 m beyond it "
               "(domain.length = 80 m)");
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 38.5, depth: 15, radius: 2}\n"), "38.5",
               "voids.0.y", "through the side y = 40 m: it reaches y = 40.5 m, 0.5 m beyond it");
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 49, radius: 2}\n"), "49",
               "voids.0.depth",
               "the sphere leaves the block through the bottom: it reaches depth 51 m, 1 m below "
               "it (domain.depth = 50 m)");
  // Box: the yaw turns its long side towards x = 50.
  expect_accepted(with_voids_3d("  - {shape: box, x: 46, y: 0, depth: 15, size: [1, 10, 2]}\n"));
  expect_error(with_voids_3d("  - {shape: box, x: 46, y: 0, depth: 15, size: [1, 10, 2], yaw: 90}\n"),
               "46", "voids.0.x", "the box leaves the block through the side x = 50 m: it reaches "
                                  "x = 51 m, 1 m beyond it");
  // A 10 m square at x = 44 fits square on; turned by 45 degrees its corner reaches 51.07 m.
  expect_accepted(with_voids_3d("  - {shape: box, x: 44, y: 0, depth: 15, size: [10, 10, 2]}\n"));
  expect_error(with_voids_3d("  - {shape: box, x: 44, y: 0, depth: 15, size: [10, 10, 2], yaw: 45}\n"),
               "44", "voids.0.x", "it reaches x = 51.0711 m, 1.07107 m beyond it");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: -35, depth: 15, size: [2, 10, 2], yaw: 180}\n"),
               "-35", "voids.0.y", "through the side y = -40 m: it reaches y = -40 m, on it");
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 48, size: [2, 2, 6]}\n"), "48",
               "voids.0.depth", "through the bottom: it reaches depth 51 m, 1 m below it");
  // Tunnel: the message points at the end that leaves the block.
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, -20, 15], to: [0, 41, 15], radius: 2}\n"),
               "41", "voids.0.to.1",
               "the tunnel leaves the block through the side y = 40 m, at its 'to' end: it "
               "reaches y = 41 m, 1 m beyond it");
  expect_error(with_voids_3d("  - {shape: tunnel, from: [-52, 0, 15], to: [0, 0, 15], radius: 2}\n"),
               "-52", "voids.0.from.0", "side x = -50 m, at its 'from' end: it reaches x = -52 m, 2 m");
  // Running along y at x = 49, its wall reaches x = 51 along its whole length.
  expect_error(with_voids_3d("  - {shape: tunnel, from: [49, -20, 15], to: [49, 20, 15], radius: 2}\n"),
               "49", "voids.0.from.0", "side x = 50 m, along its whole length: it reaches x = 51 m", 0);
  // A shaft down to 49 m: its flat end stops short of the bottom, its wall does not matter.
  expect_accepted(with_voids_3d("  - {shape: tunnel, from: [0, 0, 20], to: [0, 0, 49], radius: 2}\n"));
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, 20], to: [0, 0, 50.5], radius: 2}\n"),
               "50.5", "voids.0.to.2",
               "through the bottom, at its 'to' end: it reaches depth 50.5 m, 0.5 m below it");
}

TEST_CASE("3d: voids breaking the surface") {
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 1.5, radius: 2}\n"), "1.5",
               "voids.0.depth",
               "the sphere breaks the ground surface: its top is at depth -0.5 m, 0.5 m above "
               "the surface");
  expect_error(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 2, radius: 2}\n"), "2,",
               "voids.0.depth", "its top is at depth 0 m, on the surface");
  // Box: the yaw turns it about the vertical and leaves its top where it is.
  expect_error(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 0.9, size: [8, 1, 2], yaw: 45}\n"),
               "0.9", "voids.0.depth", "the box breaks the ground surface: its top is at depth -0.1 m");
  expect_accepted(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 1.1, size: [8, 1, 2], yaw: 45}\n"));
  // A plunging tunnel whose upper end rises above z = 0.
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, -20, 15], to: [0, 10, -1], radius: 1}\n"),
               "-1]", "voids.0.to.2", "the tunnel breaks the ground surface, at its 'to' end");
  // A level tunnel whose wall, a radius above its axis, breaks through.
  expect_error(with_voids_3d("  - {shape: tunnel, from: [-20, 0, 1.5], to: [20, 0, 1.5], radius: 2}\n"),
               "1.5]", "voids.0.from.2",
               "breaks the ground surface, along its whole length: its top is at depth -0.5 m, "
               "0.5 m above the surface", 0);
  // An inclined tunnel: the top of its flat end disc is r·sqrt(1 - dz²) above the axis end, less
  // than the radius. Axis from depth 1.9 to 19.7 over 40 m: the disc rises 1.827 m, top 0.073 m.
  expect_accepted(with_voids_3d("  - {shape: tunnel, from: [0, -20, 1.9], to: [0, 20, 19.7], radius: 2}\n"));
  const double dz = 17.9 / std::hypot(40.0, 17.9);
  const double top = 1.8 - 2 * std::sqrt(1 - dz * dz);
  REQUIRE(top < 0);
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, -20, 1.8], to: [0, 20, 19.7], radius: 2}\n"),
               "1.8", "voids.0.from.2",
               "breaks the ground surface, at its 'from' end: its top is at depth -0.0255");
  // A vertical shaft ends flat: its top is the end's depth.
  expect_accepted(with_voids_3d("  - {shape: tunnel, from: [0, 0, 0.5], to: [0, 0, 20], radius: 2}\n"));
  expect_error(with_voids_3d("  - {shape: tunnel, from: [0, 0, 0], to: [0, 0, 20], radius: 2}\n"),
               "0]", "voids.0.from.2", "on the surface", 0);
}

TEST_CASE("3d: overlapping voids name the two") {
  // sphere-sphere: centres 3 m apart, radii 2 + 1.5.
  expect_overlap("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n"
                 "  - {shape: sphere, x: 3, y: 0, depth: 15, radius: 1.5}\n",
                 "{shape: sphere, x: 3", "voids.1", "0 and 1");
  // Extents overlap, the spheres do not (4.06 m apart).
  expect_accepted(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n"
                                "  - {shape: sphere, x: 2.5, y: 2.5, depth: 17, radius: 1.5}\n"));
  // sphere-box off a vertical edge of a 4 m cube: 1.697 m from the edge.
  expect_accepted(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4]}\n"
                                "  - {shape: sphere, x: 3.2, y: 3.2, depth: 15, radius: 1.6}\n"));
  expect_overlap("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4]}\n"
                 "  - {shape: sphere, x: 3.2, y: 3.2, depth: 15, radius: 1.8}\n",
                 "{shape: sphere", "voids.1", "0 and 1");
  // Turned by 45 degrees the cube shows the sphere a face, 2.53 m away.
  expect_accepted(with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4], yaw: 45}\n"
                                "  - {shape: sphere, x: 3.2, y: 3.2, depth: 15, radius: 1.8}\n"));
  // Sphere above the box.
  expect_overlap("  - {shape: sphere, x: 1, y: 1, depth: 11.5, radius: 1.6}\n"
                 "  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4], yaw: 20}\n",
                 "{shape: box", "voids.1", "0 and 1");

  // box-box, exact in plan: a 10 m × 1 m strip along the diagonal and a 2 m square beside it.
  // Their extents overlap; the gap across the strip is 2.121 - 0.5 - 1.414 = 0.207 m.
  const std::string strip = "  - {shape: box, x: 0, y: 0, depth: 15, size: [10, 1, 2], yaw: 45}\n";
  expect_accepted(with_voids_3d(strip + "  - {shape: box, x: 1.5, y: -1.5, depth: 15, size: [2, 2, 2]}\n"));
  expect_overlap(strip + "  - {shape: box, x: 1.3, y: -1.3, depth: 15, size: [2, 2, 2]}\n",
                 "{shape: box, x: 1.3", "voids.1", "0 and 1");
  // Same plan, but below the strip.
  expect_accepted(with_voids_3d(strip + "  - {shape: box, x: 1.3, y: -1.3, depth: 17.5, size: [2, 2, 2]}\n"));
  expect_overlap(strip + "  - {shape: box, x: 1.3, y: -1.3, depth: 17, size: [2, 2, 2], yaw: 10}\n",
                 "{shape: box, x: 1.3", "voids.1", "0 and 1");
  // Two crossed strips.
  expect_overlap("  - {shape: sphere, x: 30, y: 0, depth: 15, radius: 1}\n" + strip +
                     "  - {shape: box, x: 0, y: 0, depth: 15, size: [10, 1, 2], yaw: -45}\n",
                 "{shape: box", "voids.2", "1 and 2");

  // sphere-tunnel: beside the wall, and beyond the flat end.
  const std::string level = "  - {shape: tunnel, from: [-20, 0, 15], to: [20, 0, 15], radius: 2}\n";
  expect_accepted(with_voids_3d(level + "  - {shape: sphere, x: 0, y: 4.5, depth: 15, radius: 2}\n"));
  expect_overlap(level + "  - {shape: sphere, x: 0, y: 4.5, depth: 15, radius: 2.6}\n",
                 "{shape: sphere", "voids.1", "0 and 1");
  expect_accepted(with_voids_3d(level + "  - {shape: sphere, x: 22.5, y: 1.5, depth: 15, radius: 2}\n"));
  expect_overlap(level + "  - {shape: sphere, x: 22.5, y: 1.5, depth: 15, radius: 2.6}\n",
                 "{shape: sphere", "voids.1", "0 and 1");

  // tunnel-tunnel: parallel, end to end, crossing, and an end against a wall.
  expect_accepted(with_voids_3d(level + "  - {shape: tunnel, from: [-20, 4.5, 15], to: [20, 4.5, 15], radius: 2}\n"));
  expect_overlap(level + "  - {shape: tunnel, from: [-20, 3.9, 15], to: [20, 3.9, 15], radius: 2}\n",
                 "{shape: tunnel, from: [-20, 3.9", "voids.1", "0 and 1");
  expect_accepted(with_voids_3d(level + "  - {shape: tunnel, from: [21, 0, 15], to: [40, 0, 15], radius: 2}\n"));
  expect_overlap(level + "  - {shape: tunnel, from: [20, 0, 15], to: [40, 0, 15], radius: 2}\n",
                 "{shape: tunnel, from: [20", "voids.1", "0 and 1");
  expect_accepted(with_voids_3d(level + "  - {shape: tunnel, from: [0, -20, 19.5], to: [0, 20, 19.5], radius: 2}\n"));
  expect_overlap(level + "  - {shape: tunnel, from: [0, -20, 18.5], to: [0, 20, 18.5], radius: 2}\n",
                 "{shape: tunnel, from: [0", "voids.1", "0 and 1");
  const std::string stub = "  - {shape: tunnel, from: [-20, 0, 15], to: [0, 0, 15], radius: 2}\n";
  expect_accepted(with_voids_3d(stub + "  - {shape: tunnel, from: [2.5, -20, 15], to: [2.5, 20, 15], radius: 2}\n"));
  expect_overlap(stub + "  - {shape: tunnel, from: [1.9, -20, 15], to: [1.9, 20, 15], radius: 2}\n",
                 "{shape: tunnel, from: [1.9", "voids.1", "0 and 1");
  // Skew and inclined: one passes 0.2 m above the other where they cross.
  expect_accepted(with_voids_3d("  - {shape: tunnel, from: [-20, -10, 15], to: [20, 10, 15], radius: 1}\n"
                                "  - {shape: tunnel, from: [-10, 20, 12.8], to: [10, -20, 12.8], radius: 1}\n"));
  expect_overlap("  - {shape: tunnel, from: [-20, -10, 15], to: [20, 10, 15], radius: 1}\n"
                 "  - {shape: tunnel, from: [-10, 20, 11], to: [10, -20, 15], radius: 1}\n",
                 "{shape: tunnel, from: [-10", "voids.1", "0 and 1");

  // box-tunnel: a flat end before a face, a tunnel over the top, and a yawed box's corner.
  const std::string cube = "  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4]}\n";
  expect_accepted(with_voids_3d(cube + "  - {shape: tunnel, from: [2.5, 0, 15], to: [30, 0, 15], radius: 1.5}\n"));
  expect_overlap(cube + "  - {shape: tunnel, from: [1.9, 0, 15], to: [30, 0, 15], radius: 1.5}\n",
                 "{shape: tunnel", "voids.1", "0 and 1");
  expect_accepted(with_voids_3d(cube + "  - {shape: tunnel, from: [-10, -10, 11], to: [10, 10, 11], radius: 1.5}\n"));
  expect_overlap(cube + "  - {shape: tunnel, from: [-10, -10, 11.6], to: [10, 10, 11.6], radius: 1.5}\n",
                 "{shape: tunnel", "voids.1", "0 and 1");
  const std::string turned = "  - {shape: box, x: 0, y: 0, depth: 15, size: [4, 4, 4], yaw: 45}\n";
  expect_accepted(with_voids_3d(cube + "  - {shape: tunnel, from: [3.7, -20, 15], to: [3.7, 20, 15], radius: 1}\n"));
  expect_accepted(with_voids_3d(turned + "  - {shape: tunnel, from: [4, -20, 15], to: [4, 20, 15], radius: 1}\n"));
  expect_overlap(turned + "  - {shape: tunnel, from: [3.7, -20, 15], to: [3.7, 20, 15], radius: 1}\n",
                 "{shape: tunnel", "voids.1", "0 and 1");
  // A tunnel wholly inside a box.
  expect_overlap("  - {shape: tunnel, from: [-1, 0, 15], to: [1, 0, 15], radius: 0.5}\n" + cube,
                 "{shape: box", "voids.1", "0 and 1");
}

TEST_CASE("3d: void contents and ground loss") {
  const Scenario sc = parse_scenario(
      with_voids_3d("  - {shape: tunnel, from: [-10, -10, 14], to: [10, 10, 18], radius: 1.5, "
                    "contents: {water: {table-depth: 15}}}\n"
                    "  - {shape: box, x: 20, y: 20, depth: 15, size: [2, 2, 2], contents: {pressure: -3.0e3}}\n") +
          "loads:\n  ground-loss:\n    - {void: 0, percent: 1.2}\n",
      k_file);
  CHECK(sc.voids[0].contents == Contents::water);
  CHECK(sc.voids[0].water_table_depth == 15);
  CHECK(sc.voids[0].x == 0);
  CHECK(sc.voids[0].y == 0);
  CHECK(sc.voids[0].depth == 16);
  CHECK(sc.voids[1].contents == Contents::pressure);
  CHECK(sc.voids[1].pressure == -3.0e3);
  REQUIRE(sc.loads.ground_loss.size() == 1);
  CHECK(sc.loads.ground_loss[0].percent == 1.2);
  CHECK_FALSE(any_warning(sc, "nothing loads the model"));
  // A water table below the lowest point of the tunnel (18 m + 1.5 m) leaves it dry.
  const Scenario dry = parse_scenario(
      with_voids_3d("  - {shape: tunnel, from: [-10, 0, 18], to: [10, 0, 18], radius: 1.5, "
                    "contents: {water: {table-depth: 19.6}}}\n"),
      k_file);
  CHECK(any_warning(dry, "holds no water"));
  const std::string v = "voids:\n  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n";
  expect_error(k_head_3d + v + "loads:\n  ground-loss:\n    - {void: 0}\n", "{void", "loads.ground-loss.0.percent",
               "volume loss in % of the void's volume");
  expect_error(k_head_3d + v + "loads:\n  ground-loss:\n    - {void: 1, percent: 1}\n", "1,",
               "loads.ground-loss.0.void", "out of range");
}

TEST_CASE("3d: surface loads are rectangles") {
  const std::string v = "voids:\n  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 2}\n";
  const std::string l = k_head_3d + v + "loads:\n  surface:\n";
  const Scenario sc = parse_scenario(l + "    - {x: [-50, 5], y: [-2, 40], pressure: 2.0e3}\n", k_file);
  REQUIRE(sc.loads.surface.size() == 1);
  CHECK(sc.loads.surface[0].from == -50);
  CHECK(sc.loads.surface[0].to == 5);
  CHECK(sc.loads.surface[0].y_from == -2);
  CHECK(sc.loads.surface[0].y_to == 40);
  CHECK(sc.loads.surface[0].pressure == 2.0e3);
  CHECK(sc.loads.surface[0].loc.key == "loads.surface.0");
  expect_error(l + "    - {x: [5, 5], y: [0, 1], pressure: 1.0e3}\n", "5]", "loads.surface.0.x.1",
               "the end of the range (5 m) must be greater than its start (5 m)");
  expect_error(l + "    - {x: [0, 1], y: [3, -3], pressure: 1.0e3}\n", "-3]", "loads.surface.0.y.1",
               "must be greater than its start");
  expect_error(l + "    - {x: [-51, 0], y: [0, 1], pressure: 1.0e3}\n", "-51", "loads.surface.0.x.0",
               "the load starts at x = -51 m, outside the block (x from -50 to 50 m, "
               "domain.width = 100 m)");
  expect_error(l + "    - {x: [0, 1], y: [0, 40.5], pressure: 1.0e3}\n", "40.5", "loads.surface.0.y.1",
               "the load ends at y = 40.5 m, outside the block (y from -40 to 40 m, "
               "domain.length = 80 m)");
  expect_error(l + "    - {x: [0, 1, 2], y: [0, 1], pressure: 1.0e3}\n", "[0, 1, 2]",
               "loads.surface.0.x", "expected a range [start, end] in m, found 3 values");
  expect_error(l + "    - {x: [0, 1], pressure: 1.0e3}\n", "{x", "loads.surface.0.y",
               "required key is missing");
  expect_error(l + "    - {from: -5, to: 5, pressure: 1.0e3}\n", "from", "loads.surface.0.from",
               "a 3d surface load covers a rectangle: give x: [a, b] and y: [c, d]");
  expect_error(l + "    - {x: [0, 1], y: [0, 1], pressure: 1.0e3, area: 1}\n", "area",
               "loads.surface.0.area", "unknown key 'area'");
  // The 2D form stays as it was; x and y ranges there say they are for 3d.
  expect_error(k_head + "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\nloads:\n  surface:\n"
                        "    - {x: [0, 1], y: [0, 1], pressure: 1.0e3}\n",
               "x: [0", "loads.surface.0.x", "x: [a, b] and y: [c, d] are for 3d models");
}

TEST_CASE("3d: voids close to the boundaries are a warning") {
  // Centred and shallow enough: no warning.
  const Scenario quiet =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 10, radius: 2}\n") + k_gravity,
                     k_file);
  INFO((quiet.warnings.empty() ? std::string() : quiet.warnings[0]));
  CHECK(quiet.warnings.empty());
  // Common practice: 3 × the centre depth (15 m) from a side; 50 - 32 = 18 m < 45 m.
  const Scenario side =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 30, y: 0, depth: 15, radius: 2}\n"), k_file);
  CHECK(any_warning(side, "case.yaml:8:5: key 'voids.0': the void is 18 m from the side x = 50 m; "
                          "common practice keeps at least 3 x its centre depth (3 x 15 m = 45 m)"));
  CHECK(any_warning(side, "the void is 38 m from the side y = -40 m"));
  CHECK(any_warning(side, "the void is 38 m from the side y = 40 m"));
  CHECK_FALSE(any_warning(side, "side x = -50 m"));  // 78 m away
  // A deep box, 8 m tall, 7 m above the bottom: 3 × 8 = 24 m wanted; the 8 m height rules the
  // sides too when it exceeds the centre depth.
  const Scenario deep = parse_scenario(
      with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 39, size: [4, 4, 8]}\n"), k_file);
  CHECK(any_warning(deep, "the void is 7 m above the bottom of the block; common practice keeps "
                          "at least 3 x its height (3 x 8 m = 24 m)"));
  const Scenario tall = parse_scenario(
      with_voids_3d("  - {shape: box, x: 0, y: 0, depth: 12, size: [4, 4, 20]}\n"), k_file);
  CHECK(any_warning(tall, "3 x its height (3 x 20 m = 60 m) between a void and a side"));
  // A tunnel that runs close to the y faces.
  const Scenario run = parse_scenario(
      with_voids_3d("  - {shape: tunnel, from: [0, -35, 10], to: [0, 35, 10], radius: 1}\n"), k_file);
  CHECK(any_warning(run, "the void is 5 m from the side y = 40 m"));
  CHECK(any_warning(run, "the void is 5 m from the side y = -40 m"));
  // The near-void element size rules stay as in 2D.
  const Scenario top =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 2.1, radius: 2}\n"), k_file);
  CHECK(any_warning(top, "case.yaml:8:5: key 'voids.0': the void is closer to the ground surface"));
  const Scenario edge =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 37.9, depth: 15, radius: 2}\n"), k_file);
  CHECK(any_warning(edge, "closer to a side of the domain (0.1 m)"));
  const Scenario bottom =
      parse_scenario(with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 47.9, radius: 2}\n"), k_file);
  CHECK(any_warning(bottom, "closer to the bottom of the domain"));
  const Scenario coarse = parse_scenario(
      with_voids_3d("  - {shape: sphere, x: 0, y: 0, depth: 10, radius: 2}\n") + "mesh: {near-void: 1}\n",
      k_file);
  CHECK(any_warning(coarse, "coarse for this void"));
}

namespace {
// The n-th ```yaml block of docs/scenario-format.md (from 0).
std::string docs_yaml_block(int n) {
  std::ifstream in(std::string(VOIDSIGN_SOURCE_DIR) + "/docs/scenario-format.md");
  REQUIRE(in);
  std::string line, yaml;
  int seen = -1;
  bool inside = false;
  while (std::getline(in, line)) {
    if (!inside && line == "```yaml") {
      inside = ++seen == n;
    } else if (inside && line == "```") {
      break;
    } else if (inside) {
      yaml += line + "\n";
    }
  }
  return yaml;
}
}  // namespace

TEST_CASE("3d: the 3d example in docs/scenario-format.md parses") {
  const std::string yaml = docs_yaml_block(1);
  REQUIRE_FALSE(yaml.empty());
  const Scenario sc = parse_scenario(yaml, "/tmp/voidsign-test/heath.yaml");
  INFO((sc.warnings.empty() ? std::string() : sc.warnings[0]));
  CHECK(sc.warnings.empty());
  CHECK(sc.model == Model::three_d);
  CHECK(sc.voids.size() == 3);
  CHECK(sc.loads.surface.size() == 1);
}

TEST_CASE("modal and harmonic keys: values, defaults and errors with their position") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  const std::string mesh = "mesh: {size: 1}\n";
  const Scenario sc = parse_scenario(k_head + v + mesh +
                                         "analyses:\n  modal: {modes: 6, above-hz: 0.5}\n  harmonic:\n"
                                         "    frequencies: {min: 1, max: 8, count: 4, spacing: log}\n"
                                         "    excitation: {wave: S, incidence: 0, amplitude: 2.0e-6}\n",
                                     k_file);
  REQUIRE(sc.analyses.modal);
  CHECK(sc.analyses.modal->modes == 6);
  CHECK(sc.analyses.modal->shift_hz == 0.5);
  REQUIRE(sc.analyses.harmonic);
  const auto& f = sc.analyses.harmonic->frequencies_hz;
  REQUIRE(f.size() == 4);
  CHECK(f[0] == doctest::Approx(1));
  CHECK(f[1] == doctest::Approx(2));
  CHECK(f[3] == 8);
  CHECK(sc.analyses.harmonic->amplitude == 2e-6);
  CHECK(sc.analyses.harmonic->elements_per_wavelength > 5);
  const Scenario lin = parse_scenario(k_head + v + mesh + "analyses:\n  harmonic:\n    frequencies: [4, 2, 3]\n"
                                      "    excitation: {source: {x: 5, depth: 0, force: 1.0e3}}\n", k_file);
  CHECK(lin.analyses.harmonic->frequencies_hz == std::vector<double>{2, 3, 4});
  CHECK(lin.analyses.harmonic->excitation == HarmonicAnalysis::Excitation::source);
  CHECK(lin.analyses.harmonic->direction[2] == -1);

  const std::string h = k_head + v + mesh + "analyses:\n  harmonic:\n";
  const std::string wave = "    excitation: {wave: S}\n";
  expect_error(h + "    frequencies: {min: 0, max: 8}\n" + wave, "0", "analyses.harmonic.frequencies.min",
               "must be greater than 0");
  expect_error(h + "    frequencies: {min: 5, max: 2}\n" + wave, "2}", "analyses.harmonic.frequencies.max",
               "must be greater than min");
  expect_error(h + "    frequencies: {min: 1, max: 2, count: 0}\n" + wave, "0}", "analyses.harmonic.frequencies.count",
               "at least 1");
  expect_error(h + "    frequencies: [1, -2]\n" + wave, "-2", "analyses.harmonic.frequencies.1", "greater than 0");
  expect_error(h + "    frequencies: [1, 2]\n    excitation: {wave: S, incidence: 95}\n", "95",
               "analyses.harmonic.excitation.incidence", "below 90 degrees");
  expect_error(h + "    frequencies: [1, 2]\n    excitation: {wave: SH, incidence: 20}\n", "SH",
               "analyses.harmonic.excitation.wave", "out of the plane");
  expect_error(h + "    frequencies: [1, 2]\n    excitation: {wave: P, azimuth: 20}\n", "azimuth",
               "analyses.harmonic.excitation.azimuth", "unknown key");
  {
    const Scenario inclined = parse_scenario(h + "    frequencies: [1, 2]\n    excitation: {wave: SV, incidence: -30, amplitude: 2.0e-6}\n",
                                       "inline.yaml");
    const WaveSpec& w = inclined.analyses.harmonic->wave;
    CHECK(!w.p_wave);
    CHECK(w.polarization == 0);
    CHECK(w.incidence_deg == -30);
    CHECK(w.name() == "SV");
    CHECK(w.describe(false) == "plane SV wave at -30 deg from the vertical, travelling toward -x");
  }
  expect_error(h + "    frequencies: [1, 2]\n    excitation: {wave: R}\n", "R}", "analyses.harmonic.excitation.wave",
               "unknown wave type");
  expect_error(h + "    frequencies: [1, 2]\n", "frequencies", "analyses.harmonic.excitation", "required key is missing");
  expect_error(k_head + v + "analyses:\n  modal: {modes: 0}\n", "0}", "analyses.modal.modes", "between 1 and 500");
  expect_error(k_head + v + "analyses:\n  modal: {mode: 3}\n", "mode:", "analyses.modal.mode", "did you mean 'modes'?");
}

TEST_CASE("harmonic: a band the mesh cannot resolve warns, then fails, and axisymmetric models are refused") {
  // chalk (top layer) is the slowest; quadratic elements need 5 per S wavelength.
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  const std::string a = "analyses:\n  harmonic:\n    frequencies: {min: 1, max: MAX}\n    excitation: {wave: S}\n";
  auto with_max = [&](const std::string& mx) {
    std::string t = a;
    t.replace(t.find("MAX"), 3, mx);
    return k_head + v + "mesh: {size: 5}\n" + t;
  };
  const Scenario ok = parse_scenario(with_max("10"), k_file);
  const double per = ok.analyses.harmonic->elements_per_wavelength;
  REQUIRE(per > 0);
  // Frequencies giving 4 and 2 elements per wavelength.
  const double f4 = 10 * per / 4, f2 = 10 * per / 2;
  const Scenario warned = parse_scenario(with_max(std::to_string(f4)), k_file);
  CHECK(any_warning(warned, "per wavelength, fewer than the 5 needed for quadratic elements"));
  CHECK(any_warning(warned, "set mesh.size to"));
  const std::string bad = with_max(std::to_string(f2));
  expect_error(bad, "{min", "analyses.harmonic.frequencies", "below half of that");
  const std::string axi = "format: 1\nmodel: axisymmetric\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n"
                          "analyses:\n  harmonic: {frequencies: [1], excitation: {wave: S}}\n";
  expect_error(axi, "{frequencies", "analyses.harmonic", "not available for axisymmetric models");
  const std::string axi_modal = "format: 1\nmodel: axisymmetric\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n"
                                "analyses:\n  modal: {modes: 3}\n";
  CHECK(parse_scenario(axi_modal, k_file).analyses.modal);
}

TEST_CASE("transient analysis keys and their mistakes") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\nmesh: {size: 4}\n";
  const std::string src = "    source: {x: -20, depth: 0, peak-frequency: 5, force: 1.0e4, direction: [1, -1]}\n";
  const Scenario sc = parse_scenario(k_head + v + "analyses:\n  transient:\n    duration: 1.5\n" + src +
                                         "    snapshots: 0.25\n    record-interval: 0.002\n    receiver-spacing: 2\n",
                                     k_file);
  REQUIRE(sc.analyses.transient);
  const TransientAnalysis& a = *sc.analyses.transient;
  CHECK(a.duration_s == 1.5);
  CHECK(a.peak_hz == 5);
  CHECK(a.delay_s == doctest::Approx(0.3));
  CHECK(a.direction[0] == doctest::Approx(std::sqrt(0.5)));
  CHECK(a.direction[2] == doctest::Approx(-std::sqrt(0.5)));
  CHECK(a.snapshot_interval_s == 0.25);
  CHECK(a.record_interval_s == 0.002);
  CHECK(a.receiver_spacing == 2);
  CHECK(a.elements_per_wavelength > 5);
  CHECK_FALSE(any_warning(sc, "requests no analysis"));
  CHECK_FALSE(any_warning(sc, "nothing loads the model"));

  const std::string head = k_head + v + "analyses:\n  transient:\n";
  expect_error(head + "    duration: 1.0\n", "duration", "analyses.transient.source", "peak-frequency");
  expect_error(head + "    duration: -1\n" + src, "-1", "analyses.transient.duration", "greater than 0", 0);
  expect_error(head + "    duration: 0.2\n" + src, "0.2", "analyses.transient.duration", "ends before the wavelet's peak");
  expect_error(head + "    duration: 1.0\n    source: {x: 0, depth: 0, peak-frequency: 0, force: 1}\n", "0, force",
               "analyses.transient.source.peak-frequency", "greater than 0");
  expect_error(head + "    duration: 1.0\n    source: {x: 0, depth: 0, peak-frequency: 5, force: 1, direction: [0, 0]}\n",
               "[0, 0]", "analyses.transient.source.direction", "must not be zero");
  expect_error(head + "    duration: 1.0\n    snapshot: 0.1\n" + src, "snapshot", "analyses.transient.snapshot",
               "did you mean 'snapshots'?");
  expect_error(head + "    duration: 100\n    snapshots: 0.01\n" + src, "0.01", "analyses.transient.snapshots",
               "more than 1000");
  // The wavelet's band must be resolved by the mesh: 2.5 x 60 Hz in chalk with 4 m elements is not.
  expect_error(head + "    duration: 1.0\n    source: {x: 0, depth: 0, peak-frequency: 60, force: 1}\n", "60",
               "analyses.transient.source.peak-frequency", "element(s) of size 4 m per wavelength");
}

TEST_CASE("transient plane-wave excitation keys and their mistakes") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\nmesh: {size: 4}\n";
  const std::string head = k_head + v + "analyses:\n  transient:\n    duration: 2.0\n";
  const Scenario sc =
      parse_scenario(head + "    excitation: {wave: P, incidence: 25, peak-frequency: 4, amplitude: 1.0e-4}\n", k_file);
  const TransientAnalysis& a = *sc.analyses.transient;
  REQUIRE(a.wave);
  CHECK(a.wave->p_wave);
  CHECK(a.wave->incidence_deg == 25);
  CHECK(a.amplitude == 1.0e-4);
  CHECK(a.peak_hz == 4);
  CHECK(a.delay_s == 0);  // chosen from the geometry when the run is planned
  const std::string src = "    source: {x: -20, depth: 0, peak-frequency: 5, force: 1.0e4}\n";
  expect_error(head + src + "    excitation: {wave: S, peak-frequency: 4, amplitude: 1.0e-4}\n", "{wave: S, p", "analyses.transient.excitation",
               "not both");
  expect_error(head + "    excitation: {wave: S, peak-frequency: 4}\n", "{wave", "analyses.transient.excitation.amplitude",
               "required key is missing");
  expect_error(head + "    excitation: {wave: SH, peak-frequency: 4, amplitude: 1.0e-4}\n", "SH",
               "analyses.transient.excitation.wave", "out of the plane");
  expect_error(head + "    excitation: {wave: S, incidence: 90, peak-frequency: 4, amplitude: 1.0e-4}\n", "90",
               "analyses.transient.excitation.incidence", "below 90 degrees");
  expect_error(head + "    excitation: {wave: S, peak-frequency: 60, amplitude: 1.0e-4}\n", "60",
               "analyses.transient.excitation.peak-frequency", "per wavelength");
  const std::string axi = "format: 1\nmodel: axisymmetric\ndomain: {width: 100, depth: 50}\nlayers:\n  - {material: chalk}\n"
                          "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\nmesh: {size: 4}\n"
                          "analyses:\n  transient:\n    duration: 2.0\n";
  expect_error(axi + "    excitation: {wave: P, peak-frequency: 4, amplitude: 1.0e-4}\n", "{wave", "analyses.transient.excitation",
               "not axisymmetric");
  // 3d: azimuth and SH; polarization only for a vertical S wave.
  const std::string h3 = "format: 1\nmodel: 3d\ndomain: {width: 80, length: 80, depth: 40}\nlayers:\n  - {material: chalk}\n"
                         "voids:\n  - {shape: sphere, x: 0, y: 0, depth: 15, radius: 3}\nmesh: {size: 5}\n"
                         "analyses:\n  transient:\n    duration: 2.0\n";
  const Scenario s3 =
      parse_scenario(h3 + "    excitation: {wave: SH, incidence: 30, azimuth: 120, peak-frequency: 3, amplitude: 1.0e-4}\n", k_file);
  REQUIRE(s3.analyses.transient->wave);
  CHECK(s3.analyses.transient->wave->polarization == 1);
  CHECK(s3.analyses.transient->wave->azimuth_deg == 120);
  CHECK(s3.analyses.transient->wave->describe(true) == "plane SH wave at 30 deg from the vertical, travelling toward azimuth 120 deg");
  expect_error(h3 + "    excitation: {wave: S, incidence: 10, polarization: y, peak-frequency: 3, amplitude: 1.0e-4}\n", "y, peak",
               "analyses.transient.excitation.polarization", "vertical incidence");
  expect_error(h3 + "    excitation: {wave: SV, incidence: -10, peak-frequency: 3, amplitude: 1.0e-4}\n", "-10",
               "analyses.transient.excitation.incidence", "azimuth");
}

TEST_CASE("sensors: catalogue names, overrides, explicit specs and their mistakes") {
  const std::string v = "voids:\n  - {shape: circle, x: 0, depth: 15, radius: 2}\n";
  const Scenario sc = parse_scenario(k_head + v +
                                         "sensors:\n  - radar-typical\n"
                                         "  - {kind: radar-los, precision: 1.0e-3, pixel: 20, incidence: 39, heading: -12, window: 3}\n"
                                         "  - {name: levelling, spacing: 10, origin: -40}\n"
                                         "  - {kind: tiltmeter, precision: 1.0e-8}\n"
                                         "  - {kind: seismometer, noise: low, band: [0.1, 5]}\n"
                                         "  - radar-typical\n",
                                     k_file);
  REQUIRE(sc.sensors.size() == 6);
  CHECK(sc.sensors[1].spec.kind == voidsign::solver::SensorKind::radar_los);
  CHECK(sc.sensors[1].spec.sigma->value == 1e-3);
  CHECK(sc.sensors[1].spec.footprint_m->value == 20);
  CHECK(sc.sensors[1].spec.incidence_deg->value == 39);
  CHECK(sc.sensors[1].spec.window_s->value == 3);
  CHECK(sc.sensors[2].label == "levelling");
  CHECK(sc.sensors[2].spec.sigma_per_sqrt_km);  // the catalogue's b, kept
  CHECK(sc.sensors[2].origin_m == -40);
  CHECK(sc.sensors[3].spec.sigma->value == 1e-8);
  REQUIRE(sc.sensors[4].spec.self_noise);
  CHECK(sc.sensors[4].spec.self_noise->psd.quantity == voidsign::solver::PsdQuantity::velocity);
  CHECK(sc.sensors[4].spec.self_noise->psd.f_hz.front() == doctest::Approx(0.1));
  CHECK(sc.sensors[5].label == "radar-typical #2");

  const std::string head = k_head + v + "sensors:\n";
  expect_error(head + "  - radar-typicl\n", "radar-typicl", "sensors.0", "did you mean 'radar-typical'?");
  expect_error(head + "  - levelling\n", "levelling", "sensors.0", "benchmark spacing");
  expect_error(head + "  - {kind: tiltmeter}\n", "{kind", "sensors.0", "needs its one-sigma 'precision'");
  expect_error(head + "  - {kind: seismometer, precision: 1.0e-9}\n", "1.0e-9", "sensors.0.precision", "applies to static sensors");
  expect_error(head + "  - {kind: radar-los, precision: 1.0e-3, incidence: 95}\n", "95", "sensors.0.incidence", "[0, 90)");
  expect_error(head + "  - {name: gnss, kind: gnss, spacing: 5}\n", "gnss, spacing", "sensors.0.kind", "not both");
  expect_error(head + "  - {kind: tiltmeter, precision: 1.0e-8, pixel: 3}\n", "3}", "sensors.0.pixel", "does not apply to a tiltmeter");
  expect_error(head + "  - {kind: seismometer, noise: low, band: [0.1, 40]}\n", "low", "sensors.0.noise", "cover 1e-5 to 10 Hz");
}
