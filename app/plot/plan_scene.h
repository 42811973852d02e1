// A plan (map view) scene drawn through the Canvas: stations, points mapped
// along contacts, strike-dip symbols after the FGDC geologic map symbol
// standard (FGDC-STD-013-2006), the strike lines (structure contours) of fitted
// contacts, a probe, a scale bar and a north arrow. Shared by the touch UI's
// Plan screen and the report.
//
// Map coordinates are metres in the project's UTM zone (easting, northing), so
// the plan is a grid plan: north on the plan is GRID north. Strike azimuths
// given to this scene must be grid azimuths: true azimuth - convergence
// (geomath/geodesy.h: the convergence is the azimuth of grid north measured
// clockwise from true north), see grid_azimuth().
//
//   PlanData d;
//   PlanStation s; s.code = "S12"; s.e = e; s.n = n; d.stations.push_back(s);
//   PlanAttitude a; a.e = e; a.n = n; a.strike = grid_azimuth(strike, conv); a.dip = dip;
//   d.attitudes.push_back(a);
//   PlanView v = fit_view(plan_bounds(d), rect, 20);
//   draw_plan(canvas, rect, d, v, PlanOptions{});
#pragma once
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "app/plot/canvas.h"
#include "app/plot/symbols.h"
#include "geomath/strike_lines.h"

namespace cairn::plot {

// Which strike-dip symbol a planar reading is drawn with.
enum class AttitudeSymbol {
  Bedding,            // inclined: strike line with a dip tick; vertical: tick both sides;
                      // horizontal: circle with a cross
  BeddingOverturned,  // strike line with a hooked dip tick
  Foliation,          // strike line with a filled triangle on the dip side
  Cleavage,           // strike line with an open triangle on the dip side
  Joint,              // strike line with a T-shaped tick
  Other               // faults, veins, contacts, slope faces: a plain dip tick
};

// The symbol for a planar reading kind as storage names it ("bedding", "foliation", ...).
AttitudeSymbol attitude_symbol(std::string_view kind, bool overturned);

// A true-north azimuth on a grid-north-up plan: true - convergence, in [0, 360)
// (convergence: azimuth of grid north clockwise from true north).
double grid_azimuth(double true_azimuth, double convergence);

struct PlanStation {
  std::string code;
  double e = 0, n = 0;
  Rgba colour = kInk;
  bool selected = false;  // ringed
};

// A point mapped along a contact.
struct PlanPoint {
  double e = 0, n = 0;
  Rgba colour = kInk;
};

struct PlanAttitude {
  double e = 0, n = 0;
  double strike = 0;  // GRID azimuth of the right-hand-rule strike (see grid_azimuth)
  double dip = 0;
  AttitudeSymbol symbol = AttitudeSymbol::Bedding;
  Rgba colour = kInk;
};

// A strike line (structure contour) of a fitted contact, clipped to the map.
struct PlanStrikeLine {
  double e0 = 0, n0 = 0, e1 = 0, n1 = 0;
  double elevation = 0;  // metres
  Rgba colour = kInk;
};

// A tapped place with a few lines of text beside it (e.g. the contact's predicted elevation).
struct PlanProbe {
  double e = 0, n = 0;
  std::vector<std::string> lines;
};

// A filled area of the map (hillshade patches, trace bands), a closed ring in map metres.
struct PlanArea {
  std::vector<std::pair<double, double>> ring;
  Rgba fill;
  // Hillshade patches: illumination 0..1 instead of `fill`, drawn between the
  // theme's ink (30% at 0) and its background (at 1), so both themes keep their look.
  std::optional<double> shade;
};

// A line on the map (terrain contours, predicted traces) in map metres.
struct PlanPath {
  std::vector<std::pair<double, double>> pts;
  Rgba colour;
  double width = 1;   // times PlanOptions::line_width
  std::string label;  // predicted traces: the contact's name
};

struct PlanData {
  // The ground, drawn first (app/plot/plan_terrain.h): hillshade patches, terrain
  // contours, trace bands (translucent) and predicted outcrop traces.
  std::vector<PlanArea> shading;
  std::vector<PlanPath> terrain_contours;
  std::vector<PlanArea> bands;
  std::vector<PlanPath> traces;
  std::vector<PlanStation> stations;
  std::vector<PlanPoint> points;
  std::vector<PlanAttitude> attitudes;
  std::vector<PlanStrikeLine> strike_lines;
  // Day tracks (app/plot/plan_track.h): dashed, one per person, `label` the
  // person's initials written at the last fix (marked by an open square).
  std::vector<PlanPath> tracks;
  std::optional<PlanProbe> probe;
};

// Which part of the map the rect shows: the map point at the rect's centre and
// the scale. North is up.
struct PlanView {
  double centre_e = 0, centre_n = 0;
  double scale = 1;  // canvas units per metre
};

struct PlanOptions {
  Rgba background = kWhite;
  Rgba ink = kInk;
  double symbol_length = 24;  // canvas units, length of a symbol's strike line
  double line_width = 1.5;
  double text_size = 13;
  double mark_size = 10;  // station and point markers
  bool strike_line_labels = true;
  bool dip_values = true;    // the dip written beside each symbol
  bool strike_only = false;  // attitudes as bare strike lines (for very many on screen)
  bool station_labels = true;
  bool scale_bar = true;
  bool north_arrow = true;
};

// Bounds of every position in the data (stations, points, attitudes,
// strike-line ends); a single place gets a 100 m square about it, no data a
// 100 m square about the origin.
geo::MapRect plan_bounds(const PlanData& d);
// The view that shows `b` whole inside `r` less `margin` canvas units on every side.
PlanView fit_view(const geo::MapRect& b, const Rect& r, double margin);
Pt plan_to_canvas(const PlanView& v, const Rect& r, double e, double n);
// The map point (e, n) under a canvas point.
std::pair<double, double> canvas_to_plan(const PlanView& v, const Rect& r, Pt p);
// Zoom by `factor` (> 1 zooms in) keeping the map point under `about` in place.
PlanView zoom_about(const PlanView& v, const Rect& r, Pt about, double factor);
// The view moved so that the map follows a drag of (dx, dy) canvas units.
PlanView pan_by(const PlanView& v, double dx, double dy);
// The map rectangle visible in `r`.
geo::MapRect visible_map(const PlanView& v, const Rect& r);
// The largest 1, 2 or 5 times a power of ten metres not above max_metres (0 for none).
double nice_length(double max_metres);

// One strike-dip symbol centred on `at` with a strike line `length` long;
// `strike` is the azimuth of the strike line on the canvas (degrees clockwise
// from canvas up; right-hand rule: the dip side is to the right looking along
// it). text_size 0 hides the dip value.
void draw_attitude_symbol(Canvas& c, Pt at, double strike, double dip, AttitudeSymbol s, double length, Rgba colour,
                          double width, double text_size);

// Draws the background, the ground (shading, terrain contours, trace bands), strike lines,
// predicted traces, day tracks, contact points, strike-dip symbols,
// stations, the probe, a scale bar and a grid-north arrow. Objects outside the
// rect are skipped.
void draw_plan(Canvas& c, const Rect& r, const PlanData& d, const PlanView& v, const PlanOptions& o);

}  // namespace cairn::plot
