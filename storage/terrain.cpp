#include "storage/terrain.h"

#include <zlib.h>

#include <cmath>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <sstream>
#include <stdexcept>
#include <vector>

#include "formats/raster.h"
#include "geomath/geodesy.h"
#include "formats/ids.h"
#include "storage/repository.h"
#include "formats/sha256.h"
#include "storage/sqlite.h"

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

[[noreturn]] void fail(const std::string& field, const std::string& rule, const std::string& msg) {
  throw ValidationError(field, rule, msg);
}

// Elevations are kept as IEEE 754 single precision, little-endian, whatever the machine.
void put_f32(std::string& out, float v) {
  std::uint32_t b;
  std::memcpy(&b, &v, 4);
  for (int k = 0; k < 4; ++k) out.push_back(static_cast<char>((b >> (8 * k)) & 0xff));
}
float get_f32(const unsigned char* p) {
  std::uint32_t b = 0;
  for (int k = 0; k < 4; ++k) b |= static_cast<std::uint32_t>(p[k]) << (8 * k);
  float v;
  std::memcpy(&v, &b, 4);
  return v;
}

const char* const kColumns =
    "uuid, name, epsg, cell, west, north, nx, ny, nodata, vertical_accuracy, tile_size, digest, "
    "created, updated, device";

// The terrain row as a JSON object for the audit trail (SQLite's json_object).
std::string terrain_json(Db& db, const std::string& uuid) {
  Stmt s(db,
         "SELECT json_object('uuid', uuid, 'name', name, 'epsg', epsg, 'cell', cell, 'west', west, "
         "'north', north, 'nx', nx, 'ny', ny, 'nodata', nodata, 'vertical_accuracy', vertical_accuracy, "
         "'digest', digest, 'created', created, 'updated', updated, 'device', device, 'deleted', deleted) "
         "FROM terrain WHERE uuid = ?");
  s.bind(1, uuid);
  return s.step() ? s.text(0) : std::string();
}

void audit(Project& p, const std::string& uuid, const std::string& action, const std::string& before,
           const std::string& after, const std::string& at) {
  Stmt s(p.db(),
         "INSERT INTO audit(uuid, at, device, person, tbl, record, action, old_values, new_values) "
         "VALUES (?,?,?,?,'terrain',?,?,?,?)");
  s.bind(1, new_uuid()).bind(2, at).bind(3, p.device()).bind_text_or_null(4, p.person());
  s.bind(5, uuid).bind(6, action).bind_text_or_null(7, before).bind_text_or_null(8, after);
  s.run();
}

std::optional<std::string> live_uuid(Project& p) {
  Stmt s(p.db(), "SELECT uuid FROM terrain WHERE deleted IS NULL");
  if (!s.step()) return std::nullopt;
  return s.text(0);
}

geo::UtmZone zone_of_epsg(int epsg) {
  if (epsg > 32600 && epsg <= 32660) return {epsg - 32600, true};
  if (epsg > 32700 && epsg <= 32760) return {epsg - 32700, false};
  throw std::runtime_error("terrain: EPSG:" + std::to_string(epsg) + " is not a WGS84 UTM zone");
}

}  // namespace

std::string terrain_digest(const geo::TerrainGrid& g, int epsg) {
  std::ostringstream head;
  head.precision(17);
  head << "epsg " << epsg << " nx " << g.nx << " ny " << g.ny << " cell " << g.cell << " west " << g.west << " north "
       << g.north << "\n";
  std::string data = head.str();
  data.reserve(data.size() + g.z.size() * 4);
  for (float v : g.z) put_f32(data, std::isnan(v) ? std::numeric_limits<float>::quiet_NaN() : v);
  return sha256_hex(data);
}

