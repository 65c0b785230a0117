// SPDX-License-Identifier: GPL-3.0-or-later
#include "cli/report/text.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace voidsign::cli::report {
namespace {

constexpr std::string_view replacement_char = "\xEF\xBF\xBD";  // U+FFFD
constexpr std::string_view minus_sign = "\xE2\x88\x92";        // U+2212

/// One decoded UTF-8 sequence: the code point (or −1 when the bytes are not valid UTF-8) and
/// how many bytes it takes (1 for an invalid byte, so that decoding resynchronises).
struct CodePoint {
  long value;
  std::size_t length;
};

bool continuation(unsigned char c) { return (c & 0xC0) == 0x80; }

CodePoint decode_utf8(std::string_view s, std::size_t i) {
  const auto b = [&](std::size_t k) { return static_cast<unsigned char>(s[i + k]); };
  const unsigned char c = b(0);
  if (c < 0x80) return {c, 1};
  std::size_t n = 0;
  long v = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // the allowed range of the second byte (RFC 3629)
  if (c >= 0xC2 && c <= 0xDF) {
    n = 2, v = c & 0x1F;
  } else if (c >= 0xE0 && c <= 0xEF) {
    n = 3, v = c & 0x0F;
    if (c == 0xE0) lo = 0xA0;
    if (c == 0xED) hi = 0x9F;  // no surrogates
  } else if (c >= 0xF0 && c <= 0xF4) {
    n = 4, v = c & 0x07;
    if (c == 0xF0) lo = 0x90;
    if (c == 0xF4) hi = 0x8F;
  } else {
    return {-1, 1};
  }
  if (i + n > s.size()) return {-1, 1};
  if (b(1) < lo || b(1) > hi) return {-1, 1};
  for (std::size_t k = 1; k < n; ++k) {
    if (!continuation(b(k))) return {-1, 1};
    v = (v << 6) | (b(k) & 0x3F);
  }
  return {v, n};
}

/// XML 1.0 `Char` production.
bool xml_char(long cp) {
  if (cp == 0x9 || cp == 0xA || cp == 0xD) return true;
  if (cp < 0x20) return false;
  return cp != 0xFFFE && cp != 0xFFFF;
}

std::string strip_minus_zero(std::string s) {
  // "-0", "-0.00": every digit zero.
  if (!s.empty() && s[0] == '-' && s.find_first_not_of("0.", 1) == std::string::npos) s.erase(0, 1);
  return s;
}

/// Replaces a leading ASCII '-' by the minus sign.
std::string typographic_minus(std::string s) {
  if (!s.empty() && s[0] == '-') s.replace(0, 1, minus_sign);
  return s;
}

std::string printf_fixed(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

/// Decimals needed to print multiples of `step` exactly (1-2-5 steps need at most one more
/// than the order of magnitude).
int decimals_for_step(double step) {
  step = std::abs(step);
  if (!(step > 0) || !std::isfinite(step)) return 0;
  for (int d = 0; d < 15; ++d) {
    const double scaled = step * std::pow(10.0, d);
    if (std::abs(scaled - std::round(scaled)) < 1e-6 * scaled) return d;
  }
  return 15;
}

}  // namespace

std::string xml_escape(std::string_view text) {
  std::string out;
  out.reserve(text.size() + text.size() / 8);
  for (std::size_t i = 0; i < text.size();) {
    const CodePoint cp = decode_utf8(text, i);
    if (cp.value < 0 || !xml_char(cp.value)) {
      out += replacement_char;
    } else if (cp.length > 1) {
      out.append(text.substr(i, cp.length));
    } else {
      switch (text[i]) {
        case '&':
          out += "&amp;";
          break;
        case '<':
          out += "&lt;";
          break;
        case '>':
          out += "&gt;";
          break;
        case '"':
          out += "&quot;";
          break;
        case '\'':
          out += "&#39;";
          break;
        default:
          out += text[i];
      }
    }
    i += cp.length;
  }
  return out;
}

std::string fixed(double v, int decimals) {
  if (!std::isfinite(v)) return "0";
  return strip_minus_zero(printf_fixed(v, decimals));
}

std::string superscript(int n) {
  static constexpr std::array<std::string_view, 10> digits = {
      "\xE2\x81\xB0", "\xC2\xB9",     "\xC2\xB2",     "\xC2\xB3",     "\xE2\x81\xB4",
      "\xE2\x81\xB5", "\xE2\x81\xB6", "\xE2\x81\xB7", "\xE2\x81\xB8", "\xE2\x81\xB9"};
  std::string out;
  if (n < 0) out += "\xE2\x81\xBB";  // superscript minus U+207B
  for (const char c : std::to_string(std::abs(static_cast<long>(n)))) out += digits[c - '0'];
  return out;
}

std::string power_of_ten(int n) { return "10" + superscript(n); }

int engineering_exponent(double max_abs) {
  max_abs = std::abs(max_abs);
  if (!(max_abs > 0) || !std::isfinite(max_abs)) return 0;
  // A small tolerance so that 0.001 (stored a hair below 1e-3) counts as 1e-3.
  const int e = static_cast<int>(std::floor(std::log10(max_abs) + 1e-9));
  return static_cast<int>(std::floor(e / 3.0)) * 3;
}

std::optional<std::string> si_prefix(int exponent) {
  static constexpr std::array<std::string_view, 17> prefixes = {
      "y", "z", "a", "f", "p", "n", "\xC2\xB5", "m", "", "k", "M", "G", "T", "P", "E", "Z", "Y"};
  if (exponent % 3 != 0 || exponent < -24 || exponent > 24) return std::nullopt;
  return std::string(prefixes[static_cast<std::size_t>(exponent / 3 + 8)]);
}

bool takes_prefix(std::string_view unit) {
  static constexpr std::array<std::string_view, 10> symbols = {"rad", "Pa", "Hz", "m", "s",
                                                               "N",   "g",  "V",  "W", "J"};
  for (const std::string_view sym : symbols) {
    if (unit.substr(0, sym.size()) != sym) continue;
    const std::string_view rest = unit.substr(sym.size());
    // The symbol must end there: "m" in "m/s" yes, in "mol" or "m²" no.
    return rest.empty() || rest[0] == '/' || rest[0] == ' ' ||
           rest.substr(0, 2) == "\xC2\xB7";  // middle dot U+00B7
  }
  return false;
}

std::string scaled_unit(std::string_view unit, int exponent) {
  if (exponent == 0) return std::string(unit);
  if (takes_prefix(unit)) {
    if (const auto p = si_prefix(exponent)) return *p + std::string(unit);
  }
  std::string out = "\xC3\x97" + power_of_ten(exponent);  // ×10ⁿ
  if (!unit.empty()) out.append(" ").append(unit);
  return out;
}

std::string tick_label(double v, double step) {
  if (std::abs(v) < 1e-9 * std::abs(step)) v = 0;
  return typographic_minus(strip_minus_zero(printf_fixed(v, decimals_for_step(step))));
}

std::string format_quantity(double v, std::string_view unit, int significant) {
  std::string space_unit;
  if (!unit.empty()) space_unit.append(" ").append(unit);
  if (std::isnan(v)) return "n/a";
  if (std::isinf(v)) return (v < 0 ? std::string(minus_sign) : "") + "\xE2\x88\x9E" + space_unit;
  if (v == 0) return "0" + space_unit;
  significant = std::max(1, significant);
  // Round first, so that 999.96 at 3 digits becomes 1.00 k and not 1000.
  const auto magnitude = [](double x) {
    return static_cast<int>(std::floor(std::log10(std::abs(x)) + 1e-9));
  };
  const double quantum = std::pow(10.0, magnitude(v) - significant + 1);
  const double rounded = std::round(v / quantum) * quantum;
  const int mag = magnitude(rounded);
  const auto digits = [&](double mantissa, int mantissa_mag) {
    return typographic_minus(
        strip_minus_zero(printf_fixed(mantissa, std::max(0, significant - 1 - mantissa_mag))));
  };
  if (takes_prefix(unit)) {
    const int e = engineering_exponent(rounded);
    if (const auto prefix = si_prefix(e)) {
      const double mantissa = rounded / std::pow(10.0, e);
      return digits(mantissa, mag - e) + " " + *prefix + std::string(unit);
    }
  }
  if (mag >= -3 && mag <= 3) return digits(rounded, mag) + space_unit;
  return digits(rounded / std::pow(10.0, mag), 0) + "\xC3\x97" + power_of_ten(mag) + space_unit;
}

std::size_t utf8_length(std::string_view text) {
  std::size_t n = 0;
  for (std::size_t i = 0; i < text.size(); i += decode_utf8(text, i).length) ++n;
  return n;
}

double text_width_px(std::string_view text, double font_px) {
  return 0.6 * font_px * static_cast<double>(utf8_length(text));
}

}  // namespace voidsign::cli::report
