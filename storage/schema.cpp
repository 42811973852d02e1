#include "storage/schema.h"

#include <stdexcept>

#include "storage/sqlite.h"

namespace cairn::store {

namespace {

// Version 1: the records, the project row and the audit trail. CHECK
// constraints repeat the boundary validation as a last line of defence; the
// friendly messages come from storage/validate before anything reaches SQL.
// Partial unique indexes keep codes unique among live records only, so a code
// freed by a soft delete can be used again.
const char* const kSchemaV1 = R"SQL(
CREATE TABLE project (
  id              INTEGER PRIMARY KEY CHECK (id = 1),
  file_uuid       TEXT NOT NULL,
  name            TEXT NOT NULL,
  utm_zone        TEXT,
  north_default   TEXT NOT NULL CHECK (north_default IN ('true','magnetic')),
  declination     REAL NOT NULL DEFAULT 0 CHECK (declination BETWEEN -180 AND 180),
  local_device    TEXT NOT NULL,
  created         TEXT NOT NULL,
  updated         TEXT NOT NULL
);

CREATE TABLE devices (
  uuid     TEXT PRIMARY KEY,
  name     TEXT NOT NULL,
  created  TEXT NOT NULL,
  updated  TEXT NOT NULL,
  device   TEXT NOT NULL,
  deleted  TEXT
);

CREATE TABLE people (
  uuid     TEXT PRIMARY KEY,
  name     TEXT NOT NULL,
  initials TEXT NOT NULL,
  created  TEXT NOT NULL,
  updated  TEXT NOT NULL,
  device   TEXT NOT NULL,
  deleted  TEXT
);
CREATE UNIQUE INDEX people_initials ON people(initials) WHERE deleted IS NULL;

CREATE TABLE units (
  uuid      TEXT PRIMARY KEY,
  code      TEXT NOT NULL,
  name      TEXT NOT NULL,
  age_rank  INTEGER NOT NULL CHECK (age_rank >= 1),
  colour    TEXT NOT NULL,
  created   TEXT NOT NULL,
  updated   TEXT NOT NULL,
  device    TEXT NOT NULL,
  deleted   TEXT
);
CREATE UNIQUE INDEX units_code ON units(code) WHERE deleted IS NULL;

CREATE TABLE contacts (
  uuid        TEXT PRIMARY KEY,
  name        TEXT NOT NULL,
  lower_unit  TEXT NOT NULL REFERENCES units(uuid),
  upper_unit  TEXT NOT NULL REFERENCES units(uuid),
  type        TEXT NOT NULL CHECK (type IN ('depositional','unconformity','fault','intrusive')),
  created     TEXT NOT NULL,
  updated     TEXT NOT NULL,
  device      TEXT NOT NULL,
  deleted     TEXT
);
CREATE UNIQUE INDEX contacts_name ON contacts(name) WHERE deleted IS NULL;

CREATE TABLE stations (
  uuid        TEXT PRIMARY KEY,
  code        TEXT NOT NULL,
  lat         REAL NOT NULL CHECK (lat BETWEEN -90 AND 90),
  lon         REAL NOT NULL CHECK (lon BETWEEN -180 AND 180),
  elevation   REAL CHECK (elevation BETWEEN -500 AND 9000),
  h_accuracy  REAL CHECK (h_accuracy >= 0),
  v_accuracy  REAL CHECK (v_accuracy >= 0),
  source      TEXT NOT NULL CHECK (source IN ('gps','map','manual')),
  unit        TEXT REFERENCES units(uuid),
  observer    TEXT REFERENCES people(uuid),
  time        TEXT,
  notes       TEXT NOT NULL DEFAULT '',
  created     TEXT NOT NULL,
  updated     TEXT NOT NULL,
  device      TEXT NOT NULL,
  deleted     TEXT
);
CREATE UNIQUE INDEX stations_code ON stations(code) WHERE deleted IS NULL;

CREATE TABLE planes (
  uuid                TEXT PRIMARY KEY,
  station             TEXT NOT NULL REFERENCES stations(uuid),
  kind                TEXT NOT NULL CHECK (kind IN ('bedding','foliation','cleavage','joint',
                                                    'fault','vein','contact','slope')),
  strike              REAL NOT NULL CHECK (strike >= 0 AND strike < 360),
  dip                 REAL NOT NULL CHECK (dip BETWEEN 0 AND 90),
  typed               TEXT NOT NULL,
  notation            TEXT NOT NULL CHECK (notation IN ('strike_dip','dip_direction_dip','text')),
  north               TEXT NOT NULL CHECK (north IN ('true','magnetic')),
  measured_strike     REAL NOT NULL,
  measured_dip        REAL NOT NULL,
  declination         REAL NOT NULL,
  declination_source  TEXT NOT NULL DEFAULT '',
  quality             INTEGER CHECK (quality BETWEEN 1 AND 5),
  facing              TEXT NOT NULL CHECK (facing IN ('unknown','upright','overturned')),
  contact             TEXT REFERENCES contacts(uuid),
  ref                 TEXT,
  time                TEXT,
  observer            TEXT REFERENCES people(uuid),
  notes               TEXT NOT NULL DEFAULT '',
  created             TEXT NOT NULL,
  updated             TEXT NOT NULL,
  device              TEXT NOT NULL,
  deleted             TEXT
);
CREATE INDEX planes_station ON planes(station);
CREATE UNIQUE INDEX planes_ref ON planes(station, ref) WHERE deleted IS NULL AND ref IS NOT NULL;

CREATE TABLE lines (
  uuid                TEXT PRIMARY KEY,
  station             TEXT NOT NULL REFERENCES stations(uuid),
  kind                TEXT NOT NULL CHECK (kind IN ('lineation','fold_axis','slickenline',
                                                    'intersection')),
  trend               REAL NOT NULL CHECK (trend >= 0 AND trend < 360),
  plunge              REAL NOT NULL CHECK (plunge BETWEEN 0 AND 90),
  typed               TEXT NOT NULL,
  north               TEXT NOT NULL CHECK (north IN ('true','magnetic')),
  measured_trend      REAL NOT NULL,
  measured_plunge     REAL NOT NULL,
  declination         REAL NOT NULL,
  declination_source  TEXT NOT NULL DEFAULT '',
  host_plane          TEXT REFERENCES planes(uuid),
  rake                REAL CHECK (rake BETWEEN 0 AND 180),
  ref                 TEXT,
  time                TEXT,
  observer            TEXT REFERENCES people(uuid),
  notes               TEXT NOT NULL DEFAULT '',
  created             TEXT NOT NULL,
  updated             TEXT NOT NULL,
  device              TEXT NOT NULL,
  deleted             TEXT
);
CREATE INDEX lines_station ON lines(station);
CREATE UNIQUE INDEX lines_ref ON lines(station, ref) WHERE deleted IS NULL AND ref IS NOT NULL;

CREATE TABLE points (
  uuid        TEXT PRIMARY KEY,
  contact     TEXT NOT NULL REFERENCES contacts(uuid),
  lat         REAL NOT NULL CHECK (lat BETWEEN -90 AND 90),
  lon         REAL NOT NULL CHECK (lon BETWEEN -180 AND 180),
  elevation   REAL CHECK (elevation BETWEEN -500 AND 9000),
  h_accuracy  REAL CHECK (h_accuracy >= 0),
  v_accuracy  REAL CHECK (v_accuracy >= 0),
  source      TEXT NOT NULL CHECK (source IN ('gps','map','dem')),
  time        TEXT,
  observer    TEXT REFERENCES people(uuid),
  notes       TEXT NOT NULL DEFAULT '',
  created     TEXT NOT NULL,
  updated     TEXT NOT NULL,
  device      TEXT NOT NULL,
  deleted     TEXT
);
CREATE INDEX points_contact ON points(contact);

CREATE TABLE photos (
  uuid      TEXT PRIMARY KEY,
  station   TEXT REFERENCES stations(uuid),
  path      TEXT NOT NULL,
  sha256    TEXT NOT NULL CHECK (length(sha256) = 64),
  caption   TEXT NOT NULL DEFAULT '',
  time      TEXT,
  created   TEXT NOT NULL,
  updated   TEXT NOT NULL,
  device    TEXT NOT NULL,
  deleted   TEXT
);

CREATE TABLE audit (
  uuid        TEXT PRIMARY KEY,
  at          TEXT NOT NULL,
  device      TEXT NOT NULL,
  person      TEXT,
  tbl         TEXT NOT NULL,
  record      TEXT NOT NULL,
  action      TEXT NOT NULL CHECK (action IN ('insert','update','delete','restore')),
  old_values  TEXT,
  new_values  TEXT
);
CREATE INDEX audit_record ON audit(record);
CREATE INDEX audit_at ON audit(at);
)SQL";

// Version 2: re-import detection and merge bookkeeping.
//  - import_key: a digest of an imported row (and of how many identical rows
//    came before it in its file), so that importing the same file again is a
//    no-op rather than a duplicate, for records that have no natural key.
//  - merges: one row per merge of another project file into this one, so a
//    later merge knows the last common merge with that file.
const char* const kMigrate1to2 = R"SQL(
ALTER TABLE planes ADD COLUMN import_key TEXT;
ALTER TABLE lines  ADD COLUMN import_key TEXT;
ALTER TABLE points ADD COLUMN import_key TEXT;
CREATE INDEX planes_import_key ON planes(import_key) WHERE import_key IS NOT NULL;
CREATE INDEX lines_import_key  ON lines(import_key)  WHERE import_key IS NOT NULL;
CREATE INDEX points_import_key ON points(import_key) WHERE import_key IS NOT NULL;

CREATE TABLE merges (
  uuid            TEXT PRIMARY KEY,
  peer_file_uuid  TEXT NOT NULL,
  peer_name       TEXT NOT NULL,
  peer_path       TEXT NOT NULL DEFAULT '',
  merged_at       TEXT NOT NULL,
  device          TEXT NOT NULL,
  added           INTEGER NOT NULL DEFAULT 0,
  skipped         INTEGER NOT NULL DEFAULT 0,
  conflicts       INTEGER NOT NULL DEFAULT 0
);
CREATE INDEX merges_peer ON merges(peer_file_uuid, merged_at);
)SQL";

