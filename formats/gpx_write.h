// Writing tracks as GPX 1.1 (GPX 1.1 schema, http://www.topografix.com/GPX/1/1/gpx.xsd):
// a root `gpx` (version="1.1", a creator, the namespace
// http://www.topografix.com/GPX/1/1) holding one `trk` per track, each with its
// `name` and `trkseg` segments of `trkpt` points (lat/lon attributes, then the
// optional `ele` and `time` children, in the schema's order).
#pragma once
#include <optional>
#include <string>
#include <vector>

namespace cairn::formats {

struct GpxTrackPoint {
  double lat = 0, lon = 0;          // WGS84 degrees: -90..90, -180..180
  std::optional<double> elevation;  // metres
  std::string time;                 // ISO 8601 / xsd:dateTime, "" when unknown
};

struct GpxTrack {
  std::string name;
  std::vector<std::vector<GpxTrackPoint>> segments;
};

// The GPX 1.1 document (UTF-8). Text is escaped for XML; a latitude or
// longitude out of range or not finite throws std::invalid_argument naming
// the track and point, and nothing is returned.
std::string write_gpx_tracks(const std::vector<GpxTrack>& tracks, const std::string& creator);

}  // namespace cairn::formats
