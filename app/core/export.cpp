#include "app/core/export.h"

#include <cctype>
#include <filesystem>
#include <stdexcept>

#include "app/core/export_layers.h"
#include "formats/atomic_file.h"
#include "formats/csv.h"
#include "formats/temp_files.h"
#include "storage/gpkg.h"
#include "storage/import.h"

namespace fs = std::filesystem;

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

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

ExportSummary export_csv_folder(Project& p, const std::string& dir) {
  const ImportKind kinds[] = {ImportKind::Units,  ImportKind::Contacts, ImportKind::Stations,
                              ImportKind::Planes, ImportKind::Lines,    ImportKind::Points};
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
  std::string folder = dir;
  while (folder.size() > 1 && folder.back() == '/') folder.pop_back();
  remove_stale_temp_files(folder);  // the folder of an export that was killed
  std::error_code ec;
  if (!fs::exists(folder, ec) || (fs::is_directory(folder, ec) && fs::is_empty(folder, ec))) {
    // A new folder appears whole or not at all: its files are written in a
    // temporary folder beside it, which is then renamed (over an empty one).
    const fs::path parent = fs::absolute(folder).parent_path();
    fs::create_directories(parent, ec);
    TempPath tmp(folder, true);
    for (const auto& [name, text] : files) write_file_atomically((fs::path(tmp.path()) / name).string(), text);
    fs::rename(tmp.path(), folder, ec);
    if (ec) throw std::runtime_error("cannot make the folder " + folder + ": " + ec.message());
    tmp.release();
    sync_to_disk(parent.string());
    return s;
  }
  // An existing folder (--overwrite): each file is replaced whole, one by one.
  if (!fs::is_directory(folder, ec))
    throw std::runtime_error("cannot make the folder " + folder + ": a file has that name");
  for (const auto& [name, text] : files) write_file_atomically((fs::path(folder) / name).string(), text);
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

void CountingSink::begin(const geo::UtmZone& zone) {
  summary_.epsg = formats::utm_epsg(zone);
  to_.begin(zone);
}
void CountingSink::begin_layer(const Layer& l) {
  summary_.layers.push_back({l.name, 0});
  to_.begin_layer(l);
}
void CountingSink::feature(Feature&& f) {
  ++summary_.layers.back().count;
  to_.feature(std::move(f));
}

ExportSummary export_geopackage(Project& p, const std::string& path, const ExportOptions& o) {
  ExportSummary s;
  s.format = ExportFormat::GeoPackage;
  s.path = path;
  formats::replace_file_atomically(path, [&](const std::string& tmp) {
    s.layers.clear();
    store::GeoPackageWriter w(tmp);
    CountingSink c(w, s);
    stream_layers(p, o, RotationFrame::Grid, c);
    w.finish();
  });
  return s;
}

}  // namespace cairn::core
