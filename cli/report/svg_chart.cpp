// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/svg_chart.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <utility>

#include "cli/report/svg_parts.hpp"
#include "cli/report/text.hpp"

namespace voidsign::cli::report {
namespace {

// ---------------------------------------------------------------------------------------------
// Styles: each differs from the others in dash pattern and marker, so colour is a bonus.

enum class Marker {
  none,
  filled_circle,
  open_circle,
  filled_square,
  filled_triangle,
  open_diamond,
  cross
};

struct LineStyle {
  const char* dash;    // stroke-dasharray, "" for solid
  const char* colour;  // dark enough to stay distinct from the grid in greyscale
  Marker marker;       // on line series; points-only series always get one
  double width;        // px
};

constexpr std::array<LineStyle, 6> line_styles = {{
    {"", "#000000", Marker::none, 2.0},
    {"7 4", "#0072b2", Marker::open_circle, 1.8},
    {"0.1 4", "#b34700", Marker::filled_square, 2.4},  // round caps turn 0.1 px dashes into dots
    {"9 3 2 3", "#007a5a", Marker::filled_triangle, 1.8},
    {"15 5", "#6a3d9a", Marker::open_diamond, 1.8},
    {"9 3 2 3 2 3", "#5b4a14", Marker::cross, 1.8},
}};

LineStyle style_of(int index) {
  const int n = static_cast<int>(line_styles.size());
  const int i = ((index % n) + n) % n;
  LineStyle s = line_styles[static_cast<std::size_t>(i)];
  if (index >= n || index < 0) s.width *= 0.6;  // the second round of styles: thinner lines
  return s;
}

Marker points_marker(const LineStyle& s) {
  return s.marker == Marker::none ? Marker::filled_circle : s.marker;
}

constexpr int n_hatches = 4;
constexpr const char* grid_colour = "#d4d4d4";
constexpr const char* minor_grid_colour = "#ececec";
constexpr const char* band_edge_colour = "#666666";

// Font sizes [px] and layout constants [px].
constexpr double tick_font = 11, label_font = 12.5, title_font = 14, legend_font = 12,
                 note_font = 11;
constexpr double tick_len = 5, minor_tick_len = 3;
constexpr double legend_row = 19, note_row = 15, sample_len = 32;

// ---------------------------------------------------------------------------------------------
// Data ranges.

bool usable(double v, AxisScale scale) {
  return std::isfinite(v) && (scale == AxisScale::linear || v > 0);
}

struct Extent {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -std::numeric_limits<double>::infinity();
  bool any() const { return lo <= hi; }
  void add(double v) {
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
};

/// What the data and reference lines span on both axes (only points drawable on both axes).
struct DataExtent {
  Extent x, y;
};

DataExtent data_extent(const Chart& c) {
  DataExtent e;
  const auto add_point = [&](double x, double y) {
    if (!usable(x, c.x.scale) || !usable(y, c.y.scale)) return;
    e.x.add(x);
    e.y.add(y);
  };
  for (const Series& s : c.series)
    for (std::size_t i = 0; i < std::min(s.x.size(), s.y.size()); ++i) add_point(s.x[i], s.y[i]);
  for (const Band& b : c.bands) {
    const std::size_t n = std::min({b.x.size(), b.lo.size(), b.hi.size()});
    for (std::size_t i = 0; i < n; ++i) {
      add_point(b.x[i], b.lo[i]);
      add_point(b.x[i], b.hi[i]);
    }
  }
  for (const RefLine& r : c.lines) {
    if (!r.include_in_range) continue;
    const bool horizontal = r.direction == RefLine::Direction::horizontal;
    const Axis& a = horizontal ? c.y : c.x;
    if (usable(r.value, a.scale)) (horizontal ? e.y : e.x).add(r.value);
  }
  return e;
}

// ---------------------------------------------------------------------------------------------
// Axes: range, ticks, labels and the title with its (scaled) unit.

struct ResolvedAxis {
  AxisScale scale = AxisScale::linear;
  double lo = 0, hi = 1;             // ends [unit]
  std::vector<double> major, minor;  // tick positions [unit]
  std::vector<std::string> labels;   // one per major tick; "" for an unlabelled decade
  std::string title;                 // "label [unit]"
};

std::string axis_title(const Axis& a, const std::string& unit_text) {
  if (unit_text.empty()) return a.label;
  return a.label.empty() ? "[" + unit_text + "]" : a.label + " [" + unit_text + "]";
}

ResolvedAxis resolve_linear(const Axis& a, Extent data, int max_intervals) {
  if (a.include_zero) data.add(0);
  const bool fixed_both = a.min && a.max;
  double lo = data.any() ? data.lo : 0, hi = data.any() ? data.hi : 1;
  if (a.min) lo = *a.min;
  if (a.max) hi = *a.max;
  if (a.min && !a.max && hi <= lo) hi = lo + std::max(1.0, std::abs(lo));
  if (a.max && !a.min && lo >= hi) lo = hi - std::max(1.0, std::abs(hi));
  LinearTicks t = fixed_both ? fixed_linear_ticks(lo, hi, max_intervals)
                             : nice_linear_ticks(lo, hi, max_intervals);
  // One fixed end stays where it was given.
  if (a.min && !fixed_both) t = fixed_linear_ticks(*a.min, t.hi, max_intervals);
  if (a.max && !fixed_both) t = fixed_linear_ticks(t.lo, *a.max, max_intervals);

  ResolvedAxis r;
  r.scale = AxisScale::linear;
  r.lo = t.lo, r.hi = t.hi, r.major = t.values;
  const int e = a.prefix_unit ? engineering_exponent(std::max(std::abs(t.lo), std::abs(t.hi))) : 0;
  const double scale = std::pow(10.0, e);
  for (const double v : t.values) r.labels.push_back(tick_label(v / scale, t.step / scale));
  r.title = axis_title(a, scaled_unit(a.unit, e));
  return r;
}

ResolvedAxis resolve_log(const Axis& a, const Extent& data, int max_labels) {
  double lo = data.any() ? data.lo : 1, hi = data.any() ? data.hi : 10;
  if (a.min && *a.min > 0) lo = *a.min;
  if (a.max && *a.max > 0) hi = *a.max;
  if (hi <= lo) hi = lo * 10;
  const LogTicks t = nice_log_ticks(lo, hi, max_labels);
  ResolvedAxis r;
  r.scale = AxisScale::log10;
  r.lo = (a.min && *a.min > 0) ? lo : std::pow(10.0, t.lo_exp);
  r.hi = (a.max && *a.max > 0) ? hi : std::pow(10.0, t.hi_exp);
  const double tol = 1e-9;
  const auto inside = [&](double v) {
    return std::log10(v) >= std::log10(r.lo) - tol && std::log10(v) <= std::log10(r.hi) + tol;
  };
  for (std::size_t k = 0; k < t.decades.size(); ++k) {
    if (!inside(t.decades[k])) continue;
    r.major.push_back(t.decades[k]);
    const int exp = t.lo_exp + static_cast<int>(k);
    r.labels.push_back((exp - t.lo_exp) % t.label_every == 0 ? power_of_ten(exp) : "");
  }
  for (const double m : t.minor)
    if (inside(m)) r.minor.push_back(m);
  r.title = axis_title(a, a.unit);
  return r;
}

ResolvedAxis resolve_axis(const Axis& a, const Extent& e, int max_intervals) {
  return a.scale == AxisScale::log10 ? resolve_log(a, e, max_intervals)
                                     : resolve_linear(a, e, max_intervals);
}

/// Maps axis values to pixels between `px_lo` (at the axis's low end) and `px_hi`.
struct AxisMap {
  AxisScale scale;
  double t_lo, t_hi, px_lo, px_hi;
  AxisMap(const ResolvedAxis& a, double from_px, double to_px)
      : scale(a.scale),
        t_lo(transform(a.lo)),
        t_hi(transform(a.hi)),
        px_lo(from_px),
        px_hi(to_px) {}
  double transform(double v) const { return scale == AxisScale::log10 ? std::log10(v) : v; }
  double operator()(double v) const {
    const double f = (transform(v) - t_lo) / (t_hi - t_lo);
    // Far-off points (a fixed range that cuts the data) stay finite for the clip path to cut.
    return std::clamp(px_lo + f * (px_hi - px_lo), -1e5, 1e5);
  }
  bool contains(double v) const {
    const double t = transform(v);
    return t >= std::min(t_lo, t_hi) && t <= std::max(t_lo, t_hi);
  }
};

// ---------------------------------------------------------------------------------------------
// Layout.

struct Frame {
  double left, top, width, height;
  double right() const { return left + width; }
  double bottom() const { return top + height; }
};

struct LegendEntry {
  enum class Kind { series, band };
  Kind kind;
  int index;  // into chart.series or chart.bands
  std::string text;
};

struct Layout {
  Frame plot;
  double legend_top = 0;
  int legend_columns = 1;
  double legend_column_width = 0;
  double notes_top = 0;
  double total_height = 0;
};

double max_label_width(const std::vector<std::string>& labels, double font) {
  double w = 0;
  for (const auto& l : labels) w = std::max(w, text_width_px(l, font));
  return w;
}

/// Splits `text` into lines of at most `max_chars` code points at spaces.
std::vector<std::string> wrap(const std::string& text, std::size_t max_chars) {
  std::vector<std::string> lines;
  std::string current;
  std::size_t start = 0;
  while (start <= text.size()) {
    std::size_t end = text.find(' ', start);
    if (end == std::string::npos) end = text.size();
    const std::string word = text.substr(start, end - start);
    if (!current.empty() && utf8_length(current) + 1 + utf8_length(word) > max_chars) {
      lines.push_back(current);
      current.clear();
    }
    current += (current.empty() ? "" : " ") + word;
    start = end + 1;
  }
  if (!current.empty()) lines.push_back(current);
  return lines;
}

// ---------------------------------------------------------------------------------------------
// Drawing pieces.

std::string dash_attrs(const LineStyle& s) {
  std::string a = "stroke=\"" + std::string(s.colour) + "\" stroke-width=\"" + fixed(s.width, 1) +
                  "\" fill=\"none\" stroke-linejoin=\"round\"";
  if (*s.dash) a += std::string(" stroke-dasharray=\"") + s.dash + "\" stroke-linecap=\"round\"";
  return a;
}

std::string marker_markup(Marker m, double x, double y, const char* colour) {
  const double r = 3.6;
  const std::string c = colour;
  const auto path = [&](const std::string& d, bool filled) {
    return "<path d=\"" + d + "\" fill=\"" + (filled ? c : "#ffffff") + "\" stroke=\"" + c +
           "\" stroke-width=\"1.4\"/>\n";
  };
  switch (m) {
    case Marker::none:
      return {};
    case Marker::filled_circle:
    case Marker::open_circle:
      return "<circle cx=\"" + fixed(x) + "\" cy=\"" + fixed(y) + "\" r=\"" + fixed(r) +
             "\" fill=\"" + (m == Marker::filled_circle ? c : "#ffffff") + "\" stroke=\"" + c +
             "\" stroke-width=\"1.4\"/>\n";
    case Marker::filled_square:
      return path("M" + svg::point(x - r, y - r) + "H" + fixed(x + r) + "V" + fixed(y + r) + "H" +
                      fixed(x - r) + "Z",
                  true);
    case Marker::filled_triangle:
      return path("M" + svg::point(x, y - r - 0.6) + "L" + svg::point(x + r, y + r - 0.6) + "L" +
                      svg::point(x - r, y + r - 0.6) + "Z",
                  true);
    case Marker::open_diamond:
      return path("M" + svg::point(x, y - r - 0.8) + "L" + svg::point(x + r + 0.8, y) + "L" +
                      svg::point(x, y + r + 0.8) + "L" + svg::point(x - r - 0.8, y) + "Z",
                  false);
    case Marker::cross:
      return "<path d=\"M" + svg::point(x - r, y - r) + "L" + svg::point(x + r, y + r) + "M" +
             svg::point(x - r, y + r) + "L" + svg::point(x + r, y - r) + "\" stroke=\"" + c +
             "\" stroke-width=\"1.8\" fill=\"none\"/>\n";
  }
  return {};
}

/// One hatch pattern per band style: a light grey tint (translucent, so that overlapping bands
/// both show) and lines at a style-specific angle.
std::string hatch_pattern(const std::string& id, int style) {
  const int k = ((style % n_hatches) + n_hatches) % n_hatches;
  static constexpr std::array<const char*, n_hatches> transforms = {"rotate(45)", "rotate(-45)",
                                                                    "rotate(45)", "rotate(0)"};
  std::string p = "<pattern id=\"" + id + "\" patternUnits=\"userSpaceOnUse\" width=\"7\" " +
                  "height=\"7\" patternTransform=\"" + transforms[static_cast<std::size_t>(k)] +
                  "\">\n";
  p += "<rect x=\"0\" y=\"0\" width=\"7\" height=\"7\" fill=\"#808080\" fill-opacity=\"0.14\"/>\n";
  const char* stroke = "stroke=\"#505050\" stroke-width=\"0.9\"";
  if (k == 3) {
    p += svg::line(0, 3.5, 7, 3.5, stroke);
  } else {
    p += svg::line(3.5, 0, 3.5, 7, stroke);
    if (k == 2) p += svg::line(0, 3.5, 7, 3.5, stroke);
  }
  return p + "</pattern>\n";
}

/// A polyline through the drawable points, as one path with a new subpath after every gap;
/// points standing alone between gaps are returned in `singles` (a subpath of one point draws
/// nothing).
struct Polyline {
  std::string d;
  std::vector<std::array<double, 2>> singles;
  std::vector<std::array<double, 2>> points;  // all drawable points [px]
};

Polyline polyline(const std::vector<double>& xs, const std::vector<double>& ys, const AxisMap& mx,
                  const AxisMap& my) {
  Polyline out;
  std::size_t run = 0;
  std::array<double, 2> run_start{};
  const std::size_t n = std::min(xs.size(), ys.size());
  for (std::size_t i = 0; i <= n; ++i) {
    const bool ok = i < n && usable(xs[i], mx.scale) && usable(ys[i], my.scale);
    if (!ok) {
      if (run == 1) out.singles.push_back(run_start);
      run = 0;
      continue;
    }
    const std::array<double, 2> p = {mx(xs[i]), my(ys[i])};
    out.d.append(run == 0 ? "M" : "L").append(svg::point(p[0], p[1]));
    if (run == 0) run_start = p;
    ++run;
    out.points.push_back(p);
  }
  return out;
}

/// Markers along a line series: at most about ten, staggered by style so that the markers of
/// different series do not sit on top of each other.
std::vector<std::array<double, 2>> marker_points(const std::vector<std::array<double, 2>>& pts,
                                                 int style, bool every_point) {
  if (every_point || pts.size() <= 10) return pts;
  const double spacing = static_cast<double>(pts.size()) / 10.0;
  const double offset = spacing * (0.5 + 0.13 * static_cast<double>(((style % 6) + 6) % 6));
  std::vector<std::array<double, 2>> out;
  for (double f = std::fmod(offset, spacing); f < static_cast<double>(pts.size()); f += spacing)
    out.push_back(pts[static_cast<std::size_t>(f)]);
  return out;
}

/// Runs of consecutive indices where x, lo and hi are all drawable.
std::vector<std::pair<std::size_t, std::size_t>> band_runs(const Band& b, AxisScale xs,
                                                           AxisScale ys) {
  std::vector<std::pair<std::size_t, std::size_t>> runs;
  const std::size_t n = std::min({b.x.size(), b.lo.size(), b.hi.size()});
  std::size_t start = 0;
  bool in_run = false;
  for (std::size_t i = 0; i <= n; ++i) {
    const bool ok = i < n && usable(b.x[i], xs) && usable(b.lo[i], ys) && usable(b.hi[i], ys);
    if (ok && !in_run) start = i, in_run = true;
    if (!ok && in_run) {
      runs.emplace_back(start, i);
      in_run = false;
    }
  }
  return runs;
}

/// How many values a log axis leaves out (not positive but finite).
std::size_t count_nonpositive(const std::vector<double>& v) {
  return static_cast<std::size_t>(
      std::count_if(v.begin(), v.end(), [](double x) { return std::isfinite(x) && x <= 0; }));
}

std::size_t count_drawable(const std::vector<double>& xs, const std::vector<double>& ys,
                           AxisScale sx, AxisScale sy) {
  std::size_t n = 0;
  for (std::size_t i = 0; i < std::min(xs.size(), ys.size()); ++i)
    n += usable(xs[i], sx) && usable(ys[i], sy);
  return n;
}

/// Notes the chart adds by itself: values a log axis cannot show.
std::vector<std::string> automatic_notes(const Chart& c) {
  std::vector<std::string> notes;
  const auto log_note = [&](const Axis& a, bool is_x) {
    if (a.scale != AxisScale::log10) return;
    std::size_t n = 0;
    for (const Series& s : c.series) n += count_nonpositive(is_x ? s.x : s.y);
    for (const Band& b : c.bands)
      n += is_x ? count_nonpositive(b.x) : count_nonpositive(b.lo) + count_nonpositive(b.hi);
    if (n > 0)
      notes.push_back(std::to_string(n) + (n == 1 ? " value" : " values") +
                      " \xE2\x89\xA4 0 not shown: the " + (is_x ? "x" : "y") +
                      " axis is logarithmic.");
  };
  log_note(c.x, true);
  log_note(c.y, false);
  return notes;
}

class ChartWriter {
 public:
  explicit ChartWriter(const Chart& c) : c_(c), id_(svg_id(c.id)) {}

