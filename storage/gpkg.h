// Writing a set of layers as a GeoPackage 1.3 (OGC 12-128r18): an SQLite
// database, so it is written here, in the one module that speaks SQL.
#pragma once
#include <string>

#include "formats/layers.h"

namespace cairn::store {

// Creates a new GeoPackage at PATH (which must not exist) holding SET's layers
// as point feature tables in EPSG:EPSG. Throws on any failure; the caller
// writes to a temporary file and renames it (formats/atomic_file.h).
void write_geopackage(const std::string& path, const formats::LayerSet& set, int epsg);

}  // namespace cairn::store
