#include "app/plot/plan_scene.h"
#include "geomath/decimal.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace cairn::plot {

namespace {

constexpr double kPi = 3.14159265358979323846;

// Unit vector on the canvas (y down) of an azimuth measured clockwise from up.
Pt dir(double azimuth_deg) {
  const double a = azimuth_deg * kPi / 180.0;
  return {std::sin(a), -std::cos(a)};
}

Pt add(Pt a, Pt b, double k = 1) { return {a.x + b.x * k, a.y + b.y * k}; }

bool near_rect(const Rect& r, Pt p, double pad) {
  return p.x >= r.x - pad && p.x <= r.x + r.w + pad && p.y >= r.y - pad && p.y <= r.y + r.h + pad;
}

}  // namespace

AttitudeSymbol attitude_symbol(std::string_view kind, bool overturned) {
  if (kind == "bedding") return overturned ? AttitudeSymbol::BeddingOverturned : AttitudeSymbol::Bedding;
  if (kind == "foliation") return AttitudeSymbol::Foliation;
  if (kind == "cleavage") return AttitudeSymbol::Cleavage;
  if (kind == "joint") return AttitudeSymbol::Joint;
  return AttitudeSymbol::Other;
}

double grid_azimuth(double true_azimuth, double convergence) {
  double a = std::fmod(true_azimuth - convergence, 360.0);
  if (a < 0) a += 360.0;
  if (a >= 360.0) a -= 360.0;
  return a;
}

geo::MapRect plan_bounds(const PlanData& d) {
  bool any = false;
  geo::MapRect b;
  auto take = [&](double e, double n) {
    if (!std::isfinite(e) || !std::isfinite(n)) return;
    if (!any) {
      b = {e, n, e, n};
      any = true;
      return;
    }
    b.e_min = std::min(b.e_min, e);
    b.n_min = std::min(b.n_min, n);
    b.e_max = std::max(b.e_max, e);
    b.n_max = std::max(b.n_max, n);
  };
  for (const auto& s : d.stations) take(s.e, s.n);
  for (const auto& p : d.points) take(p.e, p.n);
  for (const auto& a : d.attitudes) take(a.e, a.n);
  for (const auto& l : d.strike_lines) {
    take(l.e0, l.n0);
    take(l.e1, l.n1);
  }
  if (!any) return {-50, -50, 50, 50};
  // A single place (or a line of places) still gets a square of 100 m about it.
  if (b.e_max - b.e_min < 1) {
    b.e_min -= 50;
    b.e_max += 50;
  }
  if (b.n_max - b.n_min < 1) {
    b.n_min -= 50;
    b.n_max += 50;
  }
  return b;
}

PlanView fit_view(const geo::MapRect& b, const Rect& r, double margin) {
  PlanView v;
  v.centre_e = (b.e_min + b.e_max) / 2;
  v.centre_n = (b.n_min + b.n_max) / 2;
  const double w = std::max(1.0, r.w - 2 * margin), h = std::max(1.0, r.h - 2 * margin);
  const double de = std::max(1e-6, b.e_max - b.e_min), dn = std::max(1e-6, b.n_max - b.n_min);
  v.scale = std::min(w / de, h / dn);
  return v;
}

Pt plan_to_canvas(const PlanView& v, const Rect& r, double e, double n) {
  return {r.x + r.w / 2 + (e - v.centre_e) * v.scale, r.y + r.h / 2 - (n - v.centre_n) * v.scale};
}

std::pair<double, double> canvas_to_plan(const PlanView& v, const Rect& r, Pt p) {
  return {v.centre_e + (p.x - r.x - r.w / 2) / v.scale, v.centre_n - (p.y - r.y - r.h / 2) / v.scale};
}

PlanView zoom_about(const PlanView& v, const Rect& r, Pt about, double factor) {
  if (!(factor > 0) || !std::isfinite(factor)) return v;
  const auto [e, n] = canvas_to_plan(v, r, about);
  PlanView z = v;
  z.scale = v.scale * factor;
  // Keep (e, n) under `about`: about = centre + (e - ce') * s'.
  z.centre_e = e - (about.x - r.x - r.w / 2) / z.scale;
  z.centre_n = n + (about.y - r.y - r.h / 2) / z.scale;
  return z;
}

PlanView pan_by(const PlanView& v, double dx, double dy) {
  PlanView p = v;
  p.centre_e -= dx / v.scale;
  p.centre_n += dy / v.scale;
  return p;
}