  std::string write() {
    resolve();
    layout();
    std::string out = svg::open_root(id_, c_.width_px, lay_.total_height, accessible_title());
    out += defs();
    out += grid();
    out += "<g clip-path=\"url(#" + id_ + "-clip)\">\n";
    out += bands();
    out += zero_line();
    out += ref_lines();
    out += series();
    out += "</g>\n";
    out += ref_labels();
    out += frame_and_ticks();
    out += markers();
    out += titles();
    out += no_data();
    out += legend();
    out += notes();
    out += svg::close_root();
    return out;
  }

 private:
  const Chart& c_;
  std::string id_;
  ResolvedAxis ax_, ay_;
  Layout lay_{};
  std::vector<LegendEntry> entries_;
  std::vector<std::string> note_lines_;
  bool any_data_ = false;

  void resolve() {
    const DataExtent e = data_extent(c_);
    const int x_intervals = std::clamp(static_cast<int>(c_.width_px / 85), 3, 10);
    const int y_intervals = std::clamp(static_cast<int>(c_.plot_height_px / 45), 3, 10);
    ax_ = resolve_axis(c_.x, e.x, x_intervals);
    ay_ = resolve_axis(c_.y, e.y, y_intervals);
    for (const Series& s : c_.series)
      any_data_ = any_data_ || count_drawable(s.x, s.y, c_.x.scale, c_.y.scale) > 0;
    for (const Band& b : c_.bands)
      any_data_ = any_data_ || !band_runs(b, c_.x.scale, c_.y.scale).empty();
  }

