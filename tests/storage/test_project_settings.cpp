// The project's settings row: the nearby radius (schema version 4) and the
// screening settings (friction angle, sliding and toppling windows) are stored,
// validated before anything is written (SQLite documentation, "CHECK
// constraints", backs the same rule in the file), and default to 0 (off), 30,
// 20 (Hoek & Bray) and 30 (Goodman & Bray, 1976) degrees. A planar reading's
// repeat_of names a reading of the same kind at the same station.
#include <gtest/gtest.h>

#include <filesystem>
#include <unistd.h>

#include "storage/project.h"
#include "storage/repository.h"
#include "storage/schema.h"

using namespace cairn::store;

TEST(ProjectSettings, NearbyRadiusIsStoredAndValidated) {
  const auto dir = std::filesystem::temp_directory_path() / ("cairn-settings-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string path = (dir / "s.cairn").string();
  OpenOptions o;
  o.backups = false;
  {
    Project p = Project::create(path, NewProject{"S", "8N", North::True, 0}, o);
    EXPECT_EQ(p.schema_version(), kSchemaVersion);
    ProjectInfo i = p.info();
    EXPECT_EQ(i.nearby_radius, 0);  // off unless asked for
    i.nearby_radius = 250;
    p.update_info(i);
    i.nearby_radius = -1;
    try {
      p.update_info(i);
      ADD_FAILURE() << "a negative radius was accepted";
    } catch (const ValidationError& e) {
      EXPECT_EQ(e.field(), "nearby_radius");
      EXPECT_EQ(e.rule(), "nearby-range");
    }
    // The file's own CHECK refuses it too, whatever the code above does.
    EXPECT_THROW(p.db().exec("UPDATE project SET nearby_radius = -5"), std::exception);
  }
  OpenOptions ro;
  ro.read_only = true;
  Project again = Project::open(path, ro);
  EXPECT_EQ(again.info().nearby_radius, 250);
  std::filesystem::remove_all(dir);
}

TEST(ProjectSettings, ScreeningSettingsAndRepeatsAreStoredAndValidated) {
  const auto dir = std::filesystem::temp_directory_path() / ("cairn-settings5-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string path = (dir / "s.cairn").string();
  OpenOptions o;
  o.backups = false;
  {
    Project p = Project::create(path, NewProject{"S", "8N", North::True, 0}, o);
    ProjectInfo i = p.info();
    EXPECT_EQ(i.friction_angle, 30);
    EXPECT_EQ(i.sliding_window, 20);
    EXPECT_EQ(i.toppling_window, 30);
    i.friction_angle = 35;
    i.toppling_window = 10;
    p.update_info(i);
    i.toppling_window = 0;
    try {
      p.update_info(i);
      ADD_FAILURE() << "a zero window was accepted";
    } catch (const ValidationError& e) {
      EXPECT_EQ(e.field(), "toppling_window");
    }
    EXPECT_THROW(p.db().exec("UPDATE project SET friction_angle = 95"), std::exception);
    // Repeats: of the same kind at the same station only.
    Station s;
    s.code = "S1";
    s.lat = 61.2;
    s.lon = -135.6;
    add(p, s);
    PlanarReading first;
    first.station = s.meta.uuid;
    first.kind = PlaneKind::Bedding;
    first.typed = "030/40";
    first.notation = PlaneNotation::StrikeDip;
    first.ref = "A";
    add(p, first);
    PlanarReading again = first;
    again.meta = {};
    again.ref = "B";
    again.typed = "031/41";
    again.repeat_of = first.meta.uuid;
    add(p, again);
    EXPECT_EQ(get_plane(p, again.meta.uuid)->repeat_of, first.meta.uuid);
    PlanarReading joint = again;
    joint.meta = {};
    joint.ref = "C";
    joint.kind = PlaneKind::Joint;
    try {
      add(p, joint);
      ADD_FAILURE() << "a joint was accepted as a repeat of bedding";
    } catch (const ValidationError& e) {
      EXPECT_EQ(e.field(), "repeat_of");
      EXPECT_EQ(e.rule(), "repeat-mismatch");
    }
  }
  OpenOptions ro;
  ro.read_only = true;
  Project again = Project::open(path, ro);
  EXPECT_EQ(again.info().friction_angle, 35);
  EXPECT_EQ(again.info().toppling_window, 10);
  std::filesystem::remove_all(dir);
}
