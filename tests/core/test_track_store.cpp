// The day track in the project file: fixes stored and listed by person and
// day in time order; a fix outside WGS84's ranges is refused and nothing is
// written.
//
// Source: WGS84 coordinate ranges (latitude -90..90, longitude
// -180..180); ISO 8601 UTC times, whose text order is their time order (ISO
// 8601-1:2019, fixed-width extended format).
#include <gtest/gtest.h>

#include <cstdlib>

#include "app/core/export.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "storage/track.h"
#include "tests/storage/storage_test_util.h"

using namespace cairn::store;
using namespace cairn::core;
using cairn::store::testing::quiet;
using cairn::store::testing::TempDir;

TEST(TrackStore, FixesAreListedByPersonAndDayInTimeOrderAndBadOnesAreRefused) {
  TempDir dir;
  Project p = Project::create(dir.file("t.cairn"), NewProject{"track", "33N", North::True, 0}, quiet());
  add_track_point(p, {"ada", "2026-07-06T10:00:10Z", 46.5, 14.2, 1200.0, 3.0});
  add_track_point(p, {"ada", "2026-07-06T09:59:00Z", 46.4, 14.1, std::nullopt, std::nullopt});
  add_track_point(p, {"bo", "2026-07-06T10:00:00Z", 46.6, 14.3, std::nullopt, 5.0});
  add_track_point(p, {"ada", "2026-07-07T08:00:00Z", 46.7, 14.4, std::nullopt, std::nullopt});
  const auto day = list_track(p, "ada", "2026-07-06");
  ASSERT_EQ(day.size(), 2u);
  EXPECT_EQ(day[0].time, "2026-07-06T09:59:00Z");  // time order, not insertion order
  EXPECT_EQ(day[1].lat, 46.5);
  EXPECT_EQ(day[1].elevation, 1200.0);
  EXPECT_EQ(list_track(p).size(), 4u);
  EXPECT_EQ(list_track(p, "", "2026-07-06").size(), 3u);
  EXPECT_THROW(add_track_point(p, {"ada", "2026-07-06T11:00:00Z", 91.0, 14.2, std::nullopt, std::nullopt}),
               ValidationError);
  EXPECT_THROW(add_track_point(p, {"ada", "2026-07-06T11:00:00Z", 46.0, 181.0, std::nullopt, std::nullopt}),
               ValidationError);
  EXPECT_THROW(add_track_point(p, {"ada", "2026-07-06T11:00:00Z", 46.0, 14.0, std::nullopt, -1.0}), ValidationError);
  EXPECT_EQ(list_track(p).size(), 4u);
}

// `cairn export FILE OUT.gpx`: one GPX 1.1 track per person and day, read back
// by libxml2's xmllint (Debian libxml2-utils): well-formed, the points counted.
TEST(TrackStore, DayTracksExportAsOneGpxTrackPerPersonAndDay) {
  ASSERT_EQ(std::system("command -v xmllint >/dev/null 2>&1"), 0)
      << "xmllint is missing: scripts/install-deps.sh --test";
  TempDir dir;
  Project p = Project::create(dir.file("t.cairn"), NewProject{"track", "33N", North::True, 0}, quiet());
  Person who;
  who.name = "Ada Quarry";
  who.initials = "AQ";
  const std::string aq = add(p, who);
  add_track_point(p, {aq, "2026-07-06T10:00:00Z", 46.5, 14.2, 1200.0, 3.0});
  add_track_point(p, {aq, "2026-07-06T10:05:00Z", 46.501, 14.2, std::nullopt, 3.0});
  add_track_point(p, {aq, "2026-07-07T08:00:00Z", 46.6, 14.3, std::nullopt, std::nullopt});
  const std::string out = dir.file("day.gpx");
  const ExportSummary s = export_project(p, out);
  EXPECT_EQ(s.format, ExportFormat::Gpx);
  EXPECT_EQ(std::system(("xmllint --noout '" + out + "'").c_str()), 0);
  auto xpath = [&](const std::string& expr) {
    const std::string cmd = "xmllint --xpath \"" + expr + "\" '" + out + "' > '" + dir.file("x.txt") + "' 2>/dev/null";
    EXPECT_EQ(std::system(cmd.c_str()), 0) << expr;
    std::string v = cairn::store::testing::read_file(dir.file("x.txt"));
    while (!v.empty() && (v.back() == '\n' || v.back() == ' ')) v.pop_back();
    return v;
  };
  EXPECT_EQ(xpath("count(//*[local-name()='trk'])"), "2");
  EXPECT_EQ(xpath("count(//*[local-name()='trkpt'])"), "3");
  EXPECT_EQ(xpath("string(//*[local-name()='trk'][1]/*[local-name()='name'])"), "AQ 2026-07-06");
}
