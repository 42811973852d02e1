// Plain records of a Cairn project file, one struct per record kind.
//
// Every record carries a RecordMeta: a random UUID, created/updated UTC
// timestamps, the device that last wrote it and, for soft-deleted records, the
// time of deletion. References between records are UUIDs. Angles are degrees,
// azimuths clockwise from true north unless a field says otherwise; positions
// are WGS84 latitude/longitude in decimal degrees and elevations are metres.
// The table layout behind these structs is described in storage/SCHEMA.md.
#pragma once
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace cairn::store {

struct RecordMeta {
  std::string uuid;                    // RFC 4122 version 4, set by add_* when empty
  std::string created;                 // UTC, "2025-06-14T09:32:10.123Z"
  std::string updated;                 // UTC, same form; equals created until the first update
  std::string device;                  // UUID of the device that wrote the record last
  std::optional<std::string> deleted;  // UTC time of the soft delete, or nothing when live
};

// ---- enumerations, stored as their lower-case names --------------------------

enum class North { True, Magnetic };
enum class ContactType { Depositional, Unconformity, Fault, Intrusive };
// Dem: the elevation came from the project's terrain (storage/terrain.h).
enum class PositionSource { Gps, Map, Manual, Dem };
enum class PointSource { Gps, Map, Dem };
enum class PlaneKind { Bedding, Foliation, Cleavage, Joint, Fault, Vein, Contact, Slope };
enum class LineKind { Lineation, FoldAxis, Slickenline, Intersection };
enum class Facing { Unknown, Upright, Overturned };
// How the typed attitude of a planar reading is to be read again.
enum class PlaneNotation { StrikeDip, DipDirectionDip, Text };

// Names as stored and as written in CSV ("true", "fold_axis", ...).
std::string_view to_string(North v);
std::string_view to_string(ContactType v);
std::string_view to_string(PositionSource v);
std::string_view to_string(PointSource v);
std::string_view to_string(PlaneKind v);
std::string_view to_string(LineKind v);
std::string_view to_string(Facing v);
std::string_view to_string(PlaneNotation v);

// Parsers for the names above (exact, lower case); nothing for an unknown name.
std::optional<North> parse_north(std::string_view s);
std::optional<ContactType> parse_contact_type(std::string_view s);
std::optional<PositionSource> parse_position_source(std::string_view s);
std::optional<PointSource> parse_point_source(std::string_view s);
std::optional<PlaneKind> parse_plane_kind(std::string_view s);
std::optional<LineKind> parse_line_kind(std::string_view s);
std::optional<Facing> parse_facing(std::string_view s);
std::optional<PlaneNotation> parse_plane_notation(std::string_view s);

// All names of an enumeration, comma-separated, for error messages.
std::string names_of_north();
std::string names_of_contact_type();
std::string names_of_position_source();
std::string names_of_point_source();
std::string names_of_plane_kind();
std::string names_of_line_kind();
std::string names_of_facing();

// ---- records -----------------------------------------------------------------

// The one project row of a file.
struct ProjectInfo {
  std::string file_uuid;  // identity of this file (a camp file and each tablet file differ)
  std::string name;
  std::string utm_zone;               // working UTM zone, "33N" / "19S"; "" when not set
  North north_default = North::True;  // north reference of readings that do not say
  double declination = 0;             // project setting: declination (degrees, east positive) used
                                      // for magnetic readings when no magnetic model is supplied
  // Compare bedding/contact readings that name no contact with the nearest
  // contact whose points lie within this many metres (0: off).
  double nearby_radius = 0;
  // Screening settings of the cross-check (schema version 5), degrees: the
  // friction angle, and the dip-direction windows of the Markland test for
  // planar sliding and of the flexural-toppling test.
  double friction_angle = 30;
  double sliding_window = 20;
  double toppling_window = 30;
  std::string local_device;  // device recorded when the file was created
  std::string created;
  std::string updated;
};

struct Device {
  RecordMeta meta;  // meta.uuid is the device id
  std::string name;
};

struct Person {
  RecordMeta meta;
  std::string name;
  std::string initials;  // unique among live people
};

struct Unit {
  RecordMeta meta;
  std::string code;  // unique among live units, e.g. "Kls"
  std::string name;
  int age_rank = 1;    // 1 = oldest
  std::string colour;  // "#RRGGBB"
};

struct Contact {
  RecordMeta meta;
  std::string name;        // unique among live contacts
  std::string lower_unit;  // unit UUID
  std::string upper_unit;  // unit UUID
  ContactType type = ContactType::Depositional;
};

struct Station {
  RecordMeta meta;
  std::string code;                  // unique among live stations, e.g. "S12"
  double lat = 0, lon = 0;           // WGS84 decimal degrees
  std::optional<double> elevation;   // metres, -500..9000
  std::optional<double> h_accuracy;  // metres, >= 0
  std::optional<double> v_accuracy;  // metres, >= 0
  PositionSource source = PositionSource::Gps;
  std::string unit;      // unit UUID or ""
  std::string observer;  // person UUID or ""
  std::string time;      // ISO 8601 as normalised by parse_iso8601, or ""
  std::string notes;
};

// Declination applied to a magnetic reading, with where it came from.
struct Declination {
  double degrees = 0;  // east positive: true azimuth = magnetic azimuth + declination
  std::string source;  // e.g. "WMM2025", "project setting", "given"
};

struct PlanarReading {
  RecordMeta meta;
  std::string station;  // station UUID
  PlaneKind kind = PlaneKind::Bedding;
  double strike = 0;  // right-hand rule, against TRUE north, [0, 360)
  double dip = 0;     // [0, 90]
  // As measured: the text exactly as typed, how to read it, the north it was
  // measured against, and the strike/dip before the declination was applied.
  std::string typed;
  PlaneNotation notation = PlaneNotation::Text;
  North north = North::True;
  double measured_strike = 0;
  double measured_dip = 0;
  double declination = 0;          // applied (0 for true-north readings)
  std::string declination_source;  // "" for true-north readings
  std::optional<int> quality;      // 1..5
  Facing facing = Facing::Unknown;
  std::string contact;  // contact UUID or ""
  std::string ref;      // notebook reference, unique per station among planar readings, or ""
  std::string time;
  std::string observer;  // person UUID or ""
  std::string notes;
  // The first reading of the same surface when this one measures it again
  // (UUID of a planar reading of the same kind at the same station), or "".
  std::string repeat_of;
};

struct LinearReading {
  RecordMeta meta;
  std::string station;
  LineKind kind = LineKind::Lineation;
  double trend = 0;   // against TRUE north, [0, 360)
  double plunge = 0;  // [0, 90]
  std::string typed;  // "trend/plunge" as typed, or the rake as typed
  North north = North::True;
  double measured_trend = 0;
  double measured_plunge = 0;
  double declination = 0;
  std::string declination_source;
  std::string host_plane;      // planar reading UUID or ""
  std::optional<double> rake;  // 0..180 on the host plane, when measured as a rake
  std::string ref;
  std::string time;
  std::string observer;
  std::string notes;
};

struct ContactPoint {
  RecordMeta meta;
  std::string contact;  // contact UUID
  double lat = 0, lon = 0;
  std::optional<double> elevation;
  std::optional<double> h_accuracy;
  std::optional<double> v_accuracy;
  PointSource source = PointSource::Gps;
  std::string time;
  std::string observer;
  std::string notes;
};

struct Photo {
  RecordMeta meta;
  std::string station;  // station UUID or ""
  std::string path;     // as given, relative to the project file when possible
  std::string sha256;   // 64 lower-case hex digits of the file's content
  std::string caption;
  std::string time;
};

// One row of the audit trail: who changed what, when, on which device.
struct AuditEntry {
  std::string uuid;
  std::string at;          // UTC
  std::string device;      // device UUID
  std::string person;      // person UUID or ""
  std::string table;       // "stations", "planes", ...
  std::string record;      // record UUID
  std::string action;      // "insert", "update", "delete", "restore"
  std::string old_values;  // JSON object of the record before ("" for insert)
  std::string new_values;  // JSON object after ("" for delete)
};

}  // namespace cairn::store
