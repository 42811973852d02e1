// Merging project files: every record of one or more source files (each
// tablet's NAME.cairn) is brought into a target file (the camp file) by UUID.
//
// Versions. A record's version is named by its `updated` time and `device`;
// every write through storage/repository.h makes a new version and an audit
// row holding the row before and after it, so the audit trail of a record is
// the family tree of its versions. Audit rows are merged first (by their own
// UUIDs), then each incoming version is compared with what the target holds:
//  - a record the target lacks is added; the same version is skipped;
//  - a version that is an ancestor of the target's is skipped (older news);
//  - a version that descends from the target's replaces it (changed on one
//    device only since they last shared the record);
//  - otherwise both sides changed it since their common ancestor: a conflict.
//    The newer version (later `updated`, then device id, then content, so the
//    choice never depends on merge order) is current; every other version is
//    kept whole in `conflicts`/`conflict_values` and listed with the fields
//    that differ, for a person to decide. Nothing is silently overwritten.
// A soft delete is a version like any other, so a delete on one tablet against
// an edit on another is a conflict too. Because the outcome is a function of
// the set of versions seen (the newest of the versions no other descends
// from), merging is idempotent and independent of order.
//
// Codes. Station codes, unit codes, contact names, initials and reading refs
// are unique among live records. When records from two devices share one
// (two crews both used S12), both are kept: the earlier created keeps the code,
// the other is stored as CODE~xxxxxx (the first hex digits of its UUID), listed
// in `key_clashes`, and reported with a rename suggestion. They are never fused.
//
// Atomicity. All sources are merged in one transaction of the target; any
// failure rolls everything back and is rethrown. Each source is first copied
// with SQLite's online backup API and, when written by an older Cairn,
// migrated in the copy; the source file itself is only read.
//
// Trust. A source file is untrusted input (it may have been edited by hand or
// damaged). It is opened read-only (immutable when it lies on read-only
// media) with SQLite's defensive settings, trusted_schema off and its triggers
// and views disabled; its application id, schema version and PRAGMA
// integrity_check are checked before anything is read; its pages are copied
// without running any of its SQL. No SQL text read from a file is ever run:
// tables Cairn does not know are named in the report (SourceMerge::ignored),
// not adopted. Every value of every row taken from it passes the rules of the
// record API (storage/SCHEMA.md, "Bad input"); the first bad value refuses the
// merge, naming the file, table, record UUID and rule, before anything is written.
#pragma once
#include <cstddef>
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "storage/project.h"

namespace cairn::store {

// Where a merge has got to, for a progress bar.
struct MergeProgress {
  std::string source;  // path of the file being merged
  size_t source_index = 0, sources = 0;
  std::string table;  // "audit", "stations", ...
  size_t done = 0;    // rows of this source looked at so far
  size_t total = 0;   // rows of this source
};

struct MergeOptions {
  std::function<void(const MergeProgress&)> progress;
  // Test hook for the atomicity tests: throw after this many rows have been
  // written to the target (nothing: never).
  std::optional<long> fail_after;
  // Carry the sources' terrain (storage/terrain.h). Off for a target that keeps
  // no terrain (the survey store's mirror of a project).
  bool terrain = true;
  // Carry the sources' day tracks (storage/track.h), and name a source's
  // pick-list codes the target's lists have not got. Off for a target that
  // keeps neither (the survey store's mirror of a project).
  bool track = true;
  bool pick_list_report = true;
};

struct MergeCounts {
  int added = 0;      // records the target did not have
  int updated = 0;    // newer versions from one device that replaced the target's
  int skipped = 0;    // identical, older, or an already listed conflict
  int conflicts = 0;  // versions changed on two devices since their common ancestor
  int total() const { return added + updated + skipped + conflicts; }
};

// Who wrote one version of a record.
struct VersionSide {
  std::string updated;  // UTC
  std::string device, device_name;
  std::string person, person_name;  // "" when unknown
  bool deleted = false;
};

struct ConflictField {
  std::string field;    // column name
  std::string current;  // value in the current version, as text ("" for empty)
  std::string other;    // value in the version kept aside
};

struct MergeConflict {
  std::string id;      // conflicts.uuid
  std::string table;   // "stations", "planes", ...
  std::string record;  // record UUID
  std::string label;   // "station S12", "planar reading P3 at S12", ...
  VersionSide current, other;
  std::vector<ConflictField> fields;
  std::string found_at;
  std::string resolved;  // "" while open
};

// Two records from different devices that share a code.
struct KeyClash {
  std::string table;        // "stations", "units", "contacts", "people", "planes", "lines"
  std::string column;       // "code", "name", "initials", "ref"
  std::string code;         // the shared code, e.g. "S12"
  std::string scope;        // for reading refs: the station code; "" otherwise
  std::string kept;         // UUID of the record that keeps the code (the earlier created)
  std::string kept_device;  // its device's name
  std::string renamed;      // UUID of the record stored under another code
  std::string renamed_device;
  std::string stored_as;             // the code it is stored under now, e.g. "S12~3fa2c1"
  std::string suggestion;            // a free code to rename it to, e.g. "S12b"
  std::optional<double> distance_m;  // stations: metres between the two (WGS84 ellipsoid)
};

struct SourceMerge {
  std::string path, file_uuid, name;
  MergeCounts counts;                            // all records of this source
  std::map<std::string, MergeCounts> by_device;  // device UUID -> counts of the versions it wrote
  std::map<std::string, MergeCounts> by_person;  // person UUID ("" = unknown) -> counts
  int devices_added = 0;
  int audit_added = 0;  // audit rows new to the target
  // Day-track fixes (storage/track.h) new to the target, and those it had already.
  long track_added = 0, track_skipped = 0;
  // What the source holds that Cairn does not merge: "table NAME" for a table
  // Cairn does not know, "trigger NAME", "view NAME". Never run, never adopted.
  std::vector<std::string> ignored;
};

struct MergeReport {
  std::vector<SourceMerge> sources;
  std::vector<MergeConflict> conflicts;             // conflicts found by this merge
  std::vector<KeyClash> clashes;                    // codes found shared by this merge
  std::vector<std::string> warnings;                // e.g. a live reading whose station was deleted elsewhere
  std::map<std::string, std::string> device_names;  // device UUID -> name
  std::map<std::string, std::string> person_names;  // person UUID -> "Name (INI)"
  bool changed = false;                             // false: the target was left exactly as it was
};

// Merges SOURCES into TARGET (opened for writing) in one transaction.
// Throws std::runtime_error naming the file when a source is missing, is not a
// Cairn project, comes from a newer Cairn, fails its integrity check, or is the
// target itself; and rethrows any failure part-way after rolling back.
MergeReport merge_files(Project& target, const std::vector<std::string>& sources, const MergeOptions& options = {});

// The query a merge uses to find every record of TABLE holding a natural code
// (KEY = ?1, within SCOPE = ?2 when SCOPE is not empty), live or deleted, with
// its key_clashes row: uuid, stored code, created, deleted, original, stored;
// oldest first. Exposed so that a test can ask SQLite how it answers it.
std::string code_holders_sql(const std::string& table, const std::string& key, const std::string& scope);

// The conflicts listed in a project, oldest first (open ones only unless asked).
std::vector<MergeConflict> list_conflicts(Project& p, bool include_resolved = false);
// Marks a conflict as settled by a person (the version kept aside stays in the
// file; a later merge that brings it again does not list it again).
void resolve_conflict(Project& p, const std::string& conflict_id);

}  // namespace cairn::store