TerrainStored store_terrain(Project& p, const geo::TerrainGrid& g, int epsg, const std::string& name,
                            std::optional<double> vertical_accuracy) {
  if (!g.valid_shape()) fail("terrain", "shape", "the terrain grid is empty or malformed");
  if (static_cast<long long>(g.nx) * g.ny > formats::kMaxTerrainCells)
    fail("terrain", "size", "the terrain has more than " + std::to_string(formats::kMaxTerrainCells) + " cells");
  zone_of_epsg(epsg);
  if (vertical_accuracy && (!std::isfinite(*vertical_accuracy) || *vertical_accuracy < 0 || *vertical_accuracy > 1000))
    fail("vertical_accuracy", "range", "the vertical accuracy must be a number of metres from 0 to 1000");
  for (float v : g.z)
    if (!std::isnan(v) && (v < -500 || v > 9000))
      fail("terrain", "range", "a terrain elevation lies outside -500..9000 m");
  const double nodata = -9999;
  TerrainStored out;
  p.write([&] {
    remove_terrain(p);
    const std::string now = utc_now();
    out.uuid = new_uuid();
    {
      Stmt s(p.db(), std::string("INSERT INTO terrain(") + kColumns + ") VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)");
      s.bind(1, out.uuid).bind(2, name).bind(3, epsg).bind(4, g.cell).bind(5, g.west).bind(6, g.north);
      s.bind(7, g.nx).bind(8, g.ny).bind(9, nodata).bind(10, vertical_accuracy).bind(11, kTerrainTile);
      s.bind(12, terrain_digest(g, epsg)).bind(13, now).bind(14, now).bind(15, p.device());
      s.run();
    }
    Stmt ins(p.db(), "INSERT INTO terrain_tiles(terrain, row, col, data) VALUES (?,?,?,?)");
    std::string raw;
    std::vector<unsigned char> packed;
    for (int tj = 0; tj * kTerrainTile < g.ny; ++tj) {
      for (int ti = 0; ti * kTerrainTile < g.nx; ++ti) {
        const int i0 = ti * kTerrainTile, j0 = tj * kTerrainTile;
        const int w = std::min(kTerrainTile, g.nx - i0), h = std::min(kTerrainTile, g.ny - j0);
        raw.clear();
        for (int j = j0; j < j0 + h; ++j)
          for (int i = i0; i < i0 + w; ++i) {
            const float v = g.at(i, j);
            put_f32(raw, std::isnan(v) ? static_cast<float>(nodata) : v);
          }
        uLongf len = compressBound(raw.size());
        packed.resize(len);
        if (compress2(packed.data(), &len, reinterpret_cast<const Bytef*>(raw.data()), raw.size(), 6) != Z_OK)
          throw std::runtime_error("terrain: zlib could not compress a tile");
        ins.reset();
        ins.bind(1, out.uuid).bind(2, tj).bind(3, ti);
        ins.bind_blob(4, packed.data(), static_cast<int>(len));
        ins.run();
      }
    }
    audit(p, out.uuid, "insert", "", terrain_json(p.db(), out.uuid), now);
    const TerrainStored filled = fill_elevations(p);
    out.filled_points = filled.filled_points;
    out.filled_stations = filled.filled_stations;
  });
  return out;
}

std::optional<TerrainInfo> terrain_info(Project& p) {
  Stmt s(p.db(), std::string("SELECT ") + kColumns +
                     ", (SELECT coalesce(sum(length(data)), 0) FROM terrain_tiles WHERE terrain = t.uuid) "
                     "FROM terrain t WHERE deleted IS NULL");
  if (!s.step()) return std::nullopt;
  TerrainInfo t;
  t.uuid = s.text(0);
  t.name = s.text(1);
  t.epsg = s.integer(2);
  t.cell = s.real(3);
  t.west = s.real(4);
  t.north = s.real(5);
  t.nx = s.integer(6);
  t.ny = s.integer(7);
  t.nodata = s.real(8);
  t.vertical_accuracy = s.opt_real(9);
  t.digest = s.text(11);
  t.created = s.text(12);
  t.updated = s.text(13);
  t.device = s.text(14);
  t.stored_bytes = s.int64(15);
  return t;
}

