// Waypoints of a GPX 1.1 file (GPX 1.1 schema,
// http://www.topografix.com/GPX/1/1/gpx.xsd): the `wpt` elements of the root
// `gpx` element in the namespace http://www.topografix.com/GPX/1/1, with
// their `lat`/`lon` attributes (latitudeType -90..90, longitudeType -180..180),
// and the optional `ele` (metres), `time` (xsd:dateTime), `name`, `cmt`, `desc`
// and `sym` children. Elements of other namespaces (receiver extensions) and
// routes and tracks are left alone.
#pragma once
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace cairn::formats {

struct GpxWaypoint {
  double lat = 0, lon = 0;
  std::optional<double> elevation;
  std::string time;  // as in the file ("" when absent)
  std::string name, comment, description, symbol;
  int line = 0, column = 0;  // position of the <wpt> tag in the file
};

struct GpxFile {
  std::string creator;  // the root's creator attribute
  std::vector<GpxWaypoint> waypoints;
  // One entry per bad waypoint value or structure problem:
  // "FILE:LINE:COLUMN: rule: message". A file with errors yields no waypoints
  // the caller should trust.
  std::vector<std::string> errors;
};

// Parses GPX text. XML errors and a wrong root are reported in `errors` too.
GpxFile parse_gpx(std::string_view text, const std::string& filename);

}  // namespace cairn::formats
