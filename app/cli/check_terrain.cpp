#include "app/cli/check_terrain.h"

#include <cmath>

#include "geomath/angles.h"
#include "geomath/geodesy.h"
#include "app/core/export.h"
#include "formats/layers.h"
#include "storage/terrain.h"

namespace cairn::cli {

GroundCheck add_terrain_faces(store::Project& p, core::CheckData& data, const geo::CheckOptions& o) {
  GroundCheck g;
  const auto info = store::terrain_info(p);
  if (!info || info->epsg != formats::utm_epsg(data.zone)) return g;
  g.grid = *store::load_terrain(p);
  g.has_terrain = true;
  g.cell = info->cell;
  g.vertical_accuracy = info->vertical_accuracy;
  for (const auto& r : data.input.planes)
    if (r.kind == "slope") g.typed_face_stations.insert(r.station);
  std::vector<geo::CheckPlane> faces;
  for (const auto& s : data.input.stations) {
    if (g.typed_face_stations.count(s.uuid)) continue;
    const auto at = geo::slope_at(g.grid, s.e, s.n);
    if (!at) continue;
    if (at->slope > o.steep_slope) {
      // Aspect is the dip direction on the grid; true north = grid + convergence.
      geo::CheckPlane face;
      face.uuid = "dem:" + s.uuid;
      face.station = s.uuid;
      face.kind = "slope";
      face.plane.strike = geo::wrap360(at->aspect + data.input.grid.convergence - 90);
      face.plane.dip = at->slope;
      faces.push_back(face);
      g.dem_face_stations.insert(s.uuid);
    } else if (g.too_coarse()) {
      g.not_cleared.push_back(s.code);
    }
  }
  for (auto& f : faces) data.input.planes.push_back(std::move(f));
  return g;
}

std::string slope_source(const GroundCheck& g, const geo::Flag& f) {
  if (f.rule != "daylighting" && f.rule != "toppling") return "";
  return g.dem_face_stations.count(f.station_id) ? "dem" : "reading";
}

std::vector<GroundLead> where_next_on_ground(const GroundCheck& g, const core::CheckData& data,
                                             const geo::CheckReport& rep, double e, double n, double radius) {
  std::vector<GroundLead> out;
  if (!g.has_terrain) return out;
  for (const auto& f : rep.fits) {
    if (!f.fit) continue;
    const auto pred = geo::predict_contact(g.grid, *f.fit, g.vertical_accuracy.value_or(0));
    if (!pred) continue;
    GroundLead best;
    best.distance = INFINITY;
    for (const auto& line : pred->trace)
      for (std::size_t k = 0; k + 1 < line.pts.size(); ++k) {
        // Nearest point of each segment (orthogonal projection, clamped).
        const double ax = line.pts[k][0], ay = line.pts[k][1];
        const double dx = line.pts[k + 1][0] - ax, dy = line.pts[k + 1][1] - ay;
        const double l2 = dx * dx + dy * dy;
        const double t = l2 > 0 ? std::clamp(((e - ax) * dx + (n - ay) * dy) / l2, 0.0, 1.0) : 0.0;
        const double qx = ax + t * dx, qy = ay + t * dy;
        const double d = std::hypot(qx - e, qy - n);
        if (d < best.distance) best.distance = d, best.e = qx, best.n = qy;
      }
    if (!(best.distance <= radius)) continue;
    best.contact = f.contact;
    best.bearing = geo::wrap360(std::atan2(best.e - e, best.n - n) * 180 / geo::kPi + data.input.grid.convergence);
    if (auto z = geo::elevation_at(g.grid, best.e, best.n)) best.elevation = *z;
    if (pred->has_band)
      if (auto w = geo::trace_band_half_width(g.grid, f.fit->normal, pred->uncertainty, g.vertical_accuracy.value_or(0),
                                              best.e, best.n))
        best.half_width = *w;
    out.push_back(best);
  }
  std::sort(out.begin(), out.end(), [](const GroundLead& a, const GroundLead& b) { return a.distance < b.distance; });
  return out;
}

}  // namespace cairn::cli
