// What `cairn check` takes from the project's terrain (storage/terrain.h):
//  - slope faces from the ground: at every station without a typed slope-face
//    reading, the terrain's slope and aspect (Horn 1981, geomath/terrain.h) where
//    the ground is steeper than the screening limit (CheckOptions::steep_slope)
//    is added as a slope face, so daylighting/toppling screening uses it; its
//    flags say "slope_source": "dem" (typed faces: "reading");
//  - the coarse-cell rule: Horn's slope averages the ground over 3 x 3 cells, so
//    a terrain whose cell is larger than kMaxScreeningCell (5 m) cannot see a
//    face a few metres high; such a terrain never gives an all-clear: stations
//    screened only by it are listed as "not cleared" (common practice, no
//    published source);
//  - where next on the ground: from a position, the nearest point of each fitted
//    contact's predicted outcrop trace within a radius, with distance, bearing
//    (true north), the ground's elevation there and the trace band's half width.
// Screening is an indication only, never an assessment (geo::kSlopeCaution).
#pragma once
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "geomath/crosscheck.h"
#include "geomath/terrain.h"
#include "app/core/check_input.h"
#include "storage/project.h"

namespace cairn::cli {

constexpr double kMaxScreeningCell = 5.0;  // metres

struct GroundCheck {
  bool has_terrain = false;
  double cell = 0;
  std::optional<double> vertical_accuracy;
  geo::TerrainGrid grid;
  std::set<std::string> dem_face_stations;    // station ids given a slope face from the terrain
  std::set<std::string> typed_face_stations;  // station ids with a typed slope-face reading
  std::vector<std::string> not_cleared;       // station codes the terrain is too coarse to clear
  bool too_coarse() const { return has_terrain && cell > kMaxScreeningCell; }
};

// Loads the terrain (when the project has one in the check's zone) and adds its
// slope faces to `data.input` (see the file comment).
GroundCheck add_terrain_faces(store::Project& p, core::CheckData& data, const geo::CheckOptions& o);

// "reading" or "dem" for a daylighting/toppling flag; "" for other rules.
std::string slope_source(const GroundCheck& g, const geo::Flag& f);

struct GroundLead {
  std::string contact;
  double distance = 0;               // metres (grid)
  double bearing = 0;                // degrees from true north
  double e = 0, n = 0;               // the nearest point of the trace (UTM)
  std::optional<double> elevation;   // the ground there
  std::optional<double> half_width;  // the trace band's half width there, metres
};

// The nearest stretch of each fitted contact's trace within `radius` metres of (e, n).
std::vector<GroundLead> where_next_on_ground(const GroundCheck& g, const core::CheckData& data,
                                             const geo::CheckReport& rep, double e, double n, double radius);

}  // namespace cairn::cli
