// SPDX-License-Identifier: GPL-3.0-or-later
// Scenario reader: YAML text → Scenario, with every mistake reported as
// "FILE:LINE:COL: key 'a.b.c': problem (hint)". The format is docs/scenario-format.md.
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <limits>
#include <map>
#include <numbers>
#include <optional>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include "cli/errors.hpp"
#include "cli/scenario/catalogue.hpp"
#include "cli/scenario/scenario.hpp"
#include "cli/scenario/psd_table.hpp"
#include "cli/scenario/sha256.hpp"
#include "cli/scenario/suggest.hpp"

namespace voidsign::cli {
namespace {

namespace fs = std::filesystem;
using Strings = std::vector<std::string>;

std::string num(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

// ---------------------------------------------------------------------------------------------
// Messages

struct Ctx {
  std::string file;                        // as given, for messages
  std::vector<std::string>* warnings = nullptr;
};

std::string prefix(const Ctx& c, const YAML::Mark& m, const std::string& path) {
  std::string s = c.file;
  if (m.line >= 0) s += ":" + std::to_string(m.line + 1) + ":" + std::to_string(m.column + 1);
  s += ": ";
  if (!path.empty()) s += "key '" + path + "': ";
  return s;
}

[[noreturn]] void fail_at(const Ctx& c, const YAML::Mark& m, const std::string& path,
                          const std::string& problem) {
  throw InputError(prefix(c, m, path) + problem);
}

void warn_at(const Ctx& c, const YAML::Mark& m, const std::string& path,
             const std::string& problem) {
  c.warnings->push_back(prefix(c, m, path) + problem);
}

std::string join(const std::string& parent, const std::string& key) {
  return parent.empty() ? key : parent + "." + key;
}

std::string with_hint(const std::string& problem, const std::string& hint) {
  return hint.empty() ? problem : problem + " (" + hint + ")";
}

std::string describe(const YAML::Node& n) {
  switch (n.Type()) {
    case YAML::NodeType::Map: return "a mapping";
    case YAML::NodeType::Sequence: return "a list";
    case YAML::NodeType::Scalar:
      return (n.Tag() == "!" ? "the quoted text '" : "the value '") + n.Scalar() + "'";
    default: return "no value";
  }
}

// A plain (unquoted) scalar that reads as a finite or infinite number.
bool read_number(const YAML::Node& n, double& out) {
  if (!n.IsScalar() || n.Tag() == "!") return false;
  return YAML::convert<double>::decode(n, out);
}

// ---------------------------------------------------------------------------------------------
// Typed access to the YAML tree with key paths and positions

class Map;

/// One value of the tree: the node, its key path and where its key (or list item) starts.
struct Field {
  const Ctx* ctx = nullptr;
  YAML::Node node;
  std::string path;
  YAML::Mark key_mark;

  // Points at the value itself, except for an empty value, whose mark yaml-cpp puts at the
  // next token: then the key is the better place.
  YAML::Mark mark() const {
    if (node.IsNull() || node.Mark().line < 0) return key_mark;
    return node.Mark();
  }
  [[noreturn]] void fail(const std::string& problem) const {
    fail_at(*ctx, mark(), path, problem);
  }
  void warn(const std::string& problem) const { warn_at(*ctx, mark(), path, problem); }
  SourceLoc loc() const { return {mark().line + 1, mark().column + 1, path}; }

  double number() const {
    double v = 0;
    if (!read_number(node, v)) {
      if (node.IsScalar() && node.Tag() == "!" && YAML::convert<double>::decode(node, v))
        fail("expected a number, found " + describe(node) + " (remove the quotes)");
      fail("expected a number, found " + describe(node));
    }
    if (!std::isfinite(v)) fail("expected a finite number, found " + describe(node));
    return v;
  }
  double positive() const {
    const double v = number();
    if (!(v > 0)) fail("must be greater than 0, got " + num(v));
    return v;
  }
  double non_negative() const {
    const double v = number();
    if (v < 0) fail("must be 0 or more, got " + num(v));
    return v;
  }
  int whole() const {
    const double v = number();
    if (v != std::floor(v) || std::abs(v) > 1e9) fail("expected a whole number, got " + num(v));
    return static_cast<int>(v);
  }
  std::string text() const {
    if (!node.IsScalar()) fail("expected a text value, found " + describe(node));
    return node.Scalar();
  }
  /// One word out of `choices`; `what` names it in the message ("shape").
  std::string choice(const Strings& choices, const std::string& what) const {
    if (!node.IsScalar())
      fail("expected " + what + " (one of: " + list_words(choices) + "), found " +
           describe(node));
    const std::string w = node.Scalar();
    if (std::find(choices.begin(), choices.end(), w) == choices.end())
      fail(with_hint("unknown " + what + " '" + w + "'", suggestion_hint(w, choices)));
    return w;
  }
  std::vector<Field> list() const {
    if (!node.IsSequence()) fail("expected a list, found " + describe(node));
    std::vector<Field> items;
    std::size_t i = 0;
    for (const auto& item : node) {
      const YAML::Mark m = item.Mark().line >= 0 ? item.Mark() : mark();
      items.push_back({ctx, item, join(path, std::to_string(i++)), m});
    }
    return items;
  }
  Map map(bool null_ok = false) const;

  static std::string list_words(const Strings& words) {
    std::string s;
    for (std::size_t i = 0; i < words.size(); ++i) s += (i ? ", " : "") + words[i];
    return s;
  }
};

/// A mapping whose keys are checked against the keys valid at its place.
class Map {
 public:
  Map(const Field& field, bool null_ok) : self_(field) {
    if (field.node.IsNull() && null_ok) return;
    if (!field.node.IsMap()) field.fail("expected a mapping, found " + describe(field.node));
    for (auto it = field.node.begin(); it != field.node.end(); ++it) {
      const YAML::Mark km = it->first.Mark();
      if (!it->first.IsScalar())
        fail_at(*field.ctx, km, field.path,
                "a key must be a single word, found " + describe(it->first));
      const std::string key = it->first.Scalar();
      for (const auto& e : entries_)
        if (e.key == key)
          fail_at(*field.ctx, km, join(field.path, key),
                  "duplicate key (first given at line " + std::to_string(e.field.key_mark.line + 1) +
                      ")");
      entries_.push_back({key, Field{field.ctx, it->second, join(field.path, key), km}});
    }
  }

  /// Rejects any key not in `valid`, naming the nearest valid one.
  void allow(const Strings& valid) const {
    for (const auto& e : entries_)
      if (std::find(valid.begin(), valid.end(), e.key) == valid.end()) {
        const std::string hint =
            valid.empty() ? "no keys are valid here" : suggestion_hint(e.key, valid);
        fail_at(*self_.ctx, e.field.key_mark, e.field.path,
                with_hint("unknown key '" + e.key + "'", hint));
      }
  }
  bool has(std::string_view key) const { return find(key) != nullptr; }
  std::optional<Field> get(std::string_view key) const {
    if (const Field* f = find(key)) return *f;
    return std::nullopt;
  }
  /// The value of a required key; `why` is appended to the message when it is missing.
  Field need(const std::string& key, const std::string& why = "") const {
    if (const Field* f = find(key)) return *f;
    fail_at(*self_.ctx, self_.mark(), join(self_.path, key),
            "required key is missing" + (why.empty() ? "" : " (" + why + ")"));
  }
  const Field& self() const { return self_; }
  std::vector<std::string> keys() const {
    Strings k;
    for (const auto& e : entries_) k.push_back(e.key);
    return k;
  }

 private:
  struct Entry {
    std::string key;
    Field field;
  };
  const Field* find(std::string_view key) const {
    for (const auto& e : entries_)
      if (e.key == key) return &e.field;
    return nullptr;
  }
  Field self_;
  std::vector<Entry> entries_;
};

Map Field::map(bool null_ok) const { return Map(*this, null_ok); }

// ---------------------------------------------------------------------------------------------
// Void geometry in the x–z plane (z up, z = -depth)

struct Pt {
  double x, z;
};

Pt operator-(Pt a, Pt b) { return {a.x - b.x, a.z - b.z}; }
double cross(Pt a, Pt b) { return a.x * b.z - a.z * b.x; }
double dot(Pt a, Pt b) { return a.x * b.x + a.z * b.z; }

struct Box {
  double x_min, x_max, z_min, z_max;
};

struct Shape {
  Void::Shape kind;
  Pt c{0, 0};
  double r = 0, a = 0, b = 0, w = 0, h = 0;
  double cos_t = 1, sin_t = 0;
  std::vector<Pt> pts;

  // Coordinates in the shape's own axes (rotation by -angle).
  Pt local(Pt p) const {
    const Pt d = p - c;
    return {d.x * cos_t + d.z * sin_t, -d.x * sin_t + d.z * cos_t};
  }
  Pt global(Pt q) const {
    return {c.x + q.x * cos_t - q.z * sin_t, c.z + q.x * sin_t + q.z * cos_t};
  }
};

Shape shape_of(const Void& v) {
  Shape s;
  s.kind = v.shape;
  s.c = {v.x, -v.depth};
  s.r = v.radius;
  s.a = v.axes[0];
  s.b = v.axes[1];
  s.w = v.width;
  s.h = v.height;
  const double t = v.angle * std::numbers::pi / 180.0;
  s.cos_t = std::cos(t);
  s.sin_t = std::sin(t);
  for (const auto& p : v.points) s.pts.push_back({p[0], -p[1]});
  return s;
}

Box bounding_box(const Shape& s) {
  switch (s.kind) {
    case Void::Shape::circle: return {s.c.x - s.r, s.c.x + s.r, s.c.z - s.r, s.c.z + s.r};
    case Void::Shape::ellipse: {
      // Extreme x and z of a rotated ellipse.
      const double hx = std::hypot(s.a * s.cos_t, s.b * s.sin_t);
      const double hz = std::hypot(s.a * s.sin_t, s.b * s.cos_t);
      return {s.c.x - hx, s.c.x + hx, s.c.z - hz, s.c.z + hz};
    }
    case Void::Shape::rectangle: {
      const double hx = std::abs(s.w / 2 * s.cos_t) + std::abs(s.h / 2 * s.sin_t);
      const double hz = std::abs(s.w / 2 * s.sin_t) + std::abs(s.h / 2 * s.cos_t);
      return {s.c.x - hx, s.c.x + hx, s.c.z - hz, s.c.z + hz};
    }
    case Void::Shape::polygon: break;
    case Void::Shape::sphere:
    case Void::Shape::box:
    case Void::Shape::tunnel: return {s.c.x, s.c.x, s.c.z, s.c.z};  // 3d: see Solid
  }
  Box b{s.pts[0].x, s.pts[0].x, s.pts[0].z, s.pts[0].z};
  for (const Pt& p : s.pts) {
    b.x_min = std::min(b.x_min, p.x);
    b.x_max = std::max(b.x_max, p.x);
    b.z_min = std::min(b.z_min, p.z);
    b.z_max = std::max(b.z_max, p.z);
  }
  return b;
}

double segment_distance(Pt p, Pt a, Pt b) {
  const Pt ab = b - a, ap = p - a;
  const double len2 = dot(ab, ab);
  const double t = len2 > 0 ? std::clamp(dot(ap, ab) / len2, 0.0, 1.0) : 0.0;
  return std::hypot(ap.x - t * ab.x, ap.z - t * ab.z);
}

double outline_distance(const std::vector<Pt>& pts, Pt p) {
  double d = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < pts.size(); ++i)
    d = std::min(d, segment_distance(p, pts[i], pts[(i + 1) % pts.size()]));
  return d;
}

/// Inside or on the outline, within `tol` metres (a relative tolerance for the curved shapes).
bool contains(const Shape& s, Pt p, double tol) {
  const Pt q = s.local(p);
  switch (s.kind) {
    case Void::Shape::circle: return std::hypot(q.x, q.z) <= s.r + tol;
    case Void::Shape::ellipse: {
      const double ra = q.x / (s.a + tol), rb = q.z / (s.b + tol);
      return ra * ra + rb * rb <= 1.0;
    }
    case Void::Shape::rectangle:
      return std::abs(q.x) <= s.w / 2 + tol && std::abs(q.z) <= s.h / 2 + tol;
    case Void::Shape::polygon: break;
    case Void::Shape::sphere:
    case Void::Shape::box:
    case Void::Shape::tunnel: return false;  // 3d: see Solid
  }
  bool inside = false;  // even-odd ray casting along +x
  const auto& v = s.pts;
  for (std::size_t i = 0, j = v.size() - 1; i < v.size(); j = i++) {
    if ((v[i].z > p.z) != (v[j].z > p.z)) {
      const double xc = v[j].x + (p.z - v[j].z) * (v[i].x - v[j].x) / (v[i].z - v[j].z);
      if (p.x < xc) inside = !inside;
    }
  }
  return inside || outline_distance(v, p) <= tol;
}

/// `n` points spread along the outline (polygons and rectangles by arc length).
std::vector<Pt> sample_outline(const Shape& s, int n) {
  std::vector<Pt> out;
  out.reserve(static_cast<std::size_t>(n) + 8);
  if (s.kind == Void::Shape::circle || s.kind == Void::Shape::ellipse) {
    const double a = s.kind == Void::Shape::circle ? s.r : s.a;
    const double b = s.kind == Void::Shape::circle ? s.r : s.b;
    for (int k = 0; k < n; ++k) {
      const double t = 2 * std::numbers::pi * k / n;
      out.push_back(s.global({a * std::cos(t), b * std::sin(t)}));
    }
    return out;
  }
  std::vector<Pt> corners = s.pts;
  if (s.kind == Void::Shape::rectangle) {
    const double hw = s.w / 2, hh = s.h / 2;
    corners = {s.global({-hw, -hh}), s.global({hw, -hh}), s.global({hw, hh}),
               s.global({-hw, hh})};
  }
  double perimeter = 0;
  for (std::size_t i = 0; i < corners.size(); ++i)
    perimeter += std::hypot((corners[(i + 1) % corners.size()] - corners[i]).x,
                            (corners[(i + 1) % corners.size()] - corners[i]).z);
  for (std::size_t i = 0; i < corners.size(); ++i) {
    const Pt a = corners[i], b = corners[(i + 1) % corners.size()];
    const double len = std::hypot((b - a).x, (b - a).z);
    const int m = std::max(1, static_cast<int>(std::ceil(n * len / perimeter)));
    for (int k = 0; k < m; ++k) {
      const double t = static_cast<double>(k) / m;
      out.push_back({a.x + t * (b.x - a.x), a.z + t * (b.z - a.z)});
    }
  }
  return out;
}

/// A point inside the shape (the centre, or for a polygon the midpoint of a chord through it).
Pt inner_point(const Shape& s) {
  if (s.kind != Void::Shape::polygon) return s.c;
  const Box b = bounding_box(s);
  const double z = 0.5 * (b.z_min + b.z_max);
  std::vector<double> xs;
  const auto& v = s.pts;
  for (std::size_t i = 0, j = v.size() - 1; i < v.size(); j = i++)
    if ((v[i].z > z) != (v[j].z > z))
      xs.push_back(v[j].x + (z - v[j].z) * (v[i].x - v[j].x) / (v[i].z - v[j].z));
  std::sort(xs.begin(), xs.end());
  if (xs.size() >= 2) return {0.5 * (xs[0] + xs[1]), z};
  return v[0];
}

bool shapes_overlap(const Shape& s1, const Shape& s2, double tol) {
  const Box b1 = bounding_box(s1), b2 = bounding_box(s2);
  if (b1.x_max + tol < b2.x_min || b2.x_max + tol < b1.x_min || b1.z_max + tol < b2.z_min ||
      b2.z_max + tol < b1.z_min)
    return false;
  if (contains(s1, inner_point(s2), tol) || contains(s2, inner_point(s1), tol)) return true;
  for (const Pt& p : sample_outline(s1, 720))
    if (contains(s2, p, tol)) return true;
  for (const Pt& p : sample_outline(s2, 720))
    if (contains(s1, p, tol)) return true;
  return false;
}

/// The size that governs the mesh on a void's boundary: radius (circle, sphere, tunnel), smaller
/// semi-axis, half the smaller side of a rectangle, half the smallest edge of a box, or half the
/// smaller side of a polygon's bounding box.
double feature_size(const Void& v) {
  switch (v.shape) {
    case Void::Shape::circle: return v.radius;
    case Void::Shape::ellipse: return std::min(v.axes[0], v.axes[1]);
    case Void::Shape::rectangle: return std::min(v.width, v.height) / 2;
    case Void::Shape::polygon: break;
    case Void::Shape::sphere:
    case Void::Shape::tunnel: return v.radius;
    case Void::Shape::box: return std::min({v.size[0], v.size[1], v.size[2]}) / 2;
  }
  const Box b = bounding_box(shape_of(v));
  return std::min(b.x_max - b.x_min, b.z_max - b.z_min) / 2;
}

// ---------------------------------------------------------------------------------------------
// Void geometry in 3D (z up, z = -depth). Every 3d void is convex: a sphere, a box (a vertical
// prism on a rectangle turned by `yaw` in plan) or a tunnel (a straight circular cylinder with
// flat ends square to its axis).

struct V3 {
  double x = 0, y = 0, z = 0;
};

V3 operator+(V3 a, V3 b) { return {a.x + b.x, a.y + b.y, a.z + b.z}; }
V3 operator-(V3 a, V3 b) { return {a.x - b.x, a.y - b.y, a.z - b.z}; }
V3 operator*(double k, V3 a) { return {k * a.x, k * a.y, k * a.z}; }
double dot(V3 a, V3 b) { return a.x * b.x + a.y * b.y + a.z * b.z; }
double norm(V3 a) { return std::sqrt(dot(a, a)); }
double coord(V3 a, int i) { return i == 0 ? a.x : (i == 1 ? a.y : a.z); }

struct Solid {
  Void::Shape kind = Void::Shape::sphere;
  V3 c;                              // centre (tunnel: midpoint of the axis)
  double r = 0;                      // sphere, tunnel
  std::array<double, 3> h{0, 0, 0};  // box: half edges along its own axes
  double cos_y = 1, sin_y = 0;       // box: yaw
  V3 a, b, d;                        // tunnel: axis ends and unit direction a -> b
  double len = 0;                    // tunnel: axis length