  void layout() {
    const double ylabels = max_label_width(ay_.labels, tick_font);
    const double xlast = ax_.labels.empty() ? 0 : text_width_px(ax_.labels.back(), tick_font);
    Frame& p = lay_.plot;
    p.left = 24 + ylabels + tick_len + 6;
    p.top = c_.title.empty() ? 14 : 40;
    p.width = std::max(60.0, c_.width_px - p.left - std::max(18.0, xlast / 2 + 6));
    p.height = std::max(60.0, c_.plot_height_px);

    for (std::size_t i = 0; i < c_.series.size(); ++i) {
      const Series& s = c_.series[i];
      std::string t = s.label;
      if (count_drawable(s.x, s.y, c_.x.scale, c_.y.scale) == 0) t += " (no data)";
      entries_.push_back({LegendEntry::Kind::series, static_cast<int>(i), t});
    }
    for (std::size_t i = 0; i < c_.bands.size(); ++i)
      entries_.push_back({LegendEntry::Kind::band, static_cast<int>(i), c_.bands[i].label});
    double widest = 0;
    for (const auto& e : entries_) widest = std::max(widest, text_width_px(e.text, legend_font));
    lay_.legend_column_width = sample_len + 8 + widest + 22;
    const double avail = c_.width_px - 2 * 12;
    lay_.legend_columns = std::clamp(static_cast<int>(avail / lay_.legend_column_width), 1,
                                     std::max(1, static_cast<int>(entries_.size())));
    const int rows =
        entries_.empty()
            ? 0
            : (static_cast<int>(entries_.size()) + lay_.legend_columns - 1) / lay_.legend_columns;
    lay_.legend_top = p.bottom() + 50;
    lay_.notes_top = lay_.legend_top + rows * legend_row + (rows > 0 ? 4 : 0);

    std::vector<std::string> all = c_.notes;
    for (auto& n : automatic_notes(c_)) all.push_back(n);
    const auto max_chars = static_cast<std::size_t>(std::max(20.0, avail / (0.6 * note_font)));
    for (const auto& n : all)
      for (auto& l : wrap(n, max_chars)) note_lines_.push_back(l);
    lay_.total_height = lay_.notes_top + static_cast<double>(note_lines_.size()) * note_row + 8;
  }

