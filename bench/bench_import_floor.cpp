// The two floors `cairn import` is measured against in bench/run (issue 16):
//
//   bench_import_floor bare DB KIND CSV
//     a new SQLite file (WAL, synchronous=FULL) with one table holding the CSV's
//     columns as they are (no keys, no indexes, no checks), the rows inserted in
//     one transaction with one prepared statement: what SQLite itself costs.
//
//   bench_import_floor own PROJECT KIND CSV
//     the same rows through Cairn's own schema (storage/schema.cpp: its
//     constraints, indexes and foreign keys) into PROJECT, which holds what
//     `cairn import` would find there (units, contacts, stations), with each
//     row's audit entry (the row as JSON, made by SQLite's json_object as the
//     record API does) and its import key, every statement prepared once and
//     reused, one transaction, the page cache `cairn import` sets for its
//     transaction (store::BulkWriteCache): the least Cairn's own file layout
//     costs.
//
//   bench_import_floor own-unaudited PROJECT KIND CSV
//     the same as `own` without the audit rows: what the records and their
//     indexes alone cost (bench/RESULTS.md: what the audit trail adds).
//
// KIND is stations, points or planes (the season's CSVs from bench/season.py,
// positions as easting/northing in the project's UTM zone). Prints
// "ROWS rows in SECONDS s". Not a test: the bench compares, it asserts nothing.
#include <sqlite3.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <sstream>
#include <string>

#include "formats/csv.h"
#include "formats/ids.h"
#include "formats/sha256.h"
#include "geomath/decimal.h"
#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "storage/project.h"
#include "storage/sqlite.h"

using namespace cairn;
using store::Stmt;