  V3 ex() const { return {cos_y, sin_y, 0}; }  // box axes in plan
  V3 ey() const { return {-sin_y, cos_y, 0}; }
};

V3 point_of(const std::array<double, 3>& xyd) { return {xyd[0], xyd[1], -xyd[2]}; }

Solid solid_of(const Void& v) {
  Solid s;
  s.kind = v.shape;
  s.c = {v.x, v.y, -v.depth};
  s.r = v.radius;
  s.h = {v.size[0] / 2, v.size[1] / 2, v.size[2] / 2};
  const double t = v.yaw * std::numbers::pi / 180.0;
  s.cos_y = std::cos(t);
  s.sin_y = std::sin(t);
  if (v.shape == Void::Shape::tunnel) {
    s.a = point_of(v.from);
    s.b = point_of(v.to);
    s.c = 0.5 * (s.a + s.b);
    s.len = norm(s.b - s.a);
    s.d = s.len > 0 ? (1 / s.len) * (s.b - s.a) : V3{0, 0, 1};
  }
  return s;
}

/// How far a tunnel's end discs reach beyond the axis ends along coordinate i: r sqrt(1 - d_i^2).
double disc_reach(const Solid& s, int i) {
  const double di = coord(s.d, i);
  return s.r * std::sqrt(std::max(0.0, 1 - di * di));
}

/// Axis-aligned extent: lo/hi of x, y, z.
struct Box3 {
  std::array<double, 3> lo{0, 0, 0}, hi{0, 0, 0};
};

Box3 extent(const Solid& s) {
  Box3 e;
  for (int i = 0; i < 3; ++i) {
    double lo = coord(s.c, i), hi = lo;
    switch (s.kind) {
      case Void::Shape::box: {
        const double reach = i == 0   ? std::abs(s.h[0] * s.cos_y) + std::abs(s.h[1] * s.sin_y)
                             : i == 1 ? std::abs(s.h[0] * s.sin_y) + std::abs(s.h[1] * s.cos_y)
                                      : s.h[2];
        lo -= reach;
        hi += reach;
        break;
      }
      case Void::Shape::tunnel: {
        const double reach = disc_reach(s, i);
        lo = std::min(coord(s.a, i), coord(s.b, i)) - reach;
        hi = std::max(coord(s.a, i), coord(s.b, i)) + reach;
        break;
      }
      default:  // sphere
        lo -= s.r;
        hi += s.r;
    }
    e.lo[static_cast<std::size_t>(i)] = lo;
    e.hi[static_cast<std::size_t>(i)] = hi;
  }
  return e;
}

/// Distance from p to the solid box (0 inside).
double box_distance(const Solid& s, V3 p) {
  const V3 q = p - s.c;
  const double du = std::max(std::abs(dot(q, s.ex())) - s.h[0], 0.0);
  const double dv = std::max(std::abs(dot(q, s.ey())) - s.h[1], 0.0);
  const double dz = std::max(std::abs(q.z) - s.h[2], 0.0);
  return std::sqrt(du * du + dv * dv + dz * dz);
}

/// Distance from p to the solid flat-ended cylinder of a tunnel (0 inside).
double cylinder_distance(const Solid& s, V3 p) {
  const V3 q = p - s.a;
  const double t = dot(q, s.d);
  const double radial = std::max(norm(q - t * s.d) - s.r, 0.0);
  const double axial = t < 0 ? -t : std::max(t - s.len, 0.0);
  return std::hypot(axial, radial);
}

/// Shortest distance between the segments p0-p1 and q0-q1.
double segment_segment_distance(V3 p0, V3 p1, V3 q0, V3 q1) {
  const V3 u = p1 - p0, w = q1 - q0, r = p0 - q0;
  const double a = dot(u, u), e = dot(w, w), f = dot(w, r);
  double s = 0, t = 0;
  if (a <= 0 && e <= 0) return norm(r);
  if (a <= 0) {
    t = std::clamp(f / e, 0.0, 1.0);
  } else {
    const double c = dot(u, r);
    if (e <= 0) {
      s = std::clamp(-c / a, 0.0, 1.0);
    } else {
      const double b = dot(u, w), den = a * e - b * b;
      s = den > 1e-14 * a * e ? std::clamp((b * f - c * e) / den, 0.0, 1.0) : 0.0;
      t = (b * s + f) / e;
      if (t < 0) {
        t = 0;
        s = std::clamp(-c / a, 0.0, 1.0);
      } else if (t > 1) {
        t = 1;
        s = std::clamp((b - c) / a, 0.0, 1.0);
      }
    }
  }
  return norm((p0 + s * u) - (q0 + t * w));
}

/// Exact separating-axis test for two boxes. Both are vertical prisms, so the candidate axes
/// are the vertical (their depth intervals) and the four edge normals of their plan rectangles.
bool boxes_apart(const Solid& p, const Solid& q, double tol) {
  if (std::abs(p.c.z - q.c.z) > p.h[2] + q.h[2] + tol) return true;
  const V3 dc = q.c - p.c;
  for (const V3 axis : {p.ex(), p.ey(), q.ex(), q.ey()}) {
    const double rp = p.h[0] * std::abs(dot(p.ex(), axis)) + p.h[1] * std::abs(dot(p.ey(), axis));
    const double rq = q.h[0] * std::abs(dot(q.ex(), axis)) + q.h[1] * std::abs(dot(q.ey(), axis));
    if (std::abs(dot(dc, axis)) > rp + rq + tol) return true;
  }
  return false;
}

/// The point of the solid farthest along n.
V3 support(const Solid& s, V3 n) {
  switch (s.kind) {
    case Void::Shape::box: {
      auto sg = [](double v) { return v < 0 ? -1.0 : 1.0; };
      return s.c + (sg(dot(n, s.ex())) * s.h[0]) * s.ex() +
             (sg(dot(n, s.ey())) * s.h[1]) * s.ey() + V3{0, 0, sg(n.z) * s.h[2]};
    }
    case Void::Shape::tunnel: {
      const double t = dot(n, s.d);
      const V3 radial = n - t * s.d;
      const double l = norm(radial);
      const V3 end = t >= 0 ? s.b : s.a;
      return l > 1e-12 * norm(n) ? end + (s.r / l) * radial : end;
    }
    default: {  // sphere
      const double l = norm(n);
      return l > 0 ? s.c + (s.r / l) * n : s.c + V3{s.r, 0, 0};
    }
  }
}

/// The point of the convex hull of `w` (1 to 4 points) nearest the origin; `w` is reduced to the
/// points of the face that holds it. Every face is tried (15 at most), which stays robust where
/// the simplex is flat.
V3 nearest_on_hull(std::vector<V3>& w) {
  const unsigned n = static_cast<unsigned>(w.size());
  double best = std::numeric_limits<double>::infinity();
  V3 best_point = w[0];
  unsigned best_mask = 1;
  for (unsigned mask = 1; mask < (1u << n); ++mask) {
    std::vector<V3> pts;
    for (unsigned i = 0; i < n; ++i)
      if (mask & (1u << i)) pts.push_back(w[i]);
    // x = p0 + sum mu_k e_k with e_k = p_k - p0; the normal equations G mu = -E p0.
    const std::size_t m = pts.size() - 1;
    std::array<V3, 3> e{};
    double g[3][4] = {};
    for (std::size_t k = 0; k < m; ++k) e[k] = pts[k + 1] - pts[0];
    double scale = 0;
    for (std::size_t k = 0; k < m; ++k) {
      for (std::size_t l = 0; l < m; ++l) g[k][l] = dot(e[k], e[l]);
      g[k][m] = -dot(e[k], pts[0]);
      scale = std::max(scale, g[k][k]);
    }
    bool singular = false;
    for (std::size_t col = 0; col < m && !singular; ++col) {  // Gauss-Jordan, partial pivoting
      std::size_t piv = col;
      for (std::size_t row = col + 1; row < m; ++row)
        if (std::abs(g[row][col]) > std::abs(g[piv][col])) piv = row;
      if (std::abs(g[piv][col]) <= 1e-12 * scale) {
        singular = true;
        break;
      }
      for (std::size_t k = 0; k <= m; ++k) std::swap(g[col][k], g[piv][k]);
      for (std::size_t row = 0; row < m; ++row) {
        if (row == col) continue;
        const double f = g[row][col] / g[col][col];
        for (std::size_t k = col; k <= m; ++k) g[row][k] -= f * g[col][k];
      }
    }
    if (singular) continue;  // a flat face: its own faces cover it
    double lambda0 = 1;
    bool inside = true;
    V3 x = pts[0];
    for (std::size_t k = 0; k < m; ++k) {
      const double mu = g[k][m] / g[k][k];
      inside = inside && mu >= 0;
      lambda0 -= mu;
      x = x + mu * e[k];
    }
    if (!inside || lambda0 < 0) continue;
    if (dot(x, x) < best) {
      best = dot(x, x);
      best_point = x;
      best_mask = mask;
    }
  }
  std::vector<V3> kept;
  for (unsigned i = 0; i < n; ++i)
    if (best_mask & (1u << i)) kept.push_back(w[i]);
  w = kept;
  return best_point;
}

/// Whether two convex solids come within `tol` of each other: the distance iteration of
/// Gilbert, Johnson and Keerthi (GJK) on their Minkowski difference p - q.
bool solids_within(const Solid& p, const Solid& q, double tol) {
  V3 v = p.c - q.c;  // both centres are inside their solids: a point of p - q
  std::vector<V3> simplex;
  for (int it = 0; it < 500; ++it) {
    const double vn = norm(v);
    if (vn <= tol) return true;
    const V3 w = support(p, -1.0 * v) - support(q, v);
    if (dot(v, w) / vn > tol) return false;  // a separating plane with a gap above tol
    if (vn * vn - dot(v, w) <= 1e-12 * vn * vn) return false;  // converged: distance = |v|
    for (const V3& s : simplex)
      if (norm(s - w) <= 1e-12 * vn) return false;  // no progress: |v| is the distance
    simplex.push_back(w);
    v = nearest_on_hull(simplex);
  }
  return norm(v) <= tol;
}

/// Whether two 3d voids overlap or come within `tol` of each other.
bool solids_meet(Solid p, Solid q, double tol) {
  using S = Void::Shape;
  if (p.kind > q.kind) std::swap(p, q);  // order: sphere, box, tunnel
  const Box3 ep = extent(p), eq = extent(q);
  for (std::size_t i = 0; i < 3; ++i)
    if (ep.hi[i] + tol < eq.lo[i] || eq.hi[i] + tol < ep.lo[i]) return false;
  if (p.kind == S::sphere) {
    switch (q.kind) {
      case S::sphere: return norm(p.c - q.c) <= p.r + q.r + tol;
      case S::box: return box_distance(q, p.c) <= p.r + tol;
      default: return cylinder_distance(q, p.c) <= p.r + tol;
    }
  }
  if (p.kind == S::box && q.kind == S::box) return !boxes_apart(p, q, tol);
  // A tunnel with a box or another tunnel. Two tunnels whose axes are farther apart than the
  // sum of the radii are clear; the rest go to the exact distance iteration.
  if (p.kind == S::tunnel && segment_segment_distance(p.a, p.b, q.a, q.b) > p.r + q.r + tol)
    return false;
  return solids_within(p, q, tol);
}

// ---------------------------------------------------------------------------------------------
// Sections

const Strings k_top_keys = {"format", "title",  "model", "domain",  "materials", "layers",
                            "voids",  "loads",  "analyses", "mesh", "sensors",   "output"};
const Strings k_material_keys = {"density", "young", "poisson", "vp",
                                 "vs",      "damping", "ucs",   "tensile"};

Material parse_material(const Field& f, const std::string& name) {
  const Map m = f.map();
  m.allow(k_material_keys);
  Material mat;
  mat.name = name;
  mat.density = m.need("density", "kg/m^3").positive();
  const bool elastic = m.has("young") || m.has("poisson");
  const bool waves = m.has("vp") || m.has("vs");
  std::string source = "scenario file";
  if (elastic && waves)
    (m.has("vp") ? *m.get("vp") : *m.get("vs"))
        .fail("give either young and poisson, or vp and vs, not both");
  if (!elastic && !waves)
    fail_at(*f.ctx, f.mark(), f.path,
            "a material needs young and poisson, or the wave speeds vp and vs");
  if (elastic) {
    mat.young = m.need("young", "Pa; needed with poisson").positive();
    const Field pf = m.need("poisson", "needed with young");
    mat.poisson = pf.number();
    if (!(mat.poisson > -1 && mat.poisson < 0.5))
      pf.fail("Poisson's ratio must lie between -1 and 0.5 (both excluded), got " +
              num(mat.poisson));
    if (mat.poisson < 0) pf.warn("negative Poisson's ratio " + num(mat.poisson));
  } else {
    const double vp = m.need("vp", "m/s; needed with vs").positive();
    const Field vs_field = m.need("vs", "m/s; needed with vp");
    const double vs = vs_field.positive();
    if (!(vp > vs))
      vs_field.fail("vs (" + num(vs) + " m/s) must be smaller than vp (" + num(vp) + " m/s)");
    // ν = (vp² − 2 vs²) / (2 (vp² − vs²)), G = ρ vs², E = 2 G (1 + ν).
    const double nu = (vp * vp - 2 * vs * vs) / (2 * (vp * vp - vs * vs));
    if (!(nu > -1 && nu < 0.5))
      vs_field.fail("vp and vs give Poisson's ratio " + num(nu) +
                    ", outside (-1, 0.5): vp/vs must exceed 2/sqrt(3) = 1.155");
    if (nu < 0)
      vs_field.warn("vp and vs give a negative Poisson's ratio " + num(nu) +
                    " (vp/vs below sqrt(2))");
    const double g = mat.density * vs * vs;
    mat.poisson = nu;
    mat.young = 2 * g * (1 + nu);
    source += "; young and poisson from vp and vs (G = rho vs^2)";
  }
  Strings missing;
  if (auto d = m.get("damping")) {
    mat.damping = d->non_negative();
    if (!(mat.damping < 1)) d->fail("a damping ratio must be below 1, got " + num(mat.damping));
  } else {
    missing.push_back("damping");
  }
  if (auto u = m.get("ucs"))
    mat.ucs = u->non_negative();
  else
    missing.push_back("ucs");
  if (auto t = m.get("tensile")) {
    mat.tensile = t->non_negative();
    if (mat.ucs > 0 && mat.tensile > mat.ucs)
      t->warn("tensile strength " + num(mat.tensile) + " Pa exceeds the ucs " + num(mat.ucs) +
              " Pa");
  } else {
    missing.push_back("tensile");
  }
  if (!missing.empty()) source += "; not given, set to 0: " + Field::list_words(missing);
  mat.source = source;
  return mat;
}

struct VoidInput {
  explicit VoidInput(const Field& f) : self(f) {}
  Void v;
  Field self;
  std::optional<Field> x, y, depth, points, from, to;
  std::vector<Field> point_fields;
  std::vector<Field> from_items, to_items;  // tunnel: [x, y, depth] of each end
};

void parse_contents(const Field& f, Void& v) {
  static const Strings words = {"empty", "water"};
  if (f.node.IsScalar()) {
    v.contents = f.choice(words, "contents") == "water" ? Contents::water : Contents::empty;
    return;
  }
  if (!f.node.IsMap())
    f.fail("expected empty, water, {pressure: Pa} or {water: {table-depth: m}}, found " +
           describe(f.node));
  const Map m = f.map();
  m.allow({"pressure", "water"});
  if (m.has("pressure") && m.has("water"))
    m.get("water")->fail("give either pressure or water, not both");
  if (auto p = m.get("pressure")) {
    v.contents = Contents::pressure;
    v.pressure = p->number();
    if (v.pressure < -101325)
      p->warn("a gauge pressure of " + num(v.pressure) +
              " Pa is below vacuum (-101325 Pa at sea level)");
  } else if (auto w = m.get("water")) {
    v.contents = Contents::water;
    const Map wm = w->map(true);
    wm.allow({"table-depth"});
    if (auto t = wm.get("table-depth")) {
      const double d = t->number();
      if (d < 0) t->fail("must be 0 or more (metres below the ground surface), got " + num(d));
      v.water_table_depth = d;
    }
  } else {
    f.fail("expected {pressure: Pa} or {water: {table-depth: m}}, found an empty mapping");
  }
}

void check_polygon(const VoidInput& in) {
  const auto& p = in.v.points;
  const std::size_t n = p.size();
  const Field& pf = *in.points;
  std::vector<Pt> v;
  for (const auto& q : p) v.push_back({q[0], -q[1]});
  Shape outline;
  outline.kind = Void::Shape::polygon;
  outline.pts = v;
  const Box box = bounding_box(outline);
  const double scale = std::max(box.x_max - box.x_min, box.z_max - box.z_min);
  const double eps_len = 1e-9 * scale, eps_area = 1e-12 * scale * scale;
  auto edge = [&](std::size_t i) {
    return std::to_string(i) + "-" + std::to_string((i + 1) % n);
  };
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t j = (i + 1) % n;
    if (std::hypot((v[j] - v[i]).x, (v[j] - v[i]).z) <= eps_len) {
      if (j == 0)
        in.point_fields[i].fail(
            "the last point repeats the first; a polygon closes by itself, leave it out");
      in.point_fields[j].fail("point " + std::to_string(j) + " repeats point " +
                              std::to_string(i));
    }
  }

