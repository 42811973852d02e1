// Writing a set of layers as a GeoPackage 1.3 (OGC 12-128r18): an SQLite
// database, so it is written here, in the one module that speaks SQL.
#pragma once
#include <memory>
#include <string>

#include "formats/layers.h"

namespace cairn::store {

// Creates a new GeoPackage at PATH (which must not exist) holding SET's layers
// as point feature tables in EPSG:EPSG. Throws on any failure; the caller
// writes to a temporary file and renames it (formats/atomic_file.h).
void write_geopackage(const std::string& path, const formats::LayerSet& set, int epsg);

// The same, one feature at a time, in one transaction (SQLite keeps a bounded
// page cache and spills to the file): begin() makes the tables of the
// standard, begin_layer a feature table, feature() inserts one row, end_layer()
// its gpkg_contents and gpkg_geometry_columns rows, finish() commits.
// Features are written as they come; nothing of a layer is held.
class GeoPackageWriter final : public formats::LayerSink {
 public:
  // EPSG 0: the zone's own (formats::utm_epsg).
  explicit GeoPackageWriter(const std::string& path, int epsg = 0);
  ~GeoPackageWriter() override;
  void begin(const geo::UtmZone& zone) override;
  void begin_layer(const formats::Layer& l) override;
  void feature(formats::Feature&& f) override;
  void end_layer() override;
  void finish();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace cairn::store
