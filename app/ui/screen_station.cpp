// Station sheet: one station's position (from GPS or typed), unit, notes,
// photo references and readings, and "where next": each fitted contact's
// predicted elevation at the station.
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>

#include <imgui.h>
#include <imgui_stdlib.h>

#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "geomath/crosscheck.h"
#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "geomath/strike_lines.h"
#include "storage/repository.h"
#include "formats/sha256.h"
#include "geomath/decimal.h"

namespace cairn::ui {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// A number typed on the keypad, or an error naming the field.
bool read_number(const std::string& text, const std::string& what, double* v, std::string* error) {
  const auto parsed = geo::parse_decimal(text);
  if (!parsed) {
    *error = what + " '" + text + "' is not a number";
    return false;
  }
  *v = *parsed;
  return true;
}

// The working UTM zone: the project's setting, else the zone the check used.
std::optional<geo::UtmZone> working_zone(const Model& m) {
  if (auto z = geo::parse_utm_zone(m.info().utm_zone); z && z->zone > 0)
    return geo::UtmZone{z->zone, z->northp.value_or(true)};
  if (auto c = m.check(); c && c->data.zone.zone > 0) return c->data.zone;
  return std::nullopt;
}

std::string zone_text(const geo::UtmZone& z) { return std::to_string(z.zone) + (z.northp ? "N" : "S"); }

// The position form: typed latitude/longitude or UTM easting/northing and an
// elevation, on a keypad. Returns true when the position was saved.
bool position_form(App& a, const store::Station* existing) {
  Model& m = *a.model;
  Look& lk = look();
  StationEdit& e = a.edit;
  const auto zone = working_zone(m);
  {
    ImGui::PushID("coords");
    const int hit = chip_row(
        {"latitude / longitude", zone ? "UTM " + zone_text(*zone) + " easting / northing" : "UTM (no zone set)"},
        e.utm ? 1 : 0);
    ImGui::PopID();
    if (hit == 0) e.utm = false;
    if (hit == 1 && zone) e.utm = true;
  }
  const float fw = std::min(ImGui::GetContentRegionAvail().x, lk.m.tap * 12);
  if (field(e.utm ? "Easting m" : "Latitude \xC2\xB0", e.a, e.field == 0, fw)) e.field = 0;
  if (field(e.utm ? "Northing m" : "Longitude \xC2\xB0", e.b, e.field == 1, fw)) e.field = 1;
  if (field("Elevation m", e.elev, e.field == 2, fw)) e.field = 2;
  text_dim(e.utm ? "Easting and northing in metres." : "Decimal degrees, WGS84; south and west negative.");
  // Three keys a row across the column (a comfortable thumb reach: at most 2.6 taps wide each).
  const float kw = std::clamp((ImGui::GetContentRegionAvail().x - ImGui::GetStyle().ItemSpacing.x * 2) / 3,
                              lk.m.tap * 1.6f, lk.m.tap * 2.6f),
              kh = lk.m.tap * 1.15f;
  const std::string k =
      keypad({"7", "8", "9", "4", "5", "6", "1", "2", "3", "-", "0", ".", "\xE2\x8C\xAB", "Clear", "Next"}, 3, kw, kh);
  std::string* target = e.field == 0 ? &e.a : e.field == 1 ? &e.b : &e.elev;
  if (k == "\xE2\x8C\xAB") {
    if (!target->empty()) target->pop_back();
  } else if (k == "Clear") {
    target->clear();
  } else if (k == "Next") {
    e.field = (e.field + 1) % 3;
  } else if (!k.empty()) {
    *target += k;
  }
  if (!e.error.empty()) error_box(e.error);

  const bool creating = existing == nullptr;
  const std::string code = creating ? m.next_station_code(a.person()) : existing->code;
  if (button(creating ? "Create station " + code : "Save typed position", 0, m.writable(), true)) {
    e.error.clear();
    double va = 0, vb = 0, ve = 0;
    if (!read_number(e.a, e.utm ? "easting" : "latitude", &va, &e.error)) return false;
    if (!read_number(e.b, e.utm ? "northing" : "longitude", &vb, &e.error)) return false;
    std::optional<double> elev;
    if (!e.elev.empty()) {
      if (!read_number(e.elev, "elevation", &ve, &e.error)) return false;
      elev = ve;
    }
    double lat = va, lon = vb;
    if (e.utm) {
      auto ll = geo::from_utm(geo::UtmPoint{zone->zone, zone->northp, va, vb});
      if (!ll) {
        e.error = ll.error();
        return false;
      }
      lat = ll->lat;
      lon = ll->lon;
    }
    store::Station s = existing ? *existing : store::Station{};
    if (creating) {
      s.code = code;
      s.observer = a.person();
      s.time = now_local_iso();
      if (!m.stations().empty()) s.unit = m.stations().back().unit;
    }
    s.lat = lat;
    s.lon = lon;
    s.elevation = elev;
    s.h_accuracy.reset();
    s.v_accuracy.reset();
    s.source = store::PositionSource::Manual;
    std::string err;
    const bool ok = creating ? a.act(
                                   "new station " + code, [&](store::Project& p) { store::add(p, s); }, &err)
                             : a.act(
                                   "typed position of " + code, [&](store::Project& p) { store::update(p, s); }, &err);
    if (!ok) {
      e.error = err;  // nothing was written
      return false;
    }
    if (creating) a.select_station(s.meta.uuid);
    a.edit = StationEdit{};
    a.edit.for_station = s.meta.uuid;
    a.edit.notes = s.notes;
    return true;
  }
  return false;
}

// Surfaces measured more than once (readings marked as repeats of a first
// one): their Fisher mean and alpha95, the spread the cross-check uses for them.
void repeated_surfaces(const std::vector<const store::PlanarReading*>& planes) {
  std::map<std::string, const store::PlanarReading*> by_id;
  for (const auto* p : planes) by_id[p->meta.uuid] = p;
  std::map<std::string, std::vector<const store::PlanarReading*>> sets;  // first reading -> the set
  for (const auto* p : planes) {
    const store::PlanarReading* at = p;
    for (int hop = 0; hop < 100 && !at->repeat_of.empty() && by_id.count(at->repeat_of); ++hop)
      at = by_id[at->repeat_of];
    sets[at->meta.uuid].push_back(p);
  }
  bool first = true;
  for (const auto& [root, set] : sets) {
    if (set.size() < 2) continue;
    std::vector<geo::Plane> ps;
    std::string refs;
    for (const auto* p : set) {
      ps.push_back(geo::Plane{p->strike, p->dip});
      refs += (refs.empty() ? "" : ", ") + (p->ref.empty() ? p->typed : p->ref);
    }
    auto m = geo::repeat_mean(ps);
    if (!m) continue;
    if (first) heading("Repeated surfaces");
    first = false;
    text_wrapped(std::string(store::to_string(set.front()->kind)) + " " + geo::format_strike_dip(m->plane) +
                 ": Fisher mean of " + std::to_string(m->n) + " readings (" + refs + "), " +
                 (m->alpha95 ? "\xCE\xB1"
                               "95 " +
                                   geo::format_decimal("%.1f\xC2\xB0", *m->alpha95)
                             : std::string("too scattered for a cone")));
  }
}

void where_next(App& a, const store::Station& s) {
  Model& m = *a.model;
  auto c = m.check();
  heading("Where next");
  if (!c) {
    text_dim("The contact fits are being computed...");
    return;
  }
  const auto zone = c->data.zone;
  auto u = geo::to_utm(geo::LatLon{s.lat, s.lon}, zone);
  if (!u) {
    text_dim(u.error());
    return;
  }
  int shown = 0;
  for (const auto& f : c->report.fits) {
    if (!f.usable || !f.fit) continue;
    auto est = geo::elevation_at(*f.fit, u->easting, u->northing);
    if (!est) continue;
    ++shown;
    std::string line = f.contact + ": contact at " + geo::format_decimal("%.0f m", est->elevation);
    if (est->half_width95) line += " \xC2\xB1" + geo::format_decimal("%.0f", *est->half_width95) + " (95%)";
    if (s.elevation) {
      const double d = est->elevation - *s.elevation;
      line += std::abs(d) < 0.5
                  ? ", at the station's height"
                  : ", " + geo::format_decimal("%.0f m", std::abs(d)) + (d > 0 ? " above" : " below") + " the station";
    }
    text_wrapped(line);
  }
  if (shown == 0) text_dim("No contact has a usable fit yet (a contact needs at least three mapped points).");
}

// ---- the steps of the Station sheet ------------------------------------------------

// No station open: a new one, from the GPS fix or typed.
void station_new(App& a) {
  Model& m = *a.model;
  if (!a.station.empty()) {
    text("This station has been deleted.");
    if (button("Back to the Logbook")) a.go(Screen::Logbook);
    return;
  }
  heading("New station " + m.next_station_code(a.person()));
  text_dim(a.fix.has_position() ? "A GPS fix is available: " + describe(a.fix)
                                : describe(a.fix) + ": type the position.");
  if (a.fix.has_position() && button("Use the GPS position", 0, true, true)) {
    new_station(a);
    return;
  }
  ImGui::BeginChild("newform", ImVec2(0, 0));
  position_form(a, nullptr);
  touch_scroll();
  ImGui::EndChild();
}

// "Station CODE", when and by whom, and "+ New reading".
void station_header(App& a, const store::Station& s) {
  Model& m = *a.model;
  const store::Person* obs = m.person(s.observer);
  ImGui::AlignTextToFramePadding();
  heading("Station " + s.code);
  ImGui::SameLine();
  ImGui::AlignTextToFramePadding();
  std::string when = s.time.empty() ? Model::day_of(s) : s.time.substr(0, 10);
  if (s.time.size() >= 16) when += " " + s.time.substr(11, 5);
  text_dim(when + (obs ? "   " + obs->initials + " (" + obs->name + ")" : std::string()));
  ImGui::SameLine();
  if (button("+ New reading", 0, m.writable(), true)) {
    a.pad = PadState{};
    a.go(Screen::Pad);
  }
}

// The position, how it was taken, and the buttons to take it again (GPS or
// typed). Returns false when the station went away (an undo in the form).
bool station_position(App& a, const store::Station*& s) {
  Model& m = *a.model;
  const bool writable = m.writable();
  heading("Position");
  std::string pos = lat_lon_text(s->lat, s->lon);
  if (s->elevation) pos += ",  " + geo::format_decimal("%.0f m", *s->elevation);
  text_wrapped(pos);
  std::string how = std::string("from ") + std::string(store::to_string(s->source));
  if (s->h_accuracy) how += ",  \xC2\xB1" + geo::format_decimal("%.0f m", *s->h_accuracy) + " horizontal";
  if (s->v_accuracy) how += ",  \xC2\xB1" + geo::format_decimal("%.0f m", *s->v_accuracy) + " vertical";
  text_dim(how);
  if (button("Use GPS position", 0, writable && a.fix.has_position())) {
    store::Station u = *s;
    take_fix_position(u, a.fix);
    a.act("GPS position of " + s->code, [&](store::Project& p) { store::update(p, u); });
  }
  ImGui::SameLine();
  std::string& typing_for = a.edit.typing_for;
  const bool typing = typing_for == s->meta.uuid;
  if (button(typing ? "Close typing" : "Type position", 0, writable)) typing_for = typing ? "" : s->meta.uuid;
  if (typing_for == s->meta.uuid && m.station(a.station)) {
    if (position_form(a, s)) typing_for.clear();
    s = m.station(a.station);
    if (!s) return false;
  }
  return true;
}

// The station's unit as chips (a tap changes it, audited).
void station_unit(App& a, const store::Station*& s) {
  Model& m = *a.model;
  heading("Unit");
  std::vector<std::string> units{"none"};
  int sel = 0;
  for (size_t i = 0; i < m.units().size(); ++i) {
    units.push_back(m.units()[i].code);
    if (m.units()[i].meta.uuid == s->unit) sel = static_cast<int>(i) + 1;
  }
  ImGui::PushID("unit");
  const int hit = chip_row(units, sel, m.writable());
  ImGui::PopID();
  if (hit >= 0 && hit != sel) {
    store::Station u = *s;
    u.unit = hit == 0 ? "" : m.units()[static_cast<size_t>(hit - 1)].meta.uuid;
    a.act("unit of " + s->code, [&](store::Project& p) { store::update(p, u); });
    s = m.station(a.station);
  }
}

// The notes, saved when the field is left after an edit (App::save_notes: at
// once, or as soon as the last change is read back). The field stays open for
// typing while a change is read back; only a read-only file closes it.
void station_notes(App& a, const store::Station*& s) {
  Model& m = *a.model;
  const bool writable = !m.project().read_only();
  heading("Notes");
  ImGui::InputTextMultiline("##notes", &a.edit.notes, ImVec2(-1, look().m.tap * 2.2f),
                            writable ? 0 : ImGuiInputTextFlags_ReadOnly);
  this_frame().targets.push_back({"notes", ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), writable});
  record_box("notes");
  if (ImGui::IsItemDeactivatedAfterEdit() && a.edit.notes != s->notes) {
    a.save_notes(s->meta.uuid, a.edit.notes);
    s = m.station(a.station);
  }
}