  std::string accessible_title() const {
    if (!c_.title.empty()) return c_.title;
    return ay_.title + " against " + ax_.title;
  }

  std::string defs() const {
    const Frame& p = lay_.plot;
    std::string d = "<defs>\n<clipPath id=\"" + id_ + "-clip\">\n" +
                    svg::rect(p.left, p.top, p.width, p.height, "") + "</clipPath>\n";
    for (std::size_t i = 0; i < c_.bands.size(); ++i)
      d += hatch_pattern(id_ + "-hatch-" + std::to_string(i), c_.bands[i].style);
    return d + "</defs>\n";
  }

  AxisMap map_x() const { return AxisMap(ax_, lay_.plot.left, lay_.plot.right()); }
  AxisMap map_y() const { return AxisMap(ay_, lay_.plot.bottom(), lay_.plot.top); }

  std::string grid() const {
    const Frame& p = lay_.plot;
    const AxisMap mx = map_x(), my = map_y();
    std::string g = "<g stroke-width=\"0.8\">\n";
    const std::string minor = std::string("stroke=\"") + minor_grid_colour + "\"";
    const std::string major = std::string("stroke=\"") + grid_colour + "\"";
    for (const double v : ax_.minor) g += svg::line(mx(v), p.top, mx(v), p.bottom(), minor);
    for (const double v : ay_.minor) g += svg::line(p.left, my(v), p.right(), my(v), minor);
    for (const double v : ax_.major) g += svg::line(mx(v), p.top, mx(v), p.bottom(), major);
    for (const double v : ay_.major) g += svg::line(p.left, my(v), p.right(), my(v), major);
    return g + "</g>\n";
  }

