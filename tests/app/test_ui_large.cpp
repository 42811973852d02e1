// What the Logbook, Net, Plan and Crosscheck derive from the records is built
// on a worker thread (app/ui/background.h) and the Net's and Plan's pictures
// drawn into pixels there (app/ui/soft_raster.h); with CAIRN_BUILD_IN_FRAME=1
// in the frame, through OpenGL. Both ways the screens show the same content.
// And the file is opened on the job worker: a file that is not a project
// still ends `cairn gui FILE` with status 1 and the reason, as it did before
// the window opened.
// Source: the expected texts are the screens' own (the demo's station codes,
// the Net's and Plan's summary lines); no published source.
#include <cstdlib>
#include <fstream>

#include "tests/app/ui_test_support.h"

using cairn::ui_test::UiTest;

namespace {

// Sets an environment variable for the UI runs of one test.
struct ScopedEnv {
  std::string name;
  ScopedEnv(const char* n, const char* v) : name(n) { setenv(n, v, 1); }
  ~ScopedEnv() { unsetenv(name.c_str()); }
};

}  // namespace

TEST_F(UiTest, ScreensBuiltOnAWorkerOrInTheFrameShowTheSameContent) {
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  std::string s = "wait 3\nwait-idle\n";
  s += "expect \"22 stations\"\n";  // the newest day's heading, a Logbook row
  s += "tap \"Net\"\nwait 2\n";
  s += "expect \"planar readings shown\"\n";  // the net's summary
  s += "tap \"Plan\"\nwait 2\n";
  s += "expect \"84 stations\"\n";  // from the plan's layers
  s += "expect \"2 km\"\n";         // the scale bar: a text of the picture
  s += "tap \"Zoom in\"\nwait 2\n";
  s += "expect \"1 km\"\n";  // a new picture for the new view
  s += "tap \"Crosscheck\"\nwait 2\n";
  s += "expect \"contacts fitted\"\n";
  s += "tap \"not-planar\"\nwait 2\n";  // a row of the list opens its flag
  s += "expect \"Action:\"\n";
  {
    const auto r = gui(project, s);  // on a worker, as always in use
    ASSERT_EQ(r.status, 0) << r.err;
  }
  ScopedEnv in_the_frame("CAIRN_BUILD_IN_FRAME", "1");
  const auto r = gui(project, s);
  ASSERT_EQ(r.status, 0) << r.err;
}

TEST_F(UiTest, AFileThatIsNotAProjectEndsTheUiWithItsReason) {
  const std::string path = file("notes.cairn");
  std::ofstream(path) << "field notes, not a database\n";
  const auto r = gui(path, "wait 3\nexpect \"Logbook\"\n");
  EXPECT_EQ(r.status, 1) << r.err;
  EXPECT_NE(r.err.find("notes.cairn cannot be read (file is not a database)"), std::string::npos) << r.err;
}
