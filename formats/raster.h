// Raster elevation models (DEMs) read and written through GDAL (Debian's
// libgdal-dev): any raster GDAL reads (GeoTIFF, an ASCII grid with its .prj, ...).
//
// read_dem() brings a DEM into the project's UTM zone and area:
//  - a raster without a coordinate reference system, without a geotransform, or
//    whose CRS cannot be transformed to the zone is refused with the reason;
//  - a raster already in the zone's CRS, north-up with square cells, is read
//    cell for cell (no resampling) over the cells that cover the area;
//  - any other is reprojected with GDAL's warper (GDALWarp, bilinear), at the
//    cell size GDAL suggests (GDALSuggestedWarpOutput), made square;
//  - the stored grid may hold at most kMaxTerrainCells cells and the source at
//    most kMaxSourceCells: larger is refused (clip the DEM to the field area or
//    coarsen it first);
//  - every elevation is checked: nodata becomes missing, any other value must be
//    finite and within -500..9000 m (the range of every elevation in a project).
#pragma once
#include <optional>
#include <string>

#include "geomath/result.h"
#include "geomath/terrain.h"

namespace cairn::formats {

// 25 million cells: a 5000 x 5000 grid, 100 MB as 4-byte floats in memory.
constexpr long long kMaxTerrainCells = 25'000'000;
// A source larger than this (e.g. 40000 x 25000) is refused before any reading.
constexpr long long kMaxSourceCells = 1'000'000'000;

// EPSG code of WGS84 / UTM zone ZONE (32601..32660 north, 32701..32760 south).
int utm_epsg(int zone, bool northp);

struct DemArea {  // a rectangle in the target CRS, metres
  double west = 0, south = 0, east = 0, north = 0;
};

struct DemRequest {
  int epsg = 0;                 // the project's UTM zone
  std::optional<DemArea> area;  // clip to this (already with its margin); none = whole raster
  long long max_cells = kMaxTerrainCells;
};

struct DemRead {
  geo::TerrainGrid grid;
  bool reprojected = false;  // true when GDAL's warper resampled it
  std::string source_crs;    // the source's CRS name as GDAL gives it
  int source_nx = 0, source_ny = 0;
  long long missing = 0;  // cells without an elevation
};

// Reads PATH (see the file comment). Failures name the file and the reason.
Result<DemRead> read_dem(const std::string& path, const DemRequest& request);

// Writes a grid as a single-band Float32 GeoTIFF in EPSG code `epsg`, missing
// cells as nodata -9999. Fails naming the file.
Result<bool> write_geotiff(const std::string& path, const geo::TerrainGrid& grid, int epsg);

}  // namespace cairn::formats