// Adds the photo file typed in the form as a reference of station S (with its SHA-256).
void add_typed_photo(App& a, const store::Station& s) {
  Model& m = *a.model;
  // The photo's SHA-256 proves later which file was meant; a relative name is
  // looked for beside the project file.
  const std::string path = a.edit.photo_path;
  std::string full = path;
  if (!path.empty() && path[0] != '/') {
    const auto slash = m.path().rfind('/');
    full = (slash == std::string::npos ? std::string() : m.path().substr(0, slash + 1)) + path;
  }
  std::ifstream f(full, std::ios::binary);
  if (!f) {
    a.edit.error = "cannot read the photo file " + full + ": a photo reference needs the file (its SHA-256 is stored)";
    return;
  }
  std::stringstream ss;
  ss << f.rdbuf();
  store::Photo ph;
  ph.station = s.meta.uuid;
  ph.path = path;
  ph.sha256 = formats::sha256_hex(ss.str());
  ph.time = now_local_iso();
  std::string err;
  if (a.act(
          "photo " + path, [&](store::Project& p) { store::add(p, ph); }, &err))
    a.edit.photo_path.clear();
  else
    a.edit.error = err;
}

// The station's photo references and a field to add one by its file name.
void station_photos(App& a, const store::Station& s) {
  Model& m = *a.model;
  Look& lk = look();
  const bool writable = m.writable();
  heading("Photos");
  station_thumbnails(a, s);
  const float button_w = label_width("Add photo") + ImGui::GetStyle().ItemSpacing.x;
  const bool one_line = ImGui::GetContentRegionAvail().x - button_w >= lk.m.tap * 4;
  ImGui::SetNextItemWidth(one_line ? ImGui::GetContentRegionAvail().x - button_w : -1);
  ImGui::InputTextWithHint("##photo", "photo file, e.g. DSC0412.JPG", &a.edit.photo_path);
  this_frame().targets.push_back({"photo file", ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), writable});
  record_box("photo file");
  if (one_line) ImGui::SameLine();
  if (button("Add photo", 0, writable && !a.edit.photo_path.empty())) add_typed_photo(a, s);
  if (!a.edit.error.empty()) error_box(a.edit.error);
}