namespace {

std::string read_all(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  std::stringstream ss;
  ss << f.rdbuf();
  return ss.str();
}

double num(const std::string& s) { return geo::parse_decimal(s).value_or(0.0); }

int bare(const std::string& db_path, const formats::CsvTable& t) {
  store::Db db(db_path, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
  db.exec("PRAGMA journal_mode = WAL; PRAGMA synchronous = FULL;");
  std::string cols, qs;
  for (size_t i = 0; i < t.header.size(); ++i) {
    cols += (i ? ", " : "") + std::string("\"") + t.header[i] + "\"";
    qs += i ? ",?" : "?";
  }
  db.exec("CREATE TABLE rows (" + cols + ")");
  db.exec("BEGIN");
  Stmt ins(db, "INSERT INTO rows VALUES (" + qs + ")");
  for (const auto& row : t.rows) {
    for (size_t i = 0; i < row.size(); ++i) ins.bind(static_cast<int>(i) + 1, row[i]);
    ins.run();
    ins.reset();
  }
  db.exec("COMMIT");
  return 0;
}

// The audit insert of the record just inserted, its JSON made by SQLite.
std::string audit_sql(store::Db& db, const std::string& table) {
  // json_object's arguments ('name', "name", ...) made by SQLite from the table's columns.
  Stmt info(db, "SELECT group_concat('''' || name || ''', \"' || name || '\"', ', ') FROM pragma_table_info(?)");
  info.bind(1, table);
  const std::string expr = info.step() ? info.text(0) : std::string();
  return "INSERT INTO audit(uuid, at, device, person, tbl, record, action, old_values, new_values) "
         "SELECT ?1, ?2, ?3, NULL, '" +
         table + "', uuid, 'insert', NULL, json_object(" + expr + ") FROM " + table + " WHERE rowid = ?4";
}

int own(const std::string& path, const std::string& kind, const formats::CsvTable& t, bool audited) {
  auto p = store::Project::open(path);
  store::Db& db = p.db();
  store::BulkWriteCache cache(db);
  const auto zone = geo::parse_utm_zone(p.info().utm_zone);
  const std::string device = p.device();
  auto col = [&](const char* name) { return t.column(name); };
  p.write([&] {
    Stmt audit(db, audit_sql(db, kind));
    Stmt unit_of(db, "SELECT uuid FROM units WHERE code = ? AND deleted IS NULL");
    Stmt person_of(db, "SELECT uuid FROM people WHERE initials = ? AND deleted IS NULL");
    Stmt contact_of(db, "SELECT uuid FROM contacts WHERE name = ? AND deleted IS NULL");
    Stmt station_of(db, "SELECT uuid, observer FROM stations WHERE code = ? AND deleted IS NULL");
    auto lookup = [](Stmt& s, const std::string& key, int column = 0) {
      s.reset();
      s.bind(1, key);
      return s.step() ? s.text(column) : std::string();
    };
    auto latlon = [&](const std::vector<std::string>& row) {
      return *geo::from_utm(
          geo::UtmPoint{zone->zone, zone->northp.value_or(true), num(row[col("easting")]), num(row[col("northing")])});
    };
    Stmt ins(db, kind == "stations"
                     ? "INSERT INTO stations(uuid, code, lat, lon, elevation, h_accuracy, v_accuracy, source, unit, "
                       "observer, time, notes, created, updated, device) VALUES (?,?,?,?,?,?,?,?,?,?,?,'',?,?,?)"
                 : kind == "points"
                     ? "INSERT INTO points(uuid, contact, lat, lon, elevation, h_accuracy, v_accuracy, source, time, "
                       "notes, created, updated, device, import_key) VALUES (?,?,?,?,?,?,?,?,?,'',?,?,?,?)"
                     : "INSERT INTO planes(uuid, station, kind, strike, dip, typed, notation, north, measured_strike, "
                       "measured_dip, declination, declination_source, quality, facing, contact, ref, time, observer, "
                       "notes, created, updated, device, import_key) "
                       "VALUES (?,?,?,?,?,?,'strike_dip',?,?,?,0,'',?,?,?,?,?,?,'',?,?,?,?)");
    for (const auto& row : t.rows) {
      const std::string uuid = formats::new_uuid(), now = formats::utc_now();
      std::string line;
      for (size_t i = 0; i < row.size(); ++i) line += t.header[i] + "=" + row[i] + "\n";
      ins.reset();
      if (kind == "stations") {
        const auto ll = latlon(row);
        ins.bind(1, uuid).bind(2, row[col("station")]).bind(3, ll.lat).bind(4, ll.lon);
        ins.bind(5, num(row[col("elevation")])).bind(6, num(row[col("h_accuracy")]));
        ins.bind(7, num(row[col("v_accuracy")])).bind(8, row[col("source")]);
        ins.bind_text_or_null(9, lookup(unit_of, row[col("unit")]));
        ins.bind_text_or_null(10, lookup(person_of, row[col("observer")])).bind(11, row[col("time")]);
        ins.bind(12, now).bind(13, now).bind(14, device);
      } else if (kind == "points") {
        const auto ll = latlon(row);
        ins.bind(1, uuid).bind(2, lookup(contact_of, row[col("contact")])).bind(3, ll.lat).bind(4, ll.lon);
        ins.bind(5, num(row[col("elevation")])).bind(6, num(row[col("h_accuracy")]));
        ins.bind(7, num(row[col("v_accuracy")])).bind(8, row[col("source")]).bind(9, row[col("time")]);
        ins.bind(10, now).bind(11, now).bind(12, device).bind(13, formats::sha256_hex(line));
      } else {
        const std::string station = lookup(station_of, row[col("station")]);
        const std::string observer = station_of.text(1);
        const double strike = std::fmod(num(row[col("strike")]), 360.0), dip = num(row[col("dip")]);
        const std::string ref = row[col("ref")];
        ins.bind(1, uuid).bind(2, station).bind(3, row[col("kind")]).bind(4, strike).bind(5, dip);
        ins.bind(6, row[col("strike")] + "/" + row[col("dip")]).bind(7, row[col("north")]);
        ins.bind(8, strike).bind(9, dip).bind(10, static_cast<int>(num(row[col("quality")])));
        ins.bind(11, row[col("facing")]).bind_text_or_null(12, lookup(contact_of, row[col("contact")]));
        ins.bind_text_or_null(13, ref).bind(14, row[col("time")]).bind_text_or_null(15, observer);
        ins.bind(16, now).bind(17, now).bind(18, device).bind(19, formats::sha256_hex(line));
      }
      ins.run();
      if (!audited) continue;
      audit.reset();
      audit.bind(1, formats::new_uuid()).bind(2, now).bind(3, device);
      audit.bind(4, static_cast<int64_t>(sqlite3_last_insert_rowid(db.handle())));
      audit.run();
    }
  });
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  const std::string modes[] = {"bare", "own", "own-unaudited"};
  if (argc != 5 || std::find(std::begin(modes), std::end(modes), argv[1]) == std::end(modes)) {
    std::fprintf(stderr, "usage: bench_import_floor bare|own|own-unaudited DB KIND CSV\n");
    return 2;
  }
  const std::string mode = argv[1], db = argv[2], kind = argv[3];
  const std::string text = read_all(argv[4]);
  const auto start = std::chrono::steady_clock::now();
  auto t = formats::parse_csv(text, argv[4]);
  if (!t) {
    std::fprintf(stderr, "%s\n", t.error().c_str());
    return 1;
  }
  const int rc = mode == "bare" ? bare(db, *t) : own(db, kind, *t, mode == "own");
  const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::printf("%zu rows in %.3f s\n", t->rows.size(), s);
  return rc;
}
