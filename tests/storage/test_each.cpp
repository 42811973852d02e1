// Records one at a time (storage/each.h): the same records, in the same order,
// as the SQL the sqlite3 shell runs on the file.
// Source: the sqlite3 shell (Debian's sqlite3) answering the SELECTs of
// storage/SCHEMA.md's tables: live rows are those with deleted NULL, ordered by
// created and then insertion order (rowid), or by UUID in byte order.
#include <gtest/gtest.h>

#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "storage/each.h"
#include "storage/repository.h"
#include "tests/storage/storage_test_util.h"

using namespace cairn::store;
using cairn::store::testing::TempDir;

namespace {

// What the sqlite3 shell prints for SQL on PATH, one line per row.
std::vector<std::string> shell(const std::string& path, const std::string& sql) {
  const std::string cmd = "sqlite3 -readonly '" + path + "' \"" + sql + "\"";
  std::vector<std::string> rows;
  FILE* f = popen(cmd.c_str(), "r");
  if (!f) return rows;
  char buf[256];
  while (fgets(buf, sizeof buf, f)) {
    std::string s(buf);
    if (!s.empty() && s.back() == '\n') s.pop_back();
    rows.push_back(s);
  }
  EXPECT_EQ(pclose(f), 0) << cmd;
  return rows;
}

}  // namespace

TEST(Each, CursorsGiveWhatTheSqlite3ShellSelects) {
  TempDir dir;
  const std::string path = dir.file("each.cairn");
  Project p = Project::create(path, NewProject{"Each", "33N", North::True, 0.0}, cairn::store::testing::quiet());
  // Stations with the same created time and UUIDs out of byte order: insertion
  // order and UUID order differ.
  const char* uuids[] = {"c0000000-0000-4000-8000-000000000000", "a0000000-0000-4000-8000-000000000000",
                         "b0000000-0000-4000-8000-000000000000"};
  for (int i = 0; i < 3; ++i) {
    Station s;
    s.meta.uuid = uuids[i];
    s.meta.created = s.meta.updated = "2025-06-14T10:00:00Z";
    s.code = "S" + std::to_string(i);
    s.lat = 46.5 + 0.001 * i;
    s.lon = 14.25;
    add(p, s);
  }
  std::string dropped;
  for (int i = 0; i < 5; ++i) {
    PlanarReading r;
    r.station = uuids[i % 2];
    r.typed = std::to_string(100 + i) + "/30";
    r.notation = PlaneNotation::StrikeDip;
    const std::string u = add(p, r);
    if (i == 2) dropped = u;
  }
  soft_delete(p, Kind::Plane, dropped);

  std::vector<std::string> got;
  for_each_station(p, {}, [&](const Station& s) { got.push_back(s.meta.uuid); });
  EXPECT_EQ(got, shell(path, "SELECT uuid FROM stations WHERE deleted IS NULL ORDER BY created, rowid"));
  got.clear();
  for_each_station(
      p, {}, [&](const Station& s) { got.push_back(s.meta.uuid); }, Ties::Uuid);
  EXPECT_EQ(got, shell(path, "SELECT uuid FROM stations WHERE deleted IS NULL ORDER BY created, uuid"));
  EXPECT_EQ(got.front(), uuids[1]);

  got.clear();
  for_each_plane(p, {}, [&](const PlanarReading& r) { got.push_back(r.meta.uuid); });
  EXPECT_EQ(got, shell(path, "SELECT uuid FROM planes WHERE deleted IS NULL ORDER BY created, rowid"));
  EXPECT_EQ(got.size(), 4u);
  ListOptions all;
  all.include_deleted = true;
  got.clear();
  for_each_plane(p, all, [&](const PlanarReading& r) { got.push_back(r.meta.uuid); });
  EXPECT_EQ(got, shell(path, "SELECT uuid FROM planes ORDER BY created, rowid"));
  ListOptions one;
  one.station = uuids[0];
  got.clear();
  for_each_plane(p, one, [&](const PlanarReading& r) { got.push_back(r.meta.uuid); });
  EXPECT_EQ(got, shell(path, std::string("SELECT uuid FROM planes WHERE deleted IS NULL AND station = '") + uuids[0] +
                                 "' ORDER BY created, rowid"));

  EXPECT_EQ(std::to_string(count_stations(p)), shell(path, "SELECT count(*) FROM stations WHERE deleted IS NULL")[0]);
  EXPECT_EQ(std::to_string(count_planes(p)), shell(path, "SELECT count(*) FROM planes WHERE deleted IS NULL")[0]);
  EXPECT_EQ(std::to_string(count_planes(p, all)), shell(path, "SELECT count(*) FROM planes")[0]);
  EXPECT_EQ(std::to_string(count_planes(p, one)),
            shell(path, std::string("SELECT count(*) FROM planes WHERE deleted IS NULL AND station = '") + uuids[0] +
                            "'")[0]);
  EXPECT_EQ(count_lines(p), 0u);
  EXPECT_EQ(count_points(p), 0u);

  // Readings per station, planar and linear together, deleted ones left out.
  LinearReading l;
  l.station = uuids[0];
  l.kind = LineKind::Lineation;
  l.typed = "045/10";
  add(p, l);
  std::vector<std::string> per;
  for (const auto& [station, n] : readings_per_station(p)) per.push_back(station + "|" + std::to_string(n));
  std::sort(per.begin(), per.end());
  EXPECT_EQ(per, shell(path,
                       "SELECT station, count(*) FROM (SELECT station FROM planes WHERE deleted IS NULL UNION ALL "
                       "SELECT station FROM lines WHERE deleted IS NULL) GROUP BY station ORDER BY station"));
  EXPECT_EQ(per.size(), 2u);  // the third station has no reading
}
