// The ground as a regular grid of elevations (a digital elevation model, DEM),
// and what Cairn computes on it: elevations at a place (bilinear), slope, aspect
// and hillshade (Horn 1981).
//
// Grid convention: GDAL's "pixel is area" (GDAL Data Model, "Affine
// GeoTransform"): cell (i, j) covers [west + i*cell, west + (i+1)*cell] in
// easting and [north - (j+1)*cell, north - j*cell] in northing, row 0 is the
// northernmost, and its elevation belongs to the cell's centre. Missing cells
// (the raster's nodata) are NaN inside the grid and never reach a result: a
// computation that needs one fails (Result) or marks its output cell missing.
#pragma once
#include <cmath>
#include <cstddef>
#include <limits>
#include <vector>

#include "geomath/contour.h"
#include "geomath/orientation.h"
#include "geomath/plane_fit.h"
#include "geomath/result.h"

namespace cairn::geo {

struct TerrainGrid {
  int nx = 0, ny = 0;    // columns (east), rows (south)
  double west = 0;       // easting of the grid's west edge, metres
  double north = 0;      // northing of the grid's north edge, metres
  double cell = 1;       // square cell size, metres
  std::vector<float> z;  // ny * nx elevations, row-major from the north; NaN = missing

  float at(int i, int j) const { return z[static_cast<std::size_t>(j) * nx + i]; }
  bool has(int i, int j) const { return !std::isnan(at(i, j)); }
  double east() const { return west + nx * cell; }
  double south() const { return north - ny * cell; }
  // Centre of cell (i, j).
  double centre_e(int i) const { return west + (i + 0.5) * cell; }
  double centre_n(int j) const { return north - (j + 0.5) * cell; }
  bool valid_shape() const {
    return nx > 0 && ny > 0 && cell > 0 && std::isfinite(cell) && std::isfinite(west) && std::isfinite(north) &&
           z.size() == static_cast<std::size_t>(nx) * ny;
  }
};

// Elevation at (e, n) by bilinear interpolation between the four nearest cell
// centres (the standard bilinear form, e.g. Press et al., Numerical Recipes,
// 3rd ed., section 3.6.1). Within half a cell of the grid's edge the nearest
// centres are used (constant extension). Fails when the place lies outside the
// grid or one of the four cells is missing.
Result<double> elevation_at(const TerrainGrid& g, double e, double n);

// ---- slope, aspect, hillshade (Horn 1981) -----------------------------------
//
// Horn, B. K. P. (1981), "Hill shading and the reflectance map", Proc. IEEE 69(1),
// 14-47: the gradient at a cell from its 3 x 3 neighbourhood a b c / d e f / g h i
// (a north-west, i south-east), weights 1-2-1:
//   dz/dE = ((c + 2f + i) - (a + 2d + g)) / (8 cell)
//   dz/dN = ((a + 2b + c) - (g + 2h + i)) / (8 cell)
// Cells on the grid's border, and cells with a missing neighbour, get no value
// (NaN), as gdaldem does without -compute_edges.
struct Gradient {
  double dz_de = 0, dz_dn = 0;
};
Result<Gradient> horn_gradient(const TerrainGrid& g, int i, int j);

// Slope in degrees from the horizontal, atan(|grad z|), per cell.
std::vector<float> slope_degrees(const TerrainGrid& g);
// Aspect: the azimuth (degrees clockwise from grid north, [0, 360)) the slope
// faces, i.e. of the steepest descent, atan2(-dz/dE, -dz/dN); NaN on flat cells.
std::vector<float> aspect_degrees(const TerrainGrid& g);
// Hillshade: illumination 0..1 of each cell by a distant light at `azimuth`
// (degrees clockwise from north) and `altitude` (degrees above the horizon):
//   cos(zenith) cos(slope) + sin(zenith) sin(slope) cos(azimuth - aspect),
// clamped at 0 (Burrough & McDonnell, "Principles of Geographical Information
// Systems", 1998, section 8.5), the gradient by Horn's method.
std::vector<float> hillshade(const TerrainGrid& g, double azimuth = 315, double altitude = 45);

// Slope (degrees) and aspect (degrees) at a place: Horn's gradient of the cell it
// lies in. Fails outside the grid, on its border cells or next to missing cells.
struct SlopeAt {
  double slope = 0, aspect = 0;
};
Result<SlopeAt> slope_at(const TerrainGrid& g, double e, double n);

// ---- the ground and a plane --------------------------------------------------

// A plane through `point` (E, N, elevation, metres) with upward unit normal `normal`
// (ENU, z > 0): its elevation at (e, n).
double plane_elevation(const Vec3& point, const Vec3& normal, double e, double n);

// The terrain minus the plane at every cell centre (NaN where the terrain is missing),
// as a grid with node (i, j) at the centre of cell (i, j).
ScalarGrid difference_grid(const TerrainGrid& g, const Vec3& point, const Vec3& normal);

// The predicted outcrop trace: the curves where the plane meets the ground, i.e.
// the zero contour of difference_grid (marching squares, geomath/contour.h),
// linear between cell centres. Coordinates are (E, N) metres. Empty when the
// plane does not meet the terrain. Fails for a normal with z <= 0 (vertical plane).
Result<std::vector<NetPolyline>> outcrop_trace(const TerrainGrid& g, const Vec3& point, const Vec3& normal);

// Contours of the ground (elevation lines) every `interval` metres (levels that are
// multiples of it), on cell centres.
struct LevelLines {
  double level = 0;
  std::vector<NetPolyline> lines;
};
std::vector<LevelLines> terrain_contours(const TerrainGrid& g, double interval);

// Structure contours (strike lines) of a plane every `interval` metres of
// elevation, clipped to the grid's extent: straight lines along the strike.
std::vector<LevelLines> structure_contours(const TerrainGrid& g, const Vec3& point, const Vec3& normal,
                                           double interval);

// Horizontal spacing (metres) of a plane's structure contours `interval` metres
// apart: interval / tan(dip) (the strike-line construction, common practice).
Result<double> structure_contour_spacing(double dip_deg, double interval);

// ---- the trace band ----------------------------------------------------------
//
// How uncertain a fitted plane's elevation is at any place: the plane written as
// z = z0 + gE (E - cE) + gN (N - cN) about the fit's centroid, with the 3 x 3
// covariance of (z0, gE, gN) over the fit's Monte Carlo realisations
// (PlaneFit::draws, the same that give the 95% cone). Its variance at (E, N) is
// v' C v with v = (1, E - cE, N - cN) (first-order propagation of a linear
// model, e.g. JCGM 100:2008 "GUM", 5.1.2).
struct PlaneUncertainty {
  Vec3 centroid = Vec3::Zero();
  Eigen::Matrix3d cov = Eigen::Matrix3d::Zero();
};
// Fails with fewer than 10 realisations or a vertical one.
Result<PlaneUncertainty> plane_uncertainty(const PlaneFit& fit);
// 1-sigma of the plane's elevation at (e, n), metres.
double plane_sigma(const PlaneUncertainty& u, double e, double n);

// Two-sided 95% normal quantile, 1.959964 (any table of the normal distribution).
constexpr double kZ95 = 1.959963984540054;

// The trace band: where the contact crops out with 95% probability. At a place
// the ground minus the plane, D, has the standard deviation
// sigma = sqrt(plane_sigma^2 + terrain_sigma^2); the contact may crop out there
// when |D| <= kZ95 * sigma (the true trace, where the true D is 0, lies inside
// with probability 0.95 at each of its points).
bool in_trace_band(const TerrainGrid& g, const Vec3& point, const Vec3& normal, const PlaneUncertainty& u,
                   double terrain_sigma, double e, double n);
// The same at every cell centre: 1 inside the band, 0 outside or missing.
std::vector<unsigned char> trace_band_cells(const TerrainGrid& g, const Vec3& point, const Vec3& normal,
                                            const PlaneUncertainty& u, double terrain_sigma);
// Half the band's width (metres, across the trace) at (e, n) on the trace:
// kZ95 * sigma / |grad D| (Horn's gradient of the ground minus the plane's).
Result<double> trace_band_half_width(const TerrainGrid& g, const Vec3& normal, const PlaneUncertainty& u,
                                     double terrain_sigma, double e, double n);

// ---- one fitted contact on the ground -----------------------------------------

// Cells of a mask (1 = in) as polygons: each run of in-cells along a row is a
// rectangle, and runs covering the same columns in consecutive rows are joined.
// Rings are closed (first point == last), counter-clockwise, in grid metres.
std::vector<std::vector<NetPoint>> mask_rectangles(const TerrainGrid& g, const std::vector<unsigned char>& mask);

// A fitted contact's predicted outcrop trace and its 95% trace band on the terrain.
struct ContactPrediction {
  std::vector<NetPolyline> trace;
  bool has_band = false;                    // false when the fit has no Monte Carlo realisations (3 exact points)
  std::vector<std::vector<NetPoint>> band;  // mask_rectangles of trace_band_cells
  std::optional<double> mean_half_width;    // mean of trace_band_half_width over the trace's vertices, metres
  PlaneUncertainty uncertainty;
};
// terrain_sigma: the terrain's stated vertical accuracy (0 when not stated).
Result<ContactPrediction> predict_contact(const TerrainGrid& g, const PlaneFit& fit, double terrain_sigma);

}  // namespace cairn::geo