geo::MapRect visible_map(const PlanView& v, const Rect& r) {
  const auto [e0, n1] = canvas_to_plan(v, r, {r.x, r.y});
  const auto [e1, n0] = canvas_to_plan(v, r, {r.x + r.w, r.y + r.h});
  return {e0, n0, e1, n1};
}

double nice_length(double max_metres) {
  if (!(max_metres > 0) || !std::isfinite(max_metres)) return 0;
  const double p = std::pow(10.0, std::floor(std::log10(max_metres)));
  for (double m : {5.0, 2.0, 1.0})
    if (m * p <= max_metres) return m * p;
  return p;
}

// Strike-dip symbols after the FGDC geologic map symbol standard
// (FGDC-STD-013-2006, section 6 "Bedding" and the foliation and joint sections):
// a strike line centred on the place, with the dip side marked by a tick
// (bedding), a hooked tick (overturned bedding), a filled triangle (foliation),
// an open triangle (cleavage) or a T (joint); vertical planes carry the mark on
// both sides, horizontal bedding is a circle with a cross. Proportions (tick a
// third of the strike line) are value from memory of the standard's plates.
void draw_attitude_symbol(Canvas& c, Pt at, double strike, double dip, AttitudeSymbol s, double length, Rgba colour,
                          double width, double text_size) {
  const double half = length / 2;
  const double tick = length / 3;
  const Pt along = dir(strike);
  const Pt down = dir(strike + 90);  // dip direction on the canvas (right-hand rule)
  const bool vertical = dip >= 89.5;
  const bool horizontal = dip <= 0.5;

  if (horizontal && (s == AttitudeSymbol::Bedding || s == AttitudeSymbol::BeddingOverturned)) {
    const double rad = length * 0.22;
    c.circle(at, rad, colour, width);
    c.polyline({{at.x - rad * 1.6, at.y}, {at.x + rad * 1.6, at.y}}, colour, width);
    c.polyline({{at.x, at.y - rad * 1.6}, {at.x, at.y + rad * 1.6}}, colour, width);
    return;
  }
  c.polyline({add(at, along, -half), add(at, along, half)}, colour, width);

  auto mark = [&](Pt side) {
    switch (s) {
      case AttitudeSymbol::Bedding:
      case AttitudeSymbol::Other: c.polyline({at, add(at, side, tick)}, colour, width); break;
      case AttitudeSymbol::BeddingOverturned: {
        // The tick, then a half-turn hook at its end.
        std::vector<Pt> p{at, add(at, side, tick)};
        const Pt end = p.back();
        const double r = tick * 0.35;
        const Pt centre = add(end, along, r);
        for (int i = 1; i <= 8; ++i) {
          const double a = kPi * i / 8.0;  // half a turn about `centre`
          p.push_back({centre.x - along.x * r * std::cos(a) + side.x * r * std::sin(a),
                       centre.y - along.y * r * std::cos(a) + side.y * r * std::sin(a)});
        }
        c.polyline(p, colour, width);
        break;
      }
      case AttitudeSymbol::Foliation:
      case AttitudeSymbol::Cleavage: {
        const double b = tick * 0.4;
        std::vector<Pt> tri{add(at, along, -b), add(at, along, b), add(at, side, tick)};
        if (s == AttitudeSymbol::Foliation) c.fill_polygon(tri, colour);
        c.polyline(tri, colour, width, true);
        break;
      }
      case AttitudeSymbol::Joint: {
        const Pt end = add(at, side, tick);
        c.polyline({at, end}, colour, width);
        c.polyline({add(end, along, -tick * 0.4), add(end, along, tick * 0.4)}, colour, width);
        break;
      }
    }
  };
  mark(down);
  if (vertical) mark({-down.x, -down.y});

  if (text_size > 0 && !vertical) {
    const Pt t = add(at, down, tick + text_size * 0.8);
    c.text({t.x, t.y - text_size * 0.5}, geo::format_decimal("%.0f", dip), colour, text_size, Anchor::Middle);
  }
}

