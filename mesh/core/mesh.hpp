// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The finite-element mesh shared by every analysis: nodes, cells, and the tags that say which
/// layer a cell belongs to and whether it lies inside a void. The mesher fills nodes, cells,
/// layer and void_id; everything else (boundary facets, surface nodes) is derived from those by
/// `finish_topology`, so no other part of the code depends on the mesher.
#include <array>
#include <cstddef>
#include <string>
#include <vector>

namespace voidsign::mesh {

/// Cell kinds. Node order follows VTK: corners first, then edge midpoints
/// (tri6: 01, 12, 20; tet10: 01, 12, 20, 03, 13, 23).
enum class CellType { tri3, tri6, tet4, tet10 };

/// Spatial dimension of a cell type: 2 (triangles, x–z section) or 3 (tetrahedra).
int dim_of(CellType t);

/// Number of nodes of a cell of this type.
int nodes_per_cell(CellType t);
/// Number of nodes of a boundary facet of this type: an edge in 2D (2 or 3 nodes), a triangle in
/// 3D (3 or 6 nodes, corners then midsides 01, 12, 20).
int nodes_per_facet(CellType t);
/// Polynomial order of the type: 1 or 2.
int order_of(CellType t);

/// Where a boundary facet lies.
enum class FacetKind { surface, bottom, left, right, front, back, void_wall };
// left/right: x = x_min / x_max; front/back: y = y_min / y_max (3D only).

/// A boundary facet of the solid (non-void) part of the mesh.
struct Facet {
  std::array<int, 6> nodes{-1, -1, -1, -1, -1, -1};  ///< corners, then midside nodes (quadratic)
  FacetKind kind = FacetKind::surface;
  int cell = -1;     ///< the cell the facet bounds (a ground cell, except on sides of void cells)
  int void_id = -1;  ///< void walls: the void on the other side; sides of void cells: their void
};

/// Node coordinates [m]: x, y, z. 2D models use x and z (y = 0); axisymmetric: r = x.
using Point = std::array<double, 3>;

struct Mesh {
  CellType type = CellType::tri6;
  std::vector<Point> nodes;
  std::vector<int> cells;    ///< nodes_per_cell(type) node indices per cell, flat
  std::vector<int> layer;    ///< per cell: index into the scenario's layers (top = 0)
  std::vector<int> void_id;  ///< per cell: -1 for ground, k when the cell fills void k
  int n_voids = 0;

  // Derived by finish_topology().
  /// Boundary facets: the block's sides (of ground cells, and of void cells where a void is cut
  /// by a side, as by a symmetry plane or a tunnel through the block: the model without voids
  /// needs their supports and loads) and the void walls (ground cell against void cell). `cell`
  /// is the cell the facet bounds; void_id ≥ 0 on walls and on sides of void cells.
  std::vector<Facet> facets;
  std::vector<int> surface_nodes;  ///< nodes on z = 0, sorted by x (3D: by x, then y)
  double x_min = 0, x_max = 0, y_min = 0, y_max = 0, z_min = 0, z_max = 0;

  std::size_t n_nodes() const { return nodes.size(); }
  std::size_t n_cells() const { return layer.size(); }
  int npc() const { return nodes_per_cell(type); }
  int dim() const { return dim_of(type); }
  /// Pointer to the npc() node indices of cell c.
  const int* cell(std::size_t c) const { return cells.data() + c * npc(); }
};

/// Fills facets, surface_nodes and the bounding box from cells and tags. `tol` [m] is the
/// distance within which a node counts as lying on the block's outer boundary.
void finish_topology(Mesh& m, double tol);

/// Element shape quality summary.
struct Quality {
  double min_quality = 0;   ///< smallest shape measure, 1 = equilateral, 0 = degenerate
  double mean_quality = 0;
  double min_jacobian_ratio = 0;  ///< smallest (min det J / max det J) over cells (tri6)
  std::size_t n_inverted = 0;     ///< cells with det J <= 0 anywhere tested
  std::size_t worst_cell = 0;
};

/// Measures every cell: triangles 4√3·A/Σℓ², tetrahedra 6√2·V/ℓ_rms³ (1 = regular), and for
/// quadratic cells the sign and spread of det J at the corners, the edge midpoints and the
/// centroid. (3D facets store their corners so that the normal points out of the solid cell.)
Quality measure_quality(const Mesh& m);

}  // namespace voidsign::mesh