  std::string bands() const {
    const AxisMap mx = map_x(), my = map_y();
    std::string out;
    for (std::size_t i = 0; i < c_.bands.size(); ++i) {
      const Band& b = c_.bands[i];
      for (const auto& [from, to] : band_runs(b, c_.x.scale, c_.y.scale)) {
        std::string d, top, bottom;
        for (std::size_t k = from; k < to; ++k) {
          const char* cmd = k == from ? "M" : "L";
          const std::string upper = svg::point(mx(b.x[k]), my(b.hi[k]));
          d.append(cmd).append(upper);
          top.append(cmd).append(upper);
          bottom.append(cmd).append(svg::point(mx(b.x[k]), my(b.lo[k])));
        }
        for (std::size_t k = to; k-- > from;)
          d.append("L").append(svg::point(mx(b.x[k]), my(b.lo[k])));
        out += "<path d=\"" + d + "Z\" fill=\"url(#" + id_ + "-hatch-" + std::to_string(i) +
               ")\" stroke=\"none\"/>\n";
        const std::string edge = std::string("\" fill=\"none\" stroke=\"") + band_edge_colour +
                                 "\" stroke-width=\"0.9\"/>\n";
        out += "<path d=\"" + top + edge + "<path d=\"" + bottom + edge;
      }
    }
    return out;
  }

