// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/section_svg.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <stdexcept>
#include <string_view>

#include "cli/report/svg_chart.hpp"
#include "cli/report/svg_parts.hpp"
#include "cli/report/text.hpp"

namespace voidsign::cli::report {
namespace {

constexpr int n_patterns = 8;
constexpr double axis_font = 11, label_font = 12, title_font = 14, small_font = 10.5;

/// Layer hatch patterns, told apart in greyscale by texture and background tone.
std::string layer_pattern(const std::string& id, int k) {
  std::string p =
      "<pattern id=\"" + id + "\" patternUnits=\"userSpaceOnUse\" width=\"10\" " + "height=\"10\"";
  const auto bg = [](const char* grey) {
    return svg::rect(0, 0, 10, 10, std::string("fill=\"") + grey + "\"");
  };
  const char* thin = "stroke=\"#555555\" stroke-width=\"0.8\"";
  switch (k) {
    case 0:  // diagonal lines
      p += " patternTransform=\"rotate(45)\">\n" + bg("#f4f4f4") + svg::line(5, 0, 5, 10, thin);
      break;
    case 1:  // dots
      p += ">\n" + bg("#e6e6e6") +
           "<circle cx=\"2.5\" cy=\"2.5\" r=\"1.1\" fill=\"#404040\"/>\n"
           "<circle cx=\"7.5\" cy=\"7.5\" r=\"1.1\" fill=\"#404040\"/>\n";
      break;
    case 2:  // brickwork
      p += ">\n" + bg("#fbfbfb") + svg::line(0, 0.4, 10, 0.4, thin) +
           svg::line(0, 5.4, 10, 5.4, thin) + svg::line(0.4, 0, 0.4, 5.4, thin) +
           svg::line(5.4, 5.4, 5.4, 10, thin);
      break;
    case 3:  // cross-hatch
      p += " patternTransform=\"rotate(45)\">\n" + bg("#d8d8d8") +
           svg::line(5, 0, 5, 10, "stroke=\"#404040\" stroke-width=\"0.6\"") +
           svg::line(0, 5, 10, 5, "stroke=\"#404040\" stroke-width=\"0.6\"");
      break;
    case 4:  // dense back-diagonal lines
      p += " patternTransform=\"rotate(-45)\">\n" + bg("#eeeeee") +
           svg::line(2.5, 0, 2.5, 10, "stroke=\"#303030\" stroke-width=\"1.1\"") +
           svg::line(7.5, 0, 7.5, 10, "stroke=\"#303030\" stroke-width=\"1.1\"");
      break;
    case 5:  // gravel: small rings
      p += ">\n" + bg("#f8f8f8") +
           "<circle cx=\"3\" cy=\"3\" r=\"1.8\" fill=\"none\" stroke=\"#404040\" "
           "stroke-width=\"0.7\"/>\n"
           "<circle cx=\"8\" cy=\"7.5\" r=\"1.4\" fill=\"none\" stroke=\"#404040\" "
           "stroke-width=\"0.7\"/>\n";
      break;
    case 6:  // vertical lines
      p += ">\n" + bg("#e2e2e2") + svg::line(5, 0, 5, 10, thin);
      break;
    default:  // plain mid grey
      p += ">\n" + bg("#c6c6c6");
  }
  return p + "</pattern>\n";
}

int pattern_of(const SectionLayer& l, std::size_t index) {
  const int k = l.pattern >= 0 ? l.pattern : static_cast<int>(index);
  return k % n_patterns;
}

bool same_words(std::string_view a, std::string_view b) {
  const auto lower = [](char c) {
    return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c;
  };
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(),
                                            [&](char x, char y) { return lower(x) == lower(y); });
}

/// "Name (material)", or one of them when the other is empty or says the same.
std::string layer_text(const SectionLayer& l) {
  if (l.material.empty() || same_words(l.material, l.name)) return l.name;
  if (l.name.empty()) return l.material;
  return l.name + " (" + l.material + ")";
}

/// The largest 1-2-5 length not above `limit` [m].
double round_length(double limit) {
  const double p = std::pow(10.0, std::floor(std::log10(limit)));
  for (const double m : {5.0, 2.0, 1.0})
    if (m * p <= limit * (1 + 1e-12)) return m * p;
  return p;
}

class SectionWriter {
 public:
  explicit SectionWriter(const Section& s) : s_(s), id_(svg_id(s.id)), scale_(section_scale(s)) {}