  auto orient = [&](Pt a, Pt b, Pt c) {
    const double k = cross(b - a, c - a);
    return k > eps_area ? 1 : (k < -eps_area ? -1 : 0);
  };
  auto on_seg = [&](Pt a, Pt b, Pt c) {  // c on segment ab, given collinear
    return std::min(a.x, b.x) - eps_len <= c.x && c.x <= std::max(a.x, b.x) + eps_len &&
           std::min(a.z, b.z) - eps_len <= c.z && c.z <= std::max(a.z, b.z) + eps_len;
  };
  auto touch = [&](Pt a, Pt b, Pt c, Pt d) {
    const int o1 = orient(a, b, c), o2 = orient(a, b, d), o3 = orient(c, d, a),
              o4 = orient(c, d, b);
    if (o1 != o2 && o3 != o4) return true;
    return (o1 == 0 && on_seg(a, b, c)) || (o2 == 0 && on_seg(a, b, d)) ||
           (o3 == 0 && on_seg(c, d, a)) || (o4 == 0 && on_seg(c, d, b));
  };
  {
    // All points on the line through point 0 and the point farthest from it: no area.
    auto from_first = [&](std::size_t i) { return std::hypot((v[i] - v[0]).x, (v[i] - v[0]).z); };
    std::size_t far = 1;
    for (std::size_t i = 2; i < n; ++i)
      if (from_first(i) > from_first(far)) far = i;
    bool in_line = true;
    for (std::size_t i = 1; i < n; ++i) in_line = in_line && orient(v[0], v[far], v[i]) == 0;
    if (in_line) pf.fail("the polygon has no area (its points are in a line)");
  }
  for (std::size_t i = 0; i < n; ++i) {
    // Neighbouring edges share a point; they only go wrong by folding back on each other.
    const Pt a = v[i], b = v[(i + 1) % n], c = v[(i + 2) % n];
    if (orient(a, b, c) == 0 && dot(a - b, c - b) > 0)
      pf.fail("polygon edges " + edge(i) + " and " + edge((i + 1) % n) +
              " fold back on each other");
    for (std::size_t j = i + 2; j < n; ++j) {
      if (i == 0 && j == n - 1) continue;  // neighbours through point 0
      if (touch(v[i], v[(i + 1) % n], v[j], v[(j + 1) % n]))
        pf.fail("the polygon crosses itself: edges " + edge(i) + " and " + edge(j) +
                " intersect");
    }
  }
}

const Strings k_shapes_2d = {"circle", "ellipse", "rectangle", "polygon"};
const Strings k_shapes_3d = {"sphere", "box", "tunnel"};

std::string model_name(Model m) {
  switch (m) {
    case Model::plane_strain: return "plane-strain";
    case Model::axisymmetric: return "axisymmetric";
    case Model::three_d: break;
  }
  return "3d";
}

/// A point [x, y, depth] in m.
std::array<double, 3> point3(const Field& f, std::vector<Field>& items) {
  items = f.list();
  if (items.size() != 3)
    f.fail("expected a point [x, y, depth], found " + std::to_string(items.size()) + " values");
  return {items[0].number(), items[1].number(), items[2].number()};
}

void parse_void_3d(const Map& m, const std::string& shape, VoidInput& in) {
  Void& v = in.v;
  if (shape == "sphere") {
    m.allow({"shape", "x", "y", "depth", "radius", "contents"});
    v.shape = Void::Shape::sphere;
    v.radius = m.need("radius", "m").positive();
  } else if (shape == "box") {
    m.allow({"shape", "x", "y", "depth", "size", "yaw", "contents"});
    v.shape = Void::Shape::box;
    const Field sz = m.need("size", "the edge lengths [lx, ly, lz] in m");
    const auto items = sz.list();
    if (items.size() != 3)
      sz.fail("expected three edge lengths [lx, ly, lz], found " + std::to_string(items.size()) +
              " values");
    v.size = {items[0].positive(), items[1].positive(), items[2].positive()};
    if (auto yf = m.get("yaw")) v.yaw = yf->number();
  } else {
    m.allow({"shape", "from", "to", "radius", "contents"});
    v.shape = Void::Shape::tunnel;
    in.from = m.need("from", "the start of the axis, [x, y, depth] in m");
    in.to = m.need("to", "the end of the axis, [x, y, depth] in m");
    v.from = point3(*in.from, in.from_items);
    v.to = point3(*in.to, in.to_items);
    v.radius = m.need("radius", "m").positive();
    const double len = std::hypot(v.to[0] - v.from[0], v.to[1] - v.from[1], v.to[2] - v.from[2]);
    if (len <= 1e-9 * v.radius)
      in.to->fail(len == 0 ? "the tunnel has zero length: 'to' is the same point as 'from'"
                           : "the tunnel has almost zero length (" + num(len) + " m)");
    // The centre (used for ground loss) is the midpoint of the axis.
    v.x = 0.5 * (v.from[0] + v.to[0]);
    v.y = 0.5 * (v.from[1] + v.to[1]);
    v.depth = 0.5 * (v.from[2] + v.to[2]);
    return;
  }
  in.x = m.need("x", "m, position of the centre along x");
  in.y = m.need("y", "m, position of the centre along y");
  in.depth = m.need("depth", "m, depth of the centre below the surface");
  v.x = in.x->number();
  v.y = in.y->number();
  v.depth = in.depth->number();
}

VoidInput parse_void(const Field& f, Model model) {
  const bool three_d = model == Model::three_d;
  const Map m = f.map();
  VoidInput in(f);
  Void& v = in.v;
  const Field sf = m.need("shape", three_d ? "sphere, box or tunnel"
                                           : "circle, ellipse, rectangle or polygon");
  if (sf.node.IsScalar()) {
    const std::string s = sf.node.Scalar();
    const bool is_2d = std::find(k_shapes_2d.begin(), k_shapes_2d.end(), s) != k_shapes_2d.end();
    const bool is_3d = std::find(k_shapes_3d.begin(), k_shapes_3d.end(), s) != k_shapes_3d.end();
    if (is_3d && !three_d)
      sf.fail("shape '" + s + "' belongs to 3d models; this scenario's model is " +
              model_name(model) + ", which takes circle, ellipse, rectangle or polygon");
    if (is_2d && three_d)
      sf.fail("shape '" + s + "' belongs to the 2D models (plane-strain, axisymmetric); a 3d "
              "model takes sphere, box or tunnel");
  }
  const std::string shape = sf.choice(three_d ? k_shapes_3d : k_shapes_2d, "shape");
  if (three_d) {
    parse_void_3d(m, shape, in);
    if (auto c = m.get("contents")) parse_contents(*c, v);
    v.loc = f.loc();
    return in;
  }
  if (shape == "circle") {
    m.allow({"shape", "x", "depth", "radius", "contents"});
    v.shape = Void::Shape::circle;
    v.radius = m.need("radius", "m").positive();
  } else if (shape == "ellipse") {
    m.allow({"shape", "x", "depth", "axes", "angle", "contents"});
    v.shape = Void::Shape::ellipse;
    const Field af = m.need("axes", "the two semi-axes [a, b] in m");
    const auto items = af.list();
    if (items.size() != 2)
      af.fail("expected two semi-axes [a, b], found " + std::to_string(items.size()) +
              " values");
    v.axes = {items[0].positive(), items[1].positive()};
  } else if (shape == "rectangle") {
    m.allow({"shape", "x", "depth", "width", "height", "angle", "contents"});
    v.shape = Void::Shape::rectangle;
    v.width = m.need("width", "m").positive();
    v.height = m.need("height", "m").positive();
  } else {
    m.allow({"shape", "points", "contents"});
    v.shape = Void::Shape::polygon;
    in.points = m.need("points", "a list of [x, depth] pairs");
    in.point_fields = in.points->list();
    if (in.point_fields.size() < 3)
      in.points->fail("a polygon needs at least 3 points, found " +
                      std::to_string(in.point_fields.size()));
    for (const Field& pf : in.point_fields) {
      const auto xy = pf.list();
      if (xy.size() != 2)
        pf.fail("expected a pair [x, depth], found " + std::to_string(xy.size()) + " values");
      v.points.push_back({xy[0].number(), xy[1].number()});
    }
    check_polygon(in);
    // The polygon's x and depth are its area centroid.
    double a2 = 0, cx = 0, cd = 0;
    const std::size_t n = v.points.size();
    for (std::size_t i = 0; i < n; ++i) {
      const auto& p = v.points[i];
      const auto& q = v.points[(i + 1) % n];
      const double k = p[0] * q[1] - q[0] * p[1];
      a2 += k;
      cx += (p[0] + q[0]) * k;
      cd += (p[1] + q[1]) * k;
    }
    v.x = cx / (3 * a2);
    v.depth = cd / (3 * a2);
  }
  if (v.shape != Void::Shape::polygon) {
    in.x = m.need("x", "m, horizontal position of the centre");
    in.depth = m.need("depth", "m, depth of the centre below the surface");
    v.x = in.x->number();
    v.depth = in.depth->number();
    if (auto a = m.get("angle")) v.angle = a->number();
  }
  if (auto c = m.get("contents")) parse_contents(*c, v);
  v.loc = f.loc();
  return in;
}

// Where to point for a geometric problem at one side of the void.
const Field& depth_field(const VoidInput& in, bool top) {
  if (in.v.shape != Void::Shape::polygon) return *in.depth;
  std::size_t best = 0;
  for (std::size_t i = 1; i < in.v.points.size(); ++i) {
    const bool better = top ? in.v.points[i][1] < in.v.points[best][1]
                            : in.v.points[i][1] > in.v.points[best][1];
    if (better) best = i;
  }
  return in.point_fields[best];
}

const Field& x_field(const VoidInput& in, bool right) {
  if (in.v.shape != Void::Shape::polygon) return *in.x;
  std::size_t best = 0;
  for (std::size_t i = 1; i < in.v.points.size(); ++i) {
    const bool better = right ? in.v.points[i][0] > in.v.points[best][0]
                              : in.v.points[i][0] < in.v.points[best][0];
    if (better) best = i;
  }
  return in.point_fields[best];
}

void check_void_in_domain(const VoidInput& in, const Scenario& sc) {
  const Void& v = in.v;
  const Shape s = shape_of(v);
  const Box b = bounding_box(s);
  const double top = -b.z_max, bottom = -b.z_min, half = sc.domain.width / 2;
  const bool axi = sc.model == Model::axisymmetric;
  if (axi) {
    if (v.shape == Void::Shape::polygon) {
      const double tol = 1e-6 * std::max(b.x_max - b.x_min, b.z_max - b.z_min);
      for (std::size_t i = 0; i < s.pts.size(); ++i)
        if (outline_distance(s.pts, {-s.pts[i].x, s.pts[i].z}) > tol)
          in.point_fields[i].fail(
              "axisymmetric model: a polygon must be symmetric about the axis x = 0, but the "
              "mirror image of this point, x = " +
              num(-s.pts[i].x) + ", is not on its outline");
    } else {
      if (v.x != 0)
        in.x->fail("axisymmetric model: a void must be centred on the axis (x: 0), got x = " +
                   num(v.x));
      const double q = std::remainder(v.angle, 90.0);
      if (v.shape != Void::Shape::circle && std::abs(q) > 1e-9)
        in.self.fail("axisymmetric model: a " +
                     std::string(v.shape == Void::Shape::ellipse ? "ellipse" : "rectangle") +
                     " must be symmetric about the axis, so its angle must be a multiple of "
                     "90 degrees, got " +
                     num(v.angle));
    }
  }
  if (top <= 0)
    depth_field(in, true)
        .fail("the void breaks the ground surface: its top is at depth " + num(top) +
              " m; it must lie below 0");
  if (bottom >= sc.domain.depth)
    depth_field(in, false)
        .fail("the void reaches depth " + num(bottom) +
              " m, at or below the bottom of the domain (domain.depth = " +
              num(sc.domain.depth) + " m)");
  if (axi) {
    if (b.x_max >= half)
      x_field(in, true).fail("the void reaches r = " + num(b.x_max) +
                             " m, at or beyond the domain's outer edge (r = width/2 = " +
                             num(half) + " m)");
  } else {
    if (b.x_min <= -half)
      x_field(in, false).fail("the void reaches x = " + num(b.x_min) +
                              " m, at or beyond the domain's left side (x = " + num(-half) +
                              " m)");
    if (b.x_max >= half)
      x_field(in, true).fail("the void reaches x = " + num(b.x_max) +
                             " m, at or beyond the domain's right side (x = " + num(half) +
                             " m)");
  }
}

/// The field to point at for the extreme of coordinate i (0 x, 1 y, 2 depth) on the `high` side
/// (the larger x, y or depth): the centre's key, or for a tunnel the end that reaches there.
const Field& field_3d(const VoidInput& in, int i, bool high) {
  const auto k = static_cast<std::size_t>(i);
  if (in.v.shape == Void::Shape::tunnel) {
    const bool from_end = high ? in.v.from[k] >= in.v.to[k] : in.v.from[k] <= in.v.to[k];
    return from_end ? in.from_items[k] : in.to_items[k];
  }
  return i == 0 ? *in.x : (i == 1 ? *in.y : *in.depth);
}

std::string shape_word(const Void& v) {
  switch (v.shape) {
    case Void::Shape::sphere: return "sphere";
    case Void::Shape::box: return "box";
    case Void::Shape::tunnel: return "tunnel";
    default: return "void";
  }
}

/// ", at its 'from' end" for a tunnel, so the reader knows which end is meant.
std::string end_note(const VoidInput& in, int i, bool high) {
  if (in.v.shape != Void::Shape::tunnel) return "";
  const auto k = static_cast<std::size_t>(i);
  if (in.v.from[k] == in.v.to[k]) return ", along its whole length";
  const bool from_end = high ? in.v.from[k] > in.v.to[k] : in.v.from[k] < in.v.to[k];
  return std::string(", at its '") + (from_end ? "from" : "to") + "' end";
}

void check_void_in_block(const VoidInput& in, const Scenario& sc) {
  const Void& v = in.v;
  const Box3 e = extent(solid_of(v));
  const std::string what = "the " + shape_word(v);
  const double top = 0.0 - e.hi[2], bottom = 0.0 - e.lo[2];  // 0.0 - z: no "-0" in messages
  if (top <= 0)
    field_3d(in, 2, false)
        .fail(what + " breaks the ground surface" + end_note(in, 2, false) + ": its top is at depth " +
              num(top) + " m, " +
              (top < 0 ? num(-top) + " m above the surface" : std::string("on the surface")) +
              "; every part must lie below 0");
  if (bottom >= sc.domain.depth)
    field_3d(in, 2, true)
        .fail(what + " leaves the block through the bottom" + end_note(in, 2, true) +
              ": it reaches depth " + num(bottom) + " m, " +
              (bottom > sc.domain.depth ? num(bottom - sc.domain.depth) + " m below it"
                                        : std::string("on it")) +
              " (domain.depth = " + num(sc.domain.depth) + " m)");
  const std::array<double, 2> half = {sc.domain.width / 2, sc.domain.length / 2};
  const std::array<std::string, 2> axis = {"x", "y"};
  const std::array<std::string, 2> extent_key = {"domain.width", "domain.length"};
  for (std::size_t i = 0; i < 2; ++i) {
    const int c = static_cast<int>(i);
    for (const bool high : {false, true}) {
      const double reach = high ? e.hi[i] : e.lo[i];
      const double face = high ? half[i] : -half[i];
      const double beyond = high ? reach - face : face - reach;
      if (beyond < 0) continue;
      field_3d(in, c, high)
          .fail(what + " leaves the block through the side " + axis[i] + " = " + num(face) +
                " m" + end_note(in, c, high) + ": it reaches " + axis[i] + " = " + num(reach) +
                " m, " + (beyond > 0 ? num(beyond) + " m beyond it" : std::string("on it")) +
                " (" + extent_key[i] + " = " + num(2 * half[i]) + " m)");
    }
  }
}

void check_layers(const std::vector<Field>& items, const Scenario& sc) {
  double total = 0;
  const double depth = sc.domain.depth;
  for (std::size_t i = 0; i < sc.layers.size(); ++i) {
    const Map m = items[i].map();
    const bool last = i + 1 == sc.layers.size();
    if (!m.has("thickness")) continue;
    const Field tf = *m.get("thickness");
    total += sc.layers[i].thickness;
    if (!last && total >= depth)
      tf.fail("the layers down to this one reach " + num(total) +
              " m, at or below the bottom of the domain (domain.depth = " + num(depth) +
              " m), which leaves no room for the layers below");
    if (last && total > depth + 1e-9 * depth)
      tf.fail("the layers reach " + num(total) + " m, below the bottom of the domain "
              "(domain.depth = " + num(depth) + " m)");
    if (last && total < depth - 1e-9 * depth)
      tf.warn("the last layer runs to the bottom of the domain: " +
              num(depth - (total - sc.layers[i].thickness)) + " m thick, not the " +
              num(sc.layers[i].thickness) + " m given");
  }
}

/// Warnings for a 3d void near the block's faces: closer than one near-void element size, and
/// closer than the common-practice clearance that keeps the boundary conditions from altering
/// the result (docs/scenario-format.md, "Distance to the boundaries"):
///   bottom:  3 x the void's height (its vertical extent);
///   sides:   3 x the larger of the void's centre depth and its height.
void warn_near_boundaries_3d(const VoidInput& in, const Scenario& sc) {
  const Void& v = in.v;
  const Box3 e = extent(solid_of(v));
  const double h = sc.mesh.near_void, feature = feature_size(v);
  const Field& self = in.self;
  if (h > feature / 4)
    self.warn("the near-void element size " + num(h) + " m is coarse for this void (size " +
              num(feature) + " m): its outline gets few elements");
  const double top = 0.0 - e.hi[2], bottom_gap = sc.domain.depth + e.lo[2];
  if (top < h)
    self.warn("the void is closer to the ground surface (" + num(top) +
              " m) than one near-void element size (" + num(h) + " m)");
  const double height = e.hi[2] - e.lo[2];
  if (bottom_gap < h)
    self.warn("the void is closer to the bottom of the domain (" + num(bottom_gap) +
              " m) than one near-void element size (" + num(h) + " m)");
  else if (bottom_gap < 3 * height)
    self.warn("the void is " + num(bottom_gap) + " m above the bottom of the block; common "
              "practice keeps at least 3 x its height (3 x " + num(height) + " m = " +
              num(3 * height) + " m) below a void so that the bottom boundary does not alter "
              "the result (a deeper domain helps)");
  const double side_need = 3 * std::max(v.depth, height);
  const std::array<double, 2> half = {sc.domain.width / 2, sc.domain.length / 2};
  const std::array<std::string, 2> axis = {"x", "y"};
  double side_gap = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < 2; ++i)
    side_gap = std::min({side_gap, half[i] - e.hi[i], e.lo[i] + half[i]});
  if (side_gap < h) {
    self.warn("the void is closer to a side of the domain (" + num(side_gap) +
              " m) than one near-void element size (" + num(h) + " m)");
    return;
  }
  for (std::size_t i = 0; i < 2; ++i)
    for (const bool high : {false, true}) {
      const double gap = high ? half[i] - e.hi[i] : e.lo[i] + half[i];
      if (gap >= side_need) continue;
      self.warn("the void is " + num(gap) + " m from the side " + axis[i] + " = " +
                num(high ? half[i] : -half[i]) + " m; common practice keeps at least 3 x " +
                (v.depth >= height ? "its centre depth (3 x " + num(v.depth)
                                   : "its height (3 x " + num(height)) +
                " m = " + num(side_need) + " m) between a void and a side so that the side "
                "boundary does not alter the result (a larger block helps)");
    }
}