std::optional<geo::TerrainGrid> load_terrain(Project& p) {
  Stmt s(p.db(), "SELECT uuid, cell, west, north, nx, ny, nodata, tile_size FROM terrain WHERE deleted IS NULL");
  if (!s.step()) return std::nullopt;
  const std::string uuid = s.text(0);
  auto damaged = [&](const std::string& why) {
    return std::runtime_error("table terrain_tiles, terrain " + uuid + ": " + why);
  };
  geo::TerrainGrid g;
  g.cell = s.real(1);
  g.west = s.real(2);
  g.north = s.real(3);
  g.nx = s.integer(4);
  g.ny = s.integer(5);
  const float nodata = static_cast<float>(s.real(6));
  const int tile = s.integer(7);
  if (g.nx <= 0 || g.ny <= 0 || static_cast<long long>(g.nx) * g.ny > formats::kMaxTerrainCells || tile <= 0)
    throw damaged("the terrain's size is out of range");
  g.z.assign(static_cast<std::size_t>(g.nx) * g.ny, std::numeric_limits<float>::quiet_NaN());
  Stmt t(p.db(), "SELECT row, col, data FROM terrain_tiles WHERE terrain = ?");
  t.bind(1, uuid);
  std::vector<unsigned char> raw;
  long long tiles = 0;
  while (t.step()) {
    const int tj = t.integer(0), ti = t.integer(1);
    const int i0 = ti * tile, j0 = tj * tile;
    if (ti < 0 || tj < 0 || i0 >= g.nx || j0 >= g.ny) throw damaged("a tile lies outside the grid");
    const int w = std::min(tile, g.nx - i0), h = std::min(tile, g.ny - j0);
    const std::string blob = t.blob(2);
    uLongf len = static_cast<uLongf>(w) * h * 4;
    raw.assign(len, 0);
    if (uncompress(raw.data(), &len, reinterpret_cast<const Bytef*>(blob.data()), blob.size()) != Z_OK ||
        len != static_cast<uLongf>(w) * h * 4)
      throw damaged("tile " + std::to_string(tj) + "," + std::to_string(ti) + " is damaged");
    std::size_t k = 0;
    for (int j = j0; j < j0 + h; ++j)
      for (int i = i0; i < i0 + w; ++i, k += 4) {
        const float v = get_f32(raw.data() + k);
        g.z[static_cast<std::size_t>(j) * g.nx + i] = v == nodata ? std::numeric_limits<float>::quiet_NaN() : v;
      }
    ++tiles;
  }
  const long long want = static_cast<long long>((g.nx + tile - 1) / tile) * ((g.ny + tile - 1) / tile);
  if (tiles != want) throw damaged("tiles are missing");
  return g;
}

namespace {

// The elevation at (lat, lon) from the live terrain, decoding only the tiles
// that hold the four cells around it; with the terrain's vertical accuracy.
struct Sample {
  double z = 0;
  std::optional<double> accuracy;
};
std::optional<Sample> sample_terrain(Project& p, double lat, double lon) {
  Stmt s(p.db(),
         "SELECT uuid, epsg, cell, west, north, nx, ny, nodata, tile_size, vertical_accuracy FROM terrain "
         "WHERE deleted IS NULL");
  if (!s.step()) return std::nullopt;
  const std::string uuid = s.text(0);
  const int epsg = s.integer(1);
  const double cell = s.real(2), west = s.real(3), north = s.real(4);
  const int nx = s.integer(5), ny = s.integer(6), tile = s.integer(8);
  const float nodata = static_cast<float>(s.real(7));
  if (!(cell > 0) || tile <= 0 || nx <= 0 || ny <= 0) return std::nullopt;
  const auto u = geo::to_utm({lat, lon}, zone_of_epsg(epsg));
  if (!u) return std::nullopt;
  const double fx = (u->easting - west) / cell - 0.5, fy = (north - u->northing) / cell - 0.5;
  if (!(fx > -1 && fy > -1 && fx < nx && fy < ny)) return std::nullopt;
  // The window of cells around the place (3 x 3 is enough for the bilinear corners).
  const int i0 = std::max(0, static_cast<int>(std::floor(fx)) - 1), i1 = std::min(nx - 1, i0 + 3);
  const int j0 = std::max(0, static_cast<int>(std::floor(fy)) - 1), j1 = std::min(ny - 1, j0 + 3);
  geo::TerrainGrid g;
  g.nx = i1 - i0 + 1;
  g.ny = j1 - j0 + 1;
  g.cell = cell;
  g.west = west + i0 * cell;
  g.north = north - j0 * cell;
  g.z.assign(static_cast<std::size_t>(g.nx) * g.ny, std::numeric_limits<float>::quiet_NaN());
  Stmt t(p.db(),
         "SELECT row, col, data FROM terrain_tiles WHERE terrain = ? AND row BETWEEN ? AND ? AND col BETWEEN ? AND ?");
  t.bind(1, uuid).bind(2, j0 / tile).bind(3, j1 / tile).bind(4, i0 / tile).bind(5, i1 / tile);
  std::vector<unsigned char> raw;
  while (t.step()) {
    const int tj = t.integer(0), ti = t.integer(1);
    const int w = std::min(tile, nx - ti * tile), h = std::min(tile, ny - tj * tile);
    if (w <= 0 || h <= 0) continue;
    const std::string blob = t.blob(2);
    uLongf len = static_cast<uLongf>(w) * h * 4;
    raw.assign(len, 0);
    if (uncompress(raw.data(), &len, reinterpret_cast<const Bytef*>(blob.data()), blob.size()) != Z_OK ||
        len != static_cast<uLongf>(w) * h * 4)
      return std::nullopt;  // a damaged tile gives no elevation here; load_terrain names it
    for (int j = std::max(j0, tj * tile); j <= std::min(j1, tj * tile + h - 1); ++j)
      for (int i = std::max(i0, ti * tile); i <= std::min(i1, ti * tile + w - 1); ++i) {
        const float v = get_f32(raw.data() + 4 * (static_cast<std::size_t>(j - tj * tile) * w + (i - ti * tile)));
        if (v != nodata) g.z[static_cast<std::size_t>(j - j0) * g.nx + (i - i0)] = v;
      }
  }
  const auto z = geo::elevation_at(g, u->easting, u->northing);
  if (!z) return std::nullopt;
  return Sample{*z, s.opt_real(9)};
}

}  // namespace

