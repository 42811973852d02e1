// Shared by the merge tests: a camp file with a small legend, tablets copied
// from it (as a field camp hands out copies of the camp file each morning),
// and an exact dump of a project file for record-for-record comparisons.
// It holds no checks of its own: the merge tests name their outside sources
// (the SQLite documentation, the GeoPackage standard, Snyder (1987)).
#pragma once
#include <sqlite3.h>

#include <chrono>
#include <cstdio>
#include <algorithm>
#include <filesystem>
#include <iterator>
#include <string>
#include <thread>
#include <vector>

#include "storage/merge.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "storage/sqlite.h"
#include "storage_test_util.h"

namespace cairn::store::testing {

// Device ids of the invented camp computer and tablets.
inline const char* const kCampDevice = "c0000000-0000-4000-8000-000000000001";
inline const char* const kTabletA = "a0000000-0000-4000-8000-00000000000a";
inline const char* const kTabletB = "b0000000-0000-4000-8000-00000000000b";
inline const char* const kTabletC = "d0000000-0000-4000-8000-00000000000c";

inline OpenOptions device(const std::string& id, const std::string& name, const std::string& person = "") {
  OpenOptions o;
  o.backups = false;
  o.device_id = id;
  o.device_name = name;
  o.person = person;
  return o;
}

// Timestamps have millisecond resolution; a short pause makes "newer" certain.
inline void tick() { std::this_thread::sleep_for(std::chrono::milliseconds(3)); }

struct Legend {
  std::string unit_a, unit_b, contact, station, plane, person_a, person_b;
};

// A camp file: two units, a contact, two people, station S1 with one bedding reading.
inline Legend make_camp(const std::string& path) {
  Project p =
      Project::create(path, NewProject{"Quartz Gully", "33N", North::True, 3.0}, device(kCampDevice, "camp laptop"));
  Legend l;
  Person a;
  a.name = "Ana Example";
  a.initials = "AE";
  l.person_a = add(p, a);
  Person b;
  b.name = "Bo Sample";
  b.initials = "BS";
  l.person_b = add(p, b);
  Unit u1;
  u1.code = "Gs";
  u1.name = "grey slate";
  u1.age_rank = 1;
  l.unit_a = add(p, u1);
  Unit u2;
  u2.code = "Wq";
  u2.name = "white quartzite";
  u2.age_rank = 2;
  l.unit_b = add(p, u2);
  Contact c;
  c.name = "slate-quartzite";
  c.lower_unit = l.unit_a;
  c.upper_unit = l.unit_b;
  l.contact = add(p, c);
  Station s;
  s.code = "S1";
  s.lat = 46.5;
  s.lon = 14.9;
  s.elevation = 1200;
  s.unit = l.unit_a;
  s.observer = l.person_a;
  s.notes = "spur";
  l.station = add(p, s);
  PlanarReading r;
  r.station = l.station;
  r.kind = PlaneKind::Bedding;
  r.measured_strike = 120;
  r.measured_dip = 35;
  r.ref = "P1";
  l.plane = add(p, r);
  return l;
}

inline void copy_file(const std::string& from, const std::string& to) {
  std::filesystem::copy_file(from, to, std::filesystem::copy_options::overwrite_existing);
}

// Every row of every table that holds records, audit rows, conflicts and code
// clashes, sorted, with reals printed to 17 significant digits (exact for
// IEEE doubles). `merges` (a log of when merges ran), the time a conflict
// was found and a fix's row id (the order it came in) are left out: they say
// when, not what.
inline std::string dump(const std::string& path) {
  Db db(path, SQLITE_OPEN_READONLY);
  std::string out;
  const std::vector<std::string> tables = {"devices",   "people",          "units",       "contacts",     "stations",
                                           "planes",    "lines",           "points",      "photos",       "audit",
                                           "conflicts", "conflict_values", "key_clashes", "track_points", "pick_lists"};
  for (const auto& t : tables) {
    std::vector<std::string> cols;
    {
      Stmt s(db, "SELECT name FROM pragma_table_info(?) ORDER BY cid");
      s.bind(1, t);
      while (s.step())
        if (s.text(0) != "found_at" && !(t == "track_points" && s.text(0) == "id")) cols.push_back(s.text(0));
    }
    std::string sel;
    for (const auto& c : cols) sel += (sel.empty() ? "" : ", ") + std::string("typeof(\"") + c + "\"), \"" + c + "\"";
    Stmt s(db, "SELECT " + sel + " FROM " + t + " ORDER BY 2, 4, 6");
    std::vector<std::string> rows;
    while (s.step()) {
      std::string row = t + ":";
      for (size_t i = 0; i < cols.size(); ++i) {
        const int k = static_cast<int>(2 * i);
        const std::string type = s.text(k);
        row += " " + cols[i] + "=";
        if (type == "real") {
          char buf[40];
          std::snprintf(buf, sizeof buf, "%.17g", s.real(k + 1));
          row += buf;
        } else if (type == "null") {
          row += "NULL";
        } else {
          row += type + ":" + s.text(k + 1);
        }
      }
      rows.push_back(row);
    }
    std::sort(rows.begin(), rows.end());
    for (const auto& r : rows) out += r + "\n";
  }
  return out;
}

// A camp file in a private folder, and tablets copied from it.
struct Camp {
  TempDir dir;
  std::string camp = dir.file("camp.cairn");
  Legend legend = make_camp(camp);
  std::string tablet(const std::string& name) {
    const std::string path = dir.file(name);
    copy_file(camp, path);
    return path;
  }
  std::string copy(const std::string& from, const std::string& name) {
    const std::string path = dir.file(name);
    copy_file(from, path);
    return path;
  }
};

inline MergeReport merge_into(const std::string& target, const std::vector<std::string>& sources,
                              const MergeOptions& o = {}) {
  Project p = Project::open(target, device(kCampDevice, "camp laptop"));
  return merge_files(p, sources, o);
}

// The lines of one dump missing from the other, for short failure messages.
inline std::string dump_difference(const std::string& a, const std::string& b) {
  auto lines = [](const std::string& t) {
    std::vector<std::string> v;
    size_t i = 0;
    while (i < t.size()) {
      const size_t j = t.find('\n', i);
      v.push_back(t.substr(i, j - i).substr(0, 400));
      i = j == std::string::npos ? t.size() : j + 1;
    }
    std::sort(v.begin(), v.end());
    return v;
  };
  const auto x = lines(a), y = lines(b);
  std::vector<std::string> only_a, only_b;
  std::set_difference(x.begin(), x.end(), y.begin(), y.end(), std::back_inserter(only_a));
  std::set_difference(y.begin(), y.end(), x.begin(), x.end(), std::back_inserter(only_b));
  std::string out;
  for (const auto& l : only_a) out += "- " + l + "\n";
  for (const auto& l : only_b) out += "+ " + l + "\n";
  return out;
}

}  // namespace cairn::store::testing
