// Photos on the touch UI, on a copy of the bundled demo: the Station sheet shows
// a station's photo as a thumbnail, a tap enlarges it and Close photo closes it;
// the Camp screen's Photos action matches tablet A's folder of photos to RO's
// stations with the camera's clock offset and records them on confirmation.
// Source: the demo's photos (demo_project/README.md: IMG_0101 … IMG_0111 taken
// at RO-01 … RO-11 by a camera 2 min 10 s behind, IMG_0112 at camp in the
// evening, matching no station), their EXIF as exiftool reads it
// (tests/reference/test_demo.py); the layout rule of the issue (no widget
// outside the window, no label wider than its widget).
#include <filesystem>

#include "storage/repository.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;
namespace fs = std::filesystem;

namespace {

void copy_demo(const fs::path& to) {
  const fs::path demo = fs::path(CAIRN_SOURCE_DIR) / "demo_project";
  for (const char* f : {"camp.cairn", "tablet-a.cairn"}) fs::copy_file(demo / f, to / f);
  fs::copy(demo / "photos", to / "photos", fs::copy_options::recursive);
}

}  // namespace

TEST_F(UiTest, StationSheetThumbnailEnlargesAndCloses) {
  copy_demo(dir_);
  std::string s = "wait 3\n";
  s += "expect \"photo photos/IMG_0101.JPG\"\n";
  s += "expect-fit\n";
  s += "tap \"photo photos/IMG_0101.JPG\"\n";
  s += "wait 2\n";
  s += "expect \"Close photo\"\n";
  s += "expect \"RO-01   photos/IMG_0101.JPG   2026-07-06T10:44:00\"\n";
  s += "expect-fit\n";
  s += "tap \"Close photo\"\n";
  s += "wait 2\n";
  s += "expect-not \"Close photo\"\n";
  const auto r = gui(file("camp.cairn"), s, "--no-gps --view station --station RO-01");
  ASSERT_EQ(r.status, 0) << r.err;
}

TEST_F(UiTest, CampPhotosMatchesThenRecords) {
  copy_demo(dir_);
  std::string s = "wait 3\n";
  s += "tap \"Camp\"\nwait 2\n";
  s += "drag 300 650 300 150\nwait 5\nwait-for \"Find stations for photos\"\n";  // a finger scrolls the left column up
  s += "tap \"clock offset\"\n";
  s += "type \"+00:02:10\"\n";
  s += "tap \"Find stations for photos\"\n";
  s += "wait-for \"photos/IMG_0101.JPG -> RO-01\" 60\n";
  s += "expect \"photos/IMG_0112.JPG: not matched: no station's time window\"\n";
  s += "drag 300 650 300 150\nwait 5\nwait-for \"Record 11 photos\"\n";
  s += "tap \"Record 11 photos\"\n";
  s += "wait-for \"recorded 11 photos, 0 already there\" 60\n";
  const auto r = gui(file("tablet-a.cairn"), s, "--no-gps --person RO");
  ASSERT_EQ(r.status, 0) << r.err;
  store::Project p = store::Project::open(file("tablet-a.cairn"), quiet());
  const auto photos = store::list_photos(p);
  ASSERT_EQ(photos.size(), 11u);
  EXPECT_EQ(store::get_station(p, photos[0].station)->code, "RO-01");
}
