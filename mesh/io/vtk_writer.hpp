// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// VTK XML unstructured-grid (.vtu) output of a mesh with named point and cell fields.
#include <filesystem>
#include <string>
#include <vector>

#include "mesh/core/mesh.hpp"

namespace voidsign::mesh {

/// A named field; values are n_items × n_components, row-major (item-major).
struct Field {
  std::string name;
  int n_components = 1;
  std::vector<double> values;
};

/// Writes `m` (optionally only the cells with keep[c] true) to `path` as .vtu (binary,
/// compressed). Point fields must have n_nodes rows, cell fields n_cells rows (before
/// filtering). Coordinates are written as (x, 0, z) in 2D. Throws std::runtime_error on failure.
/// The file is written directly to `path`; atomic renaming is the caller's business.
void write_vtu(const std::filesystem::path& path, const Mesh& m,
               const std::vector<Field>& point_fields, const std::vector<Field>& cell_fields,
               const std::vector<bool>* keep = nullptr);

}  // namespace voidsign::mesh
