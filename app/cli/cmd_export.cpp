// `cairn export FILE OUT`: a GeoPackage (OUT.gpkg), a GeoJSON file
// (OUT.geojson) or a folder of CSV files in `cairn import`'s columns
// (app/core/export.h). The fitted contacts and flags come from the same
// cross-check as `cairn check`, with the World Magnetic Model's declination.
// A long export of a GeoPackage or GeoJSON shows a progress line on stderr
// (app/core/progress.h: features written, past 2 s, on a terminal or with --progress).
#include <filesystem>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "formats/json.h"
#include "app/cli/magnetic_source.h"
#include "app/cli/project_access.h"
#include "app/core/export.h"
#include "app/core/progress.h"

namespace cairn::cli {

using formats::JsonWriter;
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
      throw std::runtime_error(target +
                               " is a folder that is not empty; name a new or empty folder, or add "
                               "--overwrite to replace the CSV files in it");
  } else {
    throw std::runtime_error(target + " exists; name another file, or add --overwrite to replace it");
  }
}

struct ExportArgs {
  std::string file, target;
  bool json = false, overwrite = false, show_progress = false;
};

int run(const ExportArgs& a, std::ostream& out, std::ostream& err) {
  const std::string& file = a.file;
  const std::string& target = a.target;
  const bool json = a.json;
  const bool overwrite = a.overwrite;
  auto format = core::export_format_for(target);
  if (!format) throw std::invalid_argument(format.error());
  refuse_to_overwrite(file, target, overwrite);

  auto project = open_project(file, true, err);
  core::ExportOptions o;
  if (*format != core::ExportFormat::CsvFolder && *format != core::ExportFormat::Gpx)
    o.local_declination = wmm_declination_or_warn(err);
  core::ProgressLine line(err, "exporting", a.show_progress);
  size_t done = 0, total = 0;
  o.progress = [&](size_t d, size_t t) {
    done = d, total = t;
    line.update(d, t);
  };
  const core::ExportSummary s = core::export_project(project, target, o);
  line.finish(done, total);
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
  positional(app, "OUT", a->target,
             "OUT.gpkg (GeoPackage), OUT.geojson (GeoJSON), OUT.gpx (the day tracks, GPX 1.1) or a FOLDER (CSV files)");
  flag(app, "--overwrite", a->overwrite,
       "replace an existing OUT file, or the CSV files in a folder that is not empty (never a project file)");
  flag(app, "--json", a->json, "print a JSON summary of what was written");
  flag(app, "--progress", a->show_progress,
       "a progress line on stderr past 2 s even when stderr is not a terminal (CAIRN_PROGRESS_AFTER=SECONDS "
       "changes the 2 s)");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"export", "export to a GeoPackage, a GeoJSON file, or CSV files that `cairn import` reads back",
                      define});

}  // namespace cairn::cli