YAML::Node load_yaml(const Ctx& ctx, const std::string& text) {
  std::vector<YAML::Node> docs;
  try {
    docs = YAML::LoadAll(text);
  } catch (const YAML::Exception& e) {
    fail_at(ctx, e.mark, "", "YAML syntax error: " + e.msg);
  }
  if (docs.empty() || docs[0].IsNull())
    throw InputError(ctx.file + ":1:1: the scenario is empty; it needs at least format, "
                                "domain and layers");
  if (docs.size() > 1)
    fail_at(ctx, docs[1].Mark(), "",
            "a scenario file holds one YAML document; this is the start of a second one");
  return docs[0];
}


// ---------------------------------------------------------------------------------------------
// Dynamic analyses

ModalAnalysis parse_modal(const Map& m) {
  m.allow({"modes", "above-hz"});
  ModalAnalysis a;
  a.loc = m.self().loc();
  if (auto f = m.get("modes")) {
    a.modes = f->whole();
    if (a.modes < 1 || a.modes > 500) f->fail("the number of modes must lie between 1 and 500, got " + std::to_string(a.modes));
  }
  if (auto f = m.get("above-hz")) a.shift_hz = f->non_negative();
  return a;
}

std::vector<double> parse_frequencies(const Field& f) {
  std::vector<double> out;
  if (f.node.IsSequence()) {
    for (const Field& item : f.list()) out.push_back(item.positive());
    if (out.empty()) f.fail("the list of frequencies is empty");
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    return out;
  }
  const Map m = f.map();
  m.allow({"min", "max", "count", "spacing"});
  const Field fmin = m.need("min", "lowest frequency in Hz"), fmax = m.need("max", "highest frequency in Hz");
  const double lo = fmin.positive(), hi = fmax.positive();
  int count = 30;
  if (auto fc = m.get("count")) {
    count = fc->whole();
    if (count < 1) fc->fail("the number of frequencies must be at least 1, got " + std::to_string(count));
    if (count > 5000) fc->fail("at most 5000 frequencies, got " + std::to_string(count));
  }
  bool log = true;
  if (auto fs = m.get("spacing")) log = fs->choice({"log", "linear"}, "spacing") == "log";
  if (count == 1) {
    if (hi < lo) fmax.fail("max (" + num(hi) + " Hz) must not be below min (" + num(lo) + " Hz)");
    return {lo};
  }
  if (!(hi > lo)) fmax.fail("max (" + num(hi) + " Hz) must be greater than min (" + num(lo) + " Hz)");
  for (int k = 0; k < count; ++k) {
    const double t = static_cast<double>(k) / (count - 1);
    out.push_back(log ? lo * std::pow(hi / lo, t) : lo + t * (hi - lo));
  }
  out.back() = hi;
  return out;
}

