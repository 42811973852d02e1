// A stereonet scene drawn through the Canvas: poles, lines, great circles,
// fitted contact planes with their 95% cones, small circles, density contours,
// statistics and a legend. Shared by the touch UI and the report.
//
// Geometry and statistics come from geomath (stereonet.h, statistics.h,
// density.h); this file only places them on the canvas and chooses inks. Net
// north is up, x east; lower hemisphere always. Statistics use the `counted`
// poles and lines: Fisher (1953) mean with alpha95 and kappa when the poles form
// a cluster, the pi-girdle and beta with its cone when Woodcock's (1977) K < 1.
//
//   NetData d;
//   d.planes.push_back({plane, unit_colour, Shape::Circle});
//   NetOptions o;
//   o.contours = o.statistics = true;
//   draw_net(canvas, Rect{0, 0, 360, 480}, d, o);
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "app/plot/canvas.h"
#include "app/plot/symbols.h"
#include "geomath/density.h"
#include "geomath/orientation.h"
#include "geomath/statistics.h"
#include "geomath/stereonet.h"

namespace cairn::plot {

// How planar readings are shown.
enum class PlaneDisplay { Poles, GreatCircles, Both };

struct NetPlane {
  geo::Plane plane;
  Rgba colour = kInk;
  Shape shape = Shape::Circle;
  bool counted = true;  // part of the statistics and contours
};

struct NetLine {
  geo::Line line;
  Rgba colour = kInk;
  Shape shape = Shape::Triangle;
  bool counted = true;
};

// A plane fitted to a contact's points, with its 95% cone about the pole.
struct NetFit {
  geo::Plane plane;
  std::optional<double> cone95;
  Rgba colour = kInk;
  std::string label;
};

struct NetSmallCircle {
  geo::Line axis;
  double half_angle = 0;
  Rgba colour = kInk;
};

// One line of the legend's key: a marker and its meaning.
struct NetKey {
  Shape shape = Shape::Circle;
  Rgba colour = kInk;
  bool filled = true;
  std::string text;
};

struct NetData {
  std::string title;
  std::vector<NetPlane> planes;
  std::vector<NetLine> lines;
  std::vector<NetFit> fits;
  std::vector<NetSmallCircle> small_circles;
  std::vector<NetKey> key;
  std::string pole_set = "poles";  // what the poles are, for the legend ("poles to bedding")
  std::string line_set = "lines";
};

struct NetOptions {
  geo::NetKind kind = geo::NetKind::EqualArea;
  PlaneDisplay planes = PlaneDisplay::Poles;
  bool grid = false;
  double grid_step = 10;
  bool contours = false;
  geo::CountingMethod counting = geo::CountingMethod::Kamb;
  // Density grid nodes per side; 0: 121 for fewer than 200 poles (a Kamb count is a
  // step function, and on few poles a coarse grid draws its rings as visible steps), else 61.
  int grid_nodes = 0;
  int contour_min_data = 3;
  bool statistics = false;
  bool legend = true;
  double text_size = 0;    // 0: from the rect
  double marker_size = 0;  // 0: from the net's size
  // At most this many pole markers, the last ones of NetData::planes (0: all).
  // Every plane still counts in the statistics and contours; the caller says
  // in its own text that some poles are not drawn.
  size_t max_pole_markers = 0;
};

struct NetStatistics {
  int poles = 0, lines = 0;
  std::optional<geo::FisherMean> pole_mean;
  std::optional<geo::OrientationTensor> pole_tensor;
  std::optional<geo::WoodcockShape> pole_shape;
  bool girdle_like = false;
  std::optional<geo::GirdleFit> girdle;
  std::optional<geo::FisherMean> line_mean;
  std::optional<geo::DensityGrid> density;
  std::vector<double> contour_levels;
};

struct NetFrame {
  Pt centre;
  double radius = 0;
  // Net point (x east, y north) -> canvas (y down).
  Pt to_canvas(const geo::NetPoint& p) const { return {centre.x + p[0] * radius, centre.y - p[1] * radius}; }
};

struct NetLayout {
  Rect title, legend;
  NetFrame frame;
  double text_size = 12;
  double marker_size = 6;
};

// "030/40" style: azimuth three digits, angle two.
std::string format_attitude(double azimuth, double angle);

NetStatistics net_statistics(const NetData& d, const NetOptions& o);
std::vector<std::string> net_legend(const NetData& d, const NetStatistics& s, const NetOptions& o);
// legend_width: the widest legend line (canvas units); 0 when not known, and the
// legend then goes beside the net only on a rectangle much wider than tall.
// Known, the legend goes where the net comes out larger (beside or below).
NetLayout net_layout(const Rect& r, bool has_title, int legend_lines, const NetOptions& o, double legend_width = 0);
// Draws the whole net (title, net, legend) and returns the statistics it drew.
NetStatistics draw_net(Canvas& c, const Rect& r, const NetData& d, const NetOptions& o);

// The height a rectangle `width` wide needs to hold the net at full width with a
// title (when has_title) and `legend_lines` lines of legend below it
// (legend_lines = net_legend(...).size()).
double net_height_for_width(double width, bool has_title, int legend_lines, const NetOptions& o);

}  // namespace cairn::plot
