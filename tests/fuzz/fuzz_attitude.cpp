// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// libFuzzer target: attitude text as a mapper types it (geomath/notation.h):
// planes in each convention, lines, and rakes on a host plane.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "geomath/notation.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using namespace cairn::geo;
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  for (auto c : {PlaneConvention::Unspecified, PlaneConvention::StrikeDipRHR, PlaneConvention::DipDirectionDip})
    (void)parse_plane(text, c);
  (void)parse_line(text);
  (void)parse_rake(text, Plane{120, 35});
  (void)parse_rake(text, Plane{0, 90});
  return 0;
}
