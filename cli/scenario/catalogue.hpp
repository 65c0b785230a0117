// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The built-in material catalogue: representative properties of common rocks and soils, each
/// value with a note of where it comes from and how far it can be trusted (verified, secondary
/// source, derived or from memory). docs/materials.md shows the same table.
#include <string>
#include <string_view>
#include <vector>

#include "cli/scenario/scenario.hpp"

namespace voidsign::cli {

/// One catalogue material. `m` holds the representative values in SI units (`m.name` is the
/// catalogue name, lower case with hyphens; `m.source` points to docs/materials.md). `vp` and
/// `vs` are representative small-strain wave speeds [m/s]; they are kept for dynamic analyses
/// and are not consistent with the static `m.young` (see docs/materials.md). Each `src_*`
/// string gives the status and source of the matching value.
struct CatalogueEntry {
  Material m;
  std::string description;
  double vp = 0, vs = 0;  ///< m/s
  std::string src_density, src_young, src_poisson, src_damping, src_ucs, src_tensile;
  std::string src_vp, src_vs;
};

/// Every catalogue entry, in a fixed order (rocks, strong to weak, then soils).
const std::vector<CatalogueEntry>& material_catalogue();

/// The entry named `name` (exact, case-sensitive), or nullptr.
const CatalogueEntry* find_material(std::string_view name);

/// The catalogue's names in catalogue order, for suggestions and listings.
std::vector<std::string> catalogue_names();

}  // namespace voidsign::cli
