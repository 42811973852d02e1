// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// libFuzzer target: a photo file's EXIF read through libexif (formats/exif.h):
// JPEG check, size limit, every tag's format, count and rationals.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "formats/exif.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view bytes(reinterpret_cast<const char*>(data), size);
  const auto r = cairn::formats::read_exif(bytes, "fuzz.jpg");
  if (r.ok() && r->lat && (*r->lat < -90 || *r->lat > 90)) __builtin_trap();
  if (r.ok() && r->lon && (*r->lon < -180 || *r->lon > 180)) __builtin_trap();
  return 0;
}
