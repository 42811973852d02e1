// The Logbook with more stations than fit on the screen: a finger drag scrolls
// the list (and is not taken as a tap on the row it started on), and a tap on a
// station then opens its Station sheet. Stations are listed by day and, within
// a day, by time (ISO 8601 times of one day sort in time order as text: the
// standard's fixed-width fields). Drag-to-scroll is common practice for touch
// lists, no published source.
#include "storage/repository.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

TEST_F(UiTest, DragScrollsTheLogbookAndATapOpensAStation) {
  const std::string path = file("many.cairn");
  {
    store::Project p = store::Project::create(path, store::NewProject{"Many", "8N", store::North::True, 0.0}, quiet());
    p.write([&] {
      for (int i = 1; i <= 40; ++i) {
        store::Station s;
        s.code = "S" + std::to_string(i);
        s.lat = 61.2 + i * 1e-4;
        s.lon = -135.6;
        char t[40];
        std::snprintf(t, sizeof t, "2026-07-05T%02d:%02d:00-07:00", 8 + i / 6, (i % 6) * 10);
        s.time = t;
        store::add(p, s);
      }
    });
  }
  std::string s = "wait 3\n";
  s += "expect \"S1   08:10\"\n";
  // Five drags upward over the list, each starting on a station row.
  for (int i = 0; i < 5; ++i) s += "drag 600 680 600 330\n";
  s += "expect \"+ New station\"\n";  // still the Logbook: the drags were not taps
  s += "tap \"S40\"\n";               // only a target on screen can be tapped
  s += "wait-for \"Station S40\"\n";
  const auto r = gui(path, s);
  ASSERT_EQ(r.status, 0) << r.err;
}