void elevation_from_terrain(Project& p, Station& st) {
  if (st.elevation) return;
  if (const auto s = sample_terrain(p, st.lat, st.lon)) {
    st.elevation = s->z;
    st.v_accuracy = s->accuracy;
    st.source = PositionSource::Dem;
  }
}

void elevation_from_terrain(Project& p, ContactPoint& pt) {
  if (pt.elevation) return;
  if (const auto s = sample_terrain(p, pt.lat, pt.lon)) {
    pt.elevation = s->z;
    pt.v_accuracy = s->accuracy;
    pt.source = PointSource::Dem;
  }
}

bool remove_terrain(Project& p) {
  bool removed = false;
  p.write([&] {
    const auto uuid = live_uuid(p);
    if (!uuid) return;
    const std::string before = terrain_json(p.db(), *uuid);
    const std::string now = utc_now();
    Stmt s(p.db(), "UPDATE terrain SET deleted = ?, updated = ?, device = ? WHERE uuid = ?");
    s.bind(1, now).bind(2, now).bind(3, p.device()).bind(4, *uuid);
    s.run();
    // The tiles go with it: the DEM file is where the ground came from.
    Stmt d(p.db(), "DELETE FROM terrain_tiles WHERE terrain = ?");
    d.bind(1, *uuid);
    d.run();
    audit(p, *uuid, "delete", before, terrain_json(p.db(), *uuid), now);
    removed = true;
  });
  return removed;
}

TerrainStored fill_elevations(Project& p) {
  TerrainStored out;
  p.write([&] {
    const auto info_uuid = live_uuid(p);
    if (!info_uuid) return;
    Stmt s(p.db(), "SELECT epsg, vertical_accuracy FROM terrain WHERE uuid = ?");
    s.bind(1, *info_uuid);
    s.step();
    const geo::UtmZone zone = zone_of_epsg(s.integer(0));
    const std::optional<double> va = s.opt_real(1);
    const auto grid = load_terrain(p);
    auto z_at = [&](double lat, double lon) -> std::optional<double> {
      const auto u = geo::to_utm({lat, lon}, zone);
      if (!u) return std::nullopt;
      const auto z = geo::elevation_at(*grid, u->easting, u->northing);
      if (!z) return std::nullopt;
      return *z;
    };
    for (Station& st : list_stations(p)) {
      if (st.elevation) continue;
      const auto z = z_at(st.lat, st.lon);
      if (!z) continue;
      st.elevation = *z;
      st.v_accuracy = va;
      st.source = PositionSource::Dem;
      if (update(p, st)) ++out.filled_stations;
    }
    for (ContactPoint& pt : list_points(p)) {
      if (pt.elevation) continue;
      const auto z = z_at(pt.lat, pt.lon);
      if (!z) continue;
      pt.elevation = *z;
      pt.v_accuracy = va;
      pt.source = PointSource::Dem;
      if (update(p, pt)) ++out.filled_points;
    }
    out.uuid = *info_uuid;
  });
  return out;
}

