// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// The SVG building blocks shared by the chart and the ground-section writers: the root element,
/// text (escaped, optionally with a white halo so that it stays readable over lines and
/// hatching), lines and rectangles. Coordinates and sizes in CSS pixels, y down; every function
/// returns markup ending in a line break.
#include <string>
#include <string_view>

namespace voidsign::cli::report::svg {

/// `<svg>` start tag of a `width` × `height` drawing with a `<title>` (id `<id>-title`) and a
/// white background, so that the drawing prints and shows the same on any page colour.
std::string open_root(std::string_view id, double width, double height, std::string_view title);

/// The closing tag of open_root.
std::string close_root();

/// A `<text>` at (x, y) (baseline) holding `content` (escaped); `attrs` are extra attributes
/// written as they are (e.g. `text-anchor="end"`).
std::string text(double x, double y, std::string_view content, std::string_view attrs = {});

/// Like text() with a white outline behind the glyphs.
std::string halo_text(double x, double y, std::string_view content, std::string_view attrs = {});

/// A `<line>` from (x1, y1) to (x2, y2) with `attrs` (stroke etc.).
std::string line(double x1, double y1, double x2, double y2, std::string_view attrs);

/// A `<rect>` with its top-left corner at (x, y) with `attrs`; a negative size is drawn as 0
/// (the browser would report it as an error).
std::string rect(double x, double y, double w, double h, std::string_view attrs);

/// A coordinate pair "x,y" with two decimals.
std::string point(double x, double y);

}  // namespace voidsign::cli::report::svg
