// SPDX-License-Identifier: GPL-3.0-or-later
// `voidsign materials` and `voidsign verify`.
#include <cstdio>
#include <nlohmann/json.hpp>

#include "cli/commands/commands.hpp"
#include "cli/errors.hpp"
#include "cli/output/output_dir.hpp"
#include "cli/scenario/catalogue.hpp"
#include "cli/verify/verify.hpp"
#include "solver/analysis/static.hpp"

#include "solver/signals/sensor_catalogue.hpp"

namespace voidsign::cli {

int materials_command() {
  std::printf("Built-in materials (representative values; sources in docs/materials.md)\n");
  std::printf("%-18s %9s %9s %6s %7s %9s %9s  %s\n", "name", "rho kg/m3", "E GPa", "nu", "damping", "UCS MPa", "T MPa",
              "description");
  for (const CatalogueEntry& e : material_catalogue()) {
    const Material& m = e.m;
    std::printf("%-18s %9.0f %9.3g %6.3g %7.3g %9.3g %9.3g  %s\n", m.name.c_str(), m.density, m.young / 1e9, m.poisson,
                m.damping, m.ucs / 1e6, m.tensile / 1e6, e.description.c_str());
  }
  return exit_ok;
}

namespace {

std::string sourced(const std::optional<solver::Sourced>& v, double scale, const char* unit) {
  if (!v) return "-";
  char buf[96];
  std::snprintf(buf, sizeof buf, "%.3g %s (%s)", v->value * scale, unit, std::string(solver::status_name(v->status)).c_str());
  return buf;
}

}  // namespace

int sensors_command() {
  std::printf("Built-in sensors (every value's source in docs/instruments.md; use a name under 'sensors:' in a scenario,\n"
              "optionally with overrides: {name: levelling, spacing: 10})\n\n");
  for (const solver::SensorSpec& e : solver::sensor_catalogue()) {
    const std::string unit(solver::quantity_unit(e.quantity));
    std::printf("%-24s %-12s measures %s [%s]\n", e.name.c_str(), std::string(solver::kind_name(e.kind)).c_str(),
                std::string(solver::quantity_name(e.quantity)).c_str(), unit.c_str());
    std::printf("  %s\n", e.description.c_str());
    if (e.sigma) std::printf("  precision (one sigma)  %s\n", sourced(e.sigma, 1, unit.c_str()).c_str());
    if (e.sigma_per_sqrt_km) std::printf("  precision per sqrt(km) %s\n", sourced(e.sigma_per_sqrt_km, 1e3, "mm").c_str());
    if (e.self_noise)
      std::printf("  self-noise             %s PSD table, %zu points (%s): %s\n", std::string(solver::psd_unit(e.self_noise->psd.quantity)).c_str(),
                  e.self_noise->psd.f_hz.size(), std::string(solver::status_name(e.self_noise->status)).c_str(), e.self_noise->source.c_str());
    if (e.band_lo_hz && e.band_hi_hz)
      std::printf("  band                   %s to %s\n", sourced(e.band_lo_hz, 1, "Hz").c_str(), sourced(e.band_hi_hz, 1, "Hz").c_str());
    if (e.footprint_m) std::printf("  footprint              %s\n", sourced(e.footprint_m, 1, "m").c_str());
    if (e.window_s) std::printf("  time window            %s\n", sourced(e.window_s, 1, "s").c_str());
    if (e.repeat_s) std::printf("  repeat interval        %s\n", sourced(e.repeat_s, 1.0 / 86400, "days").c_str());
    if (e.incidence_deg) std::printf("  incidence              %s\n", sourced(e.incidence_deg, 1, "deg").c_str());
    if (e.heading_deg) std::printf("  heading                %s\n", sourced(e.heading_deg, 1, "deg").c_str());
    if (e.kind == solver::SensorKind::levelling || e.kind == solver::SensorKind::gnss)
      std::printf("  spacing                give it in the scenario (no typical value is sourced)\n");
  }
  return exit_ok;
}

int verify_command(const std::optional<std::filesystem::path>& json, const std::string& only) {
  std::vector<VerifyRow> rows;
  std::printf("%-20s %-62s %13s %13s %9s %9s %-4s  %s\n", "case", "quantity", "computed", "reference", "rel.err", "tol",
              "pass", "source");
  bool all = true;
  for (const VerifyCase& c : verification_cases()) {
    if (!only.empty() && c.name.find(only) == std::string::npos) continue;
    std::vector<VerifyRow> got;
    try {
      got = c.run();
    } catch (const std::exception& e) {
      VerifyRow r;
      r.case_name = c.name;
      r.quantity = std::string("case failed to run: ") + e.what();
      r.rel_error = 1e300;
      got.push_back(r);
    }
    for (const VerifyRow& r : got) {
      all = all && r.pass();
      std::printf("%-20s %-62s %13.6g %13.6g %9.2e %9.2g %-4s  %s\n", r.case_name.c_str(), r.quantity.c_str(), r.computed,
                  r.reference, r.rel_error, r.tolerance, r.pass() ? "yes" : "NO", r.source.c_str());
      std::fflush(stdout);
      rows.push_back(r);
    }
  }
  if (json) {
    nlohmann::json j = nlohmann::json::array();
    for (const VerifyRow& r : rows)
      j.push_back({{"case", r.case_name},
                   {"quantity", r.quantity},
                   {"computed", r.computed},
                   {"reference", r.reference},
                   {"rel_error", r.rel_error},
                   {"tolerance", r.tolerance},
                   {"tolerance_is_minimum", r.is_minimum},
                   {"source", r.source},
                   {"pass", r.pass()}});
    write_text_atomic(*json, j.dump(2) + "\n");
  }
  std::printf("%s: %zu row(s)\n", all ? "all pass" : "SOME ROWS FAIL", rows.size());
  return all ? exit_ok : exit_unsolvable;
}

}  // namespace voidsign::cli
