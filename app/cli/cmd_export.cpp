// `cairn export FILE OUT`: a GeoPackage (OUT.gpkg), a GeoJSON file
// (OUT.geojson) or a folder of CSV files in `cairn import`'s columns
// (storage/export.h). The fitted contacts and flags come from the same
// cross-check as `cairn check`, with the World Magnetic Model's declination.
#include <filesystem>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/json.h"
#include "app/cli/magnetic_source.h"
#include "app/cli/project_access.h"
#include "storage/export.h"

namespace cairn::cli {
namespace {

namespace fs = std::filesystem;

// An export never replaces a project file (its own or another), and replaces
// an existing file or a folder that holds anything only with --overwrite.
void refuse_to_overwrite(const std::string& file, const std::string& target, bool overwrite) {
  std::error_code ec;
  if (!fs::exists(target, ec)) return;
  if (fs::equivalent(file, target, ec) || store::is_project_file(target))
    throw std::runtime_error(target + " is a Cairn project file; an export never replaces one: name another OUT");
  if (overwrite) return;
  if (fs::is_directory(target, ec)) {
    if (!fs::is_empty(target, ec))
      throw std::runtime_error(target + " is a folder that is not empty; name a new or empty folder, or add "
                                        "--overwrite to replace the CSV files in it");
  } else {
    throw std::runtime_error(target + " exists; name another file, or add --overwrite to replace it");
  }
}

int run(const Args& in, std::ostream& out, std::ostream& err) {
  Args args = in;
  const bool json = take_flag(args, "--json");
  const bool overwrite = take_flag(args, "--overwrite");
  reject_unknown_options(args);
  if (args.size() != 2) throw std::invalid_argument("expected FILE and OUT");
  const std::string& file = args[0];
  const std::string& target = args[1];
  auto format = store::export_format_for(target);
  if (!format) throw std::invalid_argument(format.error());
  refuse_to_overwrite(file, target, overwrite);

  auto project = open_project(file, true, err);
  store::ExportOptions o;
  if (*format != store::ExportFormat::CsvFolder) {
    try {
      const geo::MagneticModel* model = &wmm();
      o.local_declination = [model](double lat, double lon, double year) -> std::optional<double> {
        return model->evaluate(lat, lon, 0.0, year).declination;
      };
    } catch (const std::exception& e) {
      err << "warning: no magnetic model (" << e.what() << "); declination-suspect is not checked\n";
    }
  }
  const store::ExportSummary s = store::export_project(project, target, o);
  const char* what = s.format == store::ExportFormat::GeoPackage ? "GeoPackage"
                     : s.format == store::ExportFormat::GeoJson  ? "GeoJSON"
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

}  // namespace

CAIRN_COMMAND(Command{"export", "cairn export FILE OUT.gpkg|OUT.geojson|FOLDER [--overwrite] [--json]",
                      "export to a GeoPackage, a GeoJSON file, or CSV files that `cairn import` reads back",
                      run});

}  // namespace cairn::cli
