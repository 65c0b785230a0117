// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/svg_parts.hpp"

#include <algorithm>

#include "cli/report/text.hpp"

namespace voidsign::cli::report::svg {
namespace {

std::string with_attrs(std::string_view attrs) {
  std::string out;
  if (!attrs.empty()) out.append(" ").append(attrs);
  return out;
}

}  // namespace

std::string open_root(std::string_view id, double width, double height, std::string_view title) {
  const std::string w = fixed(width, 0), h = fixed(height, 0);
  const std::string title_id = std::string(id) + "-title";
  std::string out = "<svg xmlns=\"http://www.w3.org/2000/svg\" id=\"" + std::string(id) +
                    "\" width=\"" + w + "\" height=\"" + h + "\" viewBox=\"0 0 " + w + " " + h +
                    "\" role=\"img\" aria-labelledby=\"" + title_id +
                    "\" font-family=\"sans-serif\" font-size=\"12\">\n";
  out += "<title id=\"" + title_id + "\">" + xml_escape(title) + "</title>\n";
  out += "<rect x=\"0\" y=\"0\" width=\"" + w + "\" height=\"" + h + "\" fill=\"#ffffff\"/>\n";
  return out;
}

std::string close_root() { return "</svg>\n"; }

std::string text(double x, double y, std::string_view content, std::string_view attrs) {
  return "<text x=\"" + fixed(x) + "\" y=\"" + fixed(y) + "\"" + with_attrs(attrs) + ">" +
         xml_escape(content) + "</text>\n";
}

std::string halo_text(double x, double y, std::string_view content, std::string_view attrs) {
  std::string a =
      "stroke=\"#ffffff\" stroke-width=\"3\" stroke-linejoin=\"round\" paint-order=\"stroke\"";
  if (!attrs.empty()) a.append(" ").append(attrs);
  return text(x, y, content, a);
}

std::string line(double x1, double y1, double x2, double y2, std::string_view attrs) {
  return "<line x1=\"" + fixed(x1) + "\" y1=\"" + fixed(y1) + "\" x2=\"" + fixed(x2) + "\" y2=\"" +
         fixed(y2) + "\"" + with_attrs(attrs) + "/>\n";
}

std::string rect(double x, double y, double w, double h, std::string_view attrs) {
  // A negative size is an SVG error (the browser reports it); draw nothing instead.
  return "<rect x=\"" + fixed(x) + "\" y=\"" + fixed(y) + "\" width=\"" + fixed(std::max(0.0, w)) +
         "\" height=\"" + fixed(std::max(0.0, h)) + "\"" + with_attrs(attrs) + "/>\n";
}

std::string point(double x, double y) { return fixed(x) + "," + fixed(y); }

}  // namespace voidsign::cli::report::svg