// A force direction [dx, dz] (2D) or [dx, dy, dz] (3D), z up, normalised.
std::array<double, 3> parse_direction(const Field& df, bool three_d) {
  const auto items = df.list();
  const std::size_t n = three_d ? 3 : 2;
  if (items.size() != n)
    df.fail(std::string("expected ") + (three_d ? "[dx, dy, dz]" : "[dx, dz]") + " (z up), found " +
            std::to_string(items.size()) + " value(s)");
  std::array<double, 3> d{0, 0, 0};
  d[0] = items[0].number();
  if (three_d) d[1] = items[1].number();
  d[2] = items[n - 1].number();
  const double len = std::sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2]);
  if (!(len > 0)) df.fail("the direction must not be zero");
  return {d[0] / len, d[1] / len, d[2] / len};
}

// `wave`, `incidence`, `azimuth` (3d) and `polarization` (3d, vertical S only) of an excitation.
WaveSpec parse_wave(const Map& em, bool three_d) {
  WaveSpec w;
  const Field wf = em.need("wave", three_d ? "P, S, SV or SH" : "P, S or SV");
  const std::string type = wf.choice(three_d ? Strings{"P", "S", "SV", "SH"} : Strings{"P", "S", "SV", "SH"}, "wave type");
  if (type == "SH" && !three_d)
    wf.fail("an SH wave moves out of the plane of a plane-strain model: use P or SV (S), or a 3d model");
  w.p_wave = type == "P";
  w.polarization = type == "SH" ? 1 : 0;
  if (auto f = em.get("incidence")) {
    w.incidence_deg = f->number();
    if (!(std::abs(w.incidence_deg) < 90))
      f->fail("the angle from the vertical must be below 90 degrees, got " + num(w.incidence_deg));
    if (three_d && w.incidence_deg < 0)
      f->fail("in a 3d model the angle is 0 to 90 degrees; give the direction of travel with 'azimuth'");
    if (std::abs(w.incidence_deg) > 60)
      f->warn("at " + num(std::abs(w.incidence_deg)) + " degrees the wave runs nearly along the surface: most of it enters "
              "through the sides of the model, and the result depends more on the width of the block");
  }
  if (auto f = em.get("azimuth")) w.azimuth_deg = f->number();
  if (auto f = em.get("polarization")) {
    if (type != "S") f->fail("a polarization applies to 'wave: S' only (SV and SH say it themselves; P moves along its path)");
    if (w.incidence_deg != 0 || em.get("azimuth"))
      f->fail("'polarization' is for vertical incidence; at an angle give 'wave: SV' or 'wave: SH' and 'azimuth'");
    w.polarization = f->choice({"x", "y"}, "polarization") == "y" ? 1 : 0;
  }
  return w;
}

HarmonicAnalysis parse_harmonic(const Map& m, bool three_d) {
  m.allow({"frequencies", "excitation", "absorbing"});
  HarmonicAnalysis a;
  a.loc = m.self().loc();
  a.frequencies_hz = parse_frequencies(m.need("frequencies", "for example {min: 0.5, max: 20, count: 40, spacing: log}"));
  if (auto f = m.get("absorbing")) a.absorbing = f->positive();
  const Field ef = m.need("excitation", "{wave: S, incidence: 0, amplitude: 1.0e-6} or {source: {x, depth, force}}");
  const Map em = ef.map();
  if (auto sf = em.get("source")) {
    em.allow({"source"});
    a.excitation = HarmonicAnalysis::Excitation::source;
    const Map sm = sf->map();
    sm.allow(three_d ? Strings{"x", "y", "depth", "force", "direction"} : Strings{"x", "depth", "force", "direction"});
    a.source_x = sm.need("x").number();
    if (three_d) a.source_y = sm.need("y").number();
    a.source_depth = sm.need("depth", "0 for a force on the ground surface").non_negative();
    a.force = sm.need("force", three_d ? "amplitude in N" : "amplitude in N per metre of length").positive();
    if (auto df = sm.get("direction")) a.direction = parse_direction(*df, three_d);
    return a;
  }
  em.allow(three_d ? Strings{"wave", "incidence", "azimuth", "amplitude", "polarization", "source"}
                   : Strings{"wave", "incidence", "amplitude", "source"});
  a.wave = parse_wave(em, three_d);
  if (auto f = em.get("amplitude")) a.amplitude = f->positive();
  return a;
}

TransientAnalysis finish_transient(const Map& m, TransientAnalysis a);

