// Importing CSV and GPX files into a project, and listing a project's records
// in the same CSV columns.
//
// An import is all-or-nothing: every row is checked, inside one transaction,
// and any bad row rolls the whole file back. The report then lists every bad
// value of every row, each as "FILE:LINE:COLUMN: rule: message" (LINE is the
// file line where the row starts, COLUMN the 1-based field number; header
// problems are on the header's line). Rule ids are listed in storage/SCHEMA.md.
//
// Importing the same rows again is a no-op: units, contacts and stations are
// matched by code or name (identical values: skipped; other values: an error),
// and readings and contact points by a SHA-256 digest of the row's cells
// (with the number of identical rows before it in the file, so that two
// identical readings in one file stay two readings).
#pragma once
#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "storage/project.h"

namespace cairn::store {

enum class ImportKind { Units, Contacts, Stations, Planes, Lines, Points };

std::optional<ImportKind> parse_import_kind(std::string_view s);  // "units", ..., "points"
std::string_view to_string(ImportKind k);
// Every column a CSV of this kind may have, in the order `list_csv` writes them.
const std::vector<std::string>& import_columns(ImportKind k);

struct ImportReport {
  int added = 0;         // records written (0 when there were errors)
  int skipped = 0;       // rows already in the project
  int from_terrain = 0;  // stations and points given an elevation from the project's terrain
  std::vector<std::string> errors;
  bool ok() const { return errors.empty(); }
};

// Imports CSV text (RFC 4180, header row with column names in any order).
// Columns by kind (* required; "a | b" alternatives):
//   units:    unit*, name*, age_rank*, colour
//   contacts: contact*, lower_unit*, upper_unit*, type*
//   stations: station*, (lat, lon | easting, northing)*, elevation, h_accuracy,
//             v_accuracy, source, unit, observer, time, notes
//   planes:   station*, kind*, (strike, dip | dip_direction, dip | attitude)*, north,
//             declination, contact, quality, facing, ref, time, notes
//   lines:    station*, kind*, (trend, plunge | rake)*, plane_ref, north, declination,
//             ref, time, notes
//   points:   contact*, (lat, lon | easting, northing)*, elevation, h_accuracy,
//             v_accuracy, source, time, notes
// `easting, northing` are read in the project's UTM zone. `north` defaults to
// the project's; `declination` (degrees east) overrides the magnetic model for
// magnetic readings. A station's `observer` is a person's initials (a new person
// is added for unknown initials); readings take their station's observer.
// PROGRESS, when given, is called as rows are checked (rows done, rows in the
// file), at least at the end, for a progress line.
using ImportProgress = std::function<void(size_t done, size_t total)>;
ImportReport import_csv(Project& p, ImportKind kind, std::string_view text, const std::string& filename,
                        const ImportProgress& progress = {});
// The same from the file PATH (named so in errors), read twice in pieces and
// never held whole: memory does not grow with the file. "cannot read PATH: why"
// when it cannot be read.
ImportReport import_csv_file(Project& p, ImportKind kind, const std::string& path, const ImportProgress& progress = {});

// Imports the waypoints of a GPX 1.1 file: as stations (the waypoint name is
// the station code, `desc` or `cmt` its notes), or, when `contact` names a
// contact, as points of that contact. Positions are WGS84 as GPX defines them.
ImportReport import_gpx(Project& p, std::string_view text, const std::string& filename,
                        const std::string& contact = "");

// The live records of a kind as CSV in import_columns(kind) order, so that the
// output imports again unchanged. Readings are written as measured, with their
// north and (for magnetic ones) the declination applied.
std::string list_csv(Project& p, ImportKind kind);

}  // namespace cairn::store
