// The terrain stored in a project: one digital elevation model (DEM) per file,
// in the project's UTM zone, as zlib-compressed tiles (storage/SCHEMA.md,
// tables `terrain` and `terrain_tiles`), so a tablet's file carries its own
// ground offline.
//
// Storing the terrain fills the elevation of every live station and contact
// point that has none (bilinear, geomath/terrain.h), with source `dem` and the
// terrain's vertical accuracy: audited updates, undoable one by one.
// snap_to_terrain() does the same for a contact's points that have a receiver
// elevation, on request.
#pragma once
#include <optional>
#include <string>

#include "geomath/terrain.h"
#include "storage/project.h"

namespace cairn::store {

struct TerrainInfo {
  std::string uuid;
  std::string name;  // the file it came from (its name, no folder)
  int epsg = 0;      // the grid's CRS (the project's UTM zone)
  double cell = 0;   // metres
  double west = 0, north = 0;
  int nx = 0, ny = 0;
  double nodata = -9999;                    // the value that marks a missing cell inside the stored tiles
  std::optional<double> vertical_accuracy;  // 1-sigma, metres, as stated by the user
  std::string digest;          // SHA-256 of the grid (shape and elevations): identical terrains have equal digests
  long long stored_bytes = 0;  // compressed size of the tiles
  std::string created, updated, device;
};

// Edge length of a stored tile, in cells.
constexpr int kTerrainTile = 256;

// What store_terrain() did.
struct TerrainStored {
  std::string uuid;
  int filled_points = 0;    // points given an elevation from the terrain
  int filled_stations = 0;  // stations given an elevation from the terrain
};

// Stores GRID as the project's terrain (replacing a live one, whose removal is
// audited too) and fills missing elevations. `name` is shown by terrain_info.
// Throws ValidationError for a malformed grid or an accuracy < 0; nothing is
// written then.
TerrainStored store_terrain(Project& p, const geo::TerrainGrid& grid, int epsg, const std::string& name,
                            std::optional<double> vertical_accuracy);

// The live terrain's description, or nothing.
std::optional<TerrainInfo> terrain_info(Project& p);
// The live terrain's grid, or nothing. Throws std::runtime_error naming the
// table and UUID when a tile is damaged.
std::optional<geo::TerrainGrid> load_terrain(Project& p);
// Removes the live terrain (audited); false when there is none. Elevations
// already taken from it stay (they say source = dem).
bool remove_terrain(Project& p);

// Fills missing elevations of live stations and points from the live terrain
// (audited). Called by store_terrain; also usable after an import.
TerrainStored fill_elevations(Project& p);

// For a station or point about to be recorded without an elevation: the
// terrain's elevation there (source dem, the terrain's vertical accuracy),
// reading only the tiles around it. Leaves the record as it is when it has an
// elevation, there is no terrain, or the place is off it. Called by add().
void elevation_from_terrain(Project& p, Station& s);
void elevation_from_terrain(Project& p, ContactPoint& pt);

// Replaces the elevations of the live points of CONTACT (a contact UUID) by the
// terrain's (source dem, the terrain's vertical accuracy), audited and undoable.
// Returns how many points changed; throws ValidationError when there is no terrain.
int snap_to_terrain(Project& p, const std::string& contact_uuid);

// Merging another file's terrain into P (storage/merge.h), inside the caller's
// transaction: none here -> its terrain row and tiles are copied (Added); the
// same digest -> Skipped; a different live terrain -> Conflict, reported in
// `message` and NOT replaced (remove one and attach the DEM again to choose).
struct TerrainMerge {
  enum Outcome { None, Added, Skipped, Conflict } outcome = None;
  std::string message;
};
TerrainMerge merge_terrain(Project& p, Db& source);

// Digest of a grid as stored in TerrainInfo::digest.
std::string terrain_digest(const geo::TerrainGrid& grid, int epsg);

}  // namespace cairn::store
