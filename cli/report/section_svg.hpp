// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The ground section drawn to scale as SVG: the block with its layers (each a hatch pattern
/// distinct in greyscale, named in a column beside the block), the voids (white, outlined,
/// labelled), surface load strips (arrows) and sensors (triangles on the surface), a depth axis,
/// a distance axis and a scale bar in metres.
///
/// Horizontal and vertical scales are equal, unless the block is so wide and shallow that it
/// would be a thin strip: then depths are stretched by a round factor (2, 5, 10, …) and the
/// drawing says "vertical exaggeration ×N" under the scale bar.
///
/// Plain input, independent of the scenario types. Units: metres. Layers give depths below the
/// surface (positive down); void outlines use (x, z) with z up and the surface at z = 0, as the
/// mesh does. Sizes of the drawing are CSS pixels.
#include <array>
#include <string>
#include <vector>

namespace voidsign::cli::report {

/// A layer of the ground, between two depths.
struct SectionLayer {
  std::string name;      ///< e.g. "Upper chalk"
  std::string material;  ///< e.g. "chalk, weathered"; shown in brackets after the name
  double top_m = 0;      ///< depth of the top below the surface [m], ≥ 0
  double bottom_m = 0;   ///< depth of the bottom [m], > top_m
  int pattern = -1;      ///< hatch index (0…7); −1: the layer's position in the list
};

/// A cavity as a closed polyline (the last point joins the first).
struct SectionVoid {
  std::string label;                           ///< e.g. "Gallery, 4 m span"
  std::vector<std::array<double, 2>> outline;  ///< (x, z) [m], z up, z < 0 below the surface
};

/// A surface load spread over a strip of the surface.
struct SectionLoad {
  std::string label;    ///< e.g. "Embankment 40 kPa"
  double x_from_m = 0;  ///< [m]
  double x_to_m = 0;    ///< [m]
};

/// An instrument point on the surface.
struct SectionSensor {
  std::string label;  ///< may be empty; labels that would overlap a neighbour's are left out
  double x_m = 0;     ///< [m]
};

/// The whole drawing. `id` prefixes the ids inside the SVG (see Chart::id).
struct Section {
  std::string id = "section";
  std::string title;                 ///< drawn at the top; may be empty
  double x_min_m = -50;              ///< left side of the block [m]
  double x_max_m = 50;               ///< right side of the block [m]
  double depth_m = 30;               ///< bottom of the block below the surface [m]
  std::vector<SectionLayer> layers;  ///< top down; gaps stay blank
  std::vector<SectionVoid> voids;
  std::vector<SectionLoad> loads;
  std::vector<SectionSensor> sensors;
  double width_px = 640;       ///< drawn width of the block
  double min_height_px = 150;  ///< below this the depth is exaggerated
  double max_height_px = 480;  ///< above this the whole drawing shrinks (a deep, narrow block)
  std::string x_label = "Horizontal position x";  ///< the distance axis, in m
};

/// How the block maps to the drawing.
struct SectionScale {
  double px_per_m_x = 0;      ///< horizontal scale [px/m]
  double px_per_m_z = 0;      ///< vertical scale [px/m] = px_per_m_x × exaggeration
  double exaggeration = 1;    ///< vertical exaggeration (1: true scale)
  double block_width_px = 0;  ///< = width_px unless the block is deep and narrow
  double block_height_px = 0;
};

/// The scale of `s`: px_per_m_x = width_px / (x_max_m − x_min_m), shrunk when the block would
/// be taller than max_height_px; the exaggeration is the smallest of 1, 2, 5, 10, 20, … that
/// makes the block at least min_height_px tall. Throws std::invalid_argument for a block of no
/// width or depth.
SectionScale section_scale(const Section& s);

/// The section as an `<svg>` element for inline use in HTML. The block's rectangle has the id
/// `<id>-block`.
std::string section_svg_element(const Section& s);

/// The section as a standalone SVG document.
std::string section_svg_document(const Section& s);

}  // namespace voidsign::cli::report
