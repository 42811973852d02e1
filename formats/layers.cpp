#include "formats/layers.h"

namespace cairn::formats {

int utm_epsg(const geo::UtmZone& z) { return (z.northp ? 32600 : 32700) + z.zone; }

// The EPSG definition of WGS 84 / UTM zone N|S: Transverse Mercator with
// latitude of origin 0, central meridian 6*zone - 183 degrees, scale factor
// 0.9996, false easting 500 000 m and false northing 0 (north) or 10 000 000 m
// (south) (DMA Technical Manual 8358.2, "The Universal Grids", 1989).
std::string utm_wkt(const geo::UtmZone& z) {
  const std::string name = "WGS 84 / UTM zone " + std::to_string(z.zone) + (z.northp ? "N" : "S");
  return "PROJCS[\"" + name +
         "\",GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563,AUTHORITY[\"EPSG\","
         "\"7030\"]],AUTHORITY[\"EPSG\",\"6326\"]],PRIMEM[\"Greenwich\",0,AUTHORITY[\"EPSG\",\"8901\"]],UNIT["
         "\"degree\",0.0174532925199433,AUTHORITY[\"EPSG\",\"9122\"]],AUTHORITY[\"EPSG\",\"4326\"]],"
         "PROJECTION[\"Transverse_Mercator\"],PARAMETER[\"latitude_of_origin\",0],PARAMETER[\"central_meridian\"," +
         std::to_string(6 * z.zone - 183) +
         "],PARAMETER[\"scale_factor\",0.9996],PARAMETER[\"false_easting\",500000],PARAMETER[\"false_northing\"," +
         (z.northp ? "0" : "10000000") +
         "],UNIT[\"metre\",1,AUTHORITY[\"EPSG\",\"9001\"]],AXIS[\"Easting\",EAST],AXIS[\"Northing\",NORTH],"
         "AUTHORITY[\"EPSG\",\"" +
         std::to_string(utm_epsg(z)) + "\"]]";
}

}  // namespace cairn::formats

namespace cairn::formats {

void LayerCollector::begin_layer(const Layer& l) {
  Layer header = l;
  header.features.clear();
  set.layers.push_back(std::move(header));
}

void send_layers(const LayerSet& set, LayerSink& sink) {
  sink.begin(set.zone);
  for (const Layer& l : set.layers) {
    sink.begin_layer(l);
    for (const Feature& f : l.features) sink.feature(Feature(f));
    sink.end_layer();
  }
}

}  // namespace cairn::formats
