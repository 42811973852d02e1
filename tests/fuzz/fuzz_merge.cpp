// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// libFuzzer target: a tablet's project file, mutated from a valid one
// (tests/fuzz/corpus/merge), merged into a scratch camp file, always rolled
// back. A refused source is fine; a crash, a hang or a sanitizer report is not.
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <stdexcept>
#include <string>

#include "fuzz_support.h"
#include "storage/merge.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using namespace cairn;
  static const std::string dir = fuzz::scratch_dir();
  const std::string src = dir + "/tablet.cairn";
  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) std::filesystem::remove(src + suffix, ec);
  {
    FILE* f = std::fopen(src.c_str(), "wb");
    if (!f) return 0;
    std::fwrite(data, 1, size, f);
    std::fclose(f);
  }
  store::Project& camp = fuzz::scratch_project();
  fuzz::undone(camp, [&] {
    try {
      (void)store::merge_files(camp, {src});
    } catch (const std::exception&) {
      // a refused source
    }
  });
  return 0;
}
