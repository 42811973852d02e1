// Starting the touch UI: `cairn` with no arguments opens it only where there
// is a display (the issue: "cairn gui [FILE] (and cairn with no arguments on a
// machine with a display) opens it"); without one it prints the help, and
// `cairn gui` says why it cannot open a window. Exit statuses as the other
// verbs use them: 0 success, 1 failure, 2 usage error (BSD sysexits, GNU practice;
// common practice, no published source).
#include <gtest/gtest.h>

#include <cstdlib>
#include <string>
#include <sys/wait.h>

#include "tests/app/ui_test_support.h"

namespace {

struct LaunchRun {
  int status;
  std::string out, err;
};

LaunchRun run_without_display(const std::string& dir, const std::string& args) {
  const std::string cmd = "cd '" + dir + "' && env -u DISPLAY -u WAYLAND_DISPLAY '" + std::string(CAIRN_BINARY) + "' " +
                          args + " >out.txt 2>err.txt";
  const int rc = std::system(cmd.c_str());
  return {WIFEXITED(rc) ? WEXITSTATUS(rc) : -1, cairn::ui_test::slurp(dir + "/out.txt"),
          cairn::ui_test::slurp(dir + "/err.txt")};
}

// A private folder for the output files (tests may run at the same time).
std::string private_dir() {
  std::string tmpl = (std::filesystem::temp_directory_path() / "cairn-launch-XXXXXX").string();
  if (!mkdtemp(tmpl.data())) return std::filesystem::temp_directory_path().string();
  return tmpl;
}

}  // namespace

TEST(UiLaunch, WithoutADisplayNoArgumentsPrintsTheHelp) {
  const std::string dir = private_dir();
  const LaunchRun r = run_without_display(dir, "");
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("Verbs:"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("\n  gui "), std::string::npos) << r.out;

  const LaunchRun g = run_without_display(dir, "gui some.cairn");
  EXPECT_EQ(g.status, 1);
  EXPECT_NE(g.err.find("DISPLAY"), std::string::npos) << g.err;
  std::filesystem::remove_all(dir);
}

TEST(UiLaunch, BadOptionsAreUsageErrors) {
  const std::string dir = private_dir();
  EXPECT_EQ(run_without_display(dir, "gui --size 12").status, 2);
  EXPECT_EQ(run_without_display(dir, "gui --view nowhere").status, 2);
  const LaunchRun r = run_without_display(dir, "gui --frames many");
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("--frames"), std::string::npos) << r.err;
  std::filesystem::remove_all(dir);
}