TransientAnalysis parse_transient(const Map& m, bool three_d) {
  m.allow({"duration", "time-step", "source", "excitation", "snapshots", "record-interval", "receiver-spacing", "damping"});
  TransientAnalysis a;
  a.loc = m.self().loc();
  a.duration_s = m.need("duration", "simulated time in s").positive();
  if (auto f = m.get("time-step")) {
    a.time_step_s = f->positive();
    a.time_step_loc = f->loc();
  }
  std::optional<Field> delay_field;
  if (auto ef = m.get("excitation")) {
    if (m.get("source")) ef->fail("give either 'source' (a force) or 'excitation' (a plane wave), not both");
    const Map em = ef->map();
    em.allow(three_d ? Strings{"wave", "incidence", "azimuth", "polarization", "amplitude", "peak-frequency", "delay"}
                     : Strings{"wave", "incidence", "amplitude", "peak-frequency", "delay"});
    a.wave = parse_wave(em, three_d);
    a.amplitude = em.need("amplitude", "twice the incident pulse's peak displacement, in m").positive();
    a.peak_hz = em.need("peak-frequency", "the Ricker wavelet's peak frequency in Hz").positive();
    delay_field = em.get("delay");
  } else {
    const Map sm = m.need("source", three_d ? "{x, y, depth, peak-frequency, force} or excitation: {wave, peak-frequency, amplitude}"
                                            : "{x, depth, peak-frequency, force} or excitation: {wave, peak-frequency, amplitude}")
                       .map();
    sm.allow(three_d ? Strings{"x", "y", "depth", "peak-frequency", "force", "direction", "delay"}
                     : Strings{"x", "depth", "peak-frequency", "force", "direction", "delay"});
    a.source_x = sm.need("x").number();
    if (three_d) a.source_y = sm.need("y").number();
    a.source_depth = sm.need("depth", "0 for a force on the ground surface").non_negative();
    const Field pf = sm.need("peak-frequency", "the Ricker wavelet's peak frequency in Hz");
    a.peak_hz = pf.positive();
    a.force = sm.need("force", three_d ? "peak amplitude in N" : "peak amplitude in N per metre of length").positive();
    if (auto df = sm.get("direction")) a.direction = parse_direction(*df, three_d);
    delay_field = sm.get("delay");
  }
  if (delay_field) {
    a.delay_s = delay_field->positive();
    if (a.delay_s < 1.0 / a.peak_hz)
      delay_field->warn("a delay below 1/peak-frequency (" + num(1.0 / a.peak_hz) + " s) cuts the start of the wavelet off: the "
                        "source then starts with a jump");
  }
  if (a.wave) {
    if (a.delay_s > 0 && a.delay_s >= a.duration_s)
      m.need("duration").fail("the duration " + num(a.duration_s) + " s ends before the pulse's peak reaches the rock at " +
                              num(a.delay_s) + " s: lengthen it");
    return finish_transient(m, a);
  }
  if (a.delay_s == 0) a.delay_s = 1.5 / a.peak_hz;
  if (a.delay_s >= a.duration_s)
    m.need("duration").fail("the duration " + num(a.duration_s) + " s ends before the wavelet's peak at " + num(a.delay_s) +
                            " s: lengthen it");
  return finish_transient(m, a);
}

// The keys shared by both excitations.
TransientAnalysis finish_transient(const Map& m, TransientAnalysis a) {
  if (auto f = m.get("snapshots")) {
    a.snapshot_interval_s = f->positive();
    const double n = a.duration_s / a.snapshot_interval_s;
    if (n > 1000) f->fail("an interval of " + num(a.snapshot_interval_s) + " s gives " + num(std::floor(n)) +
                          " snapshots per model, more than 1000: choose an interval of at least " + num(a.duration_s / 1000) + " s");
  }
  if (auto f = m.get("record-interval")) a.record_interval_s = f->positive();
  if (auto f = m.get("receiver-spacing")) a.receiver_spacing = f->positive();
  if (auto f = m.get("damping")) a.mass_damping = f->choice({"rayleigh", "mass-proportional"}, "damping fit") == "mass-proportional";
  return a;
}

AmbientAnalysis parse_ambient(const Map& m, const fs::path& base_dir) {
  m.allow({"noise", "band", "wavefield", "per-octave", "absorbing"});
  AmbientAnalysis a;
  a.loc = m.self().loc();
  bool table = false;
  std::optional<Field> noise_field = m.get("noise");
  if (noise_field) {
    if (noise_field->node.IsMap()) {
      const Map tm = noise_field->map();
      tm.allow({"table"});
      const Field tf = tm.need("table", "a CSV file of f_hz and a PSD column (docs/instruments.md)");
      const std::string name = tf.text();
      if (name.empty()) tf.fail("the table's file name is empty");
      fs::path path(name);
      if (path.is_relative()) path = base_dir / path;
      a.table_file = path.lexically_normal();
      std::error_code ec;
      if (!fs::exists(a.table_file, ec)) tf.fail("no such PSD table: " + a.table_file.string());
      a.noise = AmbientAnalysis::Noise::table;
      table = true;
    } else {
      a.noise = noise_field->choice({"high", "low"}, "noise model") == "low" ? AmbientAnalysis::Noise::low
                                                                              : AmbientAnalysis::Noise::high;
    }
  }
  if (auto bf = m.get("band")) {
    const auto items = bf->list();
    if (items.size() != 2) bf->fail("expected [lowest, highest] frequency in Hz, found " + std::to_string(items.size()) + " value(s)");
    a.band_lo_hz = items[0].positive();
    a.band_hi_hz = items[1].positive();
    if (!(a.band_hi_hz > a.band_lo_hz))
      items[1].fail("the band's upper end (" + num(a.band_hi_hz) + " Hz) must be above its lower end (" + num(a.band_lo_hz) + " Hz)");
    if (a.band_hi_hz / a.band_lo_hz > 1e4) bf->fail("the band spans more than four decades; split it into separate runs");
  }
  if (auto wf = m.get("wavefield")) {
    const std::string w = wf->choice({"both", "body-waves", "surface-waves"}, "wavefield");
    a.body_waves = w != "surface-waves";
    a.surface_waves = w != "body-waves";
  }
  if (auto pf = m.get("per-octave")) {
    a.per_octave = pf->whole();
    if (a.per_octave < 2 || a.per_octave > 48) pf->fail("between 2 and 48 frequencies per octave, got " + std::to_string(a.per_octave));
  }
  if (auto f = m.get("absorbing")) a.absorbing = f->positive();
  const double octaves = std::log2(a.band_hi_hz / a.band_lo_hz);
  const int n = std::max(3, static_cast<int>(std::ceil(a.per_octave * octaves - 1e-9)) + 1);
  for (int k = 0; k < n; ++k) a.frequencies_hz.push_back(a.band_lo_hz * std::pow(a.band_hi_hz / a.band_lo_hz, static_cast<double>(k) / (n - 1)));
  a.frequencies_hz.back() = a.band_hi_hz;

  const Field band_key = m.get("band") ? *m.get("band") : m.self();
  if (table) {
    const PsdTable t = read_psd_table(a.table_file);
    const SourceLoc l = band_key.loc();
    check_band_in_table(t, a.band_lo_hz, a.band_hi_hz,
                        band_key.ctx->file + ":" + std::to_string(l.line) + ":" + std::to_string(l.column) + ": key '" + band_key.path + "'");
    a.table = t.psd;
  } else {
    // Peterson's tables start at a period of 0.1 s (10 Hz); a longer band than 1e5 s is not asked for here.
    if (a.band_lo_hz < 1e-5) band_key.fail("the standard noise models are defined from 1e-5 Hz (a period of 100000 s) up");
    if (a.band_hi_hz > 10 + 1e-9) {
      a.extrapolated = true;
      band_key.warn("Peterson's (1993) noise models end at 10 Hz (a period of 0.1 s); above it their shortest-period segment "
                    "is extended, an assumption (give a measured site spectrum as noise: {table: psd.csv} to avoid it)");
    }
  }
  return a;
}

// ---------------------------------------------------------------------------------------------
// Sensors

solver::Sourced from_scenario(double v) { return {v, solver::SourceStatus::verified, "scenario file"}; }

// The first catalogue entry of a kind: the defaults of an explicit spec.
solver::SensorSpec catalogue_default(solver::SensorKind k) {
  for (const auto& e : solver::sensor_catalogue())
    if (e.kind == k) return e;
  throw std::logic_error("sensor catalogue has no entry of a kind");
}

// A seismometer's self-noise from `noise: low | high | {table: f}` over its band, as velocity PSD.
solver::SourcedPsd parse_self_noise(const Field& f, const fs::path& base_dir, double lo, double hi) {
  if (f.node.IsMap()) {
    const Map tm = f.map();
    tm.allow({"table"});
    const Field tf = tm.need("table", "a CSV file of f_hz and a PSD column (docs/instruments.md)");
    fs::path path(tf.text());
    if (path.is_relative()) path = base_dir / path;
    std::error_code ec;
    if (!fs::exists(path, ec)) tf.fail("no such PSD table: " + path.lexically_normal().string());
    const PsdTable t = read_psd_table(path.lexically_normal());
    const SourceLoc l = f.loc();
    check_band_in_table(t, lo, hi, f.ctx->file + ":" + std::to_string(l.line) + ":" + std::to_string(l.column) + ": key '" + f.path + "'");
    return {solver::convert(t.psd, solver::PsdQuantity::velocity), solver::SourceStatus::verified, "table " + path.filename().string()};
  }
  const bool low = f.choice({"low", "high"}, "self-noise model") == "low";
  if (lo < 1e-5 || hi > 10)
    f.fail("the standard noise models cover 1e-5 to 10 Hz; this sensor's band reaches " + num(lo) + "-" + num(hi) +
           " Hz (give a band inside it or a table)");
  return {solver::peterson_breakpoints_psd(low ? solver::NoiseModel::low : solver::NoiseModel::high, lo, hi,
                                           solver::PsdQuantity::velocity),
          solver::SourceStatus::verified, std::string("Peterson (1993) ") + (low ? "NLNM" : "NHNM") + " as self-noise (scenario file)"};
}

SensorUse parse_sensor(const Field& item, const fs::path& base_dir, std::map<std::string, int>& seen) {
  SensorUse u;
  u.loc = item.loc();
  const std::vector<std::string> names = solver::sensor_names();
  auto catalogue = [&](const Field& nf) {
    const std::string n = nf.choice(names, "catalogue sensor (voidsign sensors lists them)");
    return *solver::find_sensor(n);
  };
  std::optional<Map> m;
  if (item.node.IsScalar()) {
    u.spec = catalogue(item);
    u.label = u.spec.name;
  } else {
    m = item.map();
    m->allow({"name", "kind", "label", "precision", "precision-per-km", "pixel", "spacing", "origin", "window", "incidence",
              "heading", "look", "noise", "band", "component", "bearing"});
    const auto nf = m->get("name");
    const auto kf = m->get("kind");
    if (nf && kf) kf->fail("give either a catalogue 'name' or a 'kind' with its values, not both");
    if (!nf && !kf) item.fail("a sensor needs a catalogue 'name' or a 'kind' (radar-los, levelling, gnss, tiltmeter, strainmeter, "
                              "seismometer, geophone)");
    if (nf) {
      u.spec = catalogue(*nf);
      u.label = u.spec.name;
    } else {
      const std::string k = kf->choice({"radar-los", "levelling", "gnss", "tiltmeter", "strainmeter", "seismometer", "geophone"},
                                       "sensor kind");
      for (const auto kind : {solver::SensorKind::radar_los, solver::SensorKind::levelling, solver::SensorKind::gnss,
                              solver::SensorKind::tiltmeter, solver::SensorKind::strainmeter, solver::SensorKind::seismometer,
                              solver::SensorKind::geophone})
        if (solver::kind_name(kind) == k) u.spec = catalogue_default(kind);
      u.spec.name = k;
      u.spec.description = "explicit " + k + " (scenario file)";
      const bool dynamic = solver::is_dynamic(u.spec);
      if (!dynamic && !m->has("precision") && !(k == "levelling" && m->has("precision-per-km")))
        item.fail("an explicit " + k + " needs its one-sigma 'precision' (" + std::string(solver::quantity_unit(u.spec.quantity)) + ")");
      u.label = k;
    }
    if (auto f = m->get("label")) u.label = f->text();
    const bool dynamic = solver::is_dynamic(u.spec);
    auto static_only = [&](const Field& f) {
      if (dynamic) f.fail("'" + f.path.substr(f.path.rfind('.') + 1) + "' applies to static sensors; a " +
                          std::string(solver::kind_name(u.spec.kind)) + " is described by its self-noise ('noise')");
    };
    auto kind_only = [&](const Field& f, std::initializer_list<solver::SensorKind> kinds) {
      for (auto k : kinds)
        if (u.spec.kind == k) return;
      f.fail("'" + f.path.substr(f.path.rfind('.') + 1) + "' does not apply to a " + std::string(solver::kind_name(u.spec.kind)));
    };
    if (auto f = m->get("precision")) {
      static_only(*f);
      u.spec.sigma = from_scenario(f->positive());
      u.spec.sigma_per_sqrt_km.reset();
    }
    if (auto f = m->get("precision-per-km")) {
      kind_only(*f, {solver::SensorKind::levelling});
      if (m->has("precision")) f->fail("give 'precision' (per reading) or 'precision-per-km' (grows with distance), not both");
      u.spec.sigma_per_sqrt_km = from_scenario(f->positive());
      u.spec.sigma.reset();
    }
    if (auto f = m->get("pixel")) {
      kind_only(*f, {solver::SensorKind::radar_los});
      u.spec.footprint_m = from_scenario(f->non_negative());
    }
    if (auto f = m->get("spacing")) {
      kind_only(*f, {solver::SensorKind::levelling, solver::SensorKind::gnss});
      u.spec.spacing_m = from_scenario(f->positive());
    }
    if (auto f = m->get("origin")) {
      kind_only(*f, {solver::SensorKind::levelling, solver::SensorKind::gnss});
      u.origin_m = f->number();
    }
    if (auto f = m->get("window")) {
      kind_only(*f, {solver::SensorKind::radar_los});
      u.spec.window_s = from_scenario(f->positive());
    }
    if (auto f = m->get("incidence")) {
      kind_only(*f, {solver::SensorKind::radar_los});
      const double v = f->number();
      if (v < 0 || v >= 90) f->fail("the incidence angle is measured from the vertical and lies in [0, 90) degrees, got " + num(v));
      u.spec.incidence_deg = from_scenario(v);
    }
    if (auto f = m->get("heading")) {
      kind_only(*f, {solver::SensorKind::radar_los});
      u.spec.heading_deg = from_scenario(f->number());
    }
    if (auto f = m->get("look")) {
      kind_only(*f, {solver::SensorKind::radar_los});
      u.spec.look = f->choice({"right", "left"}, "look side") == "left" ? solver::LookSide::left : solver::LookSide::right;
    }
    if (auto f = m->get("bearing")) u.profile_bearing_deg = f->number();
    if (auto f = m->get("component")) {
      kind_only(*f, {solver::SensorKind::gnss});
      u.spec.quantity = f->choice({"vertical", "horizontal"}, "component") == "horizontal"
                            ? solver::MeasuredQuantity::horizontal_displacement
                            : solver::MeasuredQuantity::vertical_displacement;
    }
    if (auto f = m->get("band")) {
      if (!dynamic) f->fail("'band' applies to seismometers and geophones");
      const auto items = f->list();
      if (items.size() != 2) f->fail("expected [lowest, highest] frequency in Hz");
      const double lo = items[0].positive(), hi = items[1].positive();
      if (!(hi > lo)) items[1].fail("the band's upper end must be above its lower end");
      u.spec.band_lo_hz = from_scenario(lo);
      u.spec.band_hi_hz = from_scenario(hi);
    }
    if (auto f = m->get("noise")) {
      if (!dynamic) f->fail("'noise' (a self-noise spectrum) applies to seismometers and geophones; static sensors take 'precision'");
      u.spec.self_noise = parse_self_noise(*f, base_dir, u.spec.band_lo_hz->value, u.spec.band_hi_hz->value);
    }
  }
  if ((u.spec.kind == solver::SensorKind::levelling || u.spec.kind == solver::SensorKind::gnss) && !u.spec.spacing_m)
    item.fail("a " + std::string(solver::kind_name(u.spec.kind)) + " survey needs its benchmark spacing in m: write {" +
              (m && m->has("kind") ? "kind" : "name") + ": " + (m && m->has("kind") ? std::string(solver::kind_name(u.spec.kind)) : u.spec.name) +
              ", spacing: 10}");
  // Repeated labels get a number so that every row of the verdict is named uniquely.
  const int n = ++seen[u.label];
  if (n > 1) u.label += " #" + std::to_string(n);
  return u;
}

