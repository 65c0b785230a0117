// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/html.hpp"

#include <algorithm>
#include <stdexcept>
#include <utility>

#include "cli/output/output_dir.hpp"
#include "cli/report/text.hpp"

namespace voidsign::cli::report {
namespace {

constexpr std::string_view css = R"css(
:root { color: #111111; background: #ffffff; }
body { font-family: sans-serif; font-size: 16px; line-height: 1.5; max-width: 60rem;
       margin: 1.5rem auto 3rem; padding: 0 1.25rem; }
h1 { font-size: 1.75rem; line-height: 1.25; margin: 0.5rem 0 1rem;
     border-bottom: 3px solid #111111; padding-bottom: 0.4rem; }
h2 { font-size: 1.3rem; margin: 2.2rem 0 0.6rem; border-bottom: 1px solid #8c8c8c;
     padding-bottom: 0.2rem; }
h3 { font-size: 1.1rem; margin: 1.6rem 0 0.4rem; }
p, ul, ol, dl { margin: 0.6rem 0; }
a { color: #0b3d91; }
nav.contents { border: 1px solid #8c8c8c; padding: 0.3rem 1.2rem 0.5rem; margin: 1rem 0 1.5rem; }
nav.contents h2 { font-size: 1rem; border: none; margin: 0.4rem 0 0.2rem; }
nav.contents ol { margin: 0.2rem 0; padding-left: 1.4rem; }
figure { margin: 1.4rem 0; break-inside: avoid; page-break-inside: avoid; }
figure svg { display: block; max-width: 100%; height: auto; border: 1px solid #d0d0d0; }
figcaption { font-size: 0.93rem; margin-top: 0.4rem; }
.label { font-weight: bold; }
.table-wrap { overflow-x: auto; margin: 1.2rem 0; break-inside: avoid; page-break-inside: avoid; }
table { border-collapse: collapse; font-size: 0.95rem; }
caption { caption-side: top; text-align: left; padding-bottom: 0.35rem; }
th, td { border: 1px solid #7a7a7a; padding: 0.3rem 0.65rem; vertical-align: top; }
th { background: #ececec; text-align: left; }
th.num, td.num { text-align: right; }
td.num { font-variant-numeric: tabular-nums; white-space: nowrap; }
td.mark-pos { font-weight: bold; }
td.mark-unc { font-style: italic; }
.table-note { font-size: 0.88rem; margin-top: 0.3rem; }
.caution { border: 2px solid #111111; border-left-width: 8px; background: #f3f3f3;
           padding: 0.4rem 1rem; margin: 1.2rem 0; break-inside: avoid; page-break-inside: avoid; }
.caution-head { font-weight: bold; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.25rem 1.2rem; }
dl.facts dt { font-weight: bold; }
dl.facts dd { margin: 0; }
code { font-family: monospace; font-size: 0.92em; overflow-wrap: anywhere; }
@media print {
  body { max-width: none; margin: 0; padding: 0; font-size: 10.5pt; }
  a { color: inherit; }
  h2, h3 { break-after: avoid; page-break-after: avoid; }
  figure svg { border: none; }
  .table-wrap { overflow: visible; }
}
@page { margin: 16mm; }
)css";

bool valid_id(std::string_view id) {
  if (id.empty()) return false;
  const auto letter = [](char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); };
  if (!letter(id[0])) return false;
  return std::all_of(id.begin(), id.end(), [&](char c) {
    return letter(c) || (c >= '0' && c <= '9') || c == '-' || c == '_';
  });
}

/// Every `id="…"` value in `markup`, in order.
std::vector<std::string> ids_in(std::string_view markup) {
  std::vector<std::string> ids;
  constexpr std::string_view key = "id=\"";
  for (std::size_t p = markup.find(key); p != std::string_view::npos; p = markup.find(key, p + 1)) {
    // The attribute named exactly "id": preceded by white space (not "data-id", "aria-…id").
    if (p == 0 || (markup[p - 1] != ' ' && markup[p - 1] != '\n' && markup[p - 1] != '\t'))
      continue;
    const std::size_t start = p + key.size();
    const std::size_t end = markup.find('"', start);
    if (end == std::string_view::npos) break;
    ids.emplace_back(markup.substr(start, end - start));
  }
  return ids;
}

std::string id_attr(const std::string& id) {
  return id.empty() ? std::string() : " id=\"" + xml_escape(id) + "\"";
}

std::string mark_symbol(Mark m) {
  switch (m) {
    case Mark::positive:
      return "\xE2\x9C\x94";  // ✔
    case Mark::negative:
      return "\xE2\x9C\x98";  // ✘
    case Mark::uncertain:
      return "\xE2\x89\x88";  // ≈
    case Mark::none:
      break;
  }
  return {};
}

std::string mark_class(Mark m) {
  switch (m) {
    case Mark::positive:
      return "mark-pos";
    case Mark::negative:
      return "mark-neg";
    case Mark::uncertain:
      return "mark-unc";
    case Mark::none:
      break;
  }
  return {};
}

std::string cell_markup(const Cell& c) {
  std::vector<std::string> classes;
  if (c.numeric) classes.emplace_back("num");
  if (c.mark != Mark::none) classes.push_back(mark_class(c.mark));
  std::string cls;
  for (const auto& k : classes) cls += (cls.empty() ? "" : " ") + k;
  std::string out = "<td" + (cls.empty() ? std::string() : " class=\"" + cls + "\"") + ">";
  if (c.mark != Mark::none) out += "<span aria-hidden=\"true\">" + mark_symbol(c.mark) + "</span> ";
  return out + xml_escape(c.text) + "</td>";
}

}  // namespace

Cell text_cell(std::string text) { return Cell{std::move(text), false, Mark::none}; }

Cell number_cell(std::string formatted) { return Cell{std::move(formatted), true, Mark::none}; }

Cell number_cell(double value, std::string_view unit, int significant) {
  return number_cell(format_quantity(value, unit, significant));
}

Cell marked_cell(Mark mark, std::string text) { return Cell{std::move(text), false, mark}; }

std::vector<std::string> duplicate_ids(std::string_view markup) {
  std::set<std::string> seen;
  std::vector<std::string> dup;
  for (const auto& id : ids_in(markup)) {
    if (seen.insert(id).second) continue;
    if (std::find(dup.begin(), dup.end(), id) == dup.end()) dup.push_back(id);
  }
  return dup;
}

Document::Document(std::string title, std::string generator)
    : title_(std::move(title)), generator_(std::move(generator)) {}

void Document::claim_id(const std::string& id) {
  if (!valid_id(id))
    throw std::invalid_argument("report: '" + id +
                                "' is not a valid id (letters, digits, '-', '_'; a letter first)");
  if (!ids_.insert(id).second)
    throw std::invalid_argument("report: the id '" + id + "' is used twice in the page");
}

void Document::section(const std::string& id, std::string_view heading) {
  claim_id(id);
  if (in_section_) body_ += "</section>\n";
  in_section_ = true;
  body_ += "<section id=\"" + id + "\">\n<h2>" + xml_escape(heading) + "</h2>\n";
  toc_.push_back({id, std::string(heading)});
}

void Document::subsection(const std::string& id, std::string_view heading) {
  claim_id(id);
  out() += "<h3 id=\"" + id + "\">" + xml_escape(heading) + "</h3>\n";
}

void Document::paragraph(std::string_view text) { out() += "<p>" + xml_escape(text) + "</p>\n"; }

void Document::list(const std::vector<std::string>& items) {
  std::string& o = out();
  o += "<ul>\n";
  for (const auto& item : items) o += "<li>" + xml_escape(item) + "</li>\n";
  o += "</ul>\n";
}

int Document::table(const Table& t) {
  if (!t.id.empty()) claim_id(t.id);
  const int number = ++n_tables_;
  const std::size_t n_cols = t.header.size();
  std::vector<bool> numeric(n_cols, false);
  for (const auto& row : t.rows)
    for (std::size_t j = 0; j < std::min(n_cols, row.size()); ++j)
      numeric[j] = numeric[j] || row[j].numeric;

  std::string o = "<div class=\"table-wrap\">\n<table" + id_attr(t.id) + ">\n";
  o += "<caption><span class=\"label\">Table " + std::to_string(number) + ".</span> " +
       xml_escape(t.caption) + "</caption>\n<thead><tr>";
  for (std::size_t j = 0; j < n_cols; ++j)
    o += std::string("<th scope=\"col\"") + (numeric[j] ? " class=\"num\"" : "") + ">" +
         xml_escape(t.header[j]) + "</th>";
  o += "</tr></thead>\n<tbody>\n";
  for (const auto& row : t.rows) {
    o += "<tr>";
    for (std::size_t j = 0; j < std::max(n_cols, row.size()); ++j)
      o += cell_markup(j < row.size() ? row[j] : Cell{});
    o += "</tr>\n";
  }
  o += "</tbody>\n</table>\n";
  if (!t.note.empty()) o += "<p class=\"table-note\">" + xml_escape(t.note) + "</p>\n";
  o += "</div>\n";
  out() += o;
  return number;
}

int Document::figure(const std::string& id, std::string_view svg_element, std::string_view caption,
                     std::string_view standalone_file) {
  claim_id(id);
  for (const auto& inner : ids_in(svg_element)) claim_id(inner);
  const int number = ++n_figures_;
  std::string o = "<figure id=\"" + id + "\">\n";
  o += svg_element;
  o += "<figcaption><span class=\"label\">Figure " + std::to_string(number) + ".</span> " +
       xml_escape(caption);
  if (!standalone_file.empty())
    o += " (Also as a separate drawing: <a href=\"" + xml_escape(standalone_file) + "\">" +
         xml_escape(standalone_file) + "</a>.)";
  o += "</figcaption>\n</figure>\n";
  out() += o;
  return number;
}

void Document::caution(std::string_view heading, std::string_view text) {
  out() +=
      "<aside class=\"caution\" role=\"note\">\n<p class=\"caution-head\"><span "
      "aria-hidden=\"true\">\xE2\x9A\xA0</span> " +
      xml_escape(heading) + "</p>\n<p>" + xml_escape(text) + "</p>\n</aside>\n";
}

void Document::definitions(const std::vector<Definition>& items) {
  std::string& o = out();
  o += "<dl class=\"facts\">\n";
  for (const auto& d : items) {
    o += "<dt>" + xml_escape(d.term) + "</dt><dd>";
    o += d.code ? "<code>" + xml_escape(d.description) + "</code>" : xml_escape(d.description);
    o += "</dd>\n";
  }
  o += "</dl>\n";
}

void Document::raw(std::string_view markup) { out() += markup; }

std::string_view Document::style_sheet() { return css; }

std::string Document::render() const {
  std::string o = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\" />\n";
  o += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\" />\n";
  // Nothing may be fetched or run: the page is one file, readable anywhere, forever.
  o += "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
       "style-src 'unsafe-inline'\" />\n";
  if (!generator_.empty())
    o += "<meta name=\"generator\" content=\"" + xml_escape(generator_) + "\" />\n";
  o += "<title>" + xml_escape(title_) + "</title>\n<style>" + std::string(css) +
       "</style>\n</head>\n<body>\n<main>\n<h1>" + xml_escape(title_) + "</h1>\n";
  o += preamble_;
  if (toc_.size() >= 2) {
    o += "<nav class=\"contents\" aria-label=\"Contents\">\n<h2>Contents</h2>\n<ol>\n";
    for (const auto& e : toc_)
      o += "<li><a href=\"#" + e.id + "\">" + xml_escape(e.heading) + "</a></li>\n";
    o += "</ol>\n</nav>\n";
  }
  o += body_;
  if (in_section_) o += "</section>\n";
  o += "</main>\n</body>\n</html>\n";
  return o;
}

void Document::write(const std::filesystem::path& path) const { write_text_atomic(path, render()); }

}  // namespace voidsign::cli::report
