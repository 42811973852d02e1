#include "app/plot/net_scene.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fmt/format.h>

#include "geomath/angles.h"
#include "geomath/decimal.h"

namespace cairn::plot {

namespace {

constexpr Rgba kStatInk{213, 94, 0, 255};     // Okabe-Ito vermillion: statistics drawn on the net
constexpr Rgba kContourInk{70, 70, 70, 255};  // contours carry no colour meaning
constexpr Rgba kFrameInk{0, 0, 0, 255};

// One line of the legend: plain text, or text behind a marker or a short stroke.
struct LegendEntry {
  enum Kind { Text, Marker, Stroke } kind = Text;
  Shape shape = Shape::Circle;
  Rgba colour = kInk;
  bool filled = true;
  std::string text;
};

std::vector<geo::Line> counted_poles(const NetData& d) {
  std::vector<geo::Line> v;
  for (const auto& p : d.planes)
    if (p.counted) v.push_back(geo::pole(p.plane));
  return v;
}

std::vector<geo::Line> counted_lines(const NetData& d) {
  std::vector<geo::Line> v;
  for (const auto& l : d.lines)
    if (l.counted) v.push_back(l.line);
  return v;
}

std::string net_name(geo::NetKind k) {
  return k == geo::NetKind::EqualArea ? "Equal-area net (Schmidt), lower hemisphere"
                                      : "Equal-angle net (Wulff), lower hemisphere";
}

std::string level_text(double v) { return geo::format_decimal("%g", v); }

std::vector<LegendEntry> legend_entries(const NetData& d, const NetStatistics& s, const NetOptions& o) {
  std::vector<LegendEntry> e;
  auto text = [&](std::string t) { e.push_back({LegendEntry::Text, Shape::Circle, kInk, true, std::move(t)}); };
  text(net_name(o.kind));
  for (const auto& k : d.key) e.push_back({LegendEntry::Marker, k.shape, k.colour, k.filled, k.text});

  if (s.density) {
    const bool kamb = s.density->method == geo::CountingMethod::Kamb;
    std::string t = kamb ? "Kamb contours" : "1%-area contours";
    if (s.contour_levels.empty()) {
      t += kamb ? ": no node reaches 2σ" : ": no node reaches 1%";
    } else {
      t += " ";
      for (size_t i = 0; i < s.contour_levels.size() && i < 6; ++i)
        t += (i ? ", " : "") + level_text(s.contour_levels[i]) + (kamb ? "σ" : "%");
      if (s.contour_levels.size() > 6) t += " …";
    }
    text(t + " (n " + std::to_string(s.density->n_data) + ")");
  }

  if (o.statistics) {
    if (s.pole_mean && (!s.girdle_like || !s.girdle)) {
      const auto& m = *s.pole_mean;
      e.push_back(
          {LegendEntry::Marker, Shape::Plus, kStatInk,
           false, "Mean of " + d.pole_set + " " + format_attitude(m.mean.trend, m.mean.plunge) + " (plane " + [&] {
             const geo::Plane p = geo::plane_from_pole(m.mean);
             return format_attitude(p.strike, p.dip);
           }() + ")"});
      std::string t = m.alpha95 ? "α95 " + geo::format_decimal("%.1f", *m.alpha95) + "°"
                                : std::string("α95 undefined (too dispersed)");
      t += std::isfinite(m.kappa) ? ", κ " + geo::format_decimal("%.1f", m.kappa) : std::string(", κ unbounded");
      text(t + ", n " + std::to_string(m.n));
    }
    if (s.pole_tensor && s.pole_tensor->n >= 2) {
      const auto& ev = s.pole_tensor->eigenvalues;
      std::string t = "Eigenvalues " + geo::format_decimal("%.3f", ev[0]) + ", " + geo::format_decimal("%.3f", ev[1]) +
                      ", " + geo::format_decimal("%.3f", ev[2]);
      text(t);
      if (s.pole_shape) {
        auto f = [](double v) { return std::isfinite(v) ? geo::format_decimal("%.2f", v) : std::string("∞"); };
        text("Woodcock K " + f(s.pole_shape->k) + ", C " + f(s.pole_shape->c));
      }
    }
    if (s.girdle && s.girdle_like) {
      const auto& g = *s.girdle;
      e.push_back({LegendEntry::Stroke, Shape::Circle, kStatInk, false,
                   "π-girdle " + format_attitude(g.girdle.strike, g.girdle.dip)});
      e.push_back({LegendEntry::Marker, Shape::Cross, kStatInk, false,
                   "β " + format_attitude(g.beta.trend, g.beta.plunge) + ", cone 95% " +
                       geo::format_decimal("%.1f", g.beta_cone) + "°"});
    }
    if (s.line_mean) {
      const auto& m = *s.line_mean;
      e.push_back({LegendEntry::Marker, Shape::Plus, kStatInk, false,
                   "Mean of " + d.line_set + " " + format_attitude(m.mean.trend, m.mean.plunge) +
                       (m.alpha95 ? ", α95 " + geo::format_decimal("%.1f", *m.alpha95) + "°" : std::string())});
    }
  }
  for (const auto& f : d.fits) {
    std::string t =
        (f.label.empty() ? std::string("Fitted plane") : f.label) + " " + format_attitude(f.plane.strike, f.plane.dip);
    t += f.cone95 ? ", cone 95% " + geo::format_decimal("%.1f", *f.cone95) + "°" : std::string(", no cone");
    e.push_back({LegendEntry::Stroke, Shape::Circle, f.colour, false, t});
  }
  return e;
}

void draw_polylines(Canvas& c, const NetFrame& f, const std::vector<geo::NetPolyline>& lines, Rgba ink, double width) {
  for (const auto& l : lines) {
    if (l.pts.size() < 2) continue;
    std::vector<Pt> pts;
    pts.reserve(l.pts.size());
    for (const auto& p : l.pts) pts.push_back(f.to_canvas(p));
    c.polyline(pts, ink, width, false);
  }
}

void draw_grid(Canvas& c, const NetFrame& f, const NetOptions& o) {
  const double step = o.grid_step > 0 ? o.grid_step : 10;
  const double w = std::max(0.5, f.radius / 300);
  // Great circles striking north-south, dipping east and west.
  for (double dip = step; dip < 90 - 1e-9; dip += step) {
    draw_polylines(c, f, {geo::great_circle(o.kind, geo::Plane{0, dip})}, kGridInk, w);
    draw_polylines(c, f, {geo::great_circle(o.kind, geo::Plane{180, dip})}, kGridInk, w);
  }
  draw_polylines(c, f, {geo::great_circle(o.kind, geo::Plane{0, 90})}, kGridInk, w);
  // Small circles about the north-south horizontal axis.
  for (double a = step; a < 90 - 1e-9; a += step) {
    if (auto sc = geo::small_circle(o.kind, geo::Line{0, 0}, a)) draw_polylines(c, f, *sc, kGridInk, w);
    if (auto sc = geo::small_circle(o.kind, geo::Line{180, 0}, a)) draw_polylines(c, f, *sc, kGridInk, w);
  }
  // East-west diameter.
  c.polyline({f.to_canvas({-1, 0}), f.to_canvas({1, 0})}, kGridInk, w);
}

void draw_frame(Canvas& c, const NetFrame& f, double ts) {
  const double w = std::max(1.0, f.radius / 120);
  c.circle(f.centre, f.radius, kFrameInk, w);
  const double t = f.radius * 0.05;
  // Ticks at the four cardinal points and a small cross at the centre.
  c.polyline({{f.centre.x, f.centre.y - f.radius}, {f.centre.x, f.centre.y - f.radius - t}}, kFrameInk, w);
  c.polyline({{f.centre.x + f.radius, f.centre.y}, {f.centre.x + f.radius + t, f.centre.y}}, kFrameInk, w);
  c.polyline({{f.centre.x, f.centre.y + f.radius}, {f.centre.x, f.centre.y + f.radius + t}}, kFrameInk, w);
  c.polyline({{f.centre.x - f.radius, f.centre.y}, {f.centre.x - f.radius - t, f.centre.y}}, kFrameInk, w);
  c.polyline({{f.centre.x - t / 2, f.centre.y}, {f.centre.x + t / 2, f.centre.y}}, kFrameInk, w * 0.7);
  c.polyline({{f.centre.x, f.centre.y - t / 2}, {f.centre.x, f.centre.y + t / 2}}, kFrameInk, w * 0.7);
  c.text({f.centre.x, f.centre.y - f.radius - t - ts * 1.05}, "N", kFrameInk, ts, Anchor::Middle);
}

double auto_text_size(const Rect& r) { return std::clamp(std::min(r.w, r.h) / 30.0, 9.0, 16.0); }

}  // namespace

std::string format_attitude(double azimuth, double angle) {
  long az = std::lround(geo::wrap360(azimuth));
  if (az >= 360) az -= 360;
  const long an = std::lround(angle);
  return fmt::format("{:03d}/{:02d}", az, an);
}

namespace {

// The counts and, when asked for, the density grid and its contour levels.
NetStatistics counts_and_density(const std::vector<geo::Line>& poles, const std::vector<geo::Line>& lines,
                                 const NetOptions& o) {
  NetStatistics s;
  s.poles = static_cast<int>(poles.size());
  s.lines = static_cast<int>(lines.size());
  if (o.contours && static_cast<int>(poles.size()) >= std::max(1, o.contour_min_data)) {
    geo::DensityOptions dopt;
    dopt.method = o.counting;
    dopt.grid_nodes = o.grid_nodes > 0 ? o.grid_nodes : poles.size() < 200 ? 121 : 61;
    if (auto g = geo::density_grid(o.kind, poles, dopt)) {
      s.density = *g;
      s.contour_levels = geo::contour_levels(*g, o.counting == geo::CountingMethod::Kamb ? 2.0 : 1.0);
    }
  }
  return s;
}

}  // namespace

NetStatistics net_statistics(const NetData& d, const NetOptions& o) {
  const auto poles = counted_poles(d);
  const auto lines = counted_lines(d);
  NetStatistics s = counts_and_density(poles, lines, o);
  if (poles.size() >= 2) {
    if (auto m = geo::fisher_mean(poles)) s.pole_mean = *m;
    if (auto t = geo::orientation_tensor(poles)) {
      s.pole_tensor = *t;
      if (auto k = geo::woodcock_shape(*t)) {
        s.pole_shape = *k;
        s.girdle_like = k->k < 1;
      }
    }
  }
  if (poles.size() >= 3) {
    if (auto g = geo::fit_girdle(poles)) s.girdle = *g;
  }
  if (lines.size() >= 2) {
    if (auto m = geo::fisher_mean(lines)) s.line_mean = *m;
  }
  return s;
}

std::vector<std::string> net_legend(const NetData& d, const NetStatistics& s, const NetOptions& o) {
  std::vector<std::string> out;
  for (auto& e : legend_entries(d, s, o)) out.push_back(e.text);
  return out;
}

NetLayout net_layout(const Rect& r, bool has_title, int legend_lines, const NetOptions& o, double legend_width) {
  NetLayout l;
  l.text_size = o.text_size > 0 ? o.text_size : auto_text_size(r);
  const double ts = l.text_size;
  const double line = ts * 1.35;
  const double pad = ts * 0.6;
  double top = r.y;
  if (has_title) {
    l.title = {r.x, r.y, r.w, line + pad * 0.5};
    top += l.title.h;
  }
  // Room for the "N" label and the cardinal ticks around the primitive.
  const double label_room = ts * 1.3 + pad;
  const double avail_h = r.y + r.h - top;
  double legend_h = (o.legend && legend_lines > 0) ? legend_lines * line + pad : 0;
  bool side = legend_lines > 0 && o.legend && r.w > 1.5 * avail_h;
  double side_diameter = std::min(avail_h - label_room - pad, r.w * 0.55);
  if (legend_width > 0 && legend_lines > 0 && o.legend) {
    // Beside the net when that leaves the net larger and the legend its whole width.
    side_diameter = std::min(avail_h - label_room - pad, r.w - legend_width - 4 * pad - ts);
    const double below_diameter = std::min(r.w - 2 * pad - ts, avail_h - label_room - legend_h - pad);
    side = side_diameter > below_diameter;
  }
  double diameter;
  if (side) {
    diameter = std::max(0.0, side_diameter);
    const double net_w = diameter + 2 * pad;
    l.frame.centre = {r.x + pad + diameter / 2, top + label_room + diameter / 2};
    l.legend = {r.x + net_w + pad, top + pad, std::max(0.0, r.w - net_w - 2 * pad), avail_h - 2 * pad};
  } else {
    diameter = std::max(0.0, std::min(r.w - 2 * pad - ts, avail_h - label_room - legend_h - pad));
    l.frame.centre = {r.x + r.w / 2, top + label_room + diameter / 2};
    if (legend_h > 0) l.legend = {r.x + pad, top + label_room + diameter + pad * 1.5, r.w - 2 * pad, legend_h};
  }
  l.frame.radius = diameter / 2;
  l.marker_size = o.marker_size > 0 ? o.marker_size : std::clamp(l.frame.radius / 22, 3.0, 12.0);
  return l;
}

double net_height_for_width(double width, bool has_title, int legend_lines, const NetOptions& o) {
  // Mirrors net_layout with the legend below the net.
  const double ts = o.text_size > 0 ? o.text_size : std::clamp(width / 30.0, 9.0, 16.0);
  const double line = ts * 1.35, pad = ts * 0.6;
  const double title_h = has_title ? line + pad * 0.5 : 0;
  const double label_room = ts * 1.3 + pad;
  const double diameter = std::max(0.0, width - 2 * pad - ts);
  const double legend_h = (o.legend && legend_lines > 0) ? legend_lines * line + pad : 0;
  const double below = legend_h > 0 ? pad * 1.5 + legend_h : diameter * 0.05 + pad;
  return title_h + label_room + diameter + below + pad;
}

// Longer than a screen: the layers of the net are drawn bottom to top in the
// order they must overlap (contours, great circles, fits, poles, legend), each
// marked by its comment.
NetStatistics draw_net(Canvas& c, const Rect& r, const NetData& d, const NetOptions& o) {
  // The means, tensor and girdle (with its resampled cone) only when they are
  // shown: on a season's poles they take seconds.
  NetStatistics s = o.statistics ? net_statistics(d, o) : counts_and_density(counted_poles(d), counted_lines(d), o);
  const auto entries = legend_entries(d, s, o);
  // The legend's widest line, by a mean glyph width of half an em (DejaVu Sans
  // in mixed-case text; value from memory), the marker or stroke indent included.
  const double ts0 = o.text_size > 0 ? o.text_size : auto_text_size(r);
  double legend_w = 0;
  for (const auto& e : entries) {
    size_t glyphs = 0;
    for (unsigned char ch : e.text)
      if ((ch & 0xC0) != 0x80) ++glyphs;
    legend_w =
        std::max(legend_w, (e.kind == LegendEntry::Text ? 0.0 : ts0 * 1.6) + 0.5 * ts0 * static_cast<double>(glyphs));
  }
  const NetLayout l = net_layout(r, !d.title.empty(), o.legend ? static_cast<int>(entries.size()) : 0, o, legend_w);
  const NetFrame& f = l.frame;
  if (f.radius <= 0) return s;
  const double ts = l.text_size;
  const double ms = l.marker_size;

  if (!d.title.empty()) c.text({l.title.x + l.title.w / 2, l.title.y}, d.title, kInk, ts * 1.1, Anchor::Middle);

  c.circle(f.centre, f.radius, kFrameInk, 0, kWhite);
  if (o.grid) draw_grid(c, f, o);

  // Contours under the data, heavier for higher levels.
  if (s.density && !s.contour_levels.empty()) {
    const auto contours = geo::density_contours(*s.density, s.contour_levels);
    for (size_t i = 0; i < contours.size(); ++i)
      draw_polylines(c, f, contours[i].lines, kContourInk, std::max(0.6, f.radius / 220) * (1 + 0.5 * i));
  }

  for (const auto& sc : d.small_circles)
    if (auto lines = geo::small_circle(o.kind, sc.axis, sc.half_angle))
      draw_polylines(c, f, *lines, sc.colour, std::max(0.8, f.radius / 160));

  if (o.planes != PlaneDisplay::Poles)
    for (const auto& p : d.planes)
      draw_polylines(c, f, {geo::great_circle(o.kind, p.plane)}, p.colour, std::max(0.6, f.radius / 200));

  // Fitted contact planes: great circle, pole and the 95% cone about the pole.
  for (const auto& fp : d.fits) {
    const double w = std::max(1.2, f.radius / 90);
    draw_polylines(c, f, {geo::great_circle(o.kind, fp.plane)}, fp.colour, w);
    const geo::Line pl = geo::pole(fp.plane);
    if (fp.cone95 && *fp.cone95 > 0)
      if (auto cone = geo::confidence_cone(o.kind, pl, *fp.cone95)) draw_polylines(c, f, *cone, fp.colour, w * 0.8);
    c.marker(f.to_canvas(geo::project(o.kind, pl)), Shape::Square, ms * 1.2, fp.colour, false);
  }

  if (o.planes != PlaneDisplay::GreatCircles)
    for (size_t i =
             o.max_pole_markers > 0 && d.planes.size() > o.max_pole_markers ? d.planes.size() - o.max_pole_markers : 0;
         i < d.planes.size(); ++i) {
      const NetPlane& p = d.planes[i];
      const Pt at = f.to_canvas(geo::project(o.kind, geo::pole(p.plane)));
      c.marker(at, p.shape, ms, p.colour, true);
      // A thin dark rim keeps light colours (yellow, sky blue) visible on white.
      if (marker_fillable(p.shape)) c.marker(at, p.shape, ms, Rgba{40, 40, 40, 200}, false);
    }
  for (const auto& ln : d.lines) c.marker(f.to_canvas(geo::project(o.kind, ln.line)), ln.shape, ms, ln.colour, false);

  if (o.statistics) {
    const double w = std::max(1.0, f.radius / 110);
    if (s.pole_mean && (!s.girdle_like || !s.girdle)) {
      if (s.pole_mean->alpha95)
        if (auto cone = geo::confidence_cone(o.kind, s.pole_mean->mean, *s.pole_mean->alpha95))
          draw_polylines(c, f, *cone, kStatInk, w);
      c.marker(f.to_canvas(geo::project(o.kind, s.pole_mean->mean)), Shape::Plus, ms * 2, kStatInk, false);
    }
    if (s.girdle && s.girdle_like) {
      draw_polylines(c, f, {geo::great_circle(o.kind, s.girdle->girdle)}, kStatInk, w);
      if (s.girdle->beta_cone > 0)
        if (auto cone = geo::confidence_cone(o.kind, s.girdle->beta, s.girdle->beta_cone))
          draw_polylines(c, f, *cone, kStatInk, w * 0.8);
      c.marker(f.to_canvas(geo::project(o.kind, s.girdle->beta)), Shape::Cross, ms * 1.8, kStatInk, false);
    }
    if (s.line_mean) {
      if (s.line_mean->alpha95)
        if (auto cone = geo::confidence_cone(o.kind, s.line_mean->mean, *s.line_mean->alpha95))
          draw_polylines(c, f, *cone, kStatInk, w);
      c.marker(f.to_canvas(geo::project(o.kind, s.line_mean->mean)), Shape::Plus, ms * 2, kStatInk, false);
    }
  }

  draw_frame(c, f, ts);

  if (o.legend && l.legend.w > 0) {
    const double line = ts * 1.35;
    double y = l.legend.y;
    const double indent = ts * 1.6;
    for (const auto& e : entries) {
      const Pt mid{l.legend.x + ts * 0.6, y + ts * 0.45};
      switch (e.kind) {
        case LegendEntry::Text: c.text({l.legend.x, y}, e.text, kInk, ts); break;
        case LegendEntry::Marker:
          c.marker(mid, e.shape, std::min(ms * 1.3, ts * 0.85), e.colour, e.filled);
          c.text({l.legend.x + indent, y}, e.text, kInk, ts);
          break;
        case LegendEntry::Stroke:
          c.polyline({{l.legend.x, mid.y}, {l.legend.x + ts * 1.2, mid.y}}, e.colour, std::max(1.2, ts / 8));
          c.text({l.legend.x + indent, y}, e.text, kInk, ts);
          break;
      }
      y += line;
    }
  }
  return s;
}

}  // namespace cairn::plot