// Version 3: merge conflicts and natural-key clashes (storage/merge.h).
//  - conflicts: a version of a record that lost to a newer one changed on
//    another device since their common ancestor; its id is derived from the
//    record and the losing version (updated, device), so finding the same
//    conflict again adds nothing. `resolved` is set when a person has settled it.
//  - conflict_values: the losing version, one row per column. The value column
//    has no declared type, so SQLite keeps every value exactly as it was stored
//    (SQLite documentation, "Datatypes In SQLite", BLOB/no affinity).
//  - key_clashes: a record whose code (station code, unit code, contact name,
//    initials, reading ref) was taken by another record from another device;
//    it is kept under `stored` until a person renames it.
const char* const kMigrate2to3 = R"SQL(
CREATE TABLE conflicts (
  uuid           TEXT PRIMARY KEY,
  tbl            TEXT NOT NULL,
  record         TEXT NOT NULL,
  other_updated  TEXT NOT NULL,
  other_device   TEXT NOT NULL,
  found_at       TEXT NOT NULL,
  resolved       TEXT
);
CREATE INDEX conflicts_record ON conflicts(record);

CREATE TABLE conflict_values (
  conflict  TEXT NOT NULL REFERENCES conflicts(uuid) ON DELETE CASCADE,
  col       TEXT NOT NULL,
  value,
  PRIMARY KEY (conflict, col)
);

