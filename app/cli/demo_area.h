// The demo field area: an invented valley and ridge ("Auska valley" and "Vell
// ridge") with six units, five contacts, three mappers on two tablets over four
// field days, a notebook typed in camp and a handheld receiver's GPX track of
// waypoints. Everything is generated from a fixed seed, so the demo is the same
// on every machine.
//
// The mistakes planted in it (each one the cross-check must find) are listed in
// demo_project/README.md.
#pragma once
#include <string>
#include <vector>

#include "geomath/terrain.h"
#include "storage/records.h"

namespace cairn::cli::demo {

// The records one tablet holds at the end of the four days.
struct Tablet {
  std::string file;         // "tablet-a.cairn"
  std::string device_id;    // the tablet's UUID
  std::string device_name;  // "tablet A"
  std::vector<store::Person> people;
  std::vector<store::Unit> units;
  std::vector<store::Contact> contacts;
  std::vector<store::Station> stations;
  std::vector<store::PlanarReading> planes;
  std::vector<store::LinearReading> lines;
  std::vector<store::ContactPoint> points;
};

struct Area {
  std::string project_name;  // "Auska valley"
  std::string utm_zone;      // "8N"
  Tablet a, b;
  std::string notebook_csv;  // planar readings typed in camp from a paper notebook
  std::string gpx;           // handheld receiver's waypoints along one contact
  std::string gpx_contact;   // the contact those waypoints belong to
};

// Terrain elevation (metres) at local offsets east/north of the area's origin, in metres:
// a ridge trending north-north-east over a valley floor rising gently northward.
double terrain(double east, double north);

// The same topography as a grid in UTM zone 8N (EPSG code terrain_epsg()):
// terrain() at the centre of every `cell`-metre cell over the area and about
// 1.3 km around it (local -4000..3000 m east, -3000..3500 m north), the grid
// aligned to whole multiples of the cell size. `cairn demo` writes it as the
// GeoTIFF terrain.tif and attaches it to every demo project file.
geo::TerrainGrid terrain_grid(double cell = 20);
int terrain_epsg();

// Builds the whole area. Needs no files; deterministic.
Area build_area();

}  // namespace cairn::cli::demo
