// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The geometry of the domain reduction method (Bielak, Loukakis, Hisada & Yoshimura 2003,
/// Bull. Seismol. Soc. Am. 93(2), 817–824; from memory), shared by the harmonic and transient
/// analyses: the box that holds every void, and the single layer of cells just outside it on
/// which the effective forces of an incident wave act. With b the nodes of those cells on the
/// box boundary Γ and e their other nodes, the forces are f_b = −A_be u⁰_e and f_e = +A_eb u⁰_b,
/// A the cell's dynamic operator and u⁰ the free field; the solution is then the total field
/// inside the box and on Γ, and the scattered field outside it.
#include <array>
#include <cstddef>
#include <string>
#include <vector>

#include "mesh/core/mesh.hpp"

namespace voidsign::solver {

/// The interior region: |x| < half_width, |y| < half_length (3D), depth below the surface < depth.
/// A cell belongs to it when the centroid of its corners does. Zero entries are chosen
/// automatically (drm_layer).
struct DrmBox {
  double half_width = 0;   ///< m
  double half_length = 0;  ///< m (3D)
  double depth = 0;        ///< m
};

/// Where the box must stop: the inner edges of an absorbing band, or the block's own faces.
struct DrmLimits {
  double x_lo = 0, x_hi = 0;  ///< m
  double y_lo = 0, y_hi = 0;  ///< m (3D)
  double z_lo = 0;            ///< m
};

struct DrmLayer {
  DrmBox box;                 ///< as used, defaults filled in
  std::vector<char> inside;   ///< per node: belongs to a cell inside the box (total field)
  struct Cell {
    std::size_t cell;
    std::vector<char> on_boundary;  ///< per local node: on Γ (b) rather than outside it (e)
  };
  std::vector<Cell> cells;    ///< the layer, ascending cell index
};

/// The box and its layer. Defaults: each face halfway between the voids' reach and the limit,
/// so that the layer lies in the far field of both whatever the size of the coarse cells there;
/// without voids two of the largest cells short of the limit. `excluded` (per cell, may be
/// empty) marks cells the layer must not use (an absorbing band); `layer_thickness` (top down,
/// the last entry ignored) is checked against the layer tags of the layer's cells, whose
/// free field is computed from those thicknesses. Throws std::invalid_argument (messages start
/// with `who`) for a void reaching the box boundary, a layer touching excluded cells, tags that
/// do not match the thicknesses, or an empty layer.
DrmLayer drm_layer(const mesh::Mesh& m, const DrmBox& requested, const DrmLimits& limits,
                   const std::vector<char>& excluded, const std::vector<double>& layer_thickness, const std::string& who);

}  // namespace voidsign::solver
