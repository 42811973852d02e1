// Writing a set of layers as one GeoJSON FeatureCollection (RFC 7946).
#pragma once
#include <memory>
#include <ostream>

#include "formats/layers.h"

namespace cairn::formats {

class JsonWriter;

// Streams SET to OUT as an RFC 7946 FeatureCollection in WGS84 longitude,
// latitude; each feature carries its layer's name in the property "layer".
void write_geojson(std::ostream& out, const LayerSet& set);

// The same, one feature at a time: begin writes the collection's opening,
// end_layer flushes, finish() its close (the bytes are those of write_geojson).
class GeoJsonWriter final : public LayerSink {
 public:
  explicit GeoJsonWriter(std::ostream& out);
  ~GeoJsonWriter() override;
  void begin(const geo::UtmZone& zone) override;
  void begin_layer(const Layer& l) override;
  void feature(Feature&& f) override;
  void end_layer() override;
  void finish();

 private:
  std::ostream& out_;
  std::unique_ptr<JsonWriter> j_;
  Layer layer_;
  int uuid_field_ = -1;
};

}  // namespace cairn::formats
