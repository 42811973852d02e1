// The UI's model of an open project (app/ui/model.h): a change is written at
// once, and the records it shows are read back on a worker; until they are
// (stale) and while the file's integrity check runs (checking), no change can
// be made, because a change built on an older record would write that
// record's older fields back (storage's update rewrites every field).
// Source: the rule above is the project's own (no published source); what is
// in the file is read through SQLite itself (the sqlite3 shell's counts).
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <string>

#include "app/ui/model.h"
#include "storage/each.h"
#include "storage/repository.h"

using namespace cairn;

namespace {

struct TempFolder {
  std::filesystem::path dir;
  TempFolder() {
    std::string t = (std::filesystem::temp_directory_path() / "cairn-model-XXXXXX").string();
    if (mkdtemp(t.data())) dir = t;
  }
  ~TempFolder() { std::filesystem::remove_all(dir); }
};

store::OpenOptions quiet() {
  store::OpenOptions o;
  o.backups = false;
  return o;
}

// Live stations in the file, counted by the sqlite3 shell.
int stations_in(const std::string& path) {
  const std::string cmd = "sqlite3 -readonly '" + path + "' 'SELECT count(*) FROM stations WHERE deleted IS NULL'";
  FILE* f = popen(cmd.c_str(), "r");
  int n = -1;
  if (f && std::fscanf(f, "%d", &n) != 1) n = -1;
  if (f) pclose(f);
  return n;
}

store::Station station(const std::string& code) {
  store::Station s;
  s.code = code;
  s.lat = 46.5;
  s.lon = 14.25;
  return s;
}

// The records as a fresh read-only connection reads them (what App::read_again does).
std::shared_ptr<const ui::Records> read_back(const std::string& path) {
  store::OpenOptions o = quiet();
  o.read_only = true;
  store::Project p = store::Project::open(path, o);
  return ui::Records::read(p);
}

// A new project file in T with one station, S1.
std::string project_with_one_station(const TempFolder& t, const std::string& name) {
  const std::string path = (t.dir / name).string();
  store::Project p = store::Project::create(path, store::NewProject{"M", "33N", store::North::True, 0.0}, quiet());
  store::Station s = station("S1");
  store::add(p, s);
  return path;
}

}  // namespace

TEST(Model, AChangeIsReadBackBeforeTheNextOne) {
  TempFolder t;
  const std::string path = project_with_one_station(t, "m.cairn");
  store::Project p = store::Project::open(path, quiet());
  auto first = ui::Records::read(p);
  ui::Model m(std::move(p), first);
  const auto rev = m.revision();
  ASSERT_TRUE(m.writable());

  std::string err;
  store::Station s2 = station("S2");
  ASSERT_TRUE(m.act(
      "new station S2", [&](store::Project& q) { store::add(q, s2); }, &err))
      << err;
  EXPECT_EQ(stations_in(path), 2);  // written at once
  EXPECT_TRUE(m.stale());
  EXPECT_FALSE(m.writable());
  EXPECT_EQ(m.stations().size(), 1u);  // the screens keep the last records meanwhile
  EXPECT_EQ(m.revision(), rev);

  // No second change, no undo, until the records show the first.
  store::Station s3 = station("S3");
  EXPECT_FALSE(m.act(
      "new station S3", [&](store::Project& q) { store::add(q, s3); }, &err));
  EXPECT_NE(err.find("still being read back"), std::string::npos) << err;
  EXPECT_FALSE(m.undo(&err));
  EXPECT_EQ(stations_in(path), 2);

  // Records read before the change are not taken.
  m.refreshed(first, m.changes() - 1);
  EXPECT_TRUE(m.stale());
  m.refreshed(read_back(path), m.changes());
  EXPECT_FALSE(m.stale());
  EXPECT_TRUE(m.writable());
  EXPECT_EQ(m.stations().size(), 2u);
  EXPECT_NE(m.revision(), rev);

  // Undo is a change like any other.
  ASSERT_TRUE(m.undo(&err)) << err;
  EXPECT_EQ(stations_in(path), 1);
  EXPECT_TRUE(m.stale());
  m.refreshed(read_back(path), m.changes());
  EXPECT_EQ(m.stations().size(), 1u);
}

