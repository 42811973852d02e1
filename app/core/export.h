// Exporting a project for a GIS or a spreadsheet: `cairn export FILE OUT`.
//
//  - OUT ending in .gpkg: a GeoPackage 1.3 (OGC 12-128r18) written directly
//    with SQLite. Layers (feature tables of points) in the project's UTM zone
//    (EPSG 326zz north / 327zz south; the zone the cross-check works in):
//      stations, planar_readings, linear_readings, contact_points,
//      fitted_contacts (one point per contact at the centroid of its mapped
//      points, with the fitted plane, its verdict and its flags) and flags
//      (the cross-check's findings at their station or contact); with a
//      terrain (storage/terrain.h) also predicted_traces (MultiLineString per
//      fitted contact: `contact`, `interval` = mean half width in metres of
//      its 95% trace band across the trace) and trace_bands (MultiPolygon of
//      the terrain cells inside the band: `contact`, `confidence` = 0.95);
//      and day_tracks (LineString per person and UTC day through the day
//      track's fixes: `person` initials, `day`, `start`, `end`, `fixes`,
//      `length_m` on the WGS84 ellipsoid; app/core/export_track.h).
//  - OUT ending in .geojson: one RFC 7946 FeatureCollection in WGS84
//    longitude/latitude with the same features; RFC 7946 has no layers, so
//    each feature carries its layer's name in the property "layer".
//    Coordinates are longitude, latitude only: elevations are heights above
//    sea level, not the ellipsoidal heights RFC 7946 gives a third coordinate,
//    so they stay a property.
//  - any other OUT (an existing folder, or a path ending in '/' or without an
//    extension): a folder with one CSV per record kind (units, contacts,
//    stations, planes, lines, points) in exactly the columns `cairn import`
//    reads (storage/import.h list_csv), so that exporting, importing into a
//    fresh project and exporting again gives the same files.
//
// Symbol rotation. Planar and linear readings and fitted contacts carry
// `symbol_rotation`: degrees clockwise from the north of the layer's own
// coordinate grid to the right-hand-rule strike (readings of lines: to the
// trend). Draw the strike-dip symbol (FGDC-STD-013-2006) with its strike line
// pointing up the page and its dip tick on the right, then turn it clockwise
// by symbol_rotation. In the GeoPackage the grid is UTM, so the rotation is the
// true strike less the meridian convergence at the point; in GeoJSON (longitude
// and latitude) it is the true strike.
//
// Every output is written under a temporary name and renamed into place, so a
// failure leaves no half-written file. The GeoPackage and GeoJSON are written
// feature by feature as the records are read (app/core/export_layers.h), so
// memory holds the cross-check and not the season's features.
#pragma once
#include <functional>
#include <string>
#include <vector>

#include "geomath/crosscheck.h"
#include "geomath/result.h"
#include "app/core/check_input.h"
#include "storage/project.h"

namespace cairn::core {

using store::Project;

enum class ExportFormat { GeoPackage, GeoJson, CsvFolder, Gpx };

// The format OUT asks for, or a failure naming OUT.
Result<ExportFormat> export_format_for(const std::string& out);

struct ExportOptions {
  // Declination of a magnetic model (for the cross-check's declination-suspect
  // rule); empty: that rule is not checked.
  LocalDeclination local_declination;
  geo::CheckOptions check;
  // Called as features are written (done, in all), for a progress line; at the end with done == in all.
  std::function<void(size_t done, size_t total)> progress;
};

struct ExportedLayer {
  std::string name;  // layer name, or CSV file name
  size_t count = 0;  // features, or data rows
};

struct ExportSummary {
  ExportFormat format = ExportFormat::GeoPackage;
  std::string path;
  std::vector<ExportedLayer> layers;
  int epsg = 0;  // EPSG code of the geometries (0 for CSV)
};

// Writes OUT in the format its name asks for. Throws std::runtime_error (or
// std::invalid_argument for an OUT of no known format) naming what failed.
ExportSummary export_project(Project& p, const std::string& out, const ExportOptions& o = {});

ExportSummary export_geopackage(Project& p, const std::string& path, const ExportOptions& o = {});
ExportSummary export_geojson(Project& p, const std::string& path, const ExportOptions& o = {});
// The day tracks as GPX 1.1 (OUT.gpx): one track per person and day, named
// "INITIALS YYYY-MM-DD" (app/core/export_gpx.cpp, formats/gpx_write.h).
ExportSummary export_gpx_tracks(Project& p, const std::string& path);
ExportSummary export_csv_folder(Project& p, const std::string& dir);

}  // namespace cairn::core
