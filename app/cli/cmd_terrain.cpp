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
#include "storage/check_input.h"
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
  out << "  extent E " << t.west << " .. " << (t.west + t.nx * t.cell) << ", N " << (t.north - t.ny * t.cell)
      << " .. " << t.north << "\n";
  out << "  nodata " << t.nodata << " (" << missing << " cells without elevation)\n";
  out << "  vertical accuracy ";
  if (t.vertical_accuracy)
    out << *t.vertical_accuracy << " m (1-sigma)\n";
  else
    out << "not stated\n";
  out << "  stored " << t.stored_bytes << " bytes compressed, digest " << t.digest.substr(0, 16) << "\n";
  out << "  attached " << t.created << "\n";
}

int run(const Args& in, std::ostream& out, std::ostream& err) {
  Args args = in;
  const bool remove = take_flag(args, "--remove");
  const auto snap = take_option(args, "--snap");
  const auto vacc = take_option(args, "--vertical-accuracy");
  reject_unknown_options(args);
  if (args.empty() || args.size() > 2) throw std::invalid_argument("expected FILE [DEM]");
  const std::string& file = args[0];
  const bool attach = args.size() == 2;
  if (static_cast<int>(attach) + static_cast<int>(remove) + static_cast<int>(snap.has_value()) > 1)
    throw std::invalid_argument("give one of DEM, --remove, --snap CONTACT");
  if (vacc && !attach) throw std::invalid_argument("--vertical-accuracy goes with a DEM");
  std::optional<double> accuracy;
  if (vacc) {
    std::size_t used = 0;
    double v = 0;
    try {
      v = std::stod(*vacc, &used);
    } catch (const std::exception&) {
      used = 0;
    }
    if (used != vacc->size() || !std::isfinite(v) || v < 0 || v > 1000)
      throw std::invalid_argument("--vertical-accuracy '" + *vacc + "' is not a number of metres from 0 to 1000");
    accuracy = v;
  }

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
    out << n << " points of " << *snap << " now take their elevation from the terrain (each change is in the audit trail and can be undone)\n";
    return 0;
  }

  // The project's zone and area.
  const store::CheckData data = store::load_check_input(project);
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
  if (w <= e) req.area = formats::DemArea{w - kTerrainMargin, s - kTerrainMargin, e + kTerrainMargin, n + kTerrainMargin};
  const std::string& dem = args[1];
  auto read = formats::read_dem(dem, req);
  if (!read) {
    err << read.error() << (read.error().find("nothing was stored") == std::string::npos ? "; nothing was stored" : "")
        << "\n";
    return 1;
  }
  const std::string name = std::filesystem::path(dem).filename().string();
  const auto stored = store::store_terrain(project, read->grid, req.epsg, name, accuracy);
  out << "stored terrain " << name << (read->reprojected ? " (reprojected from " + read->source_crs + ")" : "")
      << ": " << read->grid.nx << " x " << read->grid.ny << " cells of " << read->grid.cell << " m in EPSG:" << req.epsg
      << "\n";
  out << "elevations from the terrain: " << stored.filled_stations << " stations, " << stored.filled_points
      << " points\n";
  return 0;
}

}  // namespace

CAIRN_COMMAND(Command{"terrain", "cairn terrain FILE [DEM [--vertical-accuracy M] | --remove | --snap CONTACT]",
                      "store a digital elevation model in the project (or print, remove it, or snap a contact's "
                      "points to it)",
                      run});

}  // namespace cairn::cli
