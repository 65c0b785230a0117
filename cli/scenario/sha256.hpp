// SPDX-License-Identifier: GPL-3.0-or-later
#pragma once
/// SHA-256 (FIPS 180-4) of a byte string, to record exactly which scenario file a result
/// came from.
#include <string>
#include <string_view>

namespace voidsign::cli {

/// SHA-256 digest of `bytes` as 64 lower-case hexadecimal digits.
std::string sha256_hex(std::string_view bytes);

}  // namespace voidsign::cli