  std::string zero_line() const {
    if (ay_.scale != AxisScale::linear || !(ay_.lo < 0 && ay_.hi > 0)) return {};
    const double y = map_y()(0);
    return svg::line(lay_.plot.left, y, lay_.plot.right(), y,
                     "stroke=\"#707070\" stroke-width=\"1\"");
  }

  std::string ref_lines() const {
    const AxisMap mx = map_x(), my = map_y();
    const Frame& p = lay_.plot;
    const char* attrs = "stroke=\"#3c3c3c\" stroke-width=\"1.1\" stroke-dasharray=\"12 3 3 3\"";
    std::string out;
    for (const RefLine& r : c_.lines) {
      if (r.direction == RefLine::Direction::horizontal) {
        if (usable(r.value, ay_.scale) && my.contains(r.value))
          out += svg::line(p.left, my(r.value), p.right(), my(r.value), attrs);
      } else if (usable(r.value, ax_.scale) && mx.contains(r.value)) {
        out += svg::line(mx(r.value), p.top, mx(r.value), p.bottom(), attrs);
      }
    }
    return out;
  }

  std::string ref_labels() const {
    const AxisMap mx = map_x(), my = map_y();
    const Frame& p = lay_.plot;
    const std::string font = "font-size=\"" + fixed(tick_font, 0) + "\" fill=\"#1a1a1a\"";
    std::string out;
    for (const RefLine& r : c_.lines) {
      if (r.label.empty()) continue;
      if (r.direction == RefLine::Direction::horizontal) {
        if (!usable(r.value, ay_.scale) || !my.contains(r.value)) continue;
        const double y = my(r.value);
        const double ty = y - 4 < p.top + 12 ? y + 13 : y - 4;
        out += svg::halo_text(p.right() - 5, ty, r.label, "text-anchor=\"end\" " + font);
      } else {
        if (!usable(r.value, ax_.scale) || !mx.contains(r.value)) continue;
        const double x = mx(r.value);
        const bool left = x + 5 + text_width_px(r.label, tick_font) > p.right();
        out += svg::halo_text(left ? x - 4 : x + 4, p.top + 13, r.label,
                              std::string(left ? "text-anchor=\"end\" " : "") + font);
      }
    }
    return out;
  }

  std::string series() const {
    const AxisMap mx = map_x(), my = map_y();
    std::string out;
    for (const Series& s : c_.series) {
      const LineStyle st = style_of(s.style);
      const Polyline pl = polyline(s.x, s.y, mx, my);
      if (s.line && !pl.d.empty()) out += "<path d=\"" + pl.d + "\" " + dash_attrs(st) + "/>\n";
      if (s.line)
        for (const auto& q : pl.singles)
          out += "<circle cx=\"" + fixed(q[0]) + "\" cy=\"" + fixed(q[1]) + "\" r=\"" +
                 fixed(st.width + 0.6, 1) + "\" fill=\"" + st.colour + "\"/>\n";
    }
    return out;
  }

  /// Markers are drawn outside the clip path, so that a point on the frame shows whole; points
  /// outside a fixed range get none.
  std::string markers() const {
    const AxisMap mx = map_x(), my = map_y();
    const Frame& p = lay_.plot;
    const auto inside = [&](const std::array<double, 2>& q) {
      return q[0] >= p.left - 0.5 && q[0] <= p.right() + 0.5 && q[1] >= p.top - 0.5 &&
             q[1] <= p.bottom() + 0.5;
    };
    std::string out;
    for (const Series& s : c_.series) {
      const LineStyle st = style_of(s.style);
      const Marker m = s.line ? st.marker : points_marker(st);
      if (m == Marker::none) continue;
      for (const auto& q : marker_points(polyline(s.x, s.y, mx, my).points, s.style, !s.line))
        if (inside(q)) out += marker_markup(m, q[0], q[1], st.colour);
    }
    return out;
  }

