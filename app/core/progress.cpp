#include "app/core/progress.h"

#include <fmt/format.h>
#include <unistd.h>

#include <cstdlib>
#include <iostream>
#include <stdexcept>

#include "formats/utf8.h"
#include "geomath/decimal.h"

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

double progress_after() {
  const char* v = std::getenv("CAIRN_PROGRESS_AFTER");
  if (!v || !*v) return 2.0;
  const auto d = geo::parse_decimal(v);
  if (!d || *d < 0)
    throw std::runtime_error("CAIRN_PROGRESS_AFTER must be a number of seconds (0 or more), not '" +
                             formats::terminal_safe(v) + "': set it so, or unset it for the 2 s default");
  return *d;
}

ProgressLine::ProgressLine(std::ostream& err, std::string what, bool asked)
    : err_(err),
      what_(std::move(what)),
      terminal_(&err == &std::cerr && isatty(STDERR_FILENO) == 1),
      after_(progress_after()) {
  enabled_ = asked || terminal_;
}

void ProgressLine::update(size_t done, size_t total) {
  if (!enabled_) return;
  const double s = rate_.seconds();
  if (s < after_) return;
  if (shown_ && s - last_ < (terminal_ ? 0.2 : 1.0)) return;
  last_ = s;
  shown_ = true;
  // On a terminal: back to the start of the line, and clear what a longer line left (ECMA-48 EL, CSI K).
  err_ << (terminal_ ? "\r" : "") << what_ << ": " << rate_.line(done, total) << (terminal_ ? "\x1b[K" : "\n")
       << std::flush;
}

void ProgressLine::finish(size_t done, size_t total) {
  if (!shown_) return;
  err_ << (terminal_ ? "\r" : "") << what_ << ": " << rate_.line(done, total) << "\n" << std::flush;
}

}  // namespace cairn::core
