// Adding, changing, soft-deleting, restoring and listing records, with the
// audit trail. Every function validates before it writes (throwing
// ValidationError naming the field and the rule) and writes inside
// Project::write, so a failure leaves the file as it was.
//
// add():    fills an empty meta.uuid with a new UUID, empty created/updated with
//           now and an empty device with the project's device (a record that
//           already carries them, e.g. from a merge, keeps them); computes
//           derived values (see below); inserts; writes an "insert" audit row.
// update(): rewrites every field of the live record with that UUID, sets
//           updated/device, and writes an "update" audit row with the old and
//           new values. Returns false (and writes nothing) when nothing changed.
// soft_delete()/restore(): set or clear `deleted`; audited; refused while live
//           records still point at the record (delete those first).
//
// Orientation readings: add/update parse `typed` with geomath (notation
// StrikeDip / DipDirectionDip / Text) into measured_strike/measured_dip (when
// `typed` is empty, the measured values are used and `typed` is written as
// "SSS/DD"); a magnetic reading with an empty declination_source takes its
// declination from Project::declination_at (the station's place, the reading's
// time); strike/dip are then measured + declination, against true north.
// A linear reading with host_plane and rake gets trend/plunge from the plane.
#pragma once
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "storage/project.h"
#include "storage/records.h"

namespace cairn::store {

enum class Kind { Device, Person, Unit, Contact, Station, Plane, Line, Point, Photo };
// The table of a record kind ("stations", "planes", ...), and back.
std::string table_of(Kind k);
std::optional<Kind> kind_of_table(const std::string& table);

std::string add(Project& p, Person& r);
std::string add(Project& p, Unit& r);
std::string add(Project& p, Contact& r);
std::string add(Project& p, Station& r);
std::string add(Project& p, PlanarReading& r);
std::string add(Project& p, LinearReading& r);
std::string add(Project& p, ContactPoint& r);
std::string add(Project& p, Photo& r);

bool update(Project& p, Person& r);
bool update(Project& p, Unit& r);
bool update(Project& p, Contact& r);
bool update(Project& p, Station& r);
bool update(Project& p, PlanarReading& r);
bool update(Project& p, LinearReading& r);
bool update(Project& p, ContactPoint& r);
bool update(Project& p, Photo& r);

void soft_delete(Project& p, Kind kind, const std::string& uuid);
void restore(Project& p, Kind kind, const std::string& uuid);

struct ListOptions {
  bool include_deleted = false;
  std::string station;  // planes, lines, photos: only those of this station UUID ("" = all)
  std::string contact;  // points: only those of this contact UUID ("" = all)
};

std::vector<Device> list_devices(Project& p);
std::vector<Person> list_people(Project& p, const ListOptions& o = {});
std::vector<Unit> list_units(Project& p, const ListOptions& o = {});  // by age rank, oldest first
std::vector<Contact> list_contacts(Project& p, const ListOptions& o = {});
std::vector<Station> list_stations(Project& p, const ListOptions& o = {});
std::vector<PlanarReading> list_planes(Project& p, const ListOptions& o = {});
std::vector<LinearReading> list_lines(Project& p, const ListOptions& o = {});
std::vector<ContactPoint> list_points(Project& p, const ListOptions& o = {});
std::vector<Photo> list_photos(Project& p, const ListOptions& o = {});
// Lists come in creation order (created, then insertion order) unless said otherwise.

// The same live records one at a time, in list order, for readers that keep a
// compact form of their own (the check): memory stays flat in the row count.
// `each` sees a record that is reused for the next row (copy what you keep).
void for_each_station(Project& p, const std::function<void(const Station&)>& each);
void for_each_plane(Project& p, const std::function<void(const PlanarReading&)>& each);
void for_each_point(Project& p, const std::function<void(const ContactPoint&)>& each);
// How many live records of a kind there are (to reserve room before for_each_*).
size_t count_live(Project& p, Kind kind);

// One record by UUID, deleted or not.
std::optional<Person> get_person(Project& p, const std::string& uuid);
std::optional<Unit> get_unit(Project& p, const std::string& uuid);
std::optional<Contact> get_contact(Project& p, const std::string& uuid);
std::optional<Station> get_station(Project& p, const std::string& uuid);
std::optional<PlanarReading> get_plane(Project& p, const std::string& uuid);
std::optional<LinearReading> get_line(Project& p, const std::string& uuid);
std::optional<ContactPoint> get_point(Project& p, const std::string& uuid);
std::optional<Photo> get_photo(Project& p, const std::string& uuid);

// Live records by their natural key.
std::optional<Person> find_person(Project& p, const std::string& initials);
std::optional<Unit> find_unit(Project& p, const std::string& code);
std::optional<Contact> find_contact(Project& p, const std::string& name);
std::optional<Station> find_station(Project& p, const std::string& code);
// The live planar reading with notebook reference `ref` at a station.
std::optional<PlanarReading> find_plane_by_ref(Project& p, const std::string& station_uuid, const std::string& ref);

// ---- audit trail ------------------------------------------------------------

// Every audit row of one record, oldest first.
std::vector<AuditEntry> audit_trail(Project& p, const std::string& record_uuid);

struct AuditQuery {
  std::string since;   // UTC ISO 8601; only rows at or after it ("" = all)
  std::string device;  // only this device ("" = all)
  std::string table;   // only this table ("" = all)
  int limit = 0;       // newest N (0 = no limit)
};
// Audit rows, oldest first.
std::vector<AuditEntry> audit_log(Project& p, const AuditQuery& q = {});

// Undoes one audited action: an insert is soft-deleted, a delete restored, a
// restore deleted again, and an update has its old values written back (all
// audited themselves). Throws ValidationError when the undo would break a rule
// (e.g. the station code has been taken since).
void undo(Project& p, const AuditEntry& entry);
// Undoes this device's newest audited action; returns it, or nothing when there is none.
std::optional<AuditEntry> undo_last(Project& p);

}  // namespace cairn::store
