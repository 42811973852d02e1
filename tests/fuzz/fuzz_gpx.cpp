// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// libFuzzer target: a GPX 1.1 file read with expat and imported as stations
// and as points of a contact, always rolled back.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "formats/gpx.h"
#include "fuzz_support.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using namespace cairn;
  store::Project& p = fuzz::scratch_project();
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  (void)formats::parse_gpx(text, "fuzz.gpx");
  fuzz::undone(p, [&] { (void)store::import_gpx(p, text, "fuzz.gpx"); });
  fuzz::undone(p, [&] { (void)store::import_gpx(p, text, "fuzz.gpx", "Pgs-Qm"); });
  return 0;
}
