// `cairn export FILE out.geojson`: the layers written as GeoJSON (formats/geojson.h).
#include <sstream>

#include "app/core/export.h"
#include "app/core/export_layers.h"
#include "formats/atomic_file.h"
#include "formats/geojson.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

ExportSummary export_geojson(Project& p, const std::string& path, const ExportOptions& o) {
  const LayerSet set = build_layers(p, o, RotationFrame::TrueNorth);
  ExportSummary sum;
  sum.format = ExportFormat::GeoJson;
  sum.path = path;
  sum.epsg = 4326;
  for (const Layer& l : set.layers) sum.layers.push_back({l.name, l.features.size()});
  std::ostringstream out;
  formats::write_geojson(out, set);
  formats::write_file_atomically(path, out.str());
  return sum;
}

}  // namespace cairn::core