CREATE TABLE key_clashes (
  record    TEXT PRIMARY KEY,
  tbl       TEXT NOT NULL,
  original  TEXT NOT NULL,
  stored    TEXT NOT NULL
);
)SQL";

// Version 4: the project's option to compare bedding and contact readings that
// name no contact with the nearest contact whose points lie within this many
// metres (0: off), so that every check of the file uses the same setting.
const char* const kMigrate3to4 = R"SQL(
ALTER TABLE project ADD COLUMN nearby_radius REAL NOT NULL DEFAULT 0
  CHECK (nearby_radius BETWEEN 0 AND 100000);
)SQL";

// Version 5 (the trust work): the screening settings the cross-check uses, so
// every check of a file uses the same ones (friction angle and the Markland and
// toppling windows, degrees), and a planar reading's `repeat_of`: the first
// reading of the same surface when a mapper measures it again, so the check
// combines the repeats into their Fisher mean.
const char* const kMigrateTrust = R"SQL(
ALTER TABLE project ADD COLUMN friction_angle REAL NOT NULL DEFAULT 30
  CHECK (friction_angle BETWEEN 0 AND 89);
ALTER TABLE project ADD COLUMN sliding_window REAL NOT NULL DEFAULT 20
  CHECK (sliding_window BETWEEN 1 AND 90);
