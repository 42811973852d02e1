// The features an export writes, as plain data: layers of fields and
// features with a WGS84 position and the same place in a UTM zone. Built by
// app/core/export_layers.h, written by the GeoPackage writer (storage/gpkg.h)
// and the GeoJSON writer (formats/geojson.h).
#pragma once
#include <array>
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

// Parts of a line or polygon geometry: a MultiLineString's lines, or a
// MultiPolygon's polygons (each one closed exterior ring, no holes).
using Parts = std::vector<std::vector<std::array<double, 2>>>;

struct Feature {
  std::optional<geo::LatLon> where;   // WGS84; nothing: no geometry
  std::optional<geo::UtmPoint> grid;  // the same place in the export's UTM zone
  // Layers of lines or polygons: the parts in UTM metres (E, N) and the same in
  // WGS84 (longitude, latitude); `where`/`grid` stay empty then.
  Parts grid_parts, lonlat_parts;
  std::vector<FieldValue> values;  // one per field of the layer
};

struct Layer {
  std::string name;   // table name / value of the GeoJSON "layer" property
  std::string title;  // human-readable identifier
  std::string description;
  std::vector<FieldDef> fields;
  std::vector<Feature> features;
  // GeoPackage geometry type name (clause 2.1.6): POINT, LINESTRING (the first
  // part of each feature), MULTILINESTRING or MULTIPOLYGON.
  std::string geometry = "POINT";
};

// What `symbol_rotation` is measured from: the UTM grid's north or true north.
enum class RotationFrame { Grid, TrueNorth };

struct LayerSet {
  geo::UtmZone zone;
  std::vector<Layer> layers;
};

// Where layers go one feature at a time (the GeoPackage and GeoJSON writers,
// or a LayerSet), so that an export need not hold a season's features at once.
// Calls come as begin(zone), then for each layer begin_layer, feature..., end_layer.
class LayerSink {
 public:
  virtual ~LayerSink() = default;
  virtual void begin(const geo::UtmZone& zone) = 0;
  // L's name, title, description, fields and geometry type (its features are not used).
  virtual void begin_layer(const Layer& l) = 0;
  // One feature of the current layer: a value per field.
  virtual void feature(Feature&& f) = 0;
  virtual void end_layer() = 0;
};

// Collects the layers into a LayerSet.
class LayerCollector final : public LayerSink {
 public:
  void begin(const geo::UtmZone& zone) override { set.zone = zone; }
  void begin_layer(const Layer& l) override;
  void feature(Feature&& f) override { set.layers.back().features.push_back(std::move(f)); }
  void end_layer() override {}
  LayerSet set;
};

// Sends SET through SINK.
void send_layers(const LayerSet& set, LayerSink& sink);

// EPSG code of a WGS84 / UTM zone: 32600 + zone (north), 32700 + zone (south).
int utm_epsg(const geo::UtmZone& zone);
// OGC WKT (version 1, as in the EPSG registry's export) of a WGS84 / UTM zone.
std::string utm_wkt(const geo::UtmZone& zone);

}  // namespace cairn::formats
