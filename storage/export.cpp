#include "storage/export.h"

#include <cctype>
#include <filesystem>
#include <stdexcept>

#include "storage/export_layers.h"
#include "formats/csv.h"
#include "storage/import.h"

namespace fs = std::filesystem;

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

std::string lower_extension(const std::string& path) {
  std::string e = fs::path(path).extension().string();
  for (auto& c : e) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return e;
}

}  // namespace

Result<ExportFormat> export_format_for(const std::string& out) {
  if (out.empty()) return Result<ExportFormat>::failure("no output named");
  const std::string e = lower_extension(out);
  if (e == ".gpkg") return ExportFormat::GeoPackage;
  if (e == ".geojson") return ExportFormat::GeoJson;
  if (e == ".gpx") return ExportFormat::Gpx;
  std::error_code ec;
  if (fs::is_directory(out, ec) || out.back() == '/' || e.empty()) return ExportFormat::CsvFolder;
  return Result<ExportFormat>::failure("cannot tell what to write from '" + out +
                                       "': name a .gpkg or .geojson file, or a folder for CSV files");
}

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

ExportSummary export_csv_folder(Project& p, const std::string& dir) {
  const ImportKind kinds[] = {ImportKind::Units,    ImportKind::Contacts, ImportKind::Stations,
                              ImportKind::Planes,   ImportKind::Lines,    ImportKind::Points};
  // Everything is read before anything is written.
  std::vector<std::pair<std::string, std::string>> files;
  ExportSummary s;
  s.format = ExportFormat::CsvFolder;
  s.path = dir;
  for (ImportKind k : kinds) {
    std::string csv = list_csv(p, k);
    const std::string name = std::string(to_string(k)) + ".csv";
    auto table = parse_csv(csv, name);  // rows as RFC 4180 counts them (notes may hold line breaks)
    s.layers.push_back({name, table ? table->rows.size() : 0});
    files.emplace_back(name, std::move(csv));
  }
  std::error_code ec;
  fs::create_directories(dir, ec);
  if (ec || !fs::is_directory(dir)) throw std::runtime_error("cannot make the folder " + dir + (ec ? ": " + ec.message() : ""));
  for (const auto& [name, text] : files) write_file_atomically((fs::path(dir) / name).string(), text);
  return s;
}

ExportSummary export_project(Project& p, const std::string& out, const ExportOptions& o) {
  auto f = export_format_for(out);
  if (!f) throw std::invalid_argument(f.error());
  switch (*f) {
    case ExportFormat::GeoPackage: return export_geopackage(p, out, o);
    case ExportFormat::GeoJson: return export_geojson(p, out, o);
    case ExportFormat::CsvFolder: return export_csv_folder(p, out);
    case ExportFormat::Gpx: return export_gpx_tracks(p, out);
  }
  throw std::logic_error("unknown export format");
}

}  // namespace cairn::store
