// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Pieces shared by the 2D and 3D Gmsh meshers (internal to mesh/build; not a public interface).
#include <gmsh.h>
#include <omp.h>

#include <algorithm>
#include <numbers>
#include <string>
#include <vector>

#include "mesh/build/mesher.hpp"

namespace voidsign::mesh::gmsh_detail {

/// One Gmsh model for the lifetime of the object. Gmsh resets the OpenMP thread count to 1 in
/// initialize() and leaves it so: the destructor restores it.
class GmshSession {
 public:
  GmshSession() : threads_(omp_get_max_threads()) {
    gmsh::initialize(0, nullptr, false);
    gmsh::option::setNumber("General.Terminal", 0);
    gmsh::option::setNumber("General.Verbosity", 1);
    gmsh::model::add("voidsign");
  }
  ~GmshSession() {
    gmsh::finalize();
    omp_set_num_threads(threads_);
  }
  GmshSession(const GmshSession&) = delete;
  GmshSession& operator=(const GmshSession&) = delete;
  /// The OpenMP thread count in force before Gmsh was started.
  int threads() const { return threads_; }

 private:
  int threads_;
};

/// Degrees to radians.
inline double deg2rad(double d) { return d * std::numbers::pi / 180.0; }

/// Fragment-map bookkeeping: v[tag] = value, growing v (with −1) as needed.
inline void note_tag(std::vector<int>& v, int tag, int value) {
  if (static_cast<int>(v.size()) <= tag) v.resize(static_cast<std::size_t>(tag) + 1, -1);
  v[static_cast<std::size_t>(tag)] = value;
}

/// v[tag], or −1 when the tag was never noted.
inline int tag_value(const std::vector<int>& v, int tag) {
  return tag >= 0 && tag < static_cast<int>(v.size()) ? v[static_cast<std::size_t>(tag)] : -1;
}

/// Appends to `m` the elements of type `gmsh_type` of every model entity of dimension `dim`
/// (2: faces of the x–z section, whose Gmsh (x, y) become our (x, z); 3: volumes), with the
/// nodes they use, numbered in order of first use. `order[k]` is the Gmsh node index that becomes
/// our node k of a cell (null: the same order). Each cell is tagged with its entity's layer and
/// void from `entity_layer` and `entity_void` (indexed by entity tag); an entity with no layer
/// throws MeshError(`orphan`). With `node_of_tag`, also returns our node index for each Gmsh node
/// tag (−1 for nodes no cell uses).
inline void read_cells(Mesh& m, int dim, int gmsh_type, const int* order,
                       const std::vector<int>& entity_layer, const std::vector<int>& entity_void,
                       const char* orphan, std::vector<int>* node_of_tag = nullptr) {
  std::vector<std::size_t> node_tags;
  std::vector<double> xyz, param;
  gmsh::model::mesh::getNodes(node_tags, xyz, param, -1, -1, false, false);
  std::size_t max_tag = 0;
  for (auto t : node_tags) max_tag = std::max(max_tag, t);
  std::vector<int> index(max_tag + 1, -1);
  std::vector<Point> coords(node_tags.size());
  for (std::size_t i = 0; i < node_tags.size(); ++i) {
    index[node_tags[i]] = static_cast<int>(i);
    if (dim == 2)
      coords[i] = {xyz[3 * i], 0.0, xyz[3 * i + 1]};
    else
      coords[i] = {xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]};
  }

  const int npc = m.npc();
  std::vector<int> used(node_tags.size(), -1);
  gmsh::vectorpair entities;
  gmsh::model::getEntities(entities, dim);
  for (const auto& [edim, tag] : entities) {
    std::vector<std::size_t> etags, enodes;
    gmsh::model::mesh::getElementsByType(gmsh_type, etags, enodes, tag);
    const int lay = tag_value(entity_layer, tag);
    const int vid = tag_value(entity_void, tag);
    if (lay < 0) throw MeshError(orphan);
    for (std::size_t e = 0; e < etags.size(); ++e) {
      for (int k = 0; k < npc; ++k) {
        const int old = index[enodes[e * npc + (order ? order[k] : k)]];
        if (used[old] < 0) {
          used[old] = static_cast<int>(m.nodes.size());
          m.nodes.push_back(coords[old]);
        }
        m.cells.push_back(used[old]);
      }
      m.layer.push_back(lay);
      m.void_id.push_back(vid);
    }
  }
  if (node_of_tag) {
    node_of_tag->assign(max_tag + 1, -1);
    for (std::size_t i = 0; i < node_tags.size(); ++i) (*node_of_tag)[node_tags[i]] = used[i];
  }
}

}  // namespace voidsign::mesh::gmsh_detail
