// The day tracks as an export layer (GeoPackage and GeoJSON): `day_tracks`, one
// line per person and UTC day through that person's fixes in time order
// (storage/track.h), with the person's initials, the day, the first and last
// fix's times, the number of fixes and the length along the line on the WGS84
// ellipsoid (geodesic, Karney 2013). A day with a single fix makes no line
// (a line needs two points, OGC 06-103r4 clause 6.1.7); its fix is in the GPX
// export (`cairn export FILE OUT.gpx`).
#pragma once
#include "formats/layers.h"
#include "geomath/geodesy.h"

namespace cairn::store {
class Project;
}

namespace cairn::core {

// Throws std::runtime_error when a fix cannot be projected into ZONE.
formats::Layer day_track_layer(store::Project& p, const geo::UtmZone& zone);

}  // namespace cairn::core
