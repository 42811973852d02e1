// Writing a set of layers as one GeoJSON FeatureCollection (RFC 7946).
#pragma once
#include <ostream>

#include "formats/layers.h"

namespace cairn::formats {

// Streams SET to OUT as an RFC 7946 FeatureCollection in WGS84 longitude,
// latitude; each feature carries its layer's name in the property "layer".
void write_geojson(std::ostream& out, const LayerSet& set);

}  // namespace cairn::formats
