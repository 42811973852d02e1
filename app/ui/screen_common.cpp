// Helpers shared by several screens, and the Open screen.
#include <algorithm>
#include <cstdlib>
#include <filesystem>

#include <imgui.h>
#include <imgui_stdlib.h>

#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "geomath/notation.h"
#include "storage/repository.h"
#include "storage/reviews.h"

namespace cairn::ui {

namespace fs = std::filesystem;

std::string review_key(const geo::Flag& f) {
  // A group flag (one observer's day) has no station, reading or contact: its
  // observer and day tell it from another group's.
  if (f.reading.empty() && !f.readings.empty())
    return store::flag_key(f.rule, f.station, f.reading, "crew " + f.observer + " " + f.day);
  return store::flag_key(f.rule, f.station, f.reading, f.contact);
}

std::string severity_label(geo::Severity s) {
  switch (s) {
    case geo::Severity::Hazard: return "\xE2\x96\xB2 HAZARD";      // U+25B2 triangle
    case geo::Severity::Conflict: return "\xE2\x97\x86 CONFLICT";  // U+25C6 diamond
    case geo::Severity::Query: return "\xE2\x96\xA0 QUERY";        // U+25A0 square
    case geo::Severity::Note: return "\xE2\x97\x8F NOTE";          // U+25CF circle
  }
  return "";
}

std::string reading_summary(const store::PlanarReading& r) {
  const geo::Plane p{r.strike, r.dip};
  std::string s = (r.ref.empty() ? std::string() : r.ref + "  ") + geo::format_strike_dip(p) + "  " +
                  std::string(store::to_string(r.kind));
  if (r.typed != geo::format_strike_dip(p))
    s += "  (typed " + r.typed + (r.north == store::North::Magnetic ? ", magnetic" : "") + ")";
  if (r.quality) s += "  q" + std::to_string(*r.quality);
  if (r.facing != store::Facing::Unknown) s += "  " + std::string(store::to_string(r.facing));
  return s;
}

std::string reading_summary(const store::LinearReading& r) {
  std::string s = (r.ref.empty() ? std::string() : r.ref + "  ") +
                  geo::format_trend_plunge(geo::Line{r.trend, r.plunge}) + "  " + std::string(store::to_string(r.kind));
  if (r.rake) s += "  (rake " + geo::format_decimal("%.0f", *r.rake) + ")";
  return s;
}

void take_fix_position(store::Station& s, const GpsFix& fix) {
  s.lat = fix.lat;
  s.lon = fix.lon;
  s.elevation = fix.altitude;
  s.h_accuracy = fix.h_accuracy;
  s.v_accuracy = fix.v_accuracy;
  s.source = store::PositionSource::Gps;
}

void new_station(App& a) {
  Model& m = *a.model;
  if (a.fix.has_position()) {
    store::Station s;
    s.code = m.next_station_code(a.person());
    take_fix_position(s, a.fix);
    s.observer = a.person();
    s.time = now_local_iso();
    // A new station takes the unit of the last one: mappers walk along a unit.
    if (!m.stations().empty()) s.unit = m.stations().back().unit;
    if (a.act("new station " + s.code, [&](store::Project& p) { store::add(p, s); })) {
      a.select_station(s.meta.uuid);
      a.go(Screen::Station);
    }
    return;
  }
  // No fix: the Station sheet asks for the position before anything is written.
  a.select_station("");
  a.go(Screen::Station);
}

void draw_opening(App& a, const std::string& path) {
  heading("Opening " + fs::path(path).filename().string());
  text_dim(fs::path(path).parent_path().string());
  progress(a.jobs.progress().fraction(), a.jobs.progress().message());
  text_wrapped(
      "The file's integrity is checked and its records are read before the Logbook shows; "
      "the cross-check then runs in the background.");
}

bool readings_ready(App& a) {
  if (a.model->complete()) return true;
  if (!a.loader.busy()) {  // the loader failed and said why in the top bar
    error_box(
        "The project's readings could not be loaded: this screen needs them. Close Cairn and open the "
        "project again; the Logbook, the Plan and the Crosscheck still work.");
    return false;
  }
  heading("Loading the readings");
  progress(a.loader.progress().fraction(), a.loader.progress().message());
  text_wrapped(
      "This screen shows once the project's readings are loaded; the Logbook, the Plan and the Crosscheck work "
      "meanwhile.");
  return false;
}

void draw_open(App& a) {
  Look& lk = look();
  heading("Open a project");
  text_dim("Cairn keeps each project in one file (NAME.cairn). Tap one to open it.");
  std::vector<fs::path> found;
  std::vector<fs::path> dirs{fs::current_path()};
  if (const char* home = std::getenv("HOME")) dirs.push_back(home);
  for (const auto& d : dirs) {
    std::error_code ec;
    for (fs::directory_iterator it(d, ec), end; !ec && it != end; it.increment(ec))
      if (it->path().extension() == ".cairn" && it->is_regular_file()) found.push_back(it->path());
  }
  std::sort(found.begin(), found.end());
  found.erase(std::unique(found.begin(), found.end()), found.end());
  ImGui::BeginChild("files", ImVec2(0, std::max(lk.m.tap * 2, ImGui::GetContentRegionAvail().y - lk.m.tap * 3.2f)));
  for (const auto& f : found) {
    ImGui::PushID(f.string().c_str());
    if (button(f.filename().string() + "   (" + f.parent_path().string() + ")", -1)) {
      a.open_error.clear();
      a.open_project(f.string(), &a.open_error);
    }
    ImGui::PopID();
  }
  if (found.empty()) text_dim("No project files here or in the home folder.");
  touch_scroll();
  ImGui::EndChild();
  if (!a.open_error.empty()) error_box(a.open_error);
  ImGui::AlignTextToFramePadding();
  text("New project: name");
  ImGui::SameLine();
  // The name field: eight taps wide where that fits, else what is left of the
  // line, and on a line of its own when less than four taps are left.
  if (ImGui::GetContentRegionAvail().x < lk.m.tap * 4) ImGui::NewLine();
  ImGui::SetNextItemWidth(std::min(lk.m.tap * 8, ImGui::GetContentRegionAvail().x));
  ImGui::InputText("##newname", &a.new_name);
  this_frame().targets.push_back({"project name", ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
  record_box("project name");
  ImGui::SameLine();
  if (button("Create project", 0, !a.new_name.empty(), true)) {
    try {
      const fs::path path = fs::current_path() / (a.new_name + ".cairn");
      store::NewProject np;
      np.name = a.new_name;
      store::Project::create(path.string(), np);
      a.open_error.clear();
      a.open_project(path.string(), &a.open_error);
    } catch (const std::exception& e) {
      a.open_error = e.what();
    }
  }
}

}  // namespace cairn::ui
