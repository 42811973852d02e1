// cairn demo [DIR]: builds the invented demo field area (see demo_area.h).
#include <filesystem>
#include <fstream>
#include <iostream>

#include "app/cli/command.h"
#include "app/cli/demo_area.h"
#include "app/cli/demo_photos.h"
#include "app/cli/demo_track.h"
#include "app/cli/project_access.h"
#include "formats/raster.h"
#include "storage/import.h"
#include "storage/merge.h"
#include "storage/repository.h"
#include "storage/terrain.h"

namespace fs = std::filesystem;

namespace cairn::cli {
namespace {

const char* const kFiles[] = {"tablet-a.cairn", "tablet-b.cairn", "camp.cairn",
                              "notebook.csv",   "handheld.gpx",   "terrain.tif"};

void remove_project_file(const fs::path& f) {
  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) fs::remove(f.string() + suffix, ec);
  fs::remove_all(f.string() + ".backups", ec);
}

store::OpenOptions demo_options(const std::string& device_id, const std::string& device_name) {
  store::OpenOptions o = cli_open_options(false);
  o.device_id = device_id;
  o.device_name = device_name;
  o.backups = false;  // a generated file needs no rolling backups
  return o;
}

void write_records(store::Project& p, const demo::Tablet& t) {
  p.write([&] {
    for (auto r : t.people) store::add(p, r);
    for (auto r : t.units) store::add(p, r);
    for (auto r : t.contacts) store::add(p, r);
    for (auto r : t.stations) store::add(p, r);
    for (auto r : t.planes) store::add(p, r);
    for (auto r : t.lines) store::add(p, r);
    for (auto r : t.points) store::add(p, r);
  });
}

void write_tablet(const fs::path& dir, const demo::Area& area, const demo::Tablet& t, store::North north) {
  store::NewProject np;
  np.name = area.project_name;
  np.utm_zone = area.utm_zone;
  np.north_default = north;
  store::Project p = store::Project::create((dir / t.file).string(), np, demo_options(t.device_id, t.device_name));
  write_records(p, t);
  demo::add_demo_tracks(p, t);
}

void write_text(const fs::path& f, const std::string& text) {
  std::ofstream out(f, std::ios::binary);
  out << text;
  if (!out.flush()) throw std::runtime_error("cannot write " + f.string());
}

void check_import(const store::ImportReport& r, const std::string& what) {
  if (r.ok()) return;
  std::string all;
  for (const auto& e : r.errors) all += "\n  " + e;
  throw std::logic_error("the demo's " + what + " did not import:" + all);
}

// The demo's ground: terrain.tif, written from demo::terrain_grid().
void write_demo_terrain(const fs::path& dir) {
  const auto w = formats::write_geotiff((dir / "terrain.tif").string(), demo::terrain_grid(), demo::terrain_epsg());
  if (!w) throw std::runtime_error(w.error());
}

// Attaches terrain.tif to a demo project file the way `cairn terrain` does
// (read through GDAL), whole, so that every demo file holds the same terrain and
// the camp's merge finds them identical; stated vertical accuracy 2 m.
void attach_demo_terrain(const fs::path& dir, const std::string& file, const std::string& device_id,
                         const std::string& device_name) {
  store::Project p = store::Project::open((dir / file).string(), demo_options(device_id, device_name));
  auto r = formats::read_dem((dir / "terrain.tif").string(), formats::DemRequest{demo::terrain_epsg(), std::nullopt});
  if (!r) throw std::logic_error("the demo terrain does not read back: " + r.error());
  store::store_terrain(p, r->grid, demo::terrain_epsg(), "terrain.tif", 2.0);
}

struct DemoArgs {
  std::string dir;
  bool force = false;
};

int run_demo(const DemoArgs& a, std::ostream& out, std::ostream&) {
  const bool force = a.force;
  const fs::path dir = a.dir.empty() ? fs::path("demo_project") : fs::path(a.dir);
  fs::create_directories(dir);
  for (const char* f : kFiles)
    if (fs::exists(dir / f) && !force)
      throw std::runtime_error((dir / f).string() + " exists; run with --force to rebuild the demo in " + dir.string() +
                               " (its demo files are replaced)");
  for (const char* f : kFiles) remove_project_file(dir / f);

  const demo::Area area = demo::build_area();
  write_tablet(dir, area, area.a, store::North::True);
  write_tablet(dir, area, area.b, store::North::Magnetic);
  write_demo_terrain(dir);
  attach_demo_terrain(dir, area.a.file, area.a.device_id, area.a.device_name);
  attach_demo_terrain(dir, area.b.file, area.b.device_id, area.b.device_name);
  write_text(dir / "notebook.csv", area.notebook_csv);
  write_text(dir / "handheld.gpx", area.gpx);

  // The evening's camp file, on the camp laptop: both tablets merged, then the
  // notebook typed in camp and the handheld's waypoints.
  store::NewProject np;
  np.name = area.project_name;
  np.utm_zone = area.utm_zone;
  np.north_default = store::North::True;
  store::Project camp = store::Project::create((dir / "camp.cairn").string(), np,
                                               demo_options("6c61a7b0-5e1d-4c0a-9d3e-2f8b7c4d1e90", "camp laptop"));
  const store::MergeReport merged =
      store::merge_files(camp, {(dir / area.a.file).string(), (dir / area.b.file).string()}, {});
  if (!merged.conflicts.empty() || !merged.clashes.empty())
    throw std::logic_error("the demo's tablets should merge without conflicts");
  check_import(store::import_csv(camp, store::ImportKind::Planes, area.notebook_csv, "notebook.csv"), "notebook");
  check_import(store::import_gpx(camp, area.gpx, "handheld.gpx", area.gpx_contact), "handheld waypoints");
  const std::string photos = demo::write_demo_photos(dir, area, camp);

  out << "Demo field area \"" << area.project_name << "\" written to " << dir.string() << ":\n"
      << "  tablet-a.cairn  " << area.a.stations.size() << " stations, " << area.a.planes.size() << " planar and "
      << area.a.lines.size() << " linear readings, " << area.a.points.size() << " contact points\n"
      << "  tablet-b.cairn  " << area.b.stations.size() << " stations, " << area.b.planes.size() << " planar and "
      << area.b.lines.size() << " linear readings, " << area.b.points.size() << " contact points\n"
      << "  notebook.csv    planar readings typed in camp\n"
      << "  handheld.gpx    waypoints along the " << area.gpx_contact << "\n"
      << "  terrain.tif     the area's ground (GeoTIFF, UTM zone 8N), attached to every project file\n"
      << "  camp.cairn      the two tablets merged, the notebook and the waypoints imported\n"
      << photos << "Next: cairn check " << (dir / "camp.cairn").string() << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<DemoArgs>();
  positional(app, "DIR", a->dir, "the folder to build it in (default: demo_project)", false);
  flag(app, "--force", a->force, "replace the demo files in a folder that has them");
  return [a](std::ostream& out, std::ostream& err) { return run_demo(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"demo", "build the invented demo field area (default folder demo_project)", define});

}  // namespace cairn::cli
