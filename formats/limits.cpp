#include "formats/limits.h"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>

namespace cairn::formats {

std::string size_text(size_t bytes) {
  if (bytes >= (size_t{1} << 20) && bytes % (size_t{1} << 20) == 0) return std::to_string(bytes >> 20) + " MiB";
  if (bytes >= 1024 && bytes % 1024 == 0) return std::to_string(bytes >> 10) + " KiB";
  return std::to_string(bytes) + " bytes";
}

Result<std::string> read_file_limited(const std::string& path, size_t max) {
  std::unique_ptr<FILE, int (*)(FILE*)> f(std::fopen(path.c_str(), "rb"), &std::fclose);
  if (!f) return Result<std::string>::failure("cannot read " + path + ": " + std::strerror(errno));
  std::string out;
  char buf[1 << 16];
  for (;;) {
    const size_t n = std::fread(buf, 1, sizeof buf, f.get());
    if (n == 0) break;
    if (out.size() + n > max)
      return Result<std::string>::failure(path + ": the file is larger than " + size_text(max) +
                                          ", the most Cairn reads at once; split it into smaller files");
    out.append(buf, n);
  }
  if (std::ferror(f.get())) return Result<std::string>::failure("cannot read " + path + ": " + std::strerror(errno));
  return out;
}

}  // namespace cairn::formats