  std::string frame_and_ticks() const {
    const Frame& p = lay_.plot;
    const AxisMap mx = map_x(), my = map_y();
    std::string out = svg::rect(p.left, p.top, p.width, p.height,
                                "fill=\"none\" stroke=\"#000000\" stroke-width=\"1\"");
    std::string ticks;
    const char* tick_attrs = "stroke=\"#000000\" stroke-width=\"1\"";
    for (const double v : ax_.minor)
      ticks += svg::line(mx(v), p.bottom(), mx(v), p.bottom() + minor_tick_len, tick_attrs);
    for (const double v : ay_.minor)
      ticks += svg::line(p.left - minor_tick_len, my(v), p.left, my(v), tick_attrs);
    std::string labels;
    const std::string font = "font-size=\"" + fixed(tick_font, 0) + "\"";
    for (std::size_t i = 0; i < ax_.major.size(); ++i) {
      const double x = mx(ax_.major[i]);
      ticks += svg::line(x, p.bottom(), x, p.bottom() + tick_len, tick_attrs);
      labels +=
          svg::text(x, p.bottom() + tick_len + 13, ax_.labels[i], "text-anchor=\"middle\" " + font);
    }
    for (std::size_t i = 0; i < ay_.major.size(); ++i) {
      const double y = my(ay_.major[i]);
      ticks += svg::line(p.left - tick_len, y, p.left, y, tick_attrs);
      labels +=
          svg::text(p.left - tick_len - 3, y + 4, ay_.labels[i], "text-anchor=\"end\" " + font);
    }
    return out + ticks + labels;
  }

  std::string titles() const {
    const Frame& p = lay_.plot;
    std::string out;
    const std::string font = "font-size=\"" + fixed(label_font, 1) + "\"";
    out += svg::text(p.left + p.width / 2, p.bottom() + tick_len + 32, ax_.title,
                     "text-anchor=\"middle\" " + font);
    const double cy = p.top + p.height / 2;
    out += "<text x=\"0\" y=\"0\" transform=\"translate(16," + fixed(cy) +
           ") rotate(-90)\" text-anchor=\"middle\" " + font + ">" + xml_escape(ay_.title) +
           "</text>\n";
    if (!c_.title.empty())
      out += svg::text(12, 24, c_.title,
                       "font-size=\"" + fixed(title_font, 0) + "\" font-weight=\"bold\"");
    return out;
  }

  std::string no_data() const {
    if (any_data_) return {};
    const Frame& p = lay_.plot;
    return svg::text(p.left + p.width / 2, p.top + p.height / 2, "no data",
                     "text-anchor=\"middle\" font-size=\"15\" font-style=\"italic\" "
                     "fill=\"#505050\"");
  }

  std::string legend() const {
    std::string out;
    for (std::size_t i = 0; i < entries_.size(); ++i) {
      const int col = static_cast<int>(i) % lay_.legend_columns;
      const int row = static_cast<int>(i) / lay_.legend_columns;
      const double x = 12 + col * lay_.legend_column_width;
      const double y = lay_.legend_top + row * legend_row + legend_row / 2;
      out += legend_sample(entries_[i], x, y);
      out += svg::text(x + sample_len + 8, y + 4, entries_[i].text,
                       "font-size=\"" + fixed(legend_font, 0) + "\"");
    }
    return out;
  }

  std::string legend_sample(const LegendEntry& e, double x, double y) const {
    if (e.kind == LegendEntry::Kind::band) {
      return svg::rect(x, y - 6, sample_len, 12,
                       "fill=\"url(#" + id_ + "-hatch-" + std::to_string(e.index) +
                           ")\" stroke=\"" + band_edge_colour + "\" stroke-width=\"0.9\"");
    }
    const Series& s = c_.series[static_cast<std::size_t>(e.index)];
    const LineStyle st = style_of(s.style);
    std::string out;
    if (s.line) out += svg::line(x, y, x + sample_len, y, dash_attrs(st));
    return out +
           marker_markup(s.line ? st.marker : points_marker(st), x + sample_len / 2, y, st.colour);
  }

