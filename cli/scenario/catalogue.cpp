// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/scenario/catalogue.hpp"

namespace voidsign::cli {
namespace {

// Source notes shared by several cells. Status words: "verified", "secondary source",
// "derived", "from memory".
const std::string k_velocity_tables =
    "secondary source: seismic-velocity and density tables of an open-licence online "
    "geophysics textbook (itself a compilation)";
const std::string k_strength_table =
    "secondary source: an unattributed rock-strength table reproduced on several web pages, "
    "consistent with R. E. Goodman (1989), Introduction to Rock Mechanics, 2nd ed., Table 3.1 "
    "(from memory)";
const std::string k_goodman =
    "from memory: R. E. Goodman (1989), Introduction to Rock Mechanics, 2nd ed., Tables 3.1 "
    "and 6.x";
const std::string k_bowles =
    "from memory: J. E. Bowles (1996), Foundation Analysis and Design, 5th ed.";
const std::string k_kramer =
    "from memory: S. L. Kramer (1996), Geotechnical Earthquake Engineering";
const std::string k_q_rule =
    "derived: xi = 1/(2Q), with Q of rocks of order 50-300 (secondary source, after "
    "R. E. Sheriff & L. P. Geldart (1995), Exploration Seismology, 2nd ed.)";
const std::string k_schultz =
    "verified: R. A. Schultz (1995), \"Limits on strength and deformation properties of "
    "jointed basaltic rock masses\"";
const std::string k_bell_note =
    "\"A note on the physical properties of the Chalk\" (author and year, Bell 1977, from "
    "memory)";
const std::string k_none_soil =
    "no value for an uncemented soil (tabulated as none or about 0): 0 is used, meaning none";

struct Row {
  const char* name;
  const char* description;
  double density, young, poisson, damping, ucs, tensile, vp, vs;
  std::string src_density, src_young, src_poisson, src_damping, src_ucs, src_tensile, src_vp,
      src_vs;
};

CatalogueEntry make(const Row& r) {
  CatalogueEntry e;
  e.m.name = r.name;
  e.m.density = r.density;
  e.m.young = r.young;
  e.m.poisson = r.poisson;
  e.m.damping = r.damping;
  e.m.ucs = r.ucs;
  e.m.tensile = r.tensile;
  e.m.source = std::string("built-in catalogue entry '") + r.name +
               "' (status and source of each value: docs/materials.md)";
  e.description = r.description;
  e.vp = r.vp;
  e.vs = r.vs;
  e.src_density = r.src_density;
  e.src_young = r.src_young;
  e.src_poisson = r.src_poisson;
  e.src_damping = r.src_damping;
  e.src_ucs = r.src_ucs;
  e.src_tensile = r.src_tensile;
  e.src_vp = r.src_vp;
  e.src_vs = r.src_vs;
  return e;
}

std::vector<CatalogueEntry> build() {
  // Representative values: the value after the slash in each cell of the reference table;
  // where a cell gives only a range, its midpoint (said so in the note).
  const std::vector<Row> rows = {
      {"limestone-strong", "Limestone, strong (massive, well cemented)",
       2650, 50e9, 0.28, 0.005, 100e6, 8e6, 5000, 2700,
       "range 1930-2900 kg/m^3, " + k_velocity_tables + "; representative 2650",
       "range 30-80 GPa, representative 50 GPa, " + k_goodman,
       "range 0.25-0.30, representative 0.28, " + k_goodman,
       "0.5 %, " + k_q_rule + " (Q = 100)",
       "range 30-250 MPa, " + k_strength_table + "; representative 100 MPa",
       "range 5-25 MPa, " + k_strength_table + "; representative 8 MPa",
       "range 3500-6000 m/s, " + k_velocity_tables + "; representative 5000",
       "range 2000-3300 m/s, " + k_velocity_tables + "; representative 2700"},
      {"limestone-weak", "Limestone, weak or porous (oolitic, building stone)",
       2100, 10e9, 0.25, 0.01, 15e6, 1.5e6, 2800, 1500,
       "range 1900-2300 kg/m^3, representative 2100, from memory",
       "range 5-20 GPa, representative 10 GPa, from memory",
       "0.25, from memory",
       "1 %, from memory",
       "range 5-30 MPa, representative 15 MPa, from memory",
       "range 0.5-3 MPa, representative 1.5 MPa, from memory",
       "range 2000-3500 m/s, representative 2800, from memory",
       "range 1000-1800 m/s, representative 1500, from memory"},
      {"chalk", "Chalk (weak, porous limestone)",
       1900, 2e9, 0.25, 0.01, 5e6, 0.3e6, 2450, 1200,
       "range 1520-2600 kg/m^3, " + k_velocity_tables +
           "; representative 1900; intact dry density 1470-1620 kg/m^3 at 23-26 % water "
           "content, verified: Meigh & Early (1957)",
       "in situ 1-10 GPa, representative 2 GPa, from memory; laboratory static 0.7-1.4 GPa, "
       "derived from Meigh & Early (1957) (verified: 6500-13000 ton/ft^2, 1 ton/ft^2 = "
       "107.25 kPa)",
       "0.25, from memory",
       "1 %, from memory",
       "range 1-15 MPa dry, much lower when saturated, verified only qualitatively in " +
           k_bell_note + "; representative 5 MPa",
       "indirect tensile strength below UCS/20, verified in " + k_bell_note +
           "; representative 0.3 MPa as tabulated (above UCS/20 = 0.25 MPa of the "
           "representative UCS)",
       "range 2300-2600 m/s, " + k_velocity_tables + "; representative 2450",
       "range 1100-1300 m/s, " + k_velocity_tables + "; representative 1200"},
      {"sandstone", "Sandstone",
       2350, 15e9, 0.25, 0.0075, 60e6, 4e6, 3000, 1500,
       "range 1610-2760 kg/m^3, " + k_velocity_tables + "; representative 2350",
       "range 5-40 GPa, representative 15 GPa, " + k_goodman,
       "range 0.2-0.3, representative 0.25, " + k_goodman,
       "range 0.5-1 %, midpoint 0.75 %, " + k_q_rule,
       "range 20-170 MPa, " + k_strength_table + "; representative 60 MPa",
       "range 4-25 MPa, " + k_strength_table + "; representative 4 MPa",
       "range 2000-3500 m/s (porous, saturated), " + k_velocity_tables +
           "; representative 3000",
       "range 800-1800 m/s, " + k_velocity_tables + "; representative 1500"},
      {"shale", "Shale and mudstone",
       2450, 8e9, 0.30, 0.01, 35e6, 2e6, 2500, 1100,
       "range 1770-3300 kg/m^3 (wide), " + k_velocity_tables + "; representative 2450",
       "range 2-30 GPa, representative 8 GPa, " + k_goodman,
       "range 0.25-0.35, representative 0.30, " + k_goodman,
       "1 %, from memory",
       "range 5-100 MPa, " + k_strength_table + "; representative 35 MPa",
       "range 2-10 MPa, " + k_strength_table + "; representative 2 MPa",
       "range 1100-2500 m/s (saturated shales and clays), " + k_velocity_tables +
           "; competent shale up to about 4000 m/s, from memory; representative 2500",
       "range 200-800 m/s, " + k_velocity_tables +
           "; competent shale about 1200 m/s, from memory; representative 1100, from memory"},
      {"granite", "Granite (fresh)",
       2650, 60e9, 0.22, 0.0035, 180e6, 10e6, 5500, 3100,
       "range 2500-2810 kg/m^3, " + k_velocity_tables + "; representative 2650",
       "range 40-70 GPa, representative 60 GPa, " + k_goodman +
           "; a weathered granite has E about 34 GPa (derived from Lame constants of a "
           "secondary source, after Sousa 2014)",
       "range 0.2-0.25, representative 0.22, " + k_goodman,
       "range 0.2-0.5 %, midpoint 0.35 %, " + k_q_rule,
       "range 100-250 MPa, " + k_strength_table + "; representative 180 MPa",
       "range 7-25 MPa, " + k_strength_table + "; representative 10 MPa",
       "range 4500-6000 m/s, " + k_velocity_tables + "; representative 5500",
       "range 2500-3300 m/s, " + k_velocity_tables + "; representative 3100"},
      {"basalt", "Basalt (intact)",
       2950, 78e9, 0.25, 0.003, 266e6, 14.5e6, 5500, 3250,
       "range 2700-3300 kg/m^3, " + k_velocity_tables + "; representative 2950",
       "intact 78 +/- 19 GPa, " + k_schultz + "; the rock mass is much softer, 10-40 GPa "
       "(same source)",
       "0.25 +/- 0.05, " + k_schultz,
       "0.3 %, " + k_q_rule,
       "266 +/- 98 MPa, " + k_schultz + "; range 100-300 MPa, " + k_strength_table,
       "14.5 +/- 3.3 MPa, " + k_schultz + "; rock mass 0.1-2.5 MPa (same source)",
       "range 5000-6000 m/s, " + k_velocity_tables + "; representative 5500",
       "3250 m/s, derived: sqrt(E/(2 rho (1+nu))) from the verified E and nu with rho = "
       "2950 kg/m^3; range 2800-3400 m/s from memory (the secondary table prints a garbled "
       "range)"},
      {"dense-sand", "Dense sand and gravel",
       2050, 80e6, 0.30, 0.0075, 0, 0, 1800, 350,
       "range 1900-2200 kg/m^3, representative 2050, from memory; sand 1700-2300 kg/m^3, " +
           k_velocity_tables,
       "static 50-200 MPa, representative 80 MPa, " + k_bowles +
           "; the small-strain modulus is several times higher (G0 = rho vs^2 about "
           "250 MPa, derived)",
       "0.3 drained, " + k_bowles + " (0.49 undrained when saturated)",
       "range 0.5-1 %, midpoint 0.75 %, " + k_kramer,
       k_none_soil,
       k_none_soil,
       "dry 400-1200 m/s, saturated 1500-2000 m/s, " + k_velocity_tables +
           "; representative 1800 (saturated)",
       "dry 100-500 m/s, wet 400-600 m/s, " + k_velocity_tables + "; representative 350"},
      {"stiff-clay", "Stiff clay (overconsolidated)",
       2000, 40e6, 0.25, 0.03, 0.5e6, 0, 1800, 300,
       "range 1900-2100 kg/m^3, representative 2000, from memory; clay 1630-2600 kg/m^3, " +
           k_velocity_tables,
       "drained 20-100 MPa, representative 40 MPa, " + k_bowles,
       "drained 0.2-0.3, midpoint 0.25, " + k_bowles + " (0.5 undrained)",
       "range 2-4 %, midpoint 3 %, " + k_kramer,
       "derived: UCS = 2 su with su = 0.25 MPa, the midpoint of su 0.1-0.4 MPa (secondary "
       "source); gives a UCS range of 0.2-0.8 MPa",
       k_none_soil,
       "1500-2000 m/s saturated (range 1100-2500), " + k_velocity_tables +
           "; representative 1800",
       "range 200-400 m/s, representative 300, from memory; site class D is 180-360 m/s, "
       "verified: NEHRP provisions and IBC, as given in UFC 3-310-03A"},
      {"soft-clay", "Soft clay (normally consolidated)",
       1650, 5e6, 0.49, 0.035, 35e3, 0, 1500, 100,
       "range 1500-1800 kg/m^3, representative 1650, from memory",
       "range 2-15 MPa, representative 5 MPa, " + k_bowles,
       "0.5 undrained, " + k_bowles + "; 0.49 is used because an elastic solid needs nu "
       "below 0.5",
       "range 2-5 %, midpoint 3.5 %, " + k_kramer,
       "derived: UCS = 2 su with su = 17.5 kPa, the midpoint of su 10-25 kPa (verified: "
       "UFC 3-310-03A)",
       k_none_soil,
       "about 1500 m/s saturated, from memory",
       "range 50-180 m/s, representative 100, from memory; site class E is below 180 m/s, "
       "verified: UFC 3-310-03A"},
      {"loess", "Loess (wind-blown silt)",
       1600, 10e6, 0.30, 0.035, 0, 0, 500, 200,
       "range 1400-1800 kg/m^3 (row 'loess and fill'), representative 1600, from memory; "
       "soil 1200-2400 kg/m^3, " + k_velocity_tables,
       "range 5-30 MPa, representative 10 MPa, " + k_bowles,
       "0.3, " + k_bowles,
       "range 2-5 %, midpoint 3.5 %, " + k_kramer,
       k_none_soil,
       k_none_soil,
       "range 300-900 m/s, representative 500, from memory; vegetal soil 300-700 m/s, " +
           k_velocity_tables,
       "vegetal soil 100-300 m/s, " + k_velocity_tables + "; representative 200"},
      {"fill", "Made ground and fill (same row of the reference table as loess)",
       1600, 10e6, 0.30, 0.035, 0, 0, 500, 200,
       "range 1400-1800 kg/m^3 (row 'loess and fill'), representative 1600, from memory; "
       "soil 1200-2400 kg/m^3, " + k_velocity_tables,
       "range 5-30 MPa, representative 10 MPa, " + k_bowles,
       "0.3, " + k_bowles,
       "range 2-5 %, midpoint 3.5 %, " + k_kramer,
       k_none_soil,
       k_none_soil,
       "range 300-900 m/s, representative 500, from memory; vegetal soil 300-700 m/s, " +
           k_velocity_tables,
       "vegetal soil 100-300 m/s, " + k_velocity_tables + "; representative 200"},
  };
  std::vector<CatalogueEntry> out;
  out.reserve(rows.size() + 1);
  for (const auto& r : rows) out.push_back(make(r));
  // The plain name, as scenarios usually say it, stands for the strong limestone.
  CatalogueEntry plain = out.front();
  plain.m.name = "limestone";
  plain.m.source = "built-in catalogue entry 'limestone' (the values of 'limestone-strong'; "
                   "status and source of each value: docs/materials.md)";
  plain.description = "Limestone, generic: the values of limestone-strong";
  out.insert(out.begin() + 2, plain);
  return out;
}

}  // namespace

const std::vector<CatalogueEntry>& material_catalogue() {
  static const std::vector<CatalogueEntry> entries = build();
  return entries;
}

const CatalogueEntry* find_material(std::string_view name) {
  for (const auto& e : material_catalogue())
    if (e.m.name == name) return &e;
  return nullptr;
}

std::vector<std::string> catalogue_names() {
  std::vector<std::string> names;
  for (const auto& e : material_catalogue()) names.push_back(e.m.name);
  return names;
}

}  // namespace voidsign::cli
