#include "app/core/progress.h"

#include <fmt/format.h>

namespace cairn::core {

double RowRate::seconds() const {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
}

std::string RowRate::line(size_t done, size_t total) const {
  const double s = seconds();
  std::string out = fmt::format("{} of {} rows", done, total);
  if (s >= 0.1) out += fmt::format(" ({} rows/s)", static_cast<long long>(static_cast<double>(done) / s));
  return out;
}

}  // namespace cairn::core