  std::string notes() const {
    std::string out;
    for (std::size_t i = 0; i < note_lines_.size(); ++i)
      out += svg::text(12, lay_.notes_top + static_cast<double>(i) * note_row + 11, note_lines_[i],
                       "font-size=\"" + fixed(note_font, 0) + "\" fill=\"#333333\"");
    return out;
  }
};

constexpr double snap_eps = 1e-9;

}  // namespace

Axis linear_axis(std::string label, std::string unit) {
  Axis a;
  a.label = std::move(label);
  a.unit = std::move(unit);
  return a;
}

Axis log_axis(std::string label, std::string unit) {
  Axis a = linear_axis(std::move(label), std::move(unit));
  a.scale = AxisScale::log10;
  return a;
}

Series line_series(std::string label, std::vector<double> x, std::vector<double> y, int style) {
  Series s;
  s.label = std::move(label);
  s.x = std::move(x);
  s.y = std::move(y);
  s.style = style;
  return s;
}

Series point_series(std::string label, std::vector<double> x, std::vector<double> y, int style) {
  Series s = line_series(std::move(label), std::move(x), std::move(y), style);
  s.line = false;
  return s;
}

Band band(std::string label, std::vector<double> x, std::vector<double> lo, std::vector<double> hi,
          int style) {
  Band b;
  b.label = std::move(label);
  b.x = std::move(x);
  b.lo = std::move(lo);
  b.hi = std::move(hi);
  b.style = style;
  return b;
}

RefLine horizontal_line(double y, std::string label) {
  RefLine r;
  r.direction = RefLine::Direction::horizontal;
  r.value = y;
  r.label = std::move(label);
  return r;
}

RefLine vertical_line(double x, std::string label) {
  RefLine r = horizontal_line(x, std::move(label));
  r.direction = RefLine::Direction::vertical;
  return r;
}

LinearTicks nice_linear_ticks(double lo, double hi, int max_intervals) {
  if (!std::isfinite(lo) || !std::isfinite(hi)) lo = 0, hi = 1;
  if (hi < lo) std::swap(lo, hi);
  max_intervals = std::max(1, max_intervals);
  const double mag_range = std::max(std::abs(lo), std::abs(hi));
  if (hi - lo <= 1e-12 * mag_range || hi == lo) {
    const double pad = mag_range > 0 ? 0.1 * mag_range : 1.0;
    lo -= pad, hi += pad;
  }
  const double raw = (hi - lo) / max_intervals;
  double step = std::pow(10.0, std::floor(std::log10(raw)));
  long n_lo = 0, n_hi = 1;
  for (const double m : {1.0, 2.0, 5.0, 10.0, 20.0}) {
    const double s = m * std::pow(10.0, std::floor(std::log10(raw)));
    n_lo = static_cast<long>(std::floor(lo / s + snap_eps));
    n_hi = static_cast<long>(std::ceil(hi / s - snap_eps));
    step = s;
    if (n_hi - n_lo <= max_intervals) break;
  }
  LinearTicks t;
  t.step = step;
  for (long k = n_lo; k <= n_hi; ++k) t.values.push_back(static_cast<double>(k) * step);
  t.lo = t.values.front();
  t.hi = t.values.back();
  return t;
}

LinearTicks fixed_linear_ticks(double lo, double hi, int max_intervals) {
  if (!std::isfinite(lo) || !std::isfinite(hi) || lo == hi)
    return nice_linear_ticks(lo, hi, max_intervals);
  if (hi < lo) std::swap(lo, hi);
  LinearTicks t = nice_linear_ticks(lo, hi, max_intervals);
  const double tol = snap_eps * t.step * 1e3;
  std::vector<double> inside;
  for (const double v : t.values)
    if (v >= lo - tol && v <= hi + tol) inside.push_back(v);
  t.values = std::move(inside);
  t.lo = lo, t.hi = hi;
  return t;
}

LogTicks nice_log_ticks(double lo, double hi, int max_labels) {
  if (!(lo > 0) || !(hi > 0) || !std::isfinite(lo) || !std::isfinite(hi)) lo = 1, hi = 10;
  if (hi < lo) std::swap(lo, hi);
  LogTicks t;
  // The tolerance keeps an exact decade (1e-9, stored a hair off) as the end, not one beyond.
  t.lo_exp = static_cast<int>(std::floor(std::log10(lo) + snap_eps));
  t.hi_exp = static_cast<int>(std::ceil(std::log10(hi) - snap_eps));
  if (t.hi_exp <= t.lo_exp) t.hi_exp = t.lo_exp + 1;
  const int n_decades = t.hi_exp - t.lo_exp;
  for (int k = t.lo_exp; k <= t.hi_exp; ++k) t.decades.push_back(std::pow(10.0, k));
  if (n_decades <= 6)
    for (int k = t.lo_exp; k < t.hi_exp; ++k)
      for (int m = 2; m <= 9; ++m) t.minor.push_back(m * std::pow(10.0, k));
  max_labels = std::max(2, max_labels);
  t.label_every = (n_decades + 1 + max_labels - 1) / max_labels;
  return t;
}

std::string svg_id(std::string_view id) {
  std::string out;
  for (const char c : id) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                    c == '-' || c == '_';
    out += ok ? c : '-';
  }
  if (out.empty() || !((out[0] >= 'a' && out[0] <= 'z') || (out[0] >= 'A' && out[0] <= 'Z')))
    out.insert(0, "svg-");
  return out;
}

std::string chart_svg_element(const Chart& chart) { return ChartWriter(chart).write(); }

std::string svg_document(const std::string& element) {
  return "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n" + element;
}

std::string chart_svg_document(const Chart& chart) {
  return svg_document(chart_svg_element(chart));
}

}  // namespace voidsign::cli::report
