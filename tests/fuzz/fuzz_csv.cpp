// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// libFuzzer target: a CSV import of one kind (CAIRN_FUZZ_KIND, e.g. "planes")
// into a scratch project, always rolled back. An import that succeeds must
// list again as CSV that the reader takes back (storage/import.h), else abort.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "formats/csv.h"
#include "fuzz_support.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using namespace cairn;
  static const store::ImportKind kind = *store::parse_import_kind(CAIRN_FUZZ_KIND);
  store::Project& p = fuzz::scratch_project();
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  fuzz::undone(p, [&] {
    const store::ImportReport r = store::import_csv(p, kind, text, "fuzz.csv");
    if (r.ok() && !formats::parse_csv(store::list_csv(p, kind), "list.csv")) std::abort();
  });
  return 0;
}
