// The features an export writes, as plain data: layers of fields and
// features with a WGS84 position and the same place in a UTM zone. Built by
// app/core/export_layers.h, written by the GeoPackage writer (storage/gpkg.h)
// and the GeoJSON writer (formats/geojson.h).
#pragma once
#include <cstdint>
#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "geomath/geodesy.h"

namespace cairn::formats {

enum class FieldType { Text, Real, Integer, Boolean };

struct FieldDef {
  std::string name;
  FieldType type;
};

// Empty (null), text, number, whole number or yes/no.
using FieldValue = std::variant<std::monostate, std::string, double, int64_t, bool>;

struct Feature {
  std::optional<geo::LatLon> where;   // WGS84; nothing: no geometry
  std::optional<geo::UtmPoint> grid;  // the same place in the export's UTM zone
  std::vector<FieldValue> values;     // one per field of the layer
};

struct Layer {
  std::string name;         // table name / value of the GeoJSON "layer" property
  std::string title;        // human-readable identifier
  std::string description;
  std::vector<FieldDef> fields;
  std::vector<Feature> features;
};

// What `symbol_rotation` is measured from: the UTM grid's north or true north.
enum class RotationFrame { Grid, TrueNorth };

struct LayerSet {
  geo::UtmZone zone;
  std::vector<Layer> layers;
};

// EPSG code of a WGS84 / UTM zone: 32600 + zone (north), 32700 + zone (south).
int utm_epsg(const geo::UtmZone& zone);
// OGC WKT (version 1, as in the EPSG registry's export) of a WGS84 / UTM zone.
std::string utm_wkt(const geo::UtmZone& zone);

}  // namespace cairn::formats
