// SPDX-License-Identifier: GPL-3.0-or-later
// Decides whether a browser screenshot shows a rendered page rather than a blank one, for the
// browser check (browser_check.sh). Decodes the PNG with VTK's reader and measures, in
// luminance (Rec. 601 weights): the fraction of "ink" pixels (darker than 245 of 255), how many
// grey levels occur on at least 20 pixels (text and lines are anti-aliased, so a real page has
// dozens; a blank or flat page one or two), and how far down the page the ink reaches.
//
// Usage: report_png_check FILE.png [--size WxH] [--min-ink FRACTION] [--min-levels N]
//                                  [--min-extent FRACTION]
// Prints one line of measurements; exit 0 when the page passes, 1 when it looks blank, 2 when
// the file cannot be read.
#include <vtkImageData.h>
#include <vtkNew.h>
#include <vtkPNGReader.h>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <string>

namespace {

struct Options {
  std::string file;
  int width = 0, height = 0;  // 0: any size
  double min_ink = 0.01;      // fraction of pixels
  int min_levels = 8;
  double min_extent = 0.4;  // fraction of the image height between the first and last ink row
};

struct Measures {
  int width = 0, height = 0;
  double ink = 0;     // fraction of pixels darker than 245
  int levels = 0;     // grey levels with at least 20 pixels
  double extent = 0;  // (last ink row − first ink row + 1) / height
};

bool parse_args(int argc, char** argv, Options& o) {
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    const bool has_value = i + 1 < argc;
    if (a == "--size" && has_value) {
      if (std::sscanf(argv[++i], "%dx%d", &o.width, &o.height) != 2) return false;
    } else if (a == "--min-ink" && has_value) {
      o.min_ink = std::atof(argv[++i]);
    } else if (a == "--min-levels" && has_value) {
      o.min_levels = std::atoi(argv[++i]);
    } else if (a == "--min-extent" && has_value) {
      o.min_extent = std::atof(argv[++i]);
    } else if (o.file.empty() && a.rfind("--", 0) != 0) {
      o.file = a;
    } else {
      return false;
    }
  }
  return !o.file.empty();
}

Measures measure(vtkImageData* img) {
  Measures m;
  int dims[3];
  img->GetDimensions(dims);
  m.width = dims[0], m.height = dims[1];
  const int nc = img->GetNumberOfScalarComponents();
  const auto* px = static_cast<const unsigned char*>(img->GetScalarPointer());
  std::array<long, 256> histogram{};
  long ink = 0;
  int first_row = -1, last_row = -1;
  for (int y = 0; y < m.height; ++y) {
    bool row_ink = false;
    for (int x = 0; x < m.width; ++x) {
      const unsigned char* p = px + (static_cast<long>(y) * m.width + x) * nc;
      const double lum = nc >= 3 ? 0.299 * p[0] + 0.587 * p[1] + 0.114 * p[2] : p[0];
      const int level = static_cast<int>(lum + 0.5);
      ++histogram[static_cast<std::size_t>(level)];
      if (level < 245) ++ink, row_ink = true;
    }
    if (row_ink) {
      if (first_row < 0) first_row = y;
      last_row = y;
    }
  }
  const double n = static_cast<double>(m.width) * m.height;
  m.ink = n > 0 ? static_cast<double>(ink) / n : 0;
  for (const long c : histogram) m.levels += c >= 20;
  m.extent = first_row < 0 ? 0 : static_cast<double>(last_row - first_row + 1) / m.height;
  return m;
}

}  // namespace

int main(int argc, char** argv) {
  Options o;
  if (!parse_args(argc, argv, o)) {
    std::fprintf(stderr,
                 "usage: report_png_check FILE.png [--size WxH] [--min-ink F] [--min-levels N] "
                 "[--min-extent F]\n");
    return 2;
  }
  vtkNew<vtkPNGReader> reader;
  if (!reader->CanReadFile(o.file.c_str())) {
    std::fprintf(stderr, "png check: '%s' is not a readable PNG file\n", o.file.c_str());
    return 2;
  }
  reader->SetFileName(o.file.c_str());
  reader->Update();
  vtkImageData* img = reader->GetOutput();
  if (!img || img->GetScalarType() != VTK_UNSIGNED_CHAR || img->GetNumberOfPoints() == 0) {
    std::fprintf(stderr, "png check: '%s' holds no 8-bit image\n", o.file.c_str());
    return 2;
  }
  const Measures m = measure(img);
  std::printf(
      "png check: %dx%d px, ink %.2f %% of pixels, %d grey levels, ink over %.0f %% of "
      "the height\n",
      m.width, m.height, 100 * m.ink, m.levels, 100 * m.extent);
  bool ok = true;
  const auto fail = [&](const char* why) {
    std::printf("png check: FAIL: %s\n", why);
    ok = false;
  };
  if (o.width > 0 && (m.width != o.width || m.height != o.height))
    fail("the image does not have the window size");
  if (m.ink < o.min_ink) fail("too few non-white pixels: the page looks blank");
  if (m.levels < o.min_levels) fail("too few grey levels: no anti-aliased text or lines");
  if (m.extent < o.min_extent) fail("the content does not reach down the page");
  return ok ? 0 : 1;
}