int snap_to_terrain(Project& p, const std::string& contact_uuid) {
  int changed = 0;
  p.write([&] {
    const auto uuid = live_uuid(p);
    if (!uuid) fail("terrain", "no-terrain", "the project has no terrain: attach one with cairn terrain FILE DEM");
    Stmt s(p.db(), "SELECT epsg, vertical_accuracy FROM terrain WHERE uuid = ?");
    s.bind(1, *uuid);
    s.step();
    const geo::UtmZone zone = zone_of_epsg(s.integer(0));
    const std::optional<double> va = s.opt_real(1);
    const auto grid = load_terrain(p);
    ListOptions o;
    o.contact = contact_uuid;
    for (ContactPoint& pt : list_points(p, o)) {
      const auto u = geo::to_utm({pt.lat, pt.lon}, zone);
      if (!u) continue;
      const auto z = geo::elevation_at(*grid, u->easting, u->northing);
      if (!z) continue;
      pt.elevation = *z;
      pt.v_accuracy = va;
      pt.source = PointSource::Dem;
      if (update(p, pt)) ++changed;
    }
  });
  return changed;
}

}  // namespace cairn::store

namespace cairn::store {

TerrainMerge merge_terrain(Project& p, Db& source) {
  TerrainMerge out;
  Stmt s(source, "SELECT uuid, name, digest FROM terrain WHERE deleted IS NULL");
  if (!s.step()) return out;
  const std::string uuid = s.text(0), name = s.text(1), digest = s.text(2);
  Stmt mine(p.db(), "SELECT uuid, name, digest FROM terrain WHERE deleted IS NULL");
  if (mine.step()) {
    if (mine.text(2) == digest) {
      out.outcome = TerrainMerge::Skipped;
      return out;
    }
    out.outcome = TerrainMerge::Conflict;
    out.message = "its terrain (" + name + ", " + uuid + ") differs from this file's (" + mine.text(1) + ", " +
                  mine.text(0) +
                  "); this file keeps its own. To take the other, run cairn terrain FILE --remove "
                  "and attach that DEM again.";
    return out;
  }
  Stmt known(p.db(), "SELECT deleted FROM terrain WHERE uuid = ?");
  known.bind(1, uuid);
  if (known.step()) {  // removed here since: the removal stands
    out.outcome = TerrainMerge::Skipped;
    out.message = "its terrain " + name + " was removed from this file; it was not brought back";
    return out;
  }
  const std::string cols = kColumns;
  Stmt row(source, "SELECT " + cols + " FROM terrain WHERE uuid = ?");
  row.bind(1, uuid);
  row.step();
  Stmt ins(p.db(), "INSERT INTO terrain(" + cols + ") VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)");
  for (int c = 0; c < 15; ++c) {
    if (row.is_null(c))
      ins.bind(c + 1, nullptr);
    else if (c == 2 || c == 6 || c == 7 || c == 10)
      ins.bind(c + 1, row.int64(c));
    else if (c == 3 || c == 4 || c == 5 || c == 8 || c == 9)
      ins.bind(c + 1, row.real(c));
    else
      ins.bind(c + 1, row.text(c));
  }
  ins.run();
  Stmt tiles(source, "SELECT row, col, data FROM terrain_tiles WHERE terrain = ?");
  tiles.bind(1, uuid);
  Stmt put(p.db(), "INSERT INTO terrain_tiles(terrain, row, col, data) VALUES (?,?,?,?)");
  while (tiles.step()) {
    const std::string blob = tiles.blob(2);
    put.reset();
    put.bind(1, uuid)
        .bind(2, tiles.int64(0))
        .bind(3, tiles.int64(1))
        .bind_blob(4, blob.data(), static_cast<int>(blob.size()));
    put.run();
  }
  // The copy must read back whole before the merge commits.
  load_terrain(p);
  out.outcome = TerrainMerge::Added;
  return out;
}

}  // namespace cairn::store