namespace {

// A map path as canvas points; false when it lies wholly outside the rect.
bool path_on_canvas(const Rect& r, const PlanView& v, const std::vector<std::pair<double, double>>& pts,
                    std::vector<Pt>& out) {
  out.clear();
  double x0 = INFINITY, x1 = -INFINITY, y0 = INFINITY, y1 = -INFINITY;
  for (const auto& [e, n] : pts) {
    const Pt p = plan_to_canvas(v, r, e, n);
    out.push_back(p);
    x0 = std::min(x0, p.x), x1 = std::max(x1, p.x), y0 = std::min(y0, p.y), y1 = std::max(y1, p.y);
  }
  return !(x1 < r.x || x0 > r.x + r.w || y1 < r.y || y0 > r.y + r.h);
}

void draw_path(Canvas& c, const Rect& r, const PlanView& v, const PlanPath& p, double line_width) {
  std::vector<Pt> pts;
  if (p.pts.size() >= 2 && path_on_canvas(r, v, p.pts, pts)) c.polyline(pts, p.colour, p.width * line_width);
}

// A day track: dashes of 3 line widths' gap after 6 widths of line, the pattern
// carried on across vertices; the last fix an open square with the label beside it.
void draw_track(Canvas& c, const Rect& r, const PlanView& v, const PlanPath& p, const PlanOptions& o) {
  std::vector<Pt> pts;
  if (p.pts.empty() || !path_on_canvas(r, v, p.pts, pts)) return;
  const double w = p.width * o.line_width, dash = 6 * w, gap = 3 * w;
  double phase = 0;  // distance into the current dash + gap period
  for (size_t i = 0; i + 1 < pts.size(); ++i) {
    const Pt a = pts[i], b = pts[i + 1];
    const double len = std::hypot(b.x - a.x, b.y - a.y);
    double at = 0;
    while (at < len) {
      const bool on = phase < dash;
      const double step = std::min(len - at, (on ? dash : dash + gap) - phase);
      if (on) {
        const double t0 = at / len, t1 = (at + step) / len;
        c.polyline({{a.x + (b.x - a.x) * t0, a.y + (b.y - a.y) * t0}, {a.x + (b.x - a.x) * t1, a.y + (b.y - a.y) * t1}},
                   p.colour, w);
      }
      at += step;
      phase = std::fmod(phase + step, dash + gap);
    }
  }
  const Pt last = pts.back();
  if (!near_rect(r, last, o.mark_size)) return;
  c.marker(last, Shape::Square, o.mark_size * 0.7, p.colour, false);
  if (!p.label.empty())
    c.text({last.x + o.mark_size * 0.7, last.y + o.mark_size * 0.2}, p.label, p.colour, o.text_size);
}

void draw_ground(Canvas& c, const Rect& r, const PlanData& d, const PlanView& v, const PlanOptions& o) {
  std::vector<Pt> pts;
  for (const auto& a : d.shading) {
    if (!path_on_canvas(r, v, a.ring, pts)) continue;
    Rgba fill = a.fill;
    if (a.shade) {
      const double t = 0.3 * (1 - std::clamp(*a.shade, 0.0, 1.0));  // share of ink
      auto m = [t](int bg, int ink) { return static_cast<std::uint8_t>(std::lround(bg + (ink - bg) * t)); };
      fill = {m(o.background.r, o.ink.r), m(o.background.g, o.ink.g), m(o.background.b, o.ink.b), 255};
    }
    c.fill_polygon(pts, fill);
  }
  for (const auto& t : d.terrain_contours) draw_path(c, r, v, t, o.line_width);
  for (const auto& a : d.bands)
    if (path_on_canvas(r, v, a.ring, pts)) c.fill_polygon(pts, a.fill);
}

}  // namespace

