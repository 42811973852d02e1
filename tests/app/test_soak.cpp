// Soak: one process saves readings one transaction each, as the Reading pad
// saves them, while another runs `cairn check` on the same file every second;
// afterwards every reading the writer saw committed is there with what was
// written, no other, and PRAGMA integrity_check says ok.
//
// The full run is 100 000 readings:
//   CAIRN_SOAK_READINGS=100000 build/tests/test_app --gtest_filter='Soak.*'
// (2026-12-03, Release, 2 cores shared with four other builds: 100 000 readings
// saved while 139 checks ran, 335 s, passed.)
// The default, 3000 (about 25 s there), keeps ctest quick and still overlaps at least ten checks
// with the writes: the writer waits, at each tenth of its readings, for a check
// to finish after it got there, so the overlap does not depend on the speed of
// the machine (no timing is asserted).
// Sources: SQLite documentation, "Write-Ahead Logging" (one writer and many
// readers at once; a reader sees the last commit before it began) and "Atomic
// Commit In SQLite" (a transaction is durable once COMMIT returns).
#include <fcntl.h>
#include <gtest/gtest.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <string>
#include <thread>

#include "storage/project.h"
#include "storage/repository.h"
#include "tests/app/cli_test_support.h"

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;
using namespace cairn::store;

namespace {

long soak_readings() {
  const char* v = std::getenv("CAIRN_SOAK_READINGS");
  const long n = v ? std::strtol(v, nullptr, 10) : 3000;
  return n >= 10 ? n : 3000;
}

// What reading I holds: strike, dip and notes follow from I alone.
double strike_of(long i) { return static_cast<double>(i % 360); }
double dip_of(long i) { return static_cast<double>((i * 7) % 91); }
std::string notes_of(long i) { return "soak " + std::to_string(i); }

// The writer: N readings at stations of ten each, one transaction per save,
// each UUID printed to OUT once its COMMIT has returned. At each tenth, and
// once more after the last, it waits for a byte on GO that arrived after it got
// there (a check that finished): ten checks overlap the writes at least.
void await_a_check(int go) {
  char c;
  while (read(go, &c, 1) == 1) {}  // drain (GO is non-blocking): earlier checks do not count
  pollfd pf{go, POLLIN, 0};
  poll(&pf, 1, -1);
}

[[noreturn]] void writer(const std::string& path, long n, int out, int go) {
  try {
    OpenOptions o;
    o.device_name = "soak tablet";
    Project p = Project::open(path, o);
    std::string station;
    for (long i = 0; i < n; ++i) {
      if (i % (n / 10) == 0 && i > 0) await_a_check(go);
      if (i % 10 == 0) {
        Station s;
        s.code = "K" + std::to_string(i / 10);
        s.lat = 46.4 + (i / 10 % 100) * 1e-3;
        s.lon = 14.8 + (i / 1000) * 1e-3;
        station = add(p, s);
      }
      PlanarReading r;
      r.station = station;
      r.measured_strike = strike_of(i);
      r.measured_dip = dip_of(i);
      r.notes = notes_of(i);
      add(p, r);
      const std::string line = r.meta.uuid + " " + std::to_string(i) + "\n";
      if (write(out, line.data(), line.size()) != static_cast<ssize_t>(line.size())) _exit(4);
    }
    await_a_check(go);
    _exit(0);
  } catch (...) {
    _exit(3);
  }
}

class Soak : public CliTest {};

}  // namespace

TEST_F(Soak, SavesWhileChecksRunLoseNothing) {
  const long n = soak_readings();
  ASSERT_EQ(cairn("new soak.cairn --name Soak --utm 33N").status, 0);
  const std::string path = file("soak.cairn");
  // The writer may end between a check and the byte that says so: that byte
  // must not kill this process (EPIPE instead of SIGPIPE).
  struct IgnorePipe {
    void (*old)(int) = signal(SIGPIPE, SIG_IGN);
    ~IgnorePipe() { signal(SIGPIPE, old); }
  } ignore_pipe;
  int up[2], go[2];
  ASSERT_EQ(pipe(up), 0);
  ASSERT_EQ(pipe(go), 0);
  const pid_t pid = fork();
  ASSERT_GE(pid, 0);
  if (pid == 0) {
    close(up[0]);
    close(go[1]);
    fcntl(go[0], F_SETFL, O_NONBLOCK);
    writer(path, n, up[1], go[0]);
  }
  close(up[1]);
  close(go[0]);
  std::string reported;
  std::thread reader([&] {
    char chunk[65536];
    for (ssize_t k; (k = read(up[0], chunk, sizeof chunk)) > 0;) reported.append(chunk, static_cast<size_t>(k));
  });
  int checks = 0, failed = 0, status = 0;
  std::string first_failure;
  for (;;) {
    const auto start = std::chrono::steady_clock::now();
    if (waitpid(pid, &status, WNOHANG) == pid) break;
    const Outcome c = cairn("check soak.cairn");
    ++checks;
    if (c.status != 0 || c.err.find("warning") != std::string::npos) {
      if (failed++ == 0) first_failure = "status " + std::to_string(c.status) + ": " + c.err;
    }
    if (::write(go[1], "c", 1) != 1) break;
    std::this_thread::sleep_until(start + std::chrono::seconds(1));
  }
  close(go[1]);
  reader.join();
  close(up[0]);
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << "writer status " << status;
  std::cout << "[ info     ] " << n << " readings saved while " << checks << " checks ran\n";
  EXPECT_GE(checks, 10);
  EXPECT_EQ(failed, 0) << first_failure;

  // Every reported reading is there, as written, and nothing else.
  std::map<std::string, long> committed;
  for (size_t at = 0, nl; (nl = reported.find('\n', at)) != std::string::npos; at = nl + 1) {
    const std::string line = reported.substr(at, nl - at);
    const size_t sp = line.find(' ');
    committed[line.substr(0, sp)] = std::stol(line.substr(sp + 1));
  }
  ASSERT_EQ(committed.size(), static_cast<size_t>(n));
  OpenOptions o;
  o.read_only = true;
  Project p = Project::open(path, o);
  EXPECT_EQ(p.problem(), "");
  EXPECT_TRUE(p.integrity_check().empty());
  ListOptions all;
  all.include_deleted = true;
  const auto planes = list_planes(p, all);
  EXPECT_EQ(planes.size(), static_cast<size_t>(n));
  long wrong = 0, unknown = 0;
  for (const auto& r : planes) {
    auto it = committed.find(r.meta.uuid);
    if (it == committed.end()) {
      ++unknown;
      continue;
    }
    const long i = it->second;
    if (r.measured_strike != strike_of(i) || r.measured_dip != dip_of(i) || r.notes != notes_of(i) ||
        r.meta.deleted.has_value())
      ++wrong;
  }
  EXPECT_EQ(unknown, 0);
  EXPECT_EQ(wrong, 0);
}