// The station's readings, each with its worst flag and a Delete button; the
// reading opened from a flag is framed.
void station_readings(App& a, const store::Station& s) {
  Model& m = *a.model;
  Look& lk = look();
  const bool writable = m.writable();
  std::map<std::string, geo::Severity> worst;
  if (auto c = m.check())
    for (const auto& f : c->report.flags)
      if (!f.reading.empty())
        worst[f.reading] = std::max(worst.count(f.reading) ? worst[f.reading] : f.severity, f.severity);
  heading("Readings");
  const auto planes = m.planes_of(s.meta.uuid);
  const auto lines = m.lines_of(s.meta.uuid);
  if (planes.empty() && lines.empty()) text_dim("No readings yet.");
  auto row = [&](const std::string& uuid, const std::string& summary, store::Kind kind, const std::string& what) {
    ImGui::PushID(uuid.c_str());
    if (uuid == a.reading) {
      const ImVec2 p = ImGui::GetCursorScreenPos();
      ImGui::GetWindowDrawList()->AddRectFilled(p, ImVec2(p.x + ImGui::GetContentRegionAvail().x, p.y + lk.m.tap),
                                                lk.pal.panel);
      ImGui::GetWindowDrawList()->AddRect(p, ImVec2(p.x + ImGui::GetContentRegionAvail().x, p.y + lk.m.tap),
                                          lk.pal.accent, 0, 0, 3);
    }
    if (button("Delete", 0, writable)) {
      a.act("delete " + what, [&](store::Project& p) { store::soft_delete(p, kind, uuid); });
      if (a.reading == uuid) a.reading.clear();
    }
    ImGui::SameLine();
    ImGui::AlignTextToFramePadding();
    std::string t = summary;
    if (auto it = worst.find(uuid); it != worst.end()) t = severity_label(it->second) + "  " + t;
    text_wrapped(t);
    ImGui::PopID();
  };
  for (const auto* p : planes) {
    std::string summary = reading_summary(*p);
    if (const store::Contact* c = m.contact(p->contact)) summary += "   " + c->name;
    row(p->meta.uuid, summary, store::Kind::Plane, "reading " + (p->ref.empty() ? p->typed : p->ref));
  }
  for (const auto* l : lines)
    row(l->meta.uuid, reading_summary(*l), store::Kind::Line, "reading " + (l->ref.empty() ? l->typed : l->ref));
  repeated_surfaces(planes);
}

}  // namespace

