// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// Runs a libFuzzer target's entry point over files and folders named on the
// command line, without libFuzzer: the seed corpora and every input that once
// crashed (tests/fuzz/regressions) run this way in the normal test suite.
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <vector>

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size);

int main(int argc, char** argv) {
  namespace fs = std::filesystem;
  std::vector<fs::path> files;
  for (int i = 1; i < argc; ++i) {
    const fs::path a = argv[i];
    if (fs::is_directory(a)) {
      for (const auto& e : fs::recursive_directory_iterator(a))
        if (e.is_regular_file() && e.path().filename().string()[0] != '.') files.push_back(e.path());
    } else if (fs::exists(a)) {
      files.push_back(a);
    }
  }
  for (const auto& f : files) {
    std::ifstream in(f, std::ios::binary);
    const std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    LLVMFuzzerTestOneInput(reinterpret_cast<const uint8_t*>(bytes.data()), bytes.size());
  }
  std::printf("%zu inputs ran without a crash\n", files.size());
  return files.empty() ? 1 : 0;
}
