// Running the real touch UI in tests: a private folder, a project made through
// storage, and `cairn gui FILE --script EVENTS` on a virtual display (tests/tools/xvfb-do) (a virtual X
// display; Mesa's llvmpipe renders OpenGL 3 there). The script pushes SDL
// events into SDL's own queue and checks what the screen shows
// (app/ui/script.h); the test then reads the project file through storage.
// It holds no checks of its own: each test names its outside source (the
// Markland test, the ISO 8601 standard, the right-hand rule, ...).
#pragma once
#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>

#include "storage/project.h"

namespace cairn::ui_test {

struct GuiRun {
  int status = -1;
  std::string err;
};

inline std::string slurp(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  std::stringstream ss;
  ss << f.rdbuf();
  return ss.str();
}

// A keypad tap per character ("030/40" -> tap "key 0" ...), spaces as the space key.
inline std::string keys(const std::string& s) {
  std::string out;
  for (char c : s) out += std::string("tap \"key ") + (c == ' ' ? std::string("space") : std::string(1, c)) + "\"\n";
  return out;
}

// Whether Xvfb is installed (scripts/install-deps.sh --test installs it).
inline bool have_xvfb() { return std::system("command -v Xvfb >/dev/null 2>&1") == 0; }

// The prefix that runs one command on a virtual display of its own
// (tests/tools/xvfb-do: a display number per process, the server always stopped).
inline std::string xvfb_run(const std::string& screen) {
  return "'" + std::string(CAIRN_SOURCE_DIR) + "/tests/tools/xvfb-do' " + screen;
}

class UiTest : public ::testing::Test {
 protected:
  void SetUp() override {
    std::string tmpl = (std::filesystem::temp_directory_path() / "cairn-ui-XXXXXX").string();
    ASSERT_NE(mkdtemp(tmpl.data()), nullptr);
    dir_ = tmpl;
    // The UI tests need the virtual display: without it they fail, not skip.
    ASSERT_TRUE(have_xvfb()) << "Xvfb is missing: run scripts/install-deps.sh --test";
  }
  void TearDown() override {
    if (!HasFailure())
      std::filesystem::remove_all(dir_);
    else
      std::cerr << "kept " << dir_ << " for a look\n";
  }

  std::string file(const std::string& name) const { return (dir_ / name).string(); }

  static store::OpenOptions quiet() {
    store::OpenOptions o;
    o.backups = false;
    return o;
  }

  // Runs the UI on PROJECT with the event script SCRIPT (its text) and extra arguments.
  GuiRun gui(const std::string& project, const std::string& script, const std::string& extra = "") const {
    std::ofstream(file("events.txt")) << script;
    const std::string cmd = "cd '" + dir_.string() + "' && " + xvfb_run("1400x1000x24") + " '" +
                            std::string(CAIRN_BINARY) + "' gui '" + project + "' --script events.txt --size 1280x800 " +
                            extra + " >gui-out.txt 2>gui-err.txt";
    const int rc = std::system(cmd.c_str());
    return {WIFEXITED(rc) ? WEXITSTATUS(rc) : -1, slurp(file("gui-err.txt"))};
  }

  std::filesystem::path dir_;
};

}  // namespace cairn::ui_test