void draw_station(App& a) {
  if (!readings_ready(a)) return;
  Model& m = *a.model;
  Look& lk = look();
  const store::Station* s = m.station(a.station);
  if (!s && !a.station.empty() && m.stale()) {  // a station just created, not read back yet
    heading("Saving the station");
    text_dim("It shows here once the records are read again.");
    return;
  }
  if (!s) {
    station_new(a);
    return;
  }
  if (a.edit.for_station != s->meta.uuid) {
    const std::string typing_for = a.edit.typing_for;
    a.edit = StationEdit{};
    a.edit.for_station = s->meta.uuid;
    a.edit.notes = s->notes;
    a.edit.typing_for = typing_for;
  }
  station_header(a, *s);

  // Two columns (position, unit, notes, photos | readings, where next) when they fit.
  const float avail = ImGui::GetContentRegionAvail().x;
  const bool two = avail > lk.m.tap * 18;
  ImGui::BeginChild("left", ImVec2(two ? avail * 0.48f : avail, 0), false);
  if (!station_position(a, s)) {
    ImGui::EndChild();
    return;
  }
  station_unit(a, s);
  station_notes(a, s);
  station_photos(a, *s);
  if (!two) {
    station_readings(a, *s);
    where_next(a, *s);
  }
  touch_scroll();
  ImGui::EndChild();
  if (!two) return;
  ImGui::SameLine();
  ImGui::BeginChild("right", ImVec2(0, 0), false);
  station_readings(a, *s);
  where_next(a, *s);
  touch_scroll();
  ImGui::EndChild();
  photo_overlay(a);
}

}  // namespace cairn::ui
