// Base64 as RFC 4648 section 4 defines it (standard alphabet, '=' padding):
// the report's embedded thumbnails (data: URIs, RFC 2397).
#pragma once
#include <string>
#include <string_view>

namespace cairn::formats {

std::string base64_encode(std::string_view data);

}  // namespace cairn::formats
