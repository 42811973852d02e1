// The figures of a progress report for long work, the same on stderr (`cairn
// import`, `cairn merge`) and in the touch UI's job bar (app/ui/jobs.h): rows
// done of rows in all, and rows per second since the work began.
#pragma once
#include <chrono>
#include <cstddef>
#include <string>

namespace cairn::core {

class RowRate {
 public:
  RowRate() : start_(std::chrono::steady_clock::now()) {}
  // Seconds since the work began.
  double seconds() const;
  // "1200 of 5000 rows (600 rows/s)"; the rate is left out in the first tenth
  // of a second (it would mean nothing yet).
  std::string line(size_t done, size_t total) const;

 private:
  std::chrono::steady_clock::time_point start_;
};

}  // namespace cairn::core
