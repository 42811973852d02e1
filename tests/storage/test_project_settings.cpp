// The project's settings row: the nearby radius (schema version 4) is stored,
// validated before anything is written (SQLite documentation, "CHECK
// constraints", backs the same rule in the file), and defaults to 0 (off).
#include <gtest/gtest.h>

#include <filesystem>
#include <unistd.h>

#include "storage/project.h"
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
