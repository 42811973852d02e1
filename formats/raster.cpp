#include "formats/raster.h"

#include <cmath>
#include <memory>
#include <mutex>
#include <sstream>
#include <vector>

#include <fmt/format.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <gdal.h>
#include <gdal_alg.h>
#include <gdal_utils.h>
#include <ogr_srs_api.h>

namespace cairn::formats {

namespace {

void register_gdal() {
  static std::once_flag once;
  std::call_once(once, [] { GDALAllRegister(); });
}

// GDAL's messages are collected instead of printed; the last one explains a failure.
class QuietGdal {
 public:
  QuietGdal() {
    CPLPushErrorHandler(CPLQuietErrorHandler);
    CPLErrorReset();
  }
  ~QuietGdal() { CPLPopErrorHandler(); }
  static std::string last() {
    const char* m = CPLGetLastErrorMsg();
    return m && *m ? std::string(": ") + m : std::string();
  }
};

struct DsCloser {
  void operator()(void* d) const {
    if (d) GDALClose(static_cast<GDALDatasetH>(d));
  }
};
using DsPtr = std::unique_ptr<void, DsCloser>;
struct SrsDeleter {
  void operator()(void* s) const {
    if (s) OSRDestroySpatialReference(static_cast<OGRSpatialReferenceH>(s));
  }
};
using SrsPtr = std::unique_ptr<void, SrsDeleter>;

// A cell index from a coordinate, clamped to LO..HI (NaN gives LO): a
// geotransform from the file can put it anywhere, and a double outside int's
// range must not be cast (C++17 [conv.fpint]: undefined behaviour).
int cell_index(double v, int lo, int hi) {
  if (!(v > lo)) return lo;
  if (!(v < hi)) return hi;
  return static_cast<int>(v);
}

template <class T>
Result<T> fail(const std::string& path, const std::string& why) {
  return Result<T>::failure(path + ": " + why);
}

// Reads band 1 of DS over the window into a grid, turning nodata into NaN and
// checking every other value.
Result<DemRead> read_window(const std::string& path, GDALDatasetH ds, int x0, int y0, int nx, int ny,
                            const double* gt) {
  GDALRasterBandH band = GDALGetRasterBand(ds, 1);
  DemRead out;
  out.grid.nx = nx;
  out.grid.ny = ny;
  out.grid.cell = gt[1];
  out.grid.west = gt[0] + x0 * gt[1];
  out.grid.north = gt[3] + y0 * gt[5];
  out.grid.z.assign(static_cast<std::size_t>(nx) * ny, 0.0f);
  if (GDALRasterIO(band, GF_Read, x0, y0, nx, ny, out.grid.z.data(), nx, ny, GDT_Float32, 0, 0) != CE_None)
    return fail<DemRead>(path, "cannot read its elevations" + QuietGdal::last());
  int has_nodata = 0;
  const double nodata = GDALGetRasterNoDataValue(band, &has_nodata);
  const float nodata_f = static_cast<float>(nodata);
  for (int j = 0; j < ny; ++j) {
    for (int i = 0; i < nx; ++i) {
      float& v = out.grid.z[static_cast<std::size_t>(j) * nx + i];
      if (std::isnan(v) || (has_nodata && (v == nodata_f || (std::isnan(nodata) && std::isnan(v))))) {
        v = std::numeric_limits<float>::quiet_NaN();
        ++out.missing;
        continue;
      }
      if (!std::isfinite(v) || v < -500 || v > 9000) {
        std::ostringstream s;
        s << "elevation " << v << " at row " << (y0 + j + 1) << ", column " << (x0 + i + 1)
          << " is outside -500..9000 m (a nodata value the file does not declare?)";
        return fail<DemRead>(path, s.str());
      }
    }
  }
  return out;
}

}  // namespace

int utm_epsg(int zone, bool northp) { return (northp ? 32600 : 32700) + zone; }

// Longer than a screen: every check on an untrusted raster (bands, size,
// geotransform, CRS, coverage of the area, the size of the window to read)
// comes before any cell is read, in one place, for both paths (same CRS, warped).
Result<DemRead> read_dem(const std::string& path, const DemRequest& request) {
  register_gdal();
  QuietGdal quiet;
  if (request.epsg <= 0)
    return fail<DemRead>(path, "no target coordinate reference system (set the project's UTM zone)");
  DsPtr src(GDALOpenEx(path.c_str(), GDAL_OF_RASTER | GDAL_OF_READONLY, nullptr, nullptr, nullptr));
  if (!src) return fail<DemRead>(path, "cannot be read as a raster" + QuietGdal::last());
  GDALDatasetH ds = static_cast<GDALDatasetH>(src.get());
  if (GDALGetRasterCount(ds) < 1) return fail<DemRead>(path, "has no raster band");
  const int sx = GDALGetRasterXSize(ds), sy = GDALGetRasterYSize(ds);
  if (static_cast<long long>(sx) * sy > kMaxSourceCells) {
    std::ostringstream s;
    s << "is " << sx << " x " << sy << " cells, more than the limit of " << kMaxSourceCells
      << "; clip it to the field area first";
    return fail<DemRead>(path, s.str());
  }
  // GDAL's ASCII grid driver (GDAL 3.6) finds where a row starts by reading the
  // rows before it, and after a damaged row every later row read reads them all
  // again: a window near the foot of a damaged 10 x 78 grid ran for minutes
  // (found by fuzz_raster). The rows are read once, in order, first: the first
  // damaged one ends the reading, named, and later windows find every row.
  if (std::string(GDALGetDriverShortName(GDALGetDatasetDriver(ds))) == "AAIGrid") {
    GDALRasterBandH first = GDALGetRasterBand(ds, 1);
    float v = 0;
    for (int j = 0; j < sy; ++j)
      if (GDALRasterIO(first, GF_Read, 0, j, 1, 1, &v, 1, 1, GDT_Float32, 0, 0) != CE_None)
        return fail<DemRead>(path, "cannot read row " + std::to_string(j + 1) + " of the grid" + QuietGdal::last());
  }
  OGRSpatialReferenceH srs = GDALGetSpatialRef(ds);
  if (!srs || OSRIsLocal(srs))
    return fail<DemRead>(path,
                         "has no coordinate reference system (a GeoTIFF without georeferencing, or an "
                         "ASCII grid without its .prj)");
  double gt[6];
  if (GDALGetGeoTransform(ds, gt) != CE_None) return fail<DemRead>(path, "has no geotransform (cell size and origin)");

  SrsPtr target(OSRNewSpatialReference(nullptr));
  auto* t = static_cast<OGRSpatialReferenceH>(target.get());
  if (OSRImportFromEPSG(t, request.epsg) != OGRERR_NONE)
    return fail<DemRead>(path, "EPSG:" + std::to_string(request.epsg) + " is not known to PROJ");
  OSRSetAxisMappingStrategy(t, OAMS_TRADITIONAL_GIS_ORDER);

  const std::string crs_name = OSRGetName(srs) ? OSRGetName(srs) : "";

  const bool north_up = gt[2] == 0 && gt[4] == 0 && gt[1] > 0 && gt[5] < 0;
  const bool square = north_up && std::fabs(gt[1] + gt[5]) <= 1e-9 * gt[1];
  if (OSRIsSame(srs, t) && square) {
    // Same CRS: read the cells that cover the area, unchanged.
    int x0 = 0, y0 = 0, x1 = sx, y1 = sy;
    if (request.area) {
      const DemArea& a = *request.area;
      x0 = cell_index(std::floor((a.west - gt[0]) / gt[1]), 0, sx);
      x1 = cell_index(std::ceil((a.east - gt[0]) / gt[1]), 0, sx);
      y0 = cell_index(std::floor((gt[3] - a.north) / -gt[5]), 0, sy);
      y1 = cell_index(std::ceil((gt[3] - a.south) / -gt[5]), 0, sy);
      if (x1 <= x0 || y1 <= y0) return fail<DemRead>(path, "does not cover the project's area");
    }
    const long long cells = static_cast<long long>(x1 - x0) * (y1 - y0);
    if (cells > request.max_cells) {
      std::ostringstream s;
      s << "the part over the project's area is " << (x1 - x0) << " x " << (y1 - y0)
        << " cells, more than the limit of " << request.max_cells << "; coarsen it first";
      return fail<DemRead>(path, s.str());
    }
    auto r = read_window(path, ds, x0, y0, x1 - x0, y1 - y0, gt);
    if (!r) return r;
    r.value().source_crs = crs_name;
    r.value().source_nx = sx;
    r.value().source_ny = sy;
    return r;
  }

  // Any other CRS or layout: GDAL's warper, bilinear, at the suggested cell size,
  // with the exact transformation (-et 0: the default approximation, up to 1/8
  // of a cell, would shift elevations on a slope by a few decimetres).
  char* target_wkt = nullptr;
  OSRExportToWkt(t, &target_wkt);
  std::string dst_wkt = target_wkt ? target_wkt : "";
  CPLFree(target_wkt);
  char** topts = CSLSetNameValue(nullptr, "DST_SRS", dst_wkt.c_str());
  void* transformer = GDALCreateGenImgProjTransformer2(ds, nullptr, topts);
  CSLDestroy(topts);
  if (!transformer)
    return fail<DemRead>(path, "its coordinate reference system (" + crs_name + ") cannot be transformed to EPSG:" +
                                   std::to_string(request.epsg) + QuietGdal::last());
  double sgt[6];
  int spx = 0, spy = 0;
  const CPLErr se = GDALSuggestedWarpOutput(ds, GDALGenImgProjTransform, transformer, sgt, &spx, &spy);
  GDALDestroyGenImgProjTransformer(transformer);
  if (se != CE_None || !(sgt[1] > 0))
    return fail<DemRead>(path, "cannot be reprojected to EPSG:" + std::to_string(request.epsg) + QuietGdal::last());
  const double cell = std::min(sgt[1], -sgt[5]);
  DemArea a{sgt[0], sgt[3] + spy * sgt[5], sgt[0] + spx * sgt[1], sgt[3]};
  if (request.area) {
    const DemArea& r = *request.area;
    a = DemArea{std::max(a.west, r.west), std::max(a.south, r.south), std::min(a.east, r.east),
                std::min(a.north, r.north)};
    if (a.east <= a.west || a.north <= a.south) return fail<DemRead>(path, "does not cover the project's area");
  }
  // Snap the extent outwards to whole cells.
  a.west = std::floor(a.west / cell) * cell;
  a.south = std::floor(a.south / cell) * cell;
  a.east = std::ceil(a.east / cell) * cell;
  a.north = std::ceil(a.north / cell) * cell;
  // Both in cells, as doubles first: a geotransform from the file can make them
  // infinite or NaN, and their product must not overflow.
  const double fx = std::round((a.east - a.west) / cell), fy = std::round((a.north - a.south) / cell);
  if (!(cell > 0) || !std::isfinite(fx) || !std::isfinite(fy) || fx < 1 || fy < 1)
    return fail<DemRead>(path, "has a cell size or extent that cannot be reprojected (a damaged geotransform?)");
  if (fx * fy > static_cast<double>(request.max_cells))
    return fail<DemRead>(path, fmt::format("reprojected over the project's area it would be {:.0f} x {:.0f} cells, "
                                           "more than the limit of {}; coarsen it first",
                                           fx, fy, request.max_cells));
  // The warper reprojects every band (only the first is kept): the limit is on all of them.
  const int bands = GDALGetRasterCount(ds);
  if (fx * fy * bands > static_cast<double>(request.max_cells))
    return fail<DemRead>(path, fmt::format("has {} bands; a DEM has one, its elevations: save that band alone first "
                                           "(gdal_translate -b 1)",
                                           bands));
  auto num = [](double v) {
    std::ostringstream s;
    s.precision(17);
    s << v;
    return s.str();
  };
  const std::string epsg = "EPSG:" + std::to_string(request.epsg);
  std::vector<std::string> argv_s = {
      "-of", "MEM",     "-t_srs",  epsg,  "-r",        "bilinear",   "-et",       "0",          "-ot",        "Float32",
      "-tr", num(cell), num(cell), "-te", num(a.west), num(a.south), num(a.east), num(a.north), "-dstnodata", "-99999"};
  std::vector<char*> argv;
  for (auto& s : argv_s) argv.push_back(s.data());
  argv.push_back(nullptr);
  GDALWarpAppOptions* wopts = GDALWarpAppOptionsNew(argv.data(), nullptr);
  if (!wopts) return fail<DemRead>(path, "cannot set up the reprojection" + QuietGdal::last());
  GDALDatasetH srcs[1] = {ds};
  int usage_error = 0;
  DsPtr warped(GDALWarp("", nullptr, 1, srcs, wopts, &usage_error));
  GDALWarpAppOptionsFree(wopts);
  if (!warped) return fail<DemRead>(path, "cannot be reprojected to " + epsg + QuietGdal::last());
  auto* wds = static_cast<GDALDatasetH>(warped.get());
  double wgt[6];
  GDALGetGeoTransform(wds, wgt);
  auto r = read_window(path, wds, 0, 0, GDALGetRasterXSize(wds), GDALGetRasterYSize(wds), wgt);
  if (!r) return r;
  r.value().reprojected = true;
  r.value().source_crs = crs_name;
  r.value().source_nx = sx;
  r.value().source_ny = sy;
  return r;
}

Result<bool> write_geotiff(const std::string& path, const geo::TerrainGrid& g, int epsg) {
  register_gdal();
  QuietGdal quiet;
  if (!g.valid_shape()) return fail<bool>(path, "the grid is empty or malformed");
  GDALDriverH drv = GDALGetDriverByName("GTiff");
  if (!drv) return fail<bool>(path, "GDAL has no GeoTIFF driver");
  char** copts = CSLSetNameValue(nullptr, "COMPRESS", "DEFLATE");
  DsPtr ds(GDALCreate(drv, path.c_str(), g.nx, g.ny, 1, GDT_Float32, copts));
  CSLDestroy(copts);
  if (!ds) return fail<bool>(path, "cannot be written" + QuietGdal::last());
  auto* h = static_cast<GDALDatasetH>(ds.get());
  double gt[6] = {g.west, g.cell, 0, g.north, 0, -g.cell};
  GDALSetGeoTransform(h, gt);
  SrsPtr srs(OSRNewSpatialReference(nullptr));
  if (OSRImportFromEPSG(static_cast<OGRSpatialReferenceH>(srs.get()), epsg) != OGRERR_NONE)
    return fail<bool>(path, "EPSG:" + std::to_string(epsg) + " is not known to PROJ");
  GDALSetSpatialRef(h, static_cast<OGRSpatialReferenceH>(srs.get()));
  GDALRasterBandH band = GDALGetRasterBand(h, 1);
  GDALSetRasterNoDataValue(band, -9999);
  std::vector<float> rows(g.z);
  for (float& v : rows)
    if (std::isnan(v)) v = -9999;
  if (GDALRasterIO(band, GF_Write, 0, 0, g.nx, g.ny, rows.data(), g.nx, g.ny, GDT_Float32, 0, 0) != CE_None)
    return fail<bool>(path, "cannot be written" + QuietGdal::last());
  ds.reset();  // GDALClose flushes the file
  if (CPLGetLastErrorType() >= CE_Failure) return fail<bool>(path, "cannot be written" + QuietGdal::last());
  return true;
}

}  // namespace cairn::formats