TEST(Model, NothingIsWrittenWhileTheFileIsChecked) {
  TempFolder t;
  const std::string path = project_with_one_station(t, "c.cairn");
  store::OpenOptions ro = quiet();
  ro.read_only = true;
  ro.integrity_checked = true;
  store::Project shown = store::Project::open(path, ro);
  auto rec = ui::Records::read_first(shown);
  ui::Model m(std::move(shown), rec, true);
  EXPECT_TRUE(m.checking());
  EXPECT_FALSE(m.writable());
  std::string err;
  store::Station s2 = station("S2");
  EXPECT_FALSE(m.act(
      "new station S2", [&](store::Project& q) { store::add(q, s2); }, &err));
  EXPECT_NE(err.find("still being checked"), std::string::npos) << err;
  EXPECT_EQ(stations_in(path), 1);
  const auto rev = m.revision();
  m.checked(store::Project::open(path, quiet()));  // the writable opening, its quick check passed
  EXPECT_FALSE(m.checking());
  EXPECT_TRUE(m.writable());
  EXPECT_EQ(m.revision(), rev);  // the same state of the file
  ASSERT_TRUE(m.act(
      "new station S2", [&](store::Project& q) { store::add(q, s2); }, &err))
      << err;
  EXPECT_EQ(stations_in(path), 2);
}

// Planar and linear readings live at S1 and S2 in the sqlite3 shell's count;
// the first part of the records knows them per station, whether they were
// counted through the same connection or through another one beside it.
TEST(Model, TheFirstPartCountsTheReadingsPerStationEitherWay) {
  TempFolder t;
  const std::string path = project_with_one_station(t, "n.cairn");
  {
    store::Project p = store::Project::open(path, quiet());
    store::Station s2 = station("S2");
    const std::string s2_id = store::add(p, s2);
    const std::string s1_id = store::find_station(p, "S1")->meta.uuid;
    for (const auto& [at, typed] : {std::pair{s1_id, "090/40"}, {s1_id, "100/45"}, {s2_id, "010/20"}}) {
      store::PlanarReading r;
      r.station = at;
      r.typed = typed;
      r.notation = store::PlaneNotation::StrikeDip;
      store::add(p, r);
    }
    store::PlanarReading gone;
    gone.station = s2_id;
    gone.typed = "200/10";
    gone.notation = store::PlaneNotation::StrikeDip;
    store::soft_delete(p, store::Kind::Plane, store::add(p, gone));  // deleted: not counted
    store::LinearReading l;
    l.station = s2_id;
    l.typed = "30/12";
    store::add(p, l);
  }
  auto shell_count = [&](const std::string& code) {
    const std::string q =
        "SELECT (SELECT count(*) FROM planes p WHERE p.station = s.uuid AND p.deleted IS NULL) + "
        "(SELECT count(*) FROM lines l WHERE l.station = s.uuid AND l.deleted IS NULL) "
        "FROM stations s WHERE s.code = '" +
        code + "'";
    FILE* f = popen(("sqlite3 -readonly '" + path + "' \"" + q + "\"").c_str(), "r");
    int n = -1;
    if (f && std::fscanf(f, "%d", &n) != 1) n = -1;
    if (f) pclose(f);
    return static_cast<size_t>(n);
  };
  store::OpenOptions ro = quiet();
  ro.read_only = true;
  store::Project here = store::Project::open(path, ro);
  auto same = ui::Records::read_first(here);
  auto beside = ui::Records::read_first(here, [&] {
    store::Project other = store::Project::open(path, ro);
    return store::readings_per_station(other);
  });
  for (const char* code : {"S1", "S2"}) {
    const std::string id = store::find_station(here, code)->meta.uuid;
    EXPECT_EQ(same->readings_at(id), shell_count(code)) << code;
    EXPECT_EQ(beside->readings_at(id), shell_count(code)) << code;
  }
  EXPECT_EQ(shell_count("S1"), 2u);
  EXPECT_EQ(shell_count("S2"), 2u);
}
