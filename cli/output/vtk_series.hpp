// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Pieces shared by the writers of the dynamic analyses: point and cell fields from solution
/// vectors, numbered .vtu names and the ParaView collection (.pvd) that lists them.
#include <Eigen/Core>
#include <filesystem>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "mesh/core/mesh.hpp"
#include "mesh/io/vtk_writer.hpp"

namespace voidsign::cli {

/// Point field (3 components, z the last) of `u` (d unknowns per node: (x, z) or (x, y, z)),
/// times `scale`.
mesh::Field vector_field(const std::string& name, const mesh::Mesh& m, int d, const Eigen::VectorXd& u, double scale);
/// The same from a plain array of d · n_nodes values.
mesh::Field vector_field(const std::string& name, const mesh::Mesh& m, int d, std::span<const double> u);

/// A ParaView collection of `files` (one per value of `values`, the collection's timestep),
/// with `note` (units, meaning) as a comment. Written atomically.
void write_pvd(const std::filesystem::path& path, const std::vector<std::string>& files, const std::vector<double>& values,
               const std::string& note);

/// "stem_007.vtu".
std::string numbered(const char* stem, std::size_t k);

/// One value per cell from `v`.
mesh::Field cell_tag(const char* name, const mesh::Mesh& m, const std::function<double(std::size_t)>& v);

}  // namespace voidsign::cli
