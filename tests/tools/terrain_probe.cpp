// terrain_probe: lets the Python reference checks reach geomath/terrain directly.
//
//   terrain_probe grids EPSG DEM PREFIX      writes PREFIX_slope.tif, PREFIX_aspect.tif and
//                                           PREFIX_hillshade.tif (Float32, nodata -9999)
//   terrain_probe trace EPSG DEM PE PN PZ NE NN NZ
//                                           prints the outcrop trace of the plane through
//                                           (PE, PN, PZ) with normal (NE, NN, NZ): "E N" per
//                                           vertex, a blank line after each polyline
// The DEM is read with formats::read_dem into EPSG (no clipping). Exit 1 with a
// message on stderr when something fails.
#include <cstdio>
#include <cstdlib>
#include <iostream>
#include <string>

#include "formats/raster.h"
#include "geomath/terrain.h"

using namespace cairn;

int main(int argc, char** argv) {
  if (argc < 4) {
    std::cerr << "usage: terrain_probe grids|trace EPSG DEM ...\n";
    return 1;
  }
  const std::string mode = argv[1];
  const int epsg = std::atoi(argv[2]);
  auto dem = formats::read_dem(argv[3], {epsg, std::nullopt});
  if (!dem) {
    std::cerr << dem.error() << "\n";
    return 1;
  }
  const geo::TerrainGrid& g = dem->grid;
  if (mode == "grids" && argc == 5) {
    const std::string prefix = argv[4];
    auto write = [&](const std::vector<float>& v, const std::string& name) {
      geo::TerrainGrid out = g;
      out.z = v;
      auto r = formats::write_geotiff(prefix + "_" + name + ".tif", out, epsg);
      if (!r) std::cerr << r.error() << "\n";
      return r.ok();
    };
    const bool ok = write(geo::slope_degrees(g), "slope") && write(geo::aspect_degrees(g), "aspect") &&
                    write(geo::hillshade(g), "hillshade");
    return ok ? 0 : 1;
  }
  if (mode == "trace" && argc == 10) {
    double v[6];
    for (int k = 0; k < 6; ++k) v[k] = std::atof(argv[4 + k]);
    const geo::Vec3 point(v[0], v[1], v[2]);
    const geo::Vec3 normal = geo::Vec3(v[3], v[4], v[5]).normalized();
    auto lines = geo::outcrop_trace(g, point, normal);
    if (!lines) {
      std::cerr << lines.error() << "\n";
      return 1;
    }
    for (const auto& l : *lines) {
      for (const auto& p : l.pts) std::printf("%.6f %.6f\n", p[0], p[1]);
      std::printf("\n");
    }
    return 0;
  }
  std::cerr << "terrain_probe: unknown mode or wrong arguments\n";
  return 1;
}
