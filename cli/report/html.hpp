// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// A small builder of self-contained HTML reports: one file with its CSS inline, SVG figures
/// inline, no scripts and nothing fetched from anywhere (a Content-Security-Policy in the page
/// forbids it). The markup is also well-formed XML (void elements closed, only the five XML
/// entities), so it can be checked with any XML parser.
///
/// The page is built top down: a title, optional text before the first section, then sections
/// (each `<section id>` with an `<h2>`; subsections with `<h3>`), holding paragraphs, lists,
/// tables, figures, caution boxes and definition lists. All text is escaped. A contents list of
/// the sections is added after the title when there are at least two. Figures and tables are
/// numbered in order. Print-friendly: black on white, fonts from the generic families only
/// (sans-serif, monospace), no breaks inside figures and tables.
#include <filesystem>
#include <set>
#include <string>
#include <string_view>
#include <vector>

namespace voidsign::cli::report {

/// A mark that a table cell carries in words *and* a symbol, so that it reads without colour.
enum class Mark {
  none,
  positive,   ///< "✔" and bold, e.g. "detectable"
  negative,   ///< "✘", e.g. "not detectable"
  uncertain,  ///< "≈" and italic, e.g. "marginal"
};

/// One table cell.
struct Cell {
  std::string text;      ///< shown escaped
  bool numeric = false;  ///< right-aligned with tabular figures
  Mark mark = Mark::none;
};

/// A text cell.
Cell text_cell(std::string text);
/// A right-aligned cell for an already formatted number ("−12.3 mm").
Cell number_cell(std::string formatted);
/// A right-aligned cell for `value` in `unit` (format_quantity, `significant` digits).
Cell number_cell(double value, std::string_view unit, int significant = 3);
/// A cell with a mark and its words, e.g. marked_cell(Mark::positive, "detectable").
Cell marked_cell(Mark mark, std::string text);

/// A table with one header row.
struct Table {
  std::string id;                       ///< unique in the page; may be empty (no id)
  std::string caption;                  ///< after "Table N." above the table
  std::vector<std::string> header;      ///< column titles (with units, e.g. "Peak [mm]")
  std::vector<std::vector<Cell>> rows;  ///< each as long as `header` (shorter rows are padded)
  std::string note;                     ///< small text under the table; may be empty
};

/// One term of a definition list (provenance: tool version, input SHA-256, date).
struct Definition {
  std::string term;
  std::string description;
  bool code = false;  ///< set in monospace and allowed to break anywhere (hashes, paths)
};

/// The ids that occur more than once as `id="…"` in `markup`, each once, in order of first
/// repetition. Empty when all ids are unique.
std::vector<std::string> duplicate_ids(std::string_view markup);

/// The HTML page under construction.
///
/// Ids (sections, figures, tables and every id inside a figure's SVG) must be unique in the page
/// and made of letters, digits, '-' and '_', starting with a letter; the methods that take them
/// throw std::invalid_argument otherwise (a programming error, not an input error).
class Document {
 public:
  /// A page titled `title` (the `<title>` and the `<h1>`); `generator` goes into
  /// `<meta name="generator">`, e.g. "voidsign 0.1.0".
  explicit Document(std::string title, std::string generator = {});

  /// Starts a top-level section `<section id><h2>heading</h2>`, closing the one before.
  void section(const std::string& id, std::string_view heading);
  /// Starts a subsection `<h3 id>` inside the current section.
  void subsection(const std::string& id, std::string_view heading);
  /// A paragraph of text.
  void paragraph(std::string_view text);
  /// A bulleted list.
  void list(const std::vector<std::string>& items);
  /// A numbered table; returns its number (1, 2, …).
  int table(const Table& t);
  /// A numbered figure around an inline SVG element (chart_svg_element, section_svg_element),
  /// with `caption` after "Figure N.". `standalone_file`, when given, is the relative path of
  /// the same drawing as a .svg file, linked from the caption. Returns the figure's number.
  int figure(const std::string& id, std::string_view svg_element, std::string_view caption,
             std::string_view standalone_file = {});
  /// A framed box headed "⚠ heading" holding `text`, for the limits of what the results mean.
  void caution(std::string_view heading, std::string_view text);
  /// A definition list (term, description), e.g. the provenance of the results.
  void definitions(const std::vector<Definition>& items);
  /// Markup inserted as it is: the caller guarantees it is well-formed and script-free.
  void raw(std::string_view markup);

  /// The whole page.
  std::string render() const;
  /// Writes render() to `path` atomically (write_text_atomic: a temporary file in the same
  /// folder, then a rename); throws WriteError on failure.
  void write(const std::filesystem::path& path) const;

  /// The CSS of the page.
  static std::string_view style_sheet();

 private:
  struct TocEntry {
    std::string id, heading;
  };
  std::string title_;
  std::string generator_;
  std::string preamble_;  // before the first section
  std::string body_;      // the sections
  std::vector<TocEntry> toc_;
  std::set<std::string> ids_;
  bool in_section_ = false;
  int n_figures_ = 0, n_tables_ = 0;

  std::string& out() { return in_section_ ? body_ : preamble_; }
  void claim_id(const std::string& id);
};

}  // namespace voidsign::cli::report
