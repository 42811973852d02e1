// `cairn export FILE out.geojson`: the layers written as GeoJSON (formats/geojson.h),
// feature by feature into the temporary file as the records are read.
#include <cerrno>
#include <cstring>
#include <fstream>
#include <stdexcept>

#include "app/core/export.h"
#include "app/core/export_layers.h"
#include "formats/atomic_file.h"
#include "formats/geojson.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

ExportSummary export_geojson(Project& p, const std::string& path, const ExportOptions& o) {
  ExportSummary sum;
  sum.format = ExportFormat::GeoJson;
  sum.path = path;
  formats::replace_file_atomically(path, [&](const std::string& tmp) {
    sum.layers.clear();
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error(std::strerror(errno));
    formats::GeoJsonWriter w(out);
    CountingSink c(w, sum);
    stream_layers(p, o, RotationFrame::TrueNorth, c);
    w.finish();
    out.close();
    if (!out) throw std::runtime_error("the file could not be written in full (disk full?)");
  });
  sum.epsg = 4326;
  return sum;
}

}  // namespace cairn::core
