// The ground on the Plan: hillshade, terrain contours, and each fitted contact's
// predicted outcrop trace with its 95% trace band (geomath/terrain.h), added to
// a PlanData once when the data change (the UI then draws the Plan into a cached
// texture, app/ui/gl_picture.h; nothing here runs per frame).
//
// Hillshade is drawn as patches of a few grey levels (Horn 1981 gradient,
// light from the north-west at 45 degrees, as gdaldem's default), on a grid
// coarsened to at most `max_cells` across so that a large terrain stays light
// to draw; terrain contours come from the same grid. Traces and bands are drawn
// from a grid of at most `trace_cells` across (a 4000 x 4000 terrain would take
// seconds per contact at full size; the Plan is a picture at screen resolution).
#pragma once
#include <string>
#include <vector>

#include "app/plot/plan_scene.h"
#include "geomath/plane_fit.h"
#include "geomath/terrain.h"

namespace cairn::plot {

struct PlanTerrainOptions {
  int max_cells = 160;    // shading / contour grid, cells across at most
  int trace_cells = 600;  // traces and bands on the Plan: cells across at most (exports and
                          // `cairn check` use the full grid)
  int grey_levels = 7;
  double contour_interval = 0;  // metres; 0: about 12 contours over the relief
  Rgba contour = {150, 120, 80, 160};
};

struct TracedContact {
  std::string name;
  const geo::PlaneFit* fit = nullptr;
  Rgba colour;
};

// Adds the ground to `d`; returns notes for the caption ("contours every 20 m", ...).
std::vector<std::string> add_terrain(PlanData& d, const geo::TerrainGrid& g, const std::vector<TracedContact>& contacts,
                                     double terrain_sigma, const PlanTerrainOptions& o = {});

// The grid averaged over factor x factor blocks (missing cells left out; a block
// with none missing-free is missing).
geo::TerrainGrid coarsen(const geo::TerrainGrid& g, int factor);

}  // namespace cairn::plot
