// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/output/vtk_series.hpp"

#include <cstdio>

#include "cli/output/csv.hpp"
#include "cli/output/output_dir.hpp"

namespace voidsign::cli {

// Point field (3 components) of one column of `u` (d unknowns per node), times `scale`.
mesh::Field vector_field(const std::string& name, const mesh::Mesh& m, int d, const Eigen::VectorXd& u, double scale) {
  mesh::Field f{name, 3, {}};
  f.values.reserve(3 * m.n_nodes());
  for (std::size_t n = 0; n < m.n_nodes(); ++n) {
    const Eigen::Index b = d * static_cast<Eigen::Index>(n);
    if (d == 3)
      f.values.insert(f.values.end(), {scale * u[b], scale * u[b + 1], scale * u[b + 2]});
    else
      f.values.insert(f.values.end(), {scale * u[b], 0.0, scale * u[b + 1]});
  }
  return f;
}

mesh::Field vector_field(const std::string& name, const mesh::Mesh& m, int d, std::span<const double> u) {
  const Eigen::Map<const Eigen::VectorXd> v(u.data(), static_cast<Eigen::Index>(u.size()));
  return vector_field(name, m, d, v, 1.0);
}


// A ParaView collection of `files` (one per value of `values`), with a units note.
void write_pvd(const std::filesystem::path& path, const std::vector<std::string>& files, const std::vector<double>& values,
               const std::string& note) {
  std::string t = "<?xml version=\"1.0\"?>\n<!-- " + note + " -->\n";
  t += "<VTKFile type=\"Collection\" version=\"0.1\" byte_order=\"LittleEndian\">\n  <Collection>\n";
  for (std::size_t k = 0; k < files.size(); ++k)
    t += "    <DataSet timestep=\"" + format_number(values[k]) + "\" group=\"\" part=\"0\" file=\"" + files[k] + "\"/>\n";
  t += "  </Collection>\n</VTKFile>\n";
  write_text_atomic(path, t);
}

std::string numbered(const char* stem, std::size_t k) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%s_%03zu.vtu", stem, k);
  return buf;
}

mesh::Field cell_tag(const char* name, const mesh::Mesh& m, const std::function<double(std::size_t)>& v) {
  mesh::Field f{name, 1, {}};
  for (std::size_t c = 0; c < m.n_cells(); ++c) f.values.push_back(v(c));
  return f;
}

}  // namespace voidsign::cli
