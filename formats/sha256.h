// SHA-256 as FIPS 180-4 ("Secure Hash Standard", NIST, 2015) defines it: the
// digest of a photo file, and of an imported row for re-import detection.
#pragma once
#include <string>
#include <string_view>

namespace cairn::formats {

// The digest of `data` as 64 lower-case hexadecimal digits.
std::string sha256_hex(std::string_view data);

}  // namespace cairn::formats