// Elements per S wavelength at the highest frequency f_max in the slowest layer, with the
// far-field size as the element size (the mesher's largest): quadratic elements need 5, linear 10
// (docs/scenario-format.md). Below the minimum: a warning on `key`; below half of it: an error.
// `what` says where f_max comes from.
double check_resolution(const Field& key, const Scenario& sc, double f_max, const std::string& what) {
  double vs_min = std::numeric_limits<double>::infinity();
  std::string slowest;
  for (const Layer& l : sc.layers) {
    const Material& mat = sc.materials.at(l.material);
    const double vs = std::sqrt(mat.young / (2 * (1 + mat.poisson)) / mat.density);
    if (vs < vs_min) {
      vs_min = vs;
      slowest = l.material;
    }
  }
  const double lambda = vs_min / f_max, h = sc.mesh.size;
  const double need = sc.mesh.order == 2 ? 5 : 10;
  const double per = lambda / h;
  if (per >= need) return per;
  char buf[480];
  std::snprintf(buf, sizeof buf,
                "at %g Hz (%s) the S wavelength in '%s' (Vs %.0f m/s) is %.3g m: %.2g element(s) of size %g m per "
                "wavelength, fewer than the %g needed for %s elements (set mesh.size to %.3g m or less, or lower "
                "the frequency to %.3g Hz)",
                f_max, what.c_str(), slowest.c_str(), vs_min, lambda, per, h, need,
                sc.mesh.order == 2 ? "quadratic" : "linear", lambda / need, vs_min / (need * h));
  if (per < need / 2) key.fail(std::string(buf) + "; below half of that the results are meaningless");
  key.warn(buf);
  return per;
}

}  // namespace