  std::string write() {
    layout();
    std::string out = svg::open_root(id_, total_w_, total_h_, title_text());
    out += defs();
    out += layers();
    out += "<g clip-path=\"url(#" + id_ + "-clip)\">\n";
    out += voids();
    out += "</g>\n";
    out +=
        svg::rect(left_, top_, scale_.block_width_px, scale_.block_height_px,
                  "id=\"" + id_ + "-block\" fill=\"none\" stroke=\"#000000\" stroke-width=\"1\"");
    out += svg::line(left_, top_, left_ + scale_.block_width_px, top_,
                     "stroke=\"#000000\" stroke-width=\"2.2\"");
    out += void_labels();
    out += layer_labels();
    out += loads();
    out += sensors();
    out += depth_axis();
    out += distance_axis();
    out += scale_bar();
    if (!s_.title.empty())
      out += svg::text(12, 22, s_.title,
                       "font-size=\"" + fixed(title_font, 0) + "\" font-weight=\"bold\"");
    out += svg::close_root();
    return out;
  }

 private:
  const Section& s_;
  std::string id_;
  SectionScale scale_;
  double left_ = 0, top_ = 0, label_col_ = 0, total_w_ = 0, total_h_ = 0;

  double px(double x) const { return left_ + (x - s_.x_min_m) * scale_.px_per_m_x; }
  double py_depth(double d) const { return top_ + d * scale_.px_per_m_z; }
  double py_z(double z) const { return py_depth(-z); }
  double bottom() const { return top_ + scale_.block_height_px; }
  double right() const { return left_ + scale_.block_width_px; }

  std::string title_text() const {
    return s_.title.empty() ? "Ground section, drawn to scale" : s_.title;
  }

  void layout() {
    left_ = 66;
    const double above = !s_.loads.empty() ? 60 : (!s_.sensors.empty() ? 30 : 12);
    top_ = (s_.title.empty() ? 8 : 32) + above;
    double widest = 0;
    for (const auto& l : s_.layers)
      widest = std::max(widest, text_width_px(layer_text(l), label_font));
    label_col_ = right() + 18;
    total_w_ = label_col_ + (widest > 0 ? 22 + widest : 0) + 12;
    total_h_ = bottom() + 24 + 22 + 50 + 22;
  }

  std::string defs() const {
    std::string d = "<defs>\n<clipPath id=\"" + id_ + "-clip\">\n" +
                    svg::rect(left_, top_, scale_.block_width_px, scale_.block_height_px, "") +
                    "</clipPath>\n";
    for (int k = 0; k < n_patterns; ++k) d += layer_pattern(id_ + "-layer-" + std::to_string(k), k);
    return d + "</defs>\n";
  }

  /// The visible part of layer `l` as depths [m]; empty when outside the block.
  std::array<double, 2> visible(const SectionLayer& l) const {
    return {std::clamp(l.top_m, 0.0, s_.depth_m), std::clamp(l.bottom_m, 0.0, s_.depth_m)};
  }

  std::string layers() const {
    std::string out;
    for (std::size_t i = 0; i < s_.layers.size(); ++i) {
      const auto [t, b] = visible(s_.layers[i]);
      if (!(b > t)) continue;
      out += svg::rect(
          left_, py_depth(t), scale_.block_width_px, py_depth(b) - py_depth(t),
          "fill=\"url(#" + id_ + "-layer-" + std::to_string(pattern_of(s_.layers[i], i)) + ")\"");
      if (t > 0)
        out += svg::line(left_, py_depth(t), right(), py_depth(t),
                         "stroke=\"#000000\" stroke-width=\"0.9\"");
    }
    return out;
  }

  static bool drawable(const SectionVoid& v) {
    if (v.outline.size() < 3) return false;
    return std::all_of(v.outline.begin(), v.outline.end(),
                       [](const auto& p) { return std::isfinite(p[0]) && std::isfinite(p[1]); });
  }

  std::string voids() const {
    std::string out;
    for (const SectionVoid& v : s_.voids) {
      if (!drawable(v)) continue;
      std::string pts;
      for (const auto& p : v.outline) {
        if (!pts.empty()) pts += ' ';
        pts += svg::point(px(p[0]), py_z(p[1]));
      }
      out += "<polygon points=\"" + pts +
             "\" fill=\"#ffffff\" stroke=\"#000000\" stroke-width=\"1.6\" "
             "stroke-linejoin=\"round\"/>\n";
    }
    return out;
  }

