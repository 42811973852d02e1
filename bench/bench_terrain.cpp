// Terrain throughput (issue "Terrain"): attaching a SIZE x SIZE DEM (GeoTIFF
// written here, read through GDAL, stored as zlib tiles, missing elevations
// filled), then predicting the outcrop traces and 95% trace bands of CONTACTS
// fitted contacts on it. Prints wall-clock times; figures go to bench/RESULTS.md.
//
//   build/bench/bench_terrain [SIZE] [CONTACTS]   (default 4000 50)
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <random>

#include <unistd.h>

#include "formats/raster.h"
#include "geomath/angles.h"
#include "geomath/plane_fit.h"
#include "geomath/terrain.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "storage/terrain.h"

using namespace cairn;
using Clock = std::chrono::steady_clock;

static double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

int main(int argc, char** argv) {
  const int size = argc > 1 ? std::atoi(argv[1]) : 4000;
  const int contacts = argc > 2 ? std::atoi(argv[2]) : 50;
  const double cell = 5, west = 460000, north = 6790000;
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / ("cairn-bench-terrain-" + std::to_string(::getpid()));
  fs::create_directories(dir);

  geo::TerrainGrid g;
  g.nx = g.ny = size;
  g.west = west;
  g.north = north;
  g.cell = cell;
  g.z.resize(static_cast<std::size_t>(size) * size);
  for (int j = 0; j < size; ++j)
    for (int i = 0; i < size; ++i) {
      const double e = i * cell, n = j * cell;
      g.z[static_cast<std::size_t>(j) * size + i] = static_cast<float>(
          1000 + 150 * std::sin(e / 900) * std::cos(n / 1200) + 0.03 * e + 40 * std::sin((e + n) / 300));
    }
  const std::string tif = (dir / "dem.tif").string();
  auto t0 = Clock::now();
  if (!formats::write_geotiff(tif, g, 32608)) return 1;
  std::printf("write %dx%d GeoTIFF: %.2f s\n", size, size, since(t0));

  store::NewProject np{"bench", "8N", store::North::True, 0};
  store::OpenOptions oo;
  oo.backups = false;
  store::Project p = store::Project::create((dir / "bench.cairn").string(), np, oo);
  t0 = Clock::now();
  auto r = formats::read_dem(tif, {32608, std::nullopt});
  if (!r) {
    std::fprintf(stderr, "%s\n", r.error().c_str());
    return 1;
  }
  const double t_read = since(t0);
  t0 = Clock::now();
  store::store_terrain(p, r->grid, 32608, "dem.tif", 1.0);
  const double t_store = since(t0);
  t0 = Clock::now();
  auto back = store::load_terrain(p);
  const double t_load = since(t0);
  std::printf("attach: read %.2f s, store (tiles, digest, fill) %.2f s, load back %.2f s, file %.1f MB\n", t_read,
              t_store, t_load, fs::file_size(dir / "bench.cairn") / 1e6);

  // CONTACTS fitted planes from noisy points on the ground.
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> u(0, 1);
  std::normal_distribution<double> gauss(0, 1);
  std::vector<geo::PlaneFit> fits;
  for (int c = 0; c < contacts; ++c) {
    const double dd = u(rng) * 2 * geo::kPi, dip = (10 + 50 * u(rng)) * geo::kPi / 180;
    const geo::Vec3 nrm(std::sin(dip) * std::sin(dd), std::sin(dip) * std::cos(dd), std::cos(dip));
    const geo::Vec3 p0(west + (0.2 + 0.6 * u(rng)) * size * cell, north - (0.2 + 0.6 * u(rng)) * size * cell, 0);
    std::vector<geo::FitPoint> pts;
    for (int k = 0; k < 12; ++k) {
      const double e = p0.x() + 400 * gauss(rng), n = p0.y() + 400 * gauss(rng);
      const double z = 1000 - (nrm.x() * (e - p0.x()) + nrm.y() * (n - p0.y())) / nrm.z();
      pts.push_back({e + 3 * gauss(rng), n + 3 * gauss(rng), z + 2 * gauss(rng), 3, 2});
    }
    geo::FitOptions fo;
    fo.draws = 500;
    if (auto f = geo::fit_plane(pts, fo)) fits.push_back(*f);
  }
  t0 = Clock::now();
  std::size_t vertices = 0, rings = 0;
  for (const auto& f : fits) {
    auto pred = geo::predict_contact(*back, f, 1.0);
    if (!pred) continue;
    for (const auto& l : pred->trace) vertices += l.pts.size();
    rings += pred->band.size();
  }
  std::printf("traces + bands for %zu contacts: %.2f s (%zu trace vertices, %zu band rectangles)\n", fits.size(),
              since(t0), vertices, rings);
  fs::remove_all(dir);
  return 0;
}
