// The figures of a progress report for long work, the same on stderr (`cairn
// import`, `cairn merge`, `cairn list`, `cairn export`, `cairn report`) and in
// the touch UI's job bar (app/ui/jobs.h): rows done of rows in all, and rows per
// second since the work began.
#pragma once
#include <chrono>
#include <cstddef>
#include <optional>
#include <ostream>
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

// Seconds of work before a progress line appears: 2, or the environment
// variable CAIRN_PROGRESS_AFTER (a number of seconds, 0 for at once; tests set
// it). Throws std::runtime_error for a value that is not a number >= 0.
double progress_after();

// The one progress line on stderr of `cairn list`, `cairn export` and `cairn
// report`: "WHAT: N of M rows (R rows/s)", shown once the work has run for
// progress_after() seconds, and only when ERR is a terminal's stderr or when the
// user asked for it (--progress). On a terminal the line is rewritten in place
// (carriage return); elsewhere one line at most every second. Never on stdout.
class ProgressLine {
 public:
  ProgressLine(std::ostream& err, std::string what, bool asked);
  ProgressLine(const ProgressLine&) = delete;
  ProgressLine& operator=(const ProgressLine&) = delete;
  // Where the work has got to; cheap when nothing is to be shown.
  void update(size_t done, size_t total);
  // The last figures, and the end of the line, when a line was shown.
  void finish(size_t done, size_t total);
  bool shown() const { return shown_; }

 private:
  std::ostream& err_;
  std::string what_;
  bool enabled_, terminal_, shown_ = false;
  double after_;
  RowRate rate_;
  double last_ = -1;
};

}  // namespace cairn::core
