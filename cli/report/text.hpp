// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// Text helpers shared by the report's SVG and HTML writers: XML escaping, numbers for
/// coordinates and labels, powers of ten in superscript, and SI prefixes for units. Pure
/// functions, no I/O. Labels use the minus sign U+2212 and UTF-8 throughout.
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

namespace voidsign::cli::report {

/// `text` made safe as XML or HTML character data and as a quoted attribute value: & < > " '
/// become entity references; bytes that are not valid UTF-8, and control characters other than
/// tab, line feed and carriage return (not allowed in XML 1.0), become U+FFFD.
std::string xml_escape(std::string_view text);

/// `v` with `decimals` digits after the point, for SVG coordinates ("12.50"). Never "-0.00";
/// a non-finite `v` gives "0" (callers drop such points before).
std::string fixed(double v, int decimals = 2);

/// The superscript form of an integer: −6 → "⁻⁶", 12 → "¹²".
std::string superscript(int n);

/// The power of ten 10ⁿ as a label: −6 → "10⁻⁶", 0 → "10⁰".
std::string power_of_ten(int n);

/// The engineering exponent (a multiple of 3) for showing numbers of magnitude `max_abs`:
/// 0.0123 → −3, 950 → 0, 1200 → 3. 0 for zero or non-finite `max_abs`.
int engineering_exponent(double max_abs);

/// The SI prefix of a power of ten that is a multiple of 3 in [−24, 24]: −6 → "µ", 0 → "",
/// 3 → "k"; nothing for other exponents.
std::optional<std::string> si_prefix(int exponent);

/// Whether `unit` takes an SI prefix as a whole: its first symbol is one of m, rad, Pa, s, Hz, N,
/// g, V, W, J with no power on it. "m", "m/s²", "rad", "Pa" yes; "m²", "m³/m", "", "-", "%" no.
bool takes_prefix(std::string_view unit);

/// The unit of numbers that have been divided by 10^`exponent`: ("m", −3) → "mm",
/// ("m/m", −6) → "µm/m", ("m²", −3) → "×10⁻³ m²", ("", −6) → "×10⁻⁶"; exponent 0 gives `unit`.
std::string scaled_unit(std::string_view unit, int exponent);

/// A tick label for `v` on an axis whose ticks are `step` apart (both already in display units):
/// as many decimals as `step` needs, U+2212 for minus, and "0" rather than "−0".
std::string tick_label(double v, double step);

/// `v` rounded to `significant` digits with `unit`, for tables and notes. A unit that takes a
/// prefix gets one (engineering form): (−0.01234, "m") → "−12.3 mm", (7, "m") → "7.00 m".
/// Otherwise plain decimals for magnitudes 10⁻³ to 10³, else a power of ten:
/// (0.5, "m²") → "0.500 m²", (3.2e-7, "") → "3.20×10⁻⁷". NaN → "n/a", ±inf → "∞" / "−∞".
std::string format_quantity(double v, std::string_view unit, int significant = 3);

/// The number of Unicode code points in UTF-8 `text` (invalid bytes count one each): the basis
/// of the writers' text-width estimates.
std::size_t utf8_length(std::string_view text);

/// An estimate of the width [px] of `text` in a sans-serif font of `font_px` pixels: 0.6 em per
/// code point, generous so that labels do not collide.
double text_width_px(std::string_view text, double font_px);

}  // namespace voidsign::cli::report
