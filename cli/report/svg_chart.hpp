// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A small writer of x–y charts as SVG, for the HTML report and as standalone .svg files.
///
/// A `Chart` holds curves, shaded bands between two curves (an instrument's ±σ noise band, or
/// the region between a low and a high noise model) and labelled reference lines, on linear or
/// log10 axes. Everything is readable without colour: curves differ by dash pattern and marker,
/// bands by hatching, reference lines carry their own labels, and a legend below the plot shows
/// a sample of each curve and band. Values are in the units the axes name (SI; settlement is
/// negative); points that are NaN or infinite, or not positive on a log axis, are left out and
/// break the curve there. All text is XML-escaped. Sizes are in CSS pixels.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace voidsign::cli::report {

/// How an axis maps values to distance.
enum class AxisScale { linear, log10 };

/// One axis: its quantity, unit and scale.
struct Axis {
  std::string label;  ///< the quantity, e.g. "Vertical displacement anomaly"
  std::string unit;   ///< the unit of the values, e.g. "m"; shown as "label [unit]"
  AxisScale scale = AxisScale::linear;
  std::optional<double> min;  ///< fixed lower end [unit]; automatic (nice) when empty
  std::optional<double> max;  ///< fixed upper end [unit]; automatic (nice) when empty
  /// Linear axes: tick labels in engineering form, with the power of ten moved into the unit
  /// ("mm", "µrad", "×10⁻⁶"). When false, ticks show the values in `unit` as they are.
  bool prefix_unit = true;
  bool include_zero = false;  ///< linear axes: the automatic range always contains 0
};

/// A curve or a set of points. `x` and `y` have the same length.
struct Series {
  std::string label;      ///< legend text
  std::vector<double> x;  ///< [x-axis unit]
  std::vector<double> y;  ///< [y-axis unit]
  /// Style index: 0 solid; 1 dashed, open circles; 2 dotted, squares; 3 dash-dot, triangles;
  /// 4 long dashes, diamonds; 5 dash-dot-dot, crosses; larger indices repeat with a thinner line.
  int style = 0;
  bool line = true;  ///< false: a marker at every point and no line (measurements)
};

/// A shaded region between two curves sampled at the same abscissae.
struct Band {
  std::string label;       ///< legend text
  std::vector<double> x;   ///< [x-axis unit]
  std::vector<double> lo;  ///< lower curve [y-axis unit]
  std::vector<double> hi;  ///< upper curve [y-axis unit]
  int style = 0;           ///< hatch index: 0 "/", 1 "\", 2 "×", 3 "—"; repeats beyond
};

/// A horizontal or vertical line across the plot with its own label (a threshold, a depth).
struct RefLine {
  enum class Direction { horizontal, vertical };
  Direction direction = Direction::horizontal;
  double value = 0;              ///< y for a horizontal line, x for a vertical one [axis unit]
  std::string label;             ///< written beside the line
  bool include_in_range = true;  ///< automatic ranges stretch to show the line
};

/// A whole chart. `id` prefixes every id inside the SVG (clip path, patterns, title): it must
/// be unique among the SVGs of one HTML page and start with a letter; other characters than
/// letters, digits, '-' and '_' are replaced by '-'.
struct Chart {
  std::string id = "chart";
  std::string title;  ///< drawn at the top; may be empty
  Axis x;
  Axis y;
  std::vector<Series> series;
  std::vector<Band> bands;
  std::vector<RefLine> lines;
  std::vector<std::string> notes;  ///< annotation lines under the legend
  double width_px = 680;           ///< whole drawing
  double plot_height_px = 340;     ///< the plot frame; the drawing is taller by title and legend
};

/// A linear axis of `label` in `unit`, automatic range.
Axis linear_axis(std::string label, std::string unit);
/// A log10 axis of `label` in `unit`, automatic range.
Axis log_axis(std::string label, std::string unit);
/// A curve through (x, y) with `style`.
Series line_series(std::string label, std::vector<double> x, std::vector<double> y, int style = 0);
/// Points (x, y) with a marker each and no line, with `style`.
Series point_series(std::string label, std::vector<double> x, std::vector<double> y, int style = 0);
/// A band between `lo` and `hi` at abscissae `x`, with hatch `style`.
Band band(std::string label, std::vector<double> x, std::vector<double> lo, std::vector<double> hi,
          int style = 0);
/// A labelled horizontal line at `y` [y-axis unit].
RefLine horizontal_line(double y, std::string label);
/// A labelled vertical line at `x` [x-axis unit].
RefLine vertical_line(double x, std::string label);

/// Linear ticks at a 1, 2 or 5 × 10ᵏ step covering [lo, hi].
struct LinearTicks {
  double lo = 0, hi = 1;       ///< range of the axis (the outer ticks, or the fixed ends)
  double step = 0.2;           ///< tick spacing
  std::vector<double> values;  ///< tick positions, ascending
};

/// Log10 ticks: decades and the 2…9 minor ticks between them.
struct LogTicks {
  int lo_exp = 0, hi_exp = 1;   ///< the axis runs from 10^lo_exp to 10^hi_exp
  std::vector<double> decades;  ///< 10^k for k in [lo_exp, hi_exp]
  std::vector<double> minor;    ///< m·10^k, m = 2…9, inside the range; empty beyond 6 decades
  int label_every = 1;          ///< label every n-th decade so that at most `max_labels` show
};

/// Nice linear ticks for data in [lo, hi] (either order): the smallest 1-2-5 step giving at
/// most `max_intervals` intervals; the range widens to whole steps. A zero-width range widens
/// by ±10 % (±1 around 0); a non-finite one becomes [0, 1].
LinearTicks nice_linear_ticks(double lo, double hi, int max_intervals = 8);

/// Ticks inside the fixed range [lo, hi], which is kept as it is.
LinearTicks fixed_linear_ticks(double lo, double hi, int max_intervals = 8);

/// Log ticks for positive data in [lo, hi]: whole decades covering it (at least one).
/// Non-positive or non-finite input gives the decade [1, 10].
LogTicks nice_log_ticks(double lo, double hi, int max_labels = 8);

/// The chart as an `<svg>` element for inline use in HTML (no XML declaration).
std::string chart_svg_element(const Chart& chart);

/// The chart as a standalone SVG document: XML declaration, then the same element.
std::string chart_svg_document(const Chart& chart);

/// `element` (an `<svg>` element from this module) as a standalone SVG document.
std::string svg_document(const std::string& element);

/// `id` made valid for the ids inside an SVG: letters, digits, '-' and '_'; a leading letter.
std::string svg_id(std::string_view id);

}  // namespace voidsign::cli::report
