// Layouts that fit: every screen of the touch UI on the bundled demo at four
// common tablet sizes (1280x800, 800x1280, 1024x600, 1920x1200), each at 1x,
// 1.5x and 2x display density (96, 144 and 192 dpi), on a virtual display (tests/tools/xvfb-do). After
// each screen the event script's `expect-fit` asks Dear ImGui's own
// measurements whether any widget lies outside the window, is cut by the edge
// of the region it is drawn in, or has a label wider than the widget leaves
// room for (app/ui/widgets.h, layout_problems). No pixel is guessed from a
// picture.
//
// Outside sources named beside the checks:
//  - source: Dear ImGui 1.86 measures every rectangle and text width the check
//    compares (ImGui::GetItemRectMin/Max, ImGui::CalcTextSize); the project
//    computes none of them;
//  - the screen sizes are common tablet resolutions (WXGA 1280x800 landscape
//    and portrait, WSVGA 1024x600, WUXGA 1920x1200: the VESA display names),
//    and 96 dpi is the usual reference density that 1.5x and 2x scale.
#include <filesystem>
#include <fstream>

#include "tests/app/ui_test_support.h"

using cairn::ui_test::UiTest;

namespace {

struct Size {
  int w, h;
};

// Every screen and the states that change its layout, with a layout check
// after each. The navigation is always on screen; a button inside a screen may
// be scrolled out of sight at 1.5x and 2x density (the screen scrolls), so
// there the tour taps it only when it shows (tap-if); at 1x it must show.
std::string tour(bool all_in_sight) {
  std::string s = "wait 3\nwait-idle\nwait 2\nexpect-fit\n";  // Logbook
  auto nav = [&](const std::string& label) { s += "tap \"" + label + "\"\nwait 3\nexpect-fit\n"; };
  auto in_screen = [&](const std::string& label) {
    s += std::string(all_in_sight ? "tap" : "tap-if") + " \"" + label + "\"\nwait 3\nexpect-fit\n";
  };
  nav("Station sheet");
  in_screen("Type position");  // the position keypad
  nav("Reading pad");
  in_screen("line");
  in_screen("rake");
  nav("Net");
  in_screen("Kamb contours");  // the contours' key
  in_screen("statistics");     // the statistics panel
  nav("Plan");
  nav("Camp");
  nav("Review");
  in_screen("Unlock reviewing");
  in_screen("Days");
  in_screen("Audit trail");
  nav("Crosscheck");
  in_screen("not-planar");  // a flag opened (the second in the list)
  return s;
}

class UiLayout : public UiTest, public ::testing::WithParamInterface<Size> {};

}  // namespace

TEST_P(UiLayout, EveryScreenFitsAtEveryDensity) {
  const Size sz = GetParam();
  const std::string project = file("camp.cairn");
  std::filesystem::copy_file(std::string(CAIRN_SOURCE_DIR) + "/demo_project/camp.cairn", project);
  for (int dpi : {96, 144, 192}) {
    std::ofstream(file("tour.txt")) << tour(dpi == 96);
    const std::string size = std::to_string(sz.w) + "x" + std::to_string(sz.h);
    const std::string cmd = "cd '" + dir_.string() + "' && " + cairn::ui_test::xvfb_run("2000x1400x24") + " '" +
                            std::string(CAIRN_BINARY) +
                            "' gui camp.cairn --no-gps --person MT --station MT-01 --size " + size + " --dpi " +
                            std::to_string(dpi) + " --script tour.txt >gui-out.txt 2>gui-err.txt";
    const int rc = std::system(cmd.c_str());
    EXPECT_TRUE(WIFEXITED(rc) && WEXITSTATUS(rc) == 0) << size << " at " << dpi << " dpi:\n"
                                                       << cairn::ui_test::slurp(file("gui-err.txt"));
  }
  // The Open screen (no project yet), at the same size.
  std::ofstream(file("open.txt")) << "wait 3\nexpect-fit\n";
  for (int dpi : {96, 144, 192}) {
    const std::string size = std::to_string(sz.w) + "x" + std::to_string(sz.h);
    const std::string cmd = "cd '" + dir_.string() + "' && " + cairn::ui_test::xvfb_run("2000x1400x24") + " '" +
                            std::string(CAIRN_BINARY) + "' gui --no-gps --size " + size + " --dpi " +
                            std::to_string(dpi) + " --script open.txt >gui-out.txt 2>gui-err.txt";
    const int rc = std::system(cmd.c_str());
    EXPECT_TRUE(WIFEXITED(rc) && WEXITSTATUS(rc) == 0) << "Open screen, " << size << " at " << dpi << " dpi:\n"
                                                       << cairn::ui_test::slurp(file("gui-err.txt"));
  }
}

INSTANTIATE_TEST_SUITE_P(TabletSizes, UiLayout,
                         ::testing::Values(Size{1280, 800}, Size{800, 1280}, Size{1024, 600}, Size{1920, 1200}),
                         [](const ::testing::TestParamInfo<Size>& i) {
                           return "w" + std::to_string(i.param.w) + "h" + std::to_string(i.param.h);
                         });
