// `cairn export FILE OUT`: a GeoPackage (OUT.gpkg), a GeoJSON file
// (OUT.geojson) or a folder of CSV files in `cairn import`'s columns
// (app/core/export.h). The fitted contacts and flags come from the same
// cross-check as `cairn check`, with the World Magnetic Model's declination.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "formats/json.h"
#include "app/cli/magnetic_source.h"
#include "app/cli/project_access.h"
#include "app/core/export.h"

namespace cairn::cli {

using formats::JsonWriter;
namespace {

struct ExportArgs {
  std::string file, target;
  bool json = false;
};

int run(const ExportArgs& a, std::ostream& out, std::ostream& err) {
  const std::string& file = a.file;
  const std::string& target = a.target;
  const bool json = a.json;
  auto format = core::export_format_for(target);
  if (!format) throw std::invalid_argument(format.error());

  auto project = open_project(file, true, err);
  core::ExportOptions o;
  if (*format != core::ExportFormat::CsvFolder && *format != core::ExportFormat::Gpx) {
    try {
      const geo::MagneticModel* model = &wmm();
      o.local_declination = [model](double lat, double lon, double year) -> std::optional<double> {
        return model->evaluate(lat, lon, 0.0, year).declination;
      };
    } catch (const std::exception& e) {
      err << "warning: no magnetic model (" << e.what() << "); declination-suspect is not checked\n";
    }
  }
  const core::ExportSummary s = core::export_project(project, target, o);
  const char* what = s.format == core::ExportFormat::GeoPackage ? "GeoPackage"
                     : s.format == core::ExportFormat::GeoJson  ? "GeoJSON"
                     : s.format == core::ExportFormat::Gpx      ? "GPX"
                                                                 : "CSV folder";
  if (json) {
    JsonWriter j(out);
    j.begin_object();
    j.key("path").value(s.path);
    j.key("format").value(what);
    j.key("epsg").value(s.epsg ? std::optional<int>(s.epsg) : std::nullopt);
    j.key("layers").begin_array();
    for (const auto& l : s.layers) {
      j.begin_object();
      j.key("name").value(l.name);
      j.key("count").value(static_cast<unsigned long>(l.count));
      j.end_object();
    }
    j.end_array();
    j.end_object();
    out << "\n";
    return 0;
  }
  out << "wrote " << what << " " << s.path;
  if (s.epsg) out << " (EPSG:" << s.epsg << ")";
  out << "\n";
  for (const auto& l : s.layers) out << "  " << l.name << ": " << l.count << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<ExportArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "OUT", a->target, "OUT.gpkg (GeoPackage), OUT.geojson (GeoJSON) or a FOLDER (CSV files)");
  flag(app, "--json", a->json, "print a JSON summary of what was written");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"export", "export to a GeoPackage, a GeoJSON file, or CSV files that `cairn import` reads back",
                      define});

}  // namespace cairn::cli
