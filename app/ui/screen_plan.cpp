// Plan: the ground (hillshade, terrain contours, predicted traces with their
// trace bands) when the project has a terrain, stations, points mapped along
// contacts, strike-dip symbols and the fitted contacts' strike lines in the working UTM zone; the predicted contact
// elevation at a tapped point; drag to pan, pinch (or the wheel) to zoom.
#include <algorithm>
#include <cstdio>
#include <cmath>
#include <map>
#include <tuple>
#include <utility>
#include <fmt/printf.h>

#include "app/plot/plan_scene.h"
#include "app/plot/plan_terrain.h"
#include "app/plot/plan_track.h"
#include "app/plot/symbols.h"
#include "app/ui/retire.h"
#include "formats/layers.h"
#include "app/ui/gl_picture.h"
#include "app/ui/imgui_canvas.h"
#include "app/plot/recording_canvas.h"
#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "geomath/strike_lines.h"
#include "app/core/export.h"
#include "storage/terrain.h"
#include "storage/track.h"

namespace cairn::ui {

namespace {

// What a build of the plan's layers needs besides the records and the check,
// copied for a build that may run on a worker.
struct PlanChoice {
  std::string path;     // the project file: a worker reads the terrain and the track through its own connection
  double interval = 0;  // strike-line interval (0: auto)
  std::string station;  // the selected station, marked
  std::optional<std::string> track_day;  // nothing: the newest day with fixes
};

// The plan's layers from a check result (positions in UTM metres).
PlanLayers build_layers(const Records& m, const CheckResult& c, const PlanChoice& ch) {
  PlanLayers out;
  plot::PlanData& d = out.data;
  out.convergence = c.data.input.grid.convergence;
  store::Project pr = open_for_worker(ch.path);
  out.track_days = store::track_days(pr);
  out.track_day = ch.track_day ? *ch.track_day : out.track_days.empty() ? std::string() : out.track_days.back();
  std::map<std::string, size_t> unit_index;
  for (size_t i = 0; i < m.units.size(); ++i) unit_index[m.units[i].meta.uuid] = i;
  auto unit_col = [&](const std::string& uuid) {
    const store::Unit* u = m.unit(uuid);
    return u ? plot::unit_colour(u->colour, unit_index[uuid]) : plot::kInk;
  };
  std::map<std::string, const geo::CheckStation*> st;
  for (const auto& s : c.data.input.stations) {
    st[s.uuid] = &s;
    d.stations.push_back({s.code, s.e, s.n, unit_col(s.unit), s.uuid == ch.station});
  }
  std::map<std::string, plot::Rgba> contact_col;
  for (const auto& k : c.data.input.contacts) {
    const store::Contact* ct = m.contact(k.uuid);
    contact_col[k.uuid] = ct ? unit_col(ct->upper_unit) : plot::kInk;
    for (const auto& p : k.points) d.points.push_back({p.e, p.n, contact_col[k.uuid]});
  }
  for (const auto& p : c.data.input.planes) {
    auto it = st.find(p.station);
    if (it == st.end()) continue;
    d.attitudes.push_back({it->second->e, it->second->n, plot::grid_azimuth(p.plane.strike, out.convergence),
                           p.plane.dip, plot::attitude_symbol(p.kind, p.facing == geo::CheckFacing::Overturned),
                           unit_col(it->second->unit)});
  }
  // Strike lines of each fitted contact near its own points, where the fit is
  // known: every `interval` metres, or (auto) about eight across that area.
  for (const auto& f : c.report.fits) {
    if (!f.usable || !f.fit) continue;
    const geo::CheckContact* k = nullptr;
    for (const auto& kk : c.data.input.contacts)
      if (kk.uuid == f.contact_id) k = &kk;
    if (!k || k->points.empty()) continue;
    geo::MapRect b{k->points[0].e, k->points[0].n, k->points[0].e, k->points[0].n};
    for (const auto& p : k->points) {
      b.e_min = std::min(b.e_min, p.e), b.e_max = std::max(b.e_max, p.e);
      b.n_min = std::min(b.n_min, p.n), b.n_max = std::max(b.n_max, p.n);
    }
    const double grow = std::max(100.0, 0.3 * std::max(b.e_max - b.e_min, b.n_max - b.n_min));
    b = {b.e_min - grow, b.n_min - grow, b.e_max + grow, b.n_max + grow};
    const double dip = f.fit->plane.dip;
    if (dip < 0.5 || dip > 89.5) continue;
    const double across = std::max(b.e_max - b.e_min, b.n_max - b.n_min);
    const double tan_dip = std::tan(dip * 3.14159265358979323846 / 180.0);
    double interval = ch.interval;
    if (interval <= 0) interval = std::max(1.0, plot::nice_length(across * tan_dip / 8));
    if (across * tan_dip / interval > 60) {
      out.notes.push_back(f.contact + ": strike lines every " + geo::format_decimal("%g m", interval) +
                          " would be too dense here");
      continue;
    }
    auto lines = geo::structure_contours(*f.fit, b, interval, 80);
    if (!lines) continue;
    out.notes.push_back(f.contact + ": strike lines every " + geo::format_decimal("%g m", interval));
    for (const auto& l : *lines)
      d.strike_lines.push_back({l.e0, l.n0, l.e1, l.n1, l.elevation,
                                contact_col.count(f.contact_id) ? contact_col[f.contact_id] : plot::kInk});
  }
  // The ground (app/plot/plan_terrain.h): hillshade, terrain contours, the
  // predicted traces and their 95% bands, computed here once per change of the
  // data; frames show the cached picture.
  try {
    if (const auto t = store::terrain_info(pr); t && t->epsg == formats::utm_epsg(c.data.zone)) {
      std::vector<plot::TracedContact> traced;
      for (const auto& f : c.report.fits)
        if (f.fit)
          traced.push_back(
              {f.contact, &*f.fit, contact_col.count(f.contact_id) ? contact_col[f.contact_id] : plot::kInk});
      for (auto& note : plot::add_terrain(d, *store::load_terrain(pr), traced, t->vertical_accuracy.value_or(0)))
        out.notes.push_back(note);
    }
  } catch (const std::exception& e) {
    out.notes.push_back(std::string("terrain not drawn: ") + e.what());
  }
  // The day track of the chosen day (app/plot/plan_track.h).
  try {
    d.tracks = plot::day_track_paths(pr, c.data.zone, out.track_day);
  } catch (const std::exception& e) {
    out.notes.push_back(std::string("day track not drawn: ") + e.what());
  }
  // Typical distance between neighbouring stations, for deciding when labels fit.
  if (d.stations.size() >= 2 && d.stations.size() <= 3000) {
    std::vector<double> nn;
    for (size_t i = 0; i < d.stations.size(); ++i) {
      double best = 1e300;
      for (size_t j = 0; j < d.stations.size(); ++j)
        if (i != j)
          best = std::min(best, std::hypot(d.stations[i].e - d.stations[j].e, d.stations[i].n - d.stations[j].n));
      nn.push_back(best);
    }
    std::nth_element(nn.begin(), nn.begin() + static_cast<long>(nn.size() / 2), nn.end());
    out.spacing = nn[nn.size() / 2];
  }
  return out;
}

}  // namespace

void draw_plan_screen(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  PlanState& ps = a.plan;
  auto c = m.check();
  if (!c) {
    text("Preparing the plan (projecting positions and fitting contacts)...");
    return;
  }
  if (!c->error.empty()) {
    error_box("The plan needs the project's positions in UTM: " + c->error);
    return;
  }
  // The layers, once per check, interval, selection or track, on a worker
  // (background.h), the last ones staying meanwhile.
  const std::string key = std::to_string(c->revision) + "|" + geo::format_decimal("%g", ps.interval) + "|" + a.station +
                          "|" + std::to_string(a.track_logged()) + "|" + (ps.track_chosen ? ps.track_day : "newest");
  PlanChoice choice{m.path(), ps.interval, a.station, std::nullopt};
  if (ps.track_chosen) choice.track_day = ps.track_day;
  ps.layers.want(
      key, [rec = m.records(), c, choice] { return build_layers(*rec, *c, choice); }, build_in_frame());
  const auto layers = ps.layers.shared();
  if (!layers) {
    text(ps.layers.error().empty() ? "Drawing the plan..." : "The plan could not be drawn: " + ps.layers.error());
    return;
  }
  if (!ps.track_chosen) ps.track_day = layers->track_day;

  // Controls.
  ImGuiIO& io = ImGui::GetIO();
  bool zoom_in = button("Zoom in");
  ImGui::SameLine();
  bool zoom_out = button("Zoom out");
  ImGui::SameLine();
  const bool fit_all = button("Show all");
  // The day track: a tap steps to the day before, then to none, then to the newest again.
  if (!layers->track_days.empty()) {
    ImGui::SameLine();
    if (button(ps.track_day.empty() ? std::string("No track") : "Track " + ps.track_day)) {
      const auto& days = layers->track_days;
      const auto at = std::find(days.begin(), days.end(), ps.track_day);
      ps.track_day = ps.track_day.empty() ? days.back() : at == days.begin() || at == days.end() ? "" : *(at - 1);
      ps.track_chosen = true;
    }
  }
  ImGui::SameLine();
  wrap_if_past_edge(ImGui::CalcTextSize("Strike lines every").x);
  ImGui::AlignTextToFramePadding();
  text_dim("Strike lines every");
  ImGui::SameLine();
  {
    const double steps[] = {0, 10, 25, 50, 100};
    std::vector<std::string> labels{"auto", "10 m", "25 m", "50 m", "100 m"};
    int sel = -1;
    for (int i = 0; i < 5; ++i)
      if (ps.interval == steps[i]) sel = i;
    ImGui::PushID("interval");
    const int hit = chip_row(labels, sel);
    ImGui::PopID();
    if (hit >= 0) ps.interval = steps[hit];
  }

  const ImVec2 origin = ImGui::GetCursorScreenPos();
  ImVec2 size = ImGui::GetContentRegionAvail();
  size.y = std::max(size.y, lk.m.tap * 3);
  const plot::Rect r{origin.x, origin.y, size.x, size.y};
  if (!ps.have_view || fit_all) {
    ps.view = plot::fit_view(plot::plan_bounds(layers->data), r, lk.m.tap);
    ps.have_view = true;
  }
  const plot::Pt centre{r.x + r.w / 2, r.y + r.h / 2};
  if (zoom_in) ps.view = plot::zoom_about(ps.view, r, centre, 1.5);
  if (zoom_out) ps.view = plot::zoom_about(ps.view, r, centre, 1 / 1.5);

  // The map takes taps (probe), drags (pan) and two-finger pinches (zoom).
  ImGui::InvisibleButton("plan", size);
  this_frame().targets.push_back({"plan map", ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
  const bool hovered = ImGui::IsItemHovered();
  if (a.fingers.size() >= 2) {
    const ImVec2 f0 = a.fingers[0].pos, f1 = a.fingers[1].pos;
    const float dist = std::hypot(f1.x - f0.x, f1.y - f0.y);
    const plot::Pt mid{(f0.x + f1.x) / 2, (f0.y + f1.y) / 2};
    if (ps.pinch_distance > 0 && dist > 0) ps.view = plot::zoom_about(ps.view, r, mid, dist / ps.pinch_distance);
    ps.pinch_distance = dist;
    ps.dragging = true;  // a pinch is never a tap
  } else {
    ps.pinch_distance = 0;
    if (ImGui::IsItemActive() && ImGui::IsMouseDragging(0)) {
      ps.view = plot::pan_by(ps.view, io.MouseDelta.x, io.MouseDelta.y);
      ps.dragging = true;
    }
    if (ImGui::IsItemDeactivated()) {
      if (!ps.dragging) {
        const auto [e, n] = plot::canvas_to_plan(ps.view, r, {io.MousePos.x, io.MousePos.y});
        ps.probe = std::make_pair(e, n);
      }
      ps.dragging = false;
    }
  }
  if (hovered && io.MouseWheel != 0)
    ps.view = plot::zoom_about(ps.view, r, {io.MousePos.x, io.MousePos.y}, std::pow(1.2, io.MouseWheel));

  // The tapped point: each fitted contact's predicted elevation there.
  std::optional<plot::PlanProbe> probe;
  if (ps.probe) {
    plot::PlanProbe pr;
    pr.e = ps.probe->first;
    pr.n = ps.probe->second;
    for (const auto& f : c->report.fits) {
      if (!f.usable || !f.fit) continue;
      auto est = geo::elevation_at(*f.fit, pr.e, pr.n);
      if (!est) continue;
      std::string l = f.contact + ": " + geo::format_decimal("%.0f m", est->elevation);
      if (est->half_width95) l += " \xC2\xB1" + geo::format_decimal("%.0f", *est->half_width95);
      pr.lines.push_back(l);
    }
    // Where next on the ground: the nearest stretch of each predicted trace.
    std::map<std::string, std::tuple<double, double, double>> nearest;  // contact -> distance, e, n
    for (const auto& t : layers->data.traces) {
      for (size_t k = 0; k + 1 < t.pts.size(); ++k) {
        const double ax = t.pts[k].first, ay = t.pts[k].second;
        const double dx = t.pts[k + 1].first - ax, dy = t.pts[k + 1].second - ay, l2 = dx * dx + dy * dy;
        const double u = l2 > 0 ? std::clamp(((pr.e - ax) * dx + (pr.n - ay) * dy) / l2, 0.0, 1.0) : 0.0;
        const double qx = ax + u * dx, qy = ay + u * dy, d = std::hypot(qx - pr.e, qy - pr.n);
        auto it = nearest.find(t.label);
        if (it == nearest.end() || d < std::get<0>(it->second)) nearest[t.label] = {d, qx, qy};
      }
    }
    for (const auto& [name, v] : nearest) {
      const auto [d, qx, qy] = v;
      const double bearing = std::fmod(
          std::atan2(qx - pr.e, qy - pr.n) * 180 / 3.14159265358979323846 + layers->convergence + 720.0, 360.0);
      pr.lines.push_back(name + " trace: " + geo::format_decimal("%.0f m", d) + " at " +
                         geo::format_decimal("%03.0f", bearing));
    }
    if (pr.lines.empty()) pr.lines.push_back("no fitted contact");
    probe = pr;
  }

  // Level of detail: very many symbols on screen are drawn as bare strike lines.
  const geo::MapRect vis = plot::visible_map(ps.view, r);
  size_t visible = 0;
  for (const auto& at : layers->data.attitudes)
    if (at.e >= vis.e_min && at.e <= vis.e_max && at.n >= vis.n_min && at.n <= vis.n_max) ++visible;
  plot::PlanOptions o;
  o.text_size = lk.m.font * 0.75;
  o.symbol_length = lk.m.px_per_mm() * 7;
  o.mark_size = lk.m.px_per_mm() * 2.5f;
  o.line_width = std::max(1.5f, lk.m.px_per_mm() * 0.35f);
  // Labels only where neighbours are far enough apart on screen for them to be read.
  const double spacing_px = layers->spacing * ps.view.scale;
  o.dip_values = visible < 1500 && (layers->spacing <= 0 || spacing_px > o.symbol_length * 1.3);
  o.strike_only = visible > 6000;
  o.station_labels = layers->spacing > 0 ? spacing_px > o.text_size * 4 : layers->data.stations.size() < 2;
  // The picture is recorded when layers, view, size or theme change (every
  // frame of a drag or a pinch, once while the map stands still), on a worker
  // and drawn into pixels there (soft_raster.h); they go into a texture here. Meanwhile
  // the last texture is shown moved and scaled to the view.
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const std::string view_key =
      fmt::sprintf("|%.6f|%.6f|%.9g|%.0fx%.0f|%d|%d%d%d%d", ps.view.centre_e, ps.view.centre_n, ps.view.scale, r.w, r.h,
                   static_cast<int>(lk.theme), o.dip_values, o.strike_only, o.station_labels, ps.probe.has_value());
  // Keyed by the layers it is drawn from (which may be older than `key` while newer ones are built).
  const std::string picture_key =
      ps.layers.value_key() + view_key +
      (ps.probe ? geo::format_decimal("%.3f", ps.probe->first) + geo::format_decimal("%.3f", ps.probe->second) : "");
  std::optional<RasterSetup> raster;
  if (!build_in_frame()) raster = RasterSetup::from_context(lk.fonts.small, lk.theme, lk.pal.background);
  ps.drawing.want(
      picture_key,
      [layers, probe, view = ps.view, w = r.w, h = r.h, o, raster] {
        PlanPicture pic;
        pic.view = view;
        pic.w = static_cast<float>(w);
        pic.h = static_cast<float>(h);
        if (probe) {
          plot::PlanData d = layers->data;  // a copy only for the tapped point's note
          d.probe = probe;
          plot::draw_plan(pic.drawing, plot::Rect{0, 0, w, h}, d, view, o);
        } else {
          plot::draw_plan(pic.drawing, plot::Rect{0, 0, w, h}, layers->data, view, o);
        }
        if (raster) pic.pixels = draw_in_pixels(pic.drawing, static_cast<int>(w), static_cast<int>(h), *raster);
        return pic;
      },
      build_in_frame());
  if (raster && !ps.drawing.current()) {  // its texture's storage is made ready meanwhile
    if (!ps.picture) ps.picture = std::make_unique<GlPicture>();
    ps.picture->prepare(static_cast<int>(r.w), static_cast<int>(r.h));
  }
  const auto pic = ps.drawing.shared();
  if (pic && pic != ps.rendered) {
    retire(std::exchange(ps.rendered, pic));  // the older picture is freed off the UI thread (retire.h)
    if (!ps.picture) ps.picture = std::make_unique<GlPicture>();
    if (!ps.picture->show_drawing(pic->drawing, pic->pixels, static_cast<int>(pic->w), static_cast<int>(pic->h),
                                  lk.theme, lk.fonts.small, lk.pal.background))
      ps.picture.reset();
  }
  if (pic) {
    // Where the picture's corners are in this frame's view (the same unless a
    // newer picture is being recorded).
    const plot::Rect was{r.x, r.y, pic->w, pic->h};
    const auto [e0, n0] = plot::canvas_to_plan(pic->view, was, {r.x, r.y});
    const auto [e1, n1] = plot::canvas_to_plan(pic->view, was, {r.x + pic->w, r.y + pic->h});
    const plot::Pt p0 = plot::plan_to_canvas(ps.view, r, e0, n0), p1 = plot::plan_to_canvas(ps.view, r, e1, n1);
    const ImVec2 a0(static_cast<float>(p0.x), static_cast<float>(p0.y)),
        a1(static_cast<float>(p1.x), static_cast<float>(p1.y));
    dl->PushClipRect(ImVec2(r.x, r.y), ImVec2(r.x + r.w, r.y + r.h), true);
    if (ps.picture && ps.picture->ready()) {
      ps.picture->show(dl, a0, a1);
      for (const auto& t : ps.picture->texts()) this_frame().texts.push_back(t);
    } else {
      ImGuiCanvas canvas(dl, lk.fonts.small, lk.theme);
      pic->drawing.replay(canvas, a0.x, a0.y);
    }
    dl->PopClipRect();
  }
  ImGui::SetCursorScreenPos(ImVec2(origin.x + lk.m.gap, origin.y + lk.m.gap));
  // Over the map, not below it (a line below would make the screen scroll).
  const bool drawing = !ps.layers.current() || !ps.drawing.current();
  text_dim(std::string(drawing ? "Drawing the plan...  " : "") + "grid north; UTM " +
           std::to_string(c->data.zone.zone) + (c->data.zone.northp ? "N" : "S") + ", " +
           std::to_string(layers->data.stations.size()) + " stations" +
           (ps.track_day.empty() ? std::string() : "; day track " + ps.track_day + " dashed") +
           (o.station_labels ? std::string() : "; zoom in for station codes"));
  // The notes over the map, as many as fit above its bottom edge.
  const float line_h = ImGui::GetTextLineHeightWithSpacing();
  const auto& notes = layers->notes;
  for (size_t i = 0; i < notes.size(); ++i) {
    const bool last_that_fits = ImGui::GetCursorScreenPos().y + 2 * line_h > r.y + r.h;
    if (last_that_fits && i + 1 < notes.size()) {
      text_dim("+" + std::to_string(notes.size() - i) + " more contacts");
      break;
    }
    if (ImGui::GetCursorScreenPos().y + line_h > r.y + r.h) break;
    text_dim(notes[i]);
  }
}

}  // namespace cairn::ui
