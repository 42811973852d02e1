// Net: the stereonet of the project's readings with filters (kind, unit,
// contact, day, person), poles or great circles, Kamb contours and statistics.
// The drawing is recorded once per change of data, filters or size and
// replayed each frame, so a frame costs the replay only.
#include <algorithm>
#include <map>
#include <set>
#include <utility>

#include "app/plot/net_scene.h"
#include "app/plot/symbols.h"
#include "app/ui/gl_picture.h"
#include "app/ui/imgui_canvas.h"
#include "app/ui/retire.h"
#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"

namespace cairn::ui {

namespace {

// A filter as a chip row: "all" and the values; `value` is "" for all.
void filter_row(const char* id, const std::string& title,
                const std::vector<std::pair<std::string, std::string>>& values, std::string& value) {
  text_dim(title);
  std::vector<std::string> labels{"all"};
  int sel = 0;
  for (size_t i = 0; i < values.size(); ++i) {
    labels.push_back(values[i].second);
    if (values[i].first == value) sel = static_cast<int>(i) + 1;
  }
  ImGui::PushID(id);
  const int hit = chip_row(labels, sel);
  ImGui::PopID();
  if (hit >= 0) value = hit == 0 ? "" : values[static_cast<size_t>(hit - 1)].first;
}

// Above this many great circles the net shows them for the newest only (a
// thousand curves already cover a net solid).
constexpr size_t kMaxGreatCircles = 1500;
// Above this many poles only the newest are drawn: tens of thousands of
// markers already cover a net solid, and a season's 300 000 took 13 s and
// 3 GB to record and render. All of them still count in the contours and
// statistics.
constexpr size_t kMaxPoleMarkers = 20000;

// The net's filters and display, copied for a build that may run on a worker.
struct NetChoice {
  std::string kind, unit, contact, day, person;
  int display = 0;
  bool contours = false, statistics = false, equal_angle = false;
  float width = 0, height = 0, text_size = 0;
};

NetPicture build_net(const Records& m, const CheckResult* check, const NetChoice& ns) {
  NetPicture out;
  std::set<std::string> kinds_present, days_present;
  for (const auto& r : m.planes) kinds_present.insert(std::string(store::to_string(r.kind)));
  for (const auto& s : m.stations) days_present.insert(Model::day_of(s));
  for (const auto& k : kinds_present) out.kinds.push_back({k, k});
  for (const auto& d2 : days_present) out.days.push_back({d2, d2});

  plot::NetData d;
  // Colour by the station's unit (Okabe-Ito, by age rank), shape by kind.
  std::map<std::string, size_t> unit_index;
  for (size_t i = 0; i < m.units.size(); ++i) unit_index[m.units[i].meta.uuid] = i;
  std::set<std::string> units_used;
  int shown = 0;
  for (const auto& r : m.planes) {
    const store::Station* s = m.station(r.station);
    if (!s) continue;
    if (r.kind == store::PlaneKind::Slope) continue;  // slope faces are not structure
    if (!ns.kind.empty() && store::to_string(r.kind) != ns.kind) continue;
    if (!ns.unit.empty() && s->unit != ns.unit) continue;
    if (!ns.contact.empty() && r.contact != ns.contact) continue;
    if (!ns.day.empty() && Model::day_of(*s) != ns.day) continue;
    if (!ns.person.empty() && s->observer != ns.person && r.observer != ns.person) continue;
    const store::Unit* u = m.unit(s->unit);
    const plot::Rgba col = u ? plot::unit_colour(u->colour, unit_index[u->meta.uuid]) : plot::kInk;
    if (u) units_used.insert(u->meta.uuid);
    d.planes.push_back({geo::Plane{r.strike, r.dip}, col, plot::pole_shape(store::to_string(r.kind)), true});
    ++shown;
  }
  for (const auto& uid : units_used) {
    const store::Unit* u = m.unit(uid);
    d.key.push_back({plot::Shape::Circle, plot::unit_colour(u->colour, unit_index[uid]), true, "unit " + u->code});
  }
  d.pole_set = ns.kind.empty() ? "poles" : "poles to " + ns.kind;
  if (check)
    for (const auto& f : check->report.fits) {
      if (!f.usable || !f.plane || !f.fit) continue;
      if (!ns.contact.empty() && f.contact_id != ns.contact) continue;
      d.fits.push_back({*f.plane, f.fit->cone95, plot::kOkabeIto[6], f.contact});
    }
  plot::NetOptions o;
  o.kind = ns.equal_angle ? geo::NetKind::EqualAngle : geo::NetKind::EqualArea;
  o.planes = ns.display == 0   ? plot::PlaneDisplay::Poles
             : ns.display == 1 ? plot::PlaneDisplay::GreatCircles
                               : plot::PlaneDisplay::Both;
  if (o.planes != plot::PlaneDisplay::Poles && d.planes.size() > kMaxGreatCircles) o.planes = plot::PlaneDisplay::Poles;
  o.contours = ns.contours;
  o.statistics = ns.statistics;
  o.max_pole_markers = kMaxPoleMarkers;
  o.legend = true;
  o.text_size = ns.text_size;
  plot::draw_net(out.drawing, plot::Rect{0, 0, ns.width, ns.height}, d, o);
  out.legend.push_back(std::to_string(shown) + " planar reading" + (shown == 1 ? "" : "s") + " shown");
  if (ns.display != 0 && d.planes.size() > kMaxGreatCircles)
    out.legend.push_back("great circles hidden above " + std::to_string(kMaxGreatCircles) + " readings: poles shown");
  if (d.planes.size() > kMaxPoleMarkers)
    out.legend.push_back("poles of the newest " + std::to_string(kMaxPoleMarkers) +
                         " drawn, all counted in contours and statistics; a filter shows others");
  return out;
}

}  // namespace

// Immediate mode: the screen is laid out top to bottom as it appears (filters,
// summary, the net), which is why it is one function longer than a screen.
void draw_net_screen(App& a) {
  if (!readings_ready(a)) return;
  Model& m = *a.model;
  Look& lk = look();
  NetState& ns = a.net;

  const float avail = ImGui::GetContentRegionAvail().x;
  const bool two = avail > lk.m.tap * 16;
  const float left_w = two ? std::min(avail * 0.36f, lk.m.tap * 8.5f) : avail;  // the net takes the rest
  ImGui::BeginChild("netfilters", ImVec2(left_w, two ? 0 : lk.m.tap * 5), false);
  {
    ImGui::PushID("display");
    const int d = chip_row({"poles", "great circles", "both"}, ns.display);
    ImGui::PopID();
    if (d >= 0) ns.display = d;
    if (chip("Kamb contours", ns.contours)) ns.contours = !ns.contours;
    same_line_if_fits(label_width("\xE2\x9C\x93 statistics"));
    if (chip("statistics", ns.statistics)) ns.statistics = !ns.statistics;
    ImGui::PushID("proj");
    const int p = chip_row({"equal area", "equal angle"}, ns.equal_angle ? 1 : 0);
    ImGui::PopID();
    if (p >= 0) ns.equal_angle = p == 1;

    // The kinds and days present come with the last net built (a season has a
    // few hundred thousand readings: gathered off the UI thread).
    static const std::vector<std::pair<std::string, std::string>> none;
    const NetPicture* built = ns.build.value();
    filter_row("kind", "Kind", built ? built->kinds : none, ns.kind);
    std::vector<std::pair<std::string, std::string>> units;
    for (const auto& u : m.units()) units.push_back({u.meta.uuid, u.code});
    filter_row("unit", "Unit", units, ns.unit);
    std::vector<std::pair<std::string, std::string>> contacts;
    for (const auto& c : m.contacts()) contacts.push_back({c.meta.uuid, c.name});
    filter_row("contact", "Contact", contacts, ns.contact);
    filter_row("day", "Day", built ? built->days : none, ns.day);
    std::vector<std::pair<std::string, std::string>> people;
    for (const auto& pp : m.people()) people.push_back({pp.meta.uuid, pp.initials});
    filter_row("person", "Person", people, ns.person);
    touch_scroll();
  }
  ImGui::EndChild();
  if (two) ImGui::SameLine();

  ImGui::BeginChild("netview", ImVec2(0, 0), false, ImGuiWindowFlags_NoScrollbar | ImGuiWindowFlags_NoScrollWithMouse);
  const ImVec2 size = ImGui::GetContentRegionAvail();
  const float line = ImGui::GetTextLineHeightWithSpacing();
  auto check = m.check();
  const NetChoice choice{ns.kind,     ns.unit,       ns.contact,     ns.day, ns.person,     ns.display,
                         ns.contours, ns.statistics, ns.equal_angle, size.x, size.y - line, lk.m.font * 0.8f};
  const std::string key = std::to_string(m.revision()) + "|" + std::to_string(check ? check->revision : 0) + "|" +
                          ns.kind + "|" + ns.unit + "|" + ns.contact + "|" + ns.day + "|" + ns.person + "|" +
                          std::to_string(ns.display) + std::to_string(ns.contours) + std::to_string(ns.statistics) +
                          std::to_string(ns.equal_angle) + "|" + std::to_string(static_cast<int>(choice.width)) + "x" +
                          std::to_string(static_cast<int>(choice.height));
  // On a worker (background.h), drawn into pixels there (soft_raster.h): the
  // last net stays meanwhile.
  std::optional<RasterSetup> raster;
  if (!build_in_frame()) raster = RasterSetup::from_context(lk.fonts.small, lk.theme, lk.pal.background);
  ns.build.want(
      key,
      [rec = m.records(), check, choice, raster] {
        NetPicture p = build_net(*rec, check.get(), choice);
        if (raster)
          p.pixels =
              draw_in_pixels(p.drawing, static_cast<int>(choice.width), static_cast<int>(choice.height), *raster);
        return p;
      },
      build_in_frame());
  if (raster && !ns.build.current()) {  // its texture's storage is made ready meanwhile
    if (!ns.picture) ns.picture = std::make_unique<GlPicture>();
    ns.picture->prepare(static_cast<int>(choice.width), static_cast<int>(choice.height));
  }
  const NetPicture* built = ns.build.value();
  // One line of summary above the net.
  std::string summary = !built || built->legend.empty()
                            ? std::string(" ")
                            : built->legend.front() + (built->legend.size() > 1 ? "; " + built->legend[1] : "");
  if (!ns.build.current()) summary = "Drawing the net...  " + summary;
  if (!ns.build.error().empty()) summary = "The net could not be drawn: " + ns.build.error();
  text_dim(summary);
  const ImVec2 origin = ImGui::GetCursorScreenPos();
  if (built && built != ns.rendered.get()) {
    // A new drawing: into the texture once, here on the UI thread (OpenGL); the
    // one it replaces is freed on the retiring thread (retire.h).
    retire(std::exchange(ns.rendered, ns.build.shared()));
    if (!ns.picture) ns.picture = std::make_unique<GlPicture>();
    if (!ns.picture->show_drawing(built->drawing, built->pixels, static_cast<int>(choice.width),
                                  static_cast<int>(choice.height), lk.theme, lk.fonts.small, lk.pal.background))
      ns.picture.reset();
  }
  if (ns.picture && ns.picture->ready()) {
    ns.picture->show(ImGui::GetWindowDrawList(), origin);
    for (const auto& t : ns.picture->texts()) this_frame().texts.push_back(t);
  } else if (built) {
    ImGuiCanvas canvas(ImGui::GetWindowDrawList(), lk.fonts.small, lk.theme);
    built->drawing.replay(canvas, origin.x, origin.y);
  }
  ImGui::EndChild();
}

}  // namespace cairn::ui
