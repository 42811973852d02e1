// Loads a project's live records into the cross-check engine's input: stations
// and contact points projected into the working UTM zone, readings with their
// facing, quality and time, and the local declination of the magnetic model at
// each reading's station and date (for the declination-suspect rule).
#pragma once
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <unordered_map>

#include "geomath/crosscheck.h"
#include "geomath/geodesy.h"
#include "storage/project.h"

namespace cairn::core {

using store::Project;

// Declination (degrees east) of a magnetic model at a place and decimal year, or nothing.
using LocalDeclination = std::function<std::optional<double>(double lat, double lon, double decimal_year)>;

struct CheckData {
  geo::CheckInput input;
  geo::UtmZone zone;                                       // the zone the positions are in
  std::unordered_map<std::string, std::string> unit_code;  // unit UUID -> code
  // Where the contact points' elevations came from: contact UUID -> source
  // ("gps", "map", "dem", ... or "none" without an elevation) -> points; every
  // live point, fitted or not.
  std::map<std::string, std::map<std::string, int>> elevation_sources;
};

// Throws std::runtime_error naming the record when a position cannot be projected.
CheckData load_check_input(Project& p, const LocalDeclination& local_declination = {});

// Minutes since 1970-01-01T00:00Z of an ISO 8601 time as storage normalises it
// (a time without an offset is taken as UTC; a date alone as its midnight); nothing for "".
std::optional<double> minutes_since_epoch(const std::string& iso);
// Decimal year of an ISO 8601 date or time (the WMM's convention, via the calendar date).
std::optional<double> decimal_year_of(const std::string& iso);

}  // namespace cairn::core
