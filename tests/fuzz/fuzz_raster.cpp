// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets). GDAL's /vsimem/ in-memory files and
// GDALDeregisterDriver as GDAL's C API documentation describes them.
// libFuzzer target: a terrain raster (formats/raster.h, read_dem) as `cairn
// terrain` reads it, from bytes written to a GDAL in-memory file. The first byte
// picks the form: bit 0 an ASCII grid (with a fixed .prj beside it, so the read
// gets past the CRS check) or a GeoTIFF; bit 1 a clip to a small area of the
// project's zone or the whole raster; bit 2 the project's zone 33N or 32N (the
// other needs the warper). Sizes are bounded: at most 4096 cells kept, GDAL's
// block cache at 16 MB, and only the GeoTIFF, ASCII grid and in-memory drivers
// registered (the file formats Cairn documents for a DEM; not GDAL's whole zoo).
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include <cpl_conv.h>
#include <cpl_vsi.h>
#include <gdal.h>

#include "formats/raster.h"

namespace {

// WGS 84 / UTM zone 33N (EPSG:32633) in ESRI .prj form, as gdalsrsinfo -o wkt1_esri prints it.
const char* const kPrj =
    "PROJCS[\"WGS_1984_UTM_Zone_33N\",GEOGCS[\"GCS_WGS_1984\",DATUM[\"D_WGS_1984\",SPHEROID[\"WGS_1984\","
    "6378137.0,298.257223563]],PRIMEM[\"Greenwich\",0.0],UNIT[\"Degree\",0.0174532925199433]],"
    "PROJECTION[\"Transverse_Mercator\"],PARAMETER[\"False_Easting\",500000.0],PARAMETER[\"False_Northing\",0.0],"
    "PARAMETER[\"Central_Meridian\",15.0],PARAMETER[\"Scale_Factor\",0.9996],PARAMETER[\"Latitude_Of_Origin\",0.0],"
    "UNIT[\"Meter\",1.0]]";

bool init() {
  // read_dem registers GDAL's drivers once; after that, keep only the three.
  cairn::formats::DemRequest r;
  r.epsg = 32633;
  (void)cairn::formats::read_dem("/vsimem/none.tif", r);
  for (int i = GDALGetDriverCount() - 1; i >= 0; --i) {
    GDALDriverH d = GDALGetDriver(i);
    const std::string name = GDALGetDriverShortName(d);
    if (name != "GTiff" && name != "AAIGrid" && name != "MEM") {
      GDALDeregisterDriver(d);
      GDALDestroyDriver(d);
    }
  }
  GDALSetCacheMax64(16 << 20);
  CPLSetConfigOption("GDAL_PAM_ENABLED", "NO");  // no .aux.xml beside the file
  CPLSetConfigOption("GTIFF_REPORT_COMPD_CS", "NO");
  VSIFCloseL(VSIFileFromMemBuffer("/vsimem/fuzz.prj", reinterpret_cast<GByte*>(const_cast<char*>(kPrj)),
                                  static_cast<vsi_l_offset>(std::char_traits<char>::length(kPrj)), FALSE));
  return true;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  static const bool ready = init();
  (void)ready;
  if (size < 1 || size > 65536) return 0;
  const uint8_t mode = data[0];
  const std::string path = (mode & 1) ? "/vsimem/fuzz.asc" : "/vsimem/fuzz.tif";
  // GDAL reads the bytes in place (no copy, not owned).
  VSILFILE* f = VSIFileFromMemBuffer(path.c_str(), const_cast<GByte*>(data + 1), size - 1, FALSE);
  if (!f) return 0;
  VSIFCloseL(f);
  cairn::formats::DemRequest r;
  r.epsg = (mode & 4) ? 32632 : 32633;
  r.max_cells = 4096;
  if (mode & 2) r.area = cairn::formats::DemArea{499000, 5099000, 501000, 5101000};
  const auto got = cairn::formats::read_dem(path, r);
  // CAIRN_FUZZ_VERBOSE=1: what each input came to (to see that the seeds reach the reading).
  static const bool verbose = std::getenv("CAIRN_FUZZ_VERBOSE") != nullptr;
  if (verbose)
    std::fprintf(stderr, "%s\n",
                 got ? ("read " + std::to_string(got.value().grid.nx) + " x " + std::to_string(got.value().grid.ny) +
                        (got.value().reprojected ? " (reprojected)" : ""))
                           .c_str()
                     : got.error().c_str());
  VSIUnlink(path.c_str());
  return 0;
}
