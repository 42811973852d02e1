// The survey store: a PostgreSQL + PostGIS database where camps meet
// (`cairn survey init`, `cairn survey crew`, `cairn publish`, `cairn pull`).
// The tablet and the camp file stay where data is born; the store gathers every
// camp's records, the fits and flags of the latest check, reviews and sign-offs.
//
// Layout (store version kStoreVersion, table cairn.meta):
//  - schema `cairn`: one table per table of the project file (storage/SCHEMA.md),
//    same columns and types (text, double precision, bigint; a column without a
//    type keeps its value as text with a `COLUMN_kind` beside it), plus `project`
//    (the store's project UUID); primary key (project, uuid). Foreign keys and
//    the live-code uniqueness of the project file are deferred constraints.
//    cairn.projects (one row per project name, with the project settings),
//    cairn.crews (project, member role), cairn.publishes (a log of publishes
//    that changed something), cairn.fits and cairn.flags (the latest check).
//  - schema `public`: the GIS layers, views with one WGS84 geometry column
//    (EPSG:4326) each: stations, planar_readings, linear_readings,
//    contact_points, fitted_contacts, flags. Live records only; stations also
//    give the position in the project's UTM zone (utm_epsg, utm_easting,
//    utm_northing, computed by PostGIS ST_Transform).
//  - roles: cairn_crew (members read and write only the projects whose crew
//    they are in) and cairn_supervisor (members read everything and write only
//    flag_reviews and day_signoffs), enforced by grants and row-level security
//    (PostgreSQL documentation, "Row Security Policies"); the views are
//    security_invoker so the policies apply through them.
//
// Publish: the store's rows of the project are copied into a scratch project
// file, the published file is merged into it with `cairn merge`'s own code
// (storage/merge.h: same rules, conflicts kept aside), and the rows that differ
// are written back with COPY in one transaction. So publishing is idempotent and
// independent of order exactly as merging is. For speed, what merge would not
// have to judge is taken before it runs: a file the store already holds whole
// ends the publish at once, versions the store has are dropped and new records
// with free codes are added as they are; everything else goes through
// merge_files (storage/merge.h), whose rules are not repeated here.
#pragma once
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "app/core/export.h"
#include "storage/merge.h"

namespace cairn::store::survey {

constexpr int kStoreVersion = 1;

struct InitReport {
  int from_version = 0;  // 0: a new store
  int to_version = 0;
  int project_schema = 0;          // project-file schema version the tables follow
  std::vector<std::string> steps;  // what was done, in words
};
// Creates or upgrades the store at URL (a libpq URL). Throws with the reason.
InitReport init_store(const std::string& url);

// Adds ROLE to (or with remove, takes it out of) the crew of PROJECT (its name),
// making the project when it is not in the store yet.
void set_crew(const std::string& url, const std::string& role, const std::string& project, bool remove);

struct TableWrite {
  long written = 0;  // rows inserted or replaced
  long removed = 0;  // rows deleted (e.g. conflicts settled by the merge)
};

struct PublishReport {
  std::string project, project_uuid, role;
  bool project_created = false;
  bool changed = false;
  long plain_added = 0;                      // new records with free codes, added without a merge
  MergeReport merge;                         // what the merge found (conflicts, clashes, warnings)
  std::map<std::string, TableWrite> tables;  // per store table
  int fits = 0, flags = 0;                   // features of the latest check written
};

struct PublishOptions {
  core::ExportOptions check;  // for the fits and flags of the latest check
  // Called after every row is written, just before COMMIT (a test hook uses it
  // to show that a publish killed at that moment leaves the store as it was).
  std::function<void()> before_commit;
};

// Publishes FILE to the store at URL in one transaction. Throws PublishRefused
// (naming project and reason) when the store, the role or the file does not
// allow it; nothing is written then.
PublishReport publish(const std::string& file, const std::string& url, const PublishOptions& o = {});

class PublishRefused : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

struct BBox {
  double west, south, east, north;
};
// "W,S,E,N" in decimal degrees; a failure message names the value.
Result<BBox> parse_bbox(const std::string& text);

struct PullOptions {
  std::string project;
  std::optional<BBox> bbox;
  std::optional<std::string> since;  // ISO 8601 date or date-time
};

struct PullReport {
  std::string project, path;
  std::map<std::string, long> rows;  // per table
};

// Makes the project file OUT (which must not exist) from the store's records of
// a project: people, units, contacts and reviews whole; stations inside the box
// (changed since DATE, or with a reading changed since) with all their readings
// and photos; contact points inside the box (changed since); the audit rows,
// conflicts and code clashes of every record taken. It publishes back without
// duplicates because every record keeps its UUID and versions.
PullReport pull(const std::string& url, const std::string& out, const PullOptions& o);

}  // namespace cairn::store::survey