ALTER TABLE project ADD COLUMN toppling_window REAL NOT NULL DEFAULT 30
  CHECK (toppling_window BETWEEN 1 AND 90);
ALTER TABLE planes ADD COLUMN repeat_of TEXT REFERENCES planes(uuid);
)SQL";

// Version 6, the terrain step: the project's terrain (storage/terrain.h).
//  - terrain: one live row (a partial unique index on a constant), its grid in
//    the CRS `epsg` (the project's UTM zone): cell size, west/north edges, size,
//    the value that marks a missing cell in the tiles, the stated vertical
//    accuracy and a digest, so a merge tells identical terrains from different ones.
//  - terrain_tiles: the grid in kTerrainTile-square tiles, each a zlib stream
//    (RFC 1950) of little-endian float32 elevations, row by row from the north.
//  - the step is idempotent (IF NOT EXISTS; the replace finds nothing the second
//    time), so a file that already has the tables is brought up safely.
//  - stations may take source 'dem' (an elevation from the terrain). SQLite
//    cannot change a CHECK constraint with ALTER TABLE; widening one is done by
//    rewriting the table's text in sqlite_schema, the procedure the SQLite
//    documentation gives for constraint changes that leave the stored rows valid
//    ("ALTER TABLE", section 7, and "PRAGMA writable_schema").
const char* const kMigrateTerrain = R"SQL(
CREATE TABLE IF NOT EXISTS terrain (
  uuid               TEXT PRIMARY KEY,
  name               TEXT NOT NULL,
  epsg               INTEGER NOT NULL CHECK ((epsg BETWEEN 32601 AND 32660) OR (epsg BETWEEN 32701 AND 32760)),
  cell               REAL NOT NULL CHECK (cell > 0),
  west               REAL NOT NULL,
  north              REAL NOT NULL,
  nx                 INTEGER NOT NULL CHECK (nx > 0),
  ny                 INTEGER NOT NULL CHECK (ny > 0),
  nodata             REAL NOT NULL,
  vertical_accuracy  REAL CHECK (vertical_accuracy >= 0),
  tile_size          INTEGER NOT NULL CHECK (tile_size > 0),
  digest             TEXT NOT NULL,
  created            TEXT NOT NULL,
  updated            TEXT NOT NULL,
  device             TEXT NOT NULL,
  deleted            TEXT
);
CREATE UNIQUE INDEX IF NOT EXISTS terrain_one_live ON terrain((1)) WHERE deleted IS NULL;

CREATE TABLE IF NOT EXISTS terrain_tiles (
  terrain  TEXT NOT NULL REFERENCES terrain(uuid),
  row      INTEGER NOT NULL CHECK (row >= 0),
  col      INTEGER NOT NULL CHECK (col >= 0),
  data     BLOB NOT NULL,
  PRIMARY KEY (terrain, row, col)
);