Scenario parse_scenario(const std::string& yaml_text, const std::filesystem::path& file) {
  Scenario sc;
  const Ctx ctx{file.string(), &sc.warnings};
  sc.file = file.empty() ? file : fs::absolute(file).lexically_normal();
  sc.sha256 = sha256_hex(yaml_text);

  const YAML::Node root = load_yaml(ctx, yaml_text);
  const Field top_field{&ctx, root, "", root.Mark()};
  if (!root.IsMap())
    fail_at(ctx, root.Mark(), "",
            "the scenario must be a mapping of keys (format, domain, layers, ...), found " +
                describe(root));
  const Map top = top_field.map();
  top.allow(k_top_keys);

  // format, model, title
  const Field ff = top.need("format", "write 'format: 1'");
  sc.format = ff.whole();
  if (sc.format != 1)
    ff.fail("format " + std::to_string(sc.format) + " is not supported; this version reads "
                                                    "format 1");
  if (auto mf = top.get("model")) {
    const std::string model = mf->choice({"plane-strain", "axisymmetric", "3d"}, "model");
    sc.model = model == "3d"             ? Model::three_d
               : model == "axisymmetric" ? Model::axisymmetric
                                         : Model::plane_strain;
  }
  sc.title = top.has("title") ? top.get("title")->text() : file.stem().string();
  const bool axi = sc.model == Model::axisymmetric;
  const bool three_d = sc.model == Model::three_d;

  // domain
  {
    const Map dm =
        top.need("domain", three_d ? "width, length and depth in m" : "width and depth in m")
            .map();
    dm.allow({"width", "depth", "length", "boundaries"});
    sc.domain.width = dm.need("width", "m").positive();
    if (three_d)
      sc.domain.length =
          dm.need("length", "m; y runs from -length/2 to +length/2, required in 3d").positive();
    sc.domain.depth = dm.need("depth", "m").positive();
    if (auto lf = dm.get("length"); lf && !three_d) {
      sc.domain.length = lf->positive();
      lf->warn("length is used by 3d models only; ignored");
    }
    if (auto bf = dm.get("boundaries")) {
      const Map bm = bf->map();
      bm.allow({"sides", "bottom"});
      const Strings kinds = {"roller", "fixed"};
      if (auto s = bm.get("sides"))
        sc.domain.sides = s->choice(kinds, "boundary") == "fixed" ? Boundary::fixed
                                                                  : Boundary::roller;
      if (auto b = bm.get("bottom"))
        sc.domain.bottom = b->choice(kinds, "boundary") == "fixed" ? Boundary::fixed
                                                                   : Boundary::roller;
    }
  }

  // materials (explicit), then layers
  struct Explicit {
    Material m;
    Field f;
    bool used = false;
  };
  std::vector<Explicit> explicit_materials;
  if (auto mf = top.get("materials")) {
    const Map mm = mf->map(true);
    for (const std::string& name : mm.keys()) {
      const Field f = *mm.get(name);
      if (name.empty()) f.fail("a material needs a name");
      explicit_materials.push_back({parse_material(f, name), f, false});
    }
  }
  const Field lf = top.need("layers", "a list of {material, thickness}, top down");
  const std::vector<Field> layer_items = lf.list();
  if (layer_items.empty()) lf.fail("at least one layer is needed");
  for (std::size_t i = 0; i < layer_items.size(); ++i) {
    const Field& item = layer_items[i];
    const Map m = item.map();
    m.allow({"material", "thickness"});
    Layer layer;
    const Field matf = m.need("material", "a name from the materials block or the catalogue");
    layer.material = matf.text();
    const bool last = i + 1 == layer_items.size();
    if (auto tf = m.get("thickness"))
      layer.thickness = tf->positive();
    else if (!last)
      m.need("thickness", "m; every layer but the last needs one, the last runs to the bottom");
    layer.loc = item.loc();

    auto ex = std::find_if(explicit_materials.begin(), explicit_materials.end(),
                           [&](const Explicit& e) { return e.m.name == layer.material; });
    if (ex != explicit_materials.end()) {
      ex->used = true;
      sc.materials[layer.material] = ex->m;
    } else if (const CatalogueEntry* ce = find_material(layer.material)) {
      sc.materials[layer.material] = ce->m;
    } else {
      Strings names;
      for (const auto& e : explicit_materials) names.push_back(e.m.name);
      for (const auto& n : catalogue_names()) names.push_back(n);
      matf.fail(with_hint("unknown material '" + layer.material +
                              "': not in the materials block nor in the built-in catalogue",
                          suggestion_hint(layer.material, names)));
    }
    sc.layers.push_back(layer);
  }
  check_layers(layer_items, sc);
  sc.layers.back().thickness = 0;  // the last layer always runs to the bottom
  for (const auto& e : explicit_materials)
    if (!e.used) e.f.warn("material '" + e.m.name + "' is defined but no layer uses it");

  // voids
  std::vector<VoidInput> voids;
  if (auto vf = top.get("voids")) {
    for (const Field& item : vf->list()) voids.push_back(parse_void(item, sc.model));
  }
  for (const auto& in : voids) {
    if (three_d)
      check_void_in_block(in, sc);
    else
      check_void_in_domain(in, sc);
  }
  {
    const double tol =
        1e-9 * std::max({sc.domain.width, sc.domain.depth, three_d ? sc.domain.length : 0.0});
    auto overlap = [&](std::size_t i, std::size_t j) {
      voids[j].self.fail("voids " + std::to_string(i) + " and " + std::to_string(j) +
                         " overlap or touch (void " + std::to_string(i) + " starts at line " +
                         std::to_string(voids[i].v.loc.line) + ")");
    };
    if (three_d) {
      std::vector<Solid> solids;
      for (const auto& in : voids) solids.push_back(solid_of(in.v));
      for (std::size_t j = 0; j < voids.size(); ++j)
        for (std::size_t i = 0; i < j; ++i)
          if (solids_meet(solids[i], solids[j], tol)) overlap(i, j);
    } else {
      std::vector<Shape> shapes;
      for (const auto& in : voids) shapes.push_back(shape_of(in.v));
      for (std::size_t j = 0; j < voids.size(); ++j)
        for (std::size_t i = 0; i < j; ++i)
          if (shapes_overlap(shapes[i], shapes[j], tol)) overlap(i, j);
    }
  }
  for (const auto& in : voids) {
    const Void& v = in.v;
    if (v.contents == Contents::water && v.water_table_depth) {
      const double bottom =
          three_d ? -extent(solid_of(v)).lo[2] : -bounding_box(shape_of(v)).z_min;
      if (*v.water_table_depth >= bottom)
        warn_at(ctx, in.self.mark(), in.self.path + ".contents.water.table-depth",
                "the water table lies below the void, which therefore holds no water");
    }
    sc.voids.push_back(v);
  }
  if (voids.empty()) warn_at(ctx, top.self().mark(), "voids", "no voids: the signature is zero");

  // loads
  bool any_load = false;
  if (auto lof = top.get("loads")) {
    const Map lm = lof->map(true);
    lm.allow({"gravity", "surface", "ground-loss"});
    if (auto gf = lm.get("gravity")) {
      sc.loads.gravity = true;
      any_load = true;
      const Map gm = gf->map(true);
      gm.allow({"k0"});
      if (auto kf = gm.get("k0")) {
        double k0 = 0;
        if (kf->node.IsScalar() && kf->node.Scalar() == "auto") {
          sc.loads.k0.reset();
        } else if (read_number(kf->node, k0) && std::isfinite(k0)) {
          if (!(k0 > 0)) kf->fail("k0 must be greater than 0, got " + num(k0));
          sc.loads.k0 = k0;
        } else {
          kf->fail("expected 'auto' or a number greater than 0, found " + describe(kf->node));
        }
      }
    }
    if (auto sf = lm.get("surface")) {
      const double half = sc.domain.width / 2;
      for (const Field& item : sf->list()) {
        const Map m = item.map();
        SurfaceLoad s;
        if (three_d) {
          for (const char* k : {"from", "to"})
            if (auto f = m.get(k))
              fail_at(ctx, f->key_mark, f->path,
                      "unknown key '" + std::string(k) +
                          "' (a 3d surface load covers a rectangle: give x: [a, b] and "
                          "y: [c, d])");
          m.allow({"x", "y", "pressure"});
          // One side of the rectangle: [start, end] along `axis`, inside +-half.
          auto range = [&](const std::string& axis, double half_extent, const std::string& key) {
            const Field rf = m.need(axis, "[start, end] in m");
            const auto ends = rf.list();
            if (ends.size() != 2)
              rf.fail("expected a range [start, end] in m, found " +
                      std::to_string(ends.size()) + " values");
            const double a = ends[0].number(), b = ends[1].number();
            if (!(b > a))
              ends[1].fail("the end of the range (" + num(b) + " m) must be greater than its "
                           "start (" + num(a) + " m)");
            const std::string inside = " m, outside the block (" + axis + " from " +
                                       num(-half_extent) + " to " + num(half_extent) + " m, " +
                                       key + " = " + num(2 * half_extent) + " m)";
            if (a < -half_extent)
              ends[0].fail("the load starts at " + axis + " = " + num(a) + inside);
            if (b > half_extent) ends[1].fail("the load ends at " + axis + " = " + num(b) + inside);
            return std::array<double, 2>{a, b};
          };
          const auto xr = range("x", half, "domain.width");
          const auto yr = range("y", sc.domain.length / 2, "domain.length");
          s.from = xr[0];
          s.to = xr[1];
          s.y_from = yr[0];
          s.y_to = yr[1];
          s.pressure = m.need("pressure", "Pa, positive pushing down").number();
        } else {
          for (const char* k : {"x", "y"})
            if (auto f = m.get(k))
              fail_at(ctx, f->key_mark, f->path,
                      "unknown key '" + std::string(k) +
                          "' (x: [a, b] and y: [c, d] are for 3d models; here give from and "
                          "to)");
          m.allow({"from", "to", "pressure"});
          const Field from_f = m.need("from", axi ? "m, inner radius" : "m, left end");
          const Field to_f = m.need("to", axi ? "m, outer radius" : "m, right end");
          s.from = from_f.number();
          s.to = to_f.number();
          s.pressure = m.need("pressure", "Pa, positive pushing down").number();
          if (!(s.to > s.from))
            to_f.fail("'to' (" + num(s.to) + " m) must be greater than 'from' (" +
                      num(s.from) + " m)");
          if (axi && s.from < 0)
            from_f.fail("axisymmetric model: 'from' is a radius and must be 0 or more, got " +
                        num(s.from));
          if (!axi && s.from < -half)
            from_f.fail("the load starts at x = " + num(s.from) +
                        " m, outside the domain (x from " + num(-half) + " to " + num(half) +
                        " m)");
          if (s.to > half)
            to_f.fail("the load ends at " + std::string(axi ? "r = " : "x = ") + num(s.to) +
                      " m, outside the domain (" + (axi ? "r from 0" : "x from " + num(-half)) +
                      " to " + num(half) + " m)");
        }
        s.loc = item.loc();
        sc.loads.surface.push_back(s);
        any_load = true;
      }
    }
    if (auto gl = lm.get("ground-loss")) {
      for (const Field& item : gl->list()) {
        const Map m = item.map();
        m.allow({"void", "percent"});
        GroundLoss g;
        const Field vf = m.need("void", "index of the void in the voids list, from 0");
        g.void_index = vf.whole();
        if (g.void_index < 0 || g.void_index >= static_cast<int>(sc.voids.size()))
          vf.fail("void index " + std::to_string(g.void_index) + " is out of range: " +
                  (sc.voids.empty() ? std::string("the scenario has no voids")
                                    : "the voids are numbered 0 to " +
                                          std::to_string(sc.voids.size() - 1)));
        for (const auto& other : sc.loads.ground_loss)
          if (other.void_index == g.void_index)
            vf.fail("void " + std::to_string(g.void_index) + " already has a ground loss (" +
                    other.loc.key + ")");
        const Field pf = m.need("percent", three_d ? "volume loss in % of the void's volume"
                                                   : "volume loss in % of the void's area");
        g.percent = pf.number();
        if (!(g.percent > 0 && g.percent < 100))
          pf.fail("a volume loss must lie between 0 and 100 % (both excluded), got " +
                  num(g.percent));
        if (g.percent > 5)
          pf.warn("a volume loss of " + num(g.percent) +
                  " % is far above usual tunnelling values (about 0.5-2 %)");
        g.loc = item.loc();
        sc.loads.ground_loss.push_back(g);
        any_load = true;
      }
    }
  }
  for (const auto& v : sc.voids)
    if (v.contents != Contents::empty) any_load = true;

  // analyses
  std::optional<Field> harmonic_field, transient_field, ambient_field;
  if (auto af = top.get("analyses")) {
    const Map am = af->map(true);
    am.allow({"static", "modal", "harmonic", "transient", "ambient"});
    for (const std::string& name : am.keys()) {
      const Field f = *am.get(name);
      const Map options = f.map(true);
      if (name == "static") {
        options.allow({});
        sc.analyses.static_ = true;
      } else if (name == "modal") {
        sc.analyses.modal = parse_modal(options);
      } else if (name == "harmonic") {
        if (axi)
          f.fail("the harmonic analysis is not available for axisymmetric models: an incident plane wave is not "
                 "axisymmetric (use model: plane-strain or 3d; modal works in all three)");
        sc.analyses.harmonic = parse_harmonic(options, three_d);
        harmonic_field = f;
      } else if (name == "transient") {
        sc.analyses.transient = parse_transient(options, three_d);
        transient_field = f;
      } else if (name == "ambient") {
        if (axi)
          f.fail("the ambient analysis is not available for axisymmetric models: it is built on incident plane waves and "
                 "sources on both sides, which are not axisymmetric (use model: plane-strain or 3d)");
        sc.analyses.ambient = parse_ambient(options, sc.file.parent_path());
        ambient_field = f;
      }
    }
    if (!sc.analyses.static_ && !sc.analyses.modal && !sc.analyses.harmonic && !sc.analyses.transient && !sc.analyses.ambient)
      af->warn("the analyses block requests no analysis (static, modal, harmonic, transient, ambient)");
  } else {
    sc.analyses.static_ = true;
  }

  if (!any_load && sc.analyses.static_)
    warn_at(ctx, top.self().mark(), "loads",
            "nothing loads the model (no gravity, surface load, ground loss or void contents): "
            "every static displacement is zero");

  // mesh
  std::optional<Field> near_field;
  if (auto mf = top.get("mesh")) {
    const Map mm = mf->map(true);
    mm.allow({"order", "size", "near-void", "surface"});
    if (auto of = mm.get("order")) {
      sc.mesh.order = of->whole();
      if (sc.mesh.order != 1 && sc.mesh.order != 2)
        of->fail("the element order must be 1 (linear) or 2 (quadratic), got " +
                 std::to_string(sc.mesh.order));
    }
    if (auto f = mm.get("size")) sc.mesh.size = f->positive();
    if (auto f = mm.get("near-void")) {
      sc.mesh.near_void = f->positive();
      near_field = f;
    }
    if (auto f = mm.get("surface")) sc.mesh.surface = f->positive();
  }
  // Defaults. 3d: coarser, since the cell count grows with the cube of 1/size.
  if (sc.mesh.size == 0)
    sc.mesh.size = three_d ? std::min({sc.domain.width, sc.domain.length, sc.domain.depth}) / 15
                           : std::min(sc.domain.depth, sc.domain.width) / 20;
  if (sc.mesh.near_void == 0) {
    const double per_feature = three_d ? 6 : 8, floor_ratio = three_d ? 100 : 200;
    double smallest = std::numeric_limits<double>::infinity();
    for (const auto& v : sc.voids) smallest = std::min(smallest, feature_size(v));
    sc.mesh.near_void = std::isfinite(smallest)
                            ? std::max(smallest / per_feature, sc.mesh.size / floor_ratio)
                            : sc.mesh.size / per_feature;
  }
  if (sc.mesh.surface == 0) sc.mesh.surface = sc.mesh.size / 3;
  if (near_field && sc.mesh.near_void > sc.mesh.size)
    near_field->warn("near-void " + num(sc.mesh.near_void) +
                     " m is coarser than the far-field size " + num(sc.mesh.size) + " m");

  // Checks that depend on the mesh sizes: warnings only.
  for (std::size_t i = 0; i < voids.size(); ++i) {
    if (three_d) {
      warn_near_boundaries_3d(voids[i], sc);
      continue;
    }
    const Void& v = sc.voids[i];
    const Shape s = shape_of(v);
    const Box b = bounding_box(s);
    const double h = sc.mesh.near_void, half = sc.domain.width / 2;
    const double feature = feature_size(v);
    const Field& self = voids[i].self;
    if (h > feature / 4)
      self.warn("the near-void element size " + num(h) + " m is coarse for this void (size " +
                num(feature) + " m): its outline gets few elements");
    if (-b.z_max < h)
      self.warn("the void is closer to the ground surface (" + num(-b.z_max) +
                " m) than one near-void element size (" + num(h) + " m)");
    if (sc.domain.depth + b.z_min < h)
      self.warn("the void is closer to the bottom of the domain (" +
                num(sc.domain.depth + b.z_min) + " m) than one near-void element size (" +
                num(h) + " m)");
    const double side_gap = axi ? half - b.x_max : std::min(half - b.x_max, b.x_min + half);
    if (side_gap < h)
      self.warn("the void is closer to a side of the domain (" + num(side_gap) +
                " m) than one near-void element size (" + num(h) + " m)");
  }

  if (harmonic_field) {
    HarmonicAnalysis& a = *sc.analyses.harmonic;
    a.elements_per_wavelength = check_resolution(*harmonic_field->map().get("frequencies"), sc, a.frequencies_hz.back(),
                                                 "the highest frequency");
  }
  if (transient_field) {
    // The Ricker amplitude spectrum (f/fp)^2 exp(1 - (f/fp)^2) is down to 3 % of its peak at 2.5 fp.
    TransientAnalysis& a = *sc.analyses.transient;
    const Map tm = transient_field->map();
    const Map em = (a.wave ? *tm.get("excitation") : *tm.get("source")).map();
    if (a.wave && sc.model == Model::axisymmetric)
      tm.get("excitation")->fail("a plane wave is not axisymmetric: use a plane-strain or 3d model (or a force on the axis)");
    a.elements_per_wavelength = check_resolution(*em.get("peak-frequency"), sc, 2.5 * a.peak_hz,
                                                 "2.5 x the wavelet's peak frequency");
  }
  if (ambient_field) {
    AmbientAnalysis& a = *sc.analyses.ambient;
    const Map am = ambient_field->map(true);
    a.elements_per_wavelength = check_resolution(am.get("band") ? *am.get("band") : *ambient_field, sc, a.band_hi_hz,
                                                 "the top of the band");
  }

  // sensors, output
  if (auto sf = top.get("sensors")) {
    std::map<std::string, int> seen;
    for (const Field& item : sf->list()) {
      SensorUse u = parse_sensor(item, sc.file.parent_path(), seen);
      sc.sensors.push_back(std::move(u));
    }
  }
  if (auto of = top.get("output")) {
    const Map om = of->map(true);
    om.allow({"dir"});
    if (auto df = om.get("dir")) {
      const std::string dir = df->text();
      if (dir.empty()) df->fail("the output folder name is empty");
      fs::path p(dir);
      if (p.is_relative()) p = sc.file.parent_path() / p;
      sc.output_dir = p.lexically_normal();
    }
  }
  return sc;
}

Scenario load_scenario(const std::filesystem::path& file) {
  std::error_code ec;
  if (!fs::exists(file, ec)) throw InputError(file.string() + ": no such scenario file");
  if (fs::is_directory(file, ec))
    throw InputError(file.string() + ": is a folder, not a scenario file");
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(file.string() + ": cannot open the scenario file for reading");
  std::ostringstream buf;
  buf << in.rdbuf();
  if (in.bad()) throw InputError(file.string() + ": cannot read the scenario file");
  return parse_scenario(buf.str(), file);
}

std::string WaveSpec::name() const {
  if (p_wave) return "P";
  return polarization == 1 ? "SH" : "SV";
}

std::string WaveSpec::describe(bool three_d) const {
  std::ostringstream os;
  if (incidence_deg == 0) {
    os << "vertically incident plane " << (p_wave ? "P" : "S") << " wave";
    if (three_d && !p_wave) {
      const double motion = std::fmod(azimuth_deg + (polarization == 1 ? 90.0 : 0.0) + 360.0, 360.0);
      if (motion == 0 || motion == 180)
        os << " (motion along x)";
      else if (motion == 90 || motion == 270)
        os << " (motion along y)";
      else
        os << " (motion toward azimuth " << motion << " deg)";
    }
  } else {
    os << "plane " << name() << " wave at " << incidence_deg << " deg from the vertical";
    if (three_d)
      os << ", travelling toward azimuth " << azimuth_deg << " deg";
    else
      os << ", travelling toward " << (incidence_deg > 0 ? "+x" : "-x");
  }
  return os.str();
}

}  // namespace voidsign::cli
