// `cairn terrain FILE DEM [--vertical-accuracy M]` stores a digital elevation
// model in the project (storage/terrain.h), reprojected into the project's UTM
// zone and clipped to its area plus kTerrainMargin; `cairn terrain FILE` prints
// what is stored; `--remove` drops it; `--snap CONTACT` gives a contact's points
// the terrain's elevations (audited, undoable).
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <iomanip>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "formats/raster.h"
#include "geomath/geodesy.h"
#include "app/core/check_input.h"
#include "storage/repository.h"
#include "storage/terrain.h"

namespace cairn::cli {
namespace {

// Metres of ground kept around the project's stations and points: room for the
// traces and the Plan beyond the last point (common practice, no published source).
constexpr double kTerrainMargin = 1000;

void print_info(const store::TerrainInfo& t, long long missing, std::ostream& out) {
  out << std::fixed << std::setprecision(2);
  out << "terrain " << t.name << "\n";
  out << "  CRS EPSG:" << t.epsg << ", cell " << t.cell << " m, " << t.nx << " x " << t.ny << " cells\n";
  out << "  extent E " << t.west << " .. " << (t.west + t.nx * t.cell) << ", N " << (t.north - t.ny * t.cell) << " .. "
      << t.north << "\n";
  out << "  nodata " << t.nodata << " (" << missing << " cells without elevation)\n";
  out << "  vertical accuracy ";
  if (t.vertical_accuracy)
    out << *t.vertical_accuracy << " m (1-sigma)\n";
  else
    out << "not stated\n";
  out << "  stored " << t.stored_bytes << " bytes compressed, digest " << t.digest.substr(0, 16) << "\n";
  out << "  attached " << t.created << "\n";
}

struct TerrainArgs {
  std::string file, dem;
  bool remove = false;
  std::optional<std::string> snap;
  std::optional<double> vertical_accuracy;
};

int run(const TerrainArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args =
      a.dem.empty() ? std::vector<std::string>{a.file} : std::vector<std::string>{a.file, a.dem};
  const std::string& file = a.file;
  const bool attach = !a.dem.empty();
  const bool remove = a.remove;
  const auto& snap = a.snap;
  if (static_cast<int>(attach) + static_cast<int>(remove) + static_cast<int>(snap.has_value()) > 1)
    throw std::invalid_argument("give one of DEM, --remove, --snap CONTACT");
  if (a.vertical_accuracy && !attach) throw std::invalid_argument("--vertical-accuracy goes with a DEM");
  const std::optional<double> accuracy = a.vertical_accuracy;

  if (!attach && !remove && !snap) {
    auto project = open_project(file, true, err);
    const auto info = store::terrain_info(project);
    if (!info) {
      out << "no terrain in " << file << "\n";
      return 0;
    }
    long long missing = 0;
    if (const auto g = store::load_terrain(project))
      for (float v : g->z) missing += std::isnan(v) ? 1 : 0;
    print_info(*info, missing, out);
    return 0;
  }
  auto project = open_project(file, false, err);
  if (project.read_only()) return 1;
  if (remove) {
    const bool removed = store::remove_terrain(project);
    out << (removed ? "terrain removed from " : "no terrain in ") << file << "\n";
    return 0;
  }
  if (snap) {
    const auto contact = store::find_contact(project, *snap);
    if (!contact) throw std::invalid_argument("no contact named '" + *snap + "' in " + file);
    const int n = store::snap_to_terrain(project, contact->meta.uuid);
    out << n << " points of " << *snap
        << " now take their elevation from the terrain (each change is in the audit trail and can be undone)\n";
    return 0;
  }

  // The project's zone and area.
  const core::CheckData data = core::load_check_input(project);
  const bool has_zone = !project.info().utm_zone.empty();
  double w = INFINITY, s = INFINITY, e = -INFINITY, n = -INFINITY;
  auto grow = [&](double lat, double lon) {
    const auto u = geo::to_utm({lat, lon}, data.zone);
    if (!u) return;
    w = std::min(w, u->easting);
    e = std::max(e, u->easting);
    s = std::min(s, u->northing);
    n = std::max(n, u->northing);
  };
  for (const auto& st : store::list_stations(project)) grow(st.lat, st.lon);
  for (const auto& pt : store::list_points(project)) grow(pt.lat, pt.lon);
  if (!has_zone && !(w <= e))
    throw std::invalid_argument(file + " has no UTM zone and no positions: set the zone (cairn new --utm) first");
  formats::DemRequest req;
  req.epsg = formats::utm_epsg(data.zone.zone, data.zone.northp);
  if (w <= e)
    req.area = formats::DemArea{w - kTerrainMargin, s - kTerrainMargin, e + kTerrainMargin, n + kTerrainMargin};
  const std::string& dem = args[1];
  auto read = formats::read_dem(dem, req);
  if (!read) {
    err << read.error() << (read.error().find("nothing was stored") == std::string::npos ? "; nothing was stored" : "")
        << "\n";
    return 1;
  }
  const std::string name = std::filesystem::path(dem).filename().string();
  const auto stored = store::store_terrain(project, read->grid, req.epsg, name, accuracy);
  out << "stored terrain " << name << (read->reprojected ? " (reprojected from " + read->source_crs + ")" : "") << ": "
      << read->grid.nx << " x " << read->grid.ny << " cells of " << read->grid.cell << " m in EPSG:" << req.epsg
      << "\n";
  out << "elevations from the terrain: " << stored.filled_stations << " stations, " << stored.filled_points
      << " points\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<TerrainArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "DEM", a->dem, "a raster elevation model GDAL reads (GeoTIFF, ASCII grid with .prj, ...) to store",
             false);
  number(app, "--vertical-accuracy", a->vertical_accuracy, 0, 1000,
         "the DEM's stated vertical accuracy, metres (1 sigma)");
  flag(app, "--remove", a->remove, "drop the stored terrain");
  option(app, "--snap", a->snap, "replace the receiver elevations of this contact's points by the terrain's (audited)");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"terrain",
                      "store a digital elevation model in the project (or print, remove it, or snap a contact's "
                      "points to it)",
                      define});

}  // namespace cairn::cli