PRAGMA writable_schema = ON;
UPDATE sqlite_schema
   SET sql = replace(sql, 'source IN (''gps'',''map'',''manual'')', 'source IN (''gps'',''map'',''manual'',''dem'')')
 WHERE type = 'table' AND name = 'stations';
PRAGMA writable_schema = RESET;
)SQL";

// Version 7, the outcrop day's tables:
//  - pick_lists: the project's lists of lithologies and structure kinds to
//    choose from (units and people are records and make their own lists), in
//    the order they were added (storage/pick_lists.h). An empty list does not restrict.
//  - track_points: the day track, the receiver's fixes thinned while the UI
//    runs (geomath/track.h, storage/track.h): who carried the tablet, when,
//    where, and how well the receiver knew it.
const char* const kMigratePickListsAndTrack = R"SQL(
CREATE TABLE pick_lists (
  list      TEXT NOT NULL CHECK (list IN ('lithology', 'structure')),
  code      TEXT NOT NULL CHECK (length(code) BETWEEN 1 AND 64),
  position  INTEGER NOT NULL DEFAULT 0,
  PRIMARY KEY (list, code)
);
CREATE TABLE track_points (
  id          INTEGER PRIMARY KEY,
  person      TEXT NOT NULL DEFAULT '',
  device      TEXT NOT NULL DEFAULT '',
  time        TEXT NOT NULL,
  lat         REAL NOT NULL CHECK (lat BETWEEN -90 AND 90),
  lon         REAL NOT NULL CHECK (lon BETWEEN -180 AND 180),
  elevation   REAL,
  h_accuracy  REAL CHECK (h_accuracy IS NULL OR h_accuracy >= 0)
);
CREATE INDEX track_points_time ON track_points(person, time);
)SQL";

// Version 7 -> 8: full indexes on the natural keys (the unique ones above cover
// live records only) and on key_clashes.original, so that a merge finds every
// record holding a code, live or deleted, by index lookups instead of a scan of
// the whole table per merged record (bench/RESULTS.md, season scale).
const char* const kMigrateKeyIndexes = R"SQL(
CREATE INDEX people_initials_any ON people(initials);
CREATE INDEX units_code_any ON units(code);
CREATE INDEX contacts_name_any ON contacts(name);
CREATE INDEX stations_code_any ON stations(code);
CREATE INDEX key_clashes_original ON key_clashes(original);
)SQL";

const char* const kRecordTables[] = {"devices", "people", "units",  "contacts", "stations",
                                     "planes",  "lines",  "points", "photos",   nullptr};

}  // namespace

const char* const* record_tables() { return kRecordTables; }

void create_schema(Db& db) {
  db.exec(kSchemaV1);
  db.exec("PRAGMA application_id = " + std::to_string(kApplicationId));
  db.exec("PRAGMA user_version = 1");
  migrate(db, 1);
}

void migrate(Db& db, int from) {
  if (from < 1 || from > kSchemaVersion)
    throw std::logic_error("no migration from schema version " + std::to_string(from));
  static const char* const steps[] = {nullptr,
                                      kMigrate1to2,
                                      kMigrate2to3,
                                      kMigrate3to4,
                                      kMigrateTrust,
                                      kMigrateTerrain,
                                      kMigratePickListsAndTrack,
                                      kMigrateKeyIndexes};  // steps[v]: v -> v+1
  for (int v = from; v < kSchemaVersion; ++v) {
    // The terrain step widens a CHECK constraint through writable_schema (the
    // procedure SQLite's documentation gives), which defensive mode forbids; the
    // text run here is Cairn's own, never a file's, so defensive mode is off for
    // that step alone and back on after it, also when it fails.
    const bool rewrites_schema = steps[v] == kMigrateTerrain;
    if (rewrites_schema) db.set_defensive(false);
    try {
      db.exec(steps[v]);
    } catch (...) {
      if (rewrites_schema) db.set_defensive(true);
      throw;
    }
    if (rewrites_schema) db.set_defensive(true);
    db.exec("PRAGMA user_version = " + std::to_string(v + 1));
  }
}

}  // namespace cairn::store