  std::string void_labels() const {
    std::string out;
    const std::string font = "font-size=\"" + fixed(label_font, 0) + "\" font-weight=\"bold\"";
    for (const SectionVoid& v : s_.voids) {
      if (!drawable(v) || v.label.empty()) continue;
      double x0 = 1e300, x1 = -1e300, y0 = 1e300, y1 = -1e300;
      for (const auto& p : v.outline) {
        x0 = std::min(x0, px(p[0])), x1 = std::max(x1, px(p[0]));
        y0 = std::min(y0, py_z(p[1])), y1 = std::max(y1, py_z(p[1]));
      }
      const double w = text_width_px(v.label, label_font);
      const double ym = std::clamp((y0 + y1) / 2 + 4, top_ + 14, bottom() - 4);
      if (x1 + 6 + w <= right())
        out += svg::halo_text(x1 + 6, ym, v.label, font);
      else if (x0 - 6 - w >= left_)
        out += svg::halo_text(x0 - 6, ym, v.label, "text-anchor=\"end\" " + font);
      else
        out += svg::halo_text((x0 + x1) / 2, std::max(top_ + 14, y0 - 6), v.label,
                              "text-anchor=\"middle\" " + font);
    }
    return out;
  }

  std::string layer_labels() const {
    struct Item {
      double target, y;
      std::string text;
      int pattern;
    };
    std::vector<Item> items;
    for (std::size_t i = 0; i < s_.layers.size(); ++i) {
      const auto [t, b] = visible(s_.layers[i]);
      if (!(b > t)) continue;
      const double mid = (py_depth(t) + py_depth(b)) / 2;
      items.push_back({mid, mid, layer_text(s_.layers[i]), pattern_of(s_.layers[i], i)});
    }
    // Keep labels 16 px apart: push down, then back up from the bottom if they ran off.
    const double gap = 16;
    for (std::size_t i = 1; i < items.size(); ++i)
      items[i].y = std::max(items[i].y, items[i - 1].y + gap);
    if (!items.empty() && items.back().y > bottom() + 8) {
      items.back().y = bottom() + 8;
      for (std::size_t i = items.size() - 1; i-- > 0;)
        items[i].y = std::min(items[i].y, items[i + 1].y - gap);
    }
    std::string out;
    for (const Item& it : items) {
      out += "<polyline points=\"" + svg::point(right(), it.target) + " " +
             svg::point(right() + 8, it.target) + " " + svg::point(label_col_ - 2, it.y) +
             "\" fill=\"none\" stroke=\"#555555\" stroke-width=\"0.8\"/>\n";
      out += svg::rect(label_col_, it.y - 6, 16, 12,
                       "fill=\"url(#" + id_ + "-layer-" + std::to_string(it.pattern) +
                           ")\" stroke=\"#000000\" stroke-width=\"0.7\"");
      out += svg::text(label_col_ + 22, it.y + 4, it.text,
                       "font-size=\"" + fixed(label_font, 0) + "\"");
    }
    return out;
  }

  std::string loads() const {
    std::string out;
    const char* stroke = "stroke=\"#222222\" stroke-width=\"1.2\"";
    for (const SectionLoad& l : s_.loads) {
      const double a = std::clamp(px(std::min(l.x_from_m, l.x_to_m)), left_, right());
      const double b = std::clamp(px(std::max(l.x_from_m, l.x_to_m)), left_, right());
      const int n = std::clamp(static_cast<int>((b - a) / 16), 1, 14) + 1;
      const double tail = top_ - 36, tip = top_ - 1;
      out += svg::line(a, tail, b, tail, stroke);
      for (int k = 0; k < n; ++k) {
        const double x = n == 1 ? a : a + (b - a) * k / (n - 1);
        out += svg::line(x, tail, x, tip - 5, stroke);
        out += "<path d=\"M" + svg::point(x - 3, tip - 6) + "L" + svg::point(x + 3, tip - 6) + "L" +
               svg::point(x, tip) + "Z\" fill=\"#222222\"/>\n";
      }
      if (!l.label.empty())
        out += svg::halo_text((a + b) / 2, tail - 6, l.label,
                              "text-anchor=\"middle\" font-size=\"" + fixed(label_font, 0) + "\"");
    }
    return out;
  }

  std::string sensors() const {
    std::string out;
    double last_label_right = -1e300;
    for (const SectionSensor& s : s_.sensors) {
      if (!std::isfinite(s.x_m) || s.x_m < s_.x_min_m || s.x_m > s_.x_max_m) continue;
      const double x = px(s.x_m), y = top_ - 1;
      out += "<path d=\"M" + svg::point(x - 5, y - 10) + "L" + svg::point(x + 5, y - 10) + "L" +
             svg::point(x, y) + "Z\" fill=\"#000000\" stroke=\"#ffffff\" stroke-width=\"0.6\"/>\n";
      if (s.label.empty()) continue;
      const double w = text_width_px(s.label, small_font);
      if (x - w / 2 < last_label_right + 4) continue;
      last_label_right = x + w / 2;
      out += svg::halo_text(x, y - 14, s.label,
                            "text-anchor=\"middle\" font-size=\"" + fixed(small_font, 1) + "\"");
    }
    return out;
  }