void draw_plan(Canvas& c, const Rect& r, const PlanData& d, const PlanView& v, const PlanOptions& o) {
  c.fill_polygon({{r.x, r.y}, {r.x + r.w, r.y}, {r.x + r.w, r.y + r.h}, {r.x, r.y + r.h}}, o.background);
  const double pad = o.symbol_length;
  draw_ground(c, r, d, v, o);

  // Strike-line labels that would overlap one already placed are left out.
  std::vector<Rect> placed;
  auto free_at = [&](const Rect& b) {
    for (const auto& q : placed)
      if (b.x < q.x + q.w && q.x < b.x + b.w && b.y < q.y + q.h && q.y < b.y + b.h) return false;
    return true;
  };
  for (const auto& l : d.strike_lines) {
    const Pt a = plan_to_canvas(v, r, l.e0, l.n0), b = plan_to_canvas(v, r, l.e1, l.n1);
    // Skip lines whose bounding box misses the rect.
    if (std::max(a.x, b.x) < r.x || std::min(a.x, b.x) > r.x + r.w || std::max(a.y, b.y) < r.y ||
        std::min(a.y, b.y) > r.y + r.h)
      continue;
    c.polyline({a, b}, l.colour, o.line_width);
    if (o.strike_line_labels) {
      // Label at an end that lies inside the rect (or the middle); width estimated
      // at 0.6 em per character (DejaVu Sans digits are 0.64 em).
      const Pt at = near_rect(r, a, -o.text_size)   ? a
                    : near_rect(r, b, -o.text_size) ? b
                                                    : Pt{(a.x + b.x) / 2, (a.y + b.y) / 2};
      const std::string label = geo::format_decimal("%.0f m", l.elevation);
      const double ts = o.text_size * 0.9, w = ts * 0.6 * static_cast<double>(label.size());
      const Rect box{at.x - w / 2, at.y - o.text_size * 1.1, w, ts * 1.2};
      if (free_at(box)) {
        placed.push_back(box);
        c.text({at.x, at.y - o.text_size * 1.1}, label, l.colour, ts, Anchor::Middle);
      }
    }
  }
  for (const auto& t : d.traces) draw_path(c, r, v, t, o.line_width);
  for (const auto& t : d.tracks) draw_track(c, r, v, t, o);
  for (const auto& p : d.points) {
    const Pt at = plan_to_canvas(v, r, p.e, p.n);
    if (!near_rect(r, at, o.mark_size)) continue;
    c.marker(at, Shape::Diamond, o.mark_size * 0.8, p.colour, true);
  }
  for (const auto& a : d.attitudes) {
    const Pt at = plan_to_canvas(v, r, a.e, a.n);
    if (!near_rect(r, at, pad)) continue;
    if (o.strike_only) {
      const Pt d = dir(a.strike);
      c.polyline({add(at, d, -o.symbol_length / 3), add(at, d, o.symbol_length / 3)}, a.colour, o.line_width);
      continue;
    }
    draw_attitude_symbol(c, at, a.strike, a.dip, a.symbol, o.symbol_length, a.colour, o.line_width,
                         o.dip_values ? o.text_size * 0.85 : 0);
  }
  for (const auto& s : d.stations) {
    const Pt at = plan_to_canvas(v, r, s.e, s.n);
    if (!near_rect(r, at, pad)) continue;
    if (s.selected) c.circle(at, o.mark_size * 1.3, o.ink, o.line_width * 1.5);
    c.marker(at, Shape::Circle, o.mark_size * 0.55, s.colour, true);
    c.marker(at, Shape::Circle, o.mark_size * 0.55, o.ink, false);
    if (o.station_labels && !s.code.empty())
      c.text({at.x + o.mark_size * 0.7, at.y - o.text_size - o.mark_size * 0.2}, s.code, o.ink, o.text_size);
  }
  if (d.probe) {
    const Pt at = plan_to_canvas(v, r, d.probe->e, d.probe->n);
    c.marker(at, Shape::Plus, o.mark_size * 2, o.ink, false);
    c.circle(at, o.mark_size, o.ink, o.line_width);
    double y = at.y + o.mark_size;
    for (const auto& line : d.probe->lines) {
      c.text({at.x + o.mark_size * 1.4, y}, line, o.ink, o.text_size);
      y += o.text_size * 1.25;
    }
  }

  if (o.scale_bar && v.scale > 0) {
    const double metres = nice_length(r.w * 0.25 / v.scale);
    if (metres > 0) {
      const double len = metres * v.scale;
      const double x0 = r.x + o.text_size, y0 = r.y + r.h - o.text_size;
      c.polyline({{x0, y0 - o.text_size * 0.4}, {x0, y0}, {x0 + len, y0}, {x0 + len, y0 - o.text_size * 0.4}}, o.ink,
                 o.line_width * 1.5);
      c.text({x0 + len / 2, y0 - o.text_size * 1.5},
             metres >= 1000 ? geo::format_decimal("%g km", metres / 1000) : geo::format_decimal("%g m", metres), o.ink,
             o.text_size, Anchor::Middle);
    }
  }
  if (o.north_arrow) {
    const double h = o.text_size * 2.2;
    const Pt tip{r.x + r.w - o.text_size * 1.5, r.y + o.text_size * 2.2};
    c.fill_polygon({tip, {tip.x + h * 0.3, tip.y + h}, {tip.x - h * 0.3, tip.y + h}}, o.ink);
    c.text({tip.x, tip.y - o.text_size * 1.15}, "N", o.ink, o.text_size, Anchor::Middle);
  }
}

}  // namespace cairn::plot