  std::string depth_axis() const {
    const int intervals = std::clamp(static_cast<int>(scale_.block_height_px / 40), 2, 10);
    const LinearTicks t = fixed_linear_ticks(0, s_.depth_m, intervals);
    std::string out;
    const std::string font = "font-size=\"" + fixed(axis_font, 0) + "\" text-anchor=\"end\"";
    for (const double d : t.values) {
      out += svg::line(left_ - 5, py_depth(d), left_, py_depth(d), "stroke=\"#000000\"");
      out += svg::text(left_ - 8, py_depth(d) + 4, tick_label(d, t.step), font);
    }
    out += "<text x=\"0\" y=\"0\" transform=\"translate(16," + fixed((top_ + bottom()) / 2) +
           ") rotate(-90)\" text-anchor=\"middle\" font-size=\"" + fixed(label_font, 0) +
           "\">Depth below surface [m]</text>\n";
    return out;
  }

  std::string distance_axis() const {
    const int intervals = std::clamp(static_cast<int>(scale_.block_width_px / 80), 2, 10);
    const LinearTicks t = fixed_linear_ticks(s_.x_min_m, s_.x_max_m, intervals);
    std::string out;
    const std::string font = "font-size=\"" + fixed(axis_font, 0) + "\" text-anchor=\"middle\"";
    for (const double x : t.values) {
      out += svg::line(px(x), bottom(), px(x), bottom() + 5, "stroke=\"#000000\"");
      out += svg::text(px(x), bottom() + 18, tick_label(x, t.step), font);
    }
    out += svg::text(left_ + scale_.block_width_px / 2, bottom() + 36, s_.x_label + " [m]",
                     "text-anchor=\"middle\" font-size=\"" + fixed(label_font, 0) + "\"");
    return out;
  }

  std::string scale_bar() const {
    const double len_m = round_length((s_.x_max_m - s_.x_min_m) / 4);
    const double len_px = len_m * scale_.px_per_m_x;
    const double y = bottom() + 54;
    const double x = left_;
    std::string out;
    out += svg::rect(x, y, len_px / 2, 7, "fill=\"#000000\" stroke=\"#000000\" stroke-width=\"1\"");
    out += svg::rect(x + len_px / 2, y, len_px / 2, 7,
                     "fill=\"#ffffff\" stroke=\"#000000\" stroke-width=\"1\"");
    const std::string font = "font-size=\"" + fixed(axis_font, 0) + "\" text-anchor=\"middle\"";
    out += svg::text(x, y + 20, "0", font);
    out += svg::text(x + len_px / 2, y + 20, tick_label(len_m / 2, len_m / 2), font);
    out += svg::text(x + len_px, y + 20, tick_label(len_m, len_m) + " m", font);
    const bool exaggerated = scale_.exaggeration > 1;
    out += svg::text(x + len_px + 28, y + 8,
                     exaggerated ? "Scale bar: horizontal distances" : "Scale bar",
                     "font-size=\"" + fixed(axis_font, 0) + "\"");
    const std::string ve_text = tick_label(scale_.exaggeration, 1);
    out +=
        svg::text(x, y + 40,
                  exaggerated ? "Vertical exaggeration \xC3\x97" + ve_text + ": depths are drawn " +
                                    ve_text + " times larger than horizontal distances."
                              : "True scale: depths and distances are drawn alike (no "
                                "vertical exaggeration).",
                  std::string("font-size=\"") + fixed(label_font, 0) + "\"" +
                      (exaggerated ? " font-weight=\"bold\"" : ""));
    return out;
  }
};

}  // namespace

SectionScale section_scale(const Section& s) {
  const double w = s.x_max_m - s.x_min_m, d = s.depth_m;
  if (!(w > 0) || !(d > 0) || !std::isfinite(w) || !std::isfinite(d))
    throw std::invalid_argument("ground section: the block needs a positive width and depth");
  SectionScale r;
  r.px_per_m_x = s.width_px / w;
  if (d * r.px_per_m_x > s.max_height_px) r.px_per_m_x = s.max_height_px / d;
  double ve = 1;
  for (double p = 1; d * r.px_per_m_x * ve < s.min_height_px && p < 1e9; p *= 10) {
    for (const double m : {2.0, 5.0, 10.0}) {
      ve = m * p;
      if (d * r.px_per_m_x * ve >= s.min_height_px) break;
    }
  }
  r.exaggeration = ve;
  r.px_per_m_z = r.px_per_m_x * ve;
  r.block_width_px = w * r.px_per_m_x;
  r.block_height_px = d * r.px_per_m_z;
  return r;
}

std::string section_svg_element(const Section& s) { return SectionWriter(s).write(); }

std::string section_svg_document(const Section& s) { return svg_document(section_svg_element(s)); }

}  // namespace voidsign::cli::report
