// Logbook: stations by field day, newest day first, filterable by person,
// unit and flag; "New station" is one tap.
#include <algorithm>
#include <map>
#include <unordered_map>

#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"

namespace cairn::ui {

namespace {

struct StationFlags {
  int count = 0;
  geo::Severity worst = geo::Severity::Note;
};

using Row = LogbookRow;

// The Logbook's filters, copied for a build that may run on a worker.
struct Filters {
  std::string person, unit;
  int flags = 0;
};

std::vector<Row> build_rows(const Records& m, const CheckResult* check, const Filters& fl) {
  // Flags per station from the newest check.
  std::unordered_map<std::string, StationFlags> flags;
  if (check)
    for (const auto& f : check->report.flags) {
      if (f.station_id.empty()) continue;
      auto& sf = flags[f.station_id];
      ++sf.count;
      sf.worst = std::max(sf.worst, f.severity);
    }
  std::map<std::string, std::string> signed_off;
  for (const auto& s : m.signoffs) {
    const store::Person* p = m.person(s.person);
    signed_off[s.day] = p ? p->initials : "?";
  }
  // Days, newest first; stations within a day by time.
  std::map<std::string, std::vector<const store::Station*>, std::greater<>> days;
  for (const auto& s : m.stations) {
    if (!fl.person.empty() && s.observer != fl.person) continue;
    if (!fl.unit.empty() && s.unit != fl.unit) continue;
    auto it = flags.find(s.meta.uuid);
    if (fl.flags == 1 && it == flags.end()) continue;
    if (fl.flags == 2 && (it == flags.end() || it->second.worst != geo::Severity::Hazard)) continue;
    days[Model::day_of(s)].push_back(&s);
  }
  std::vector<Row> rows;
  for (auto& [day, list] : days) {
    std::sort(list.begin(), list.end(), [](const store::Station* x, const store::Station* y) {
      return x->time != y->time ? x->time < y->time : x->code < y->code;
    });
    std::string head = day + "   " + std::to_string(list.size()) + " station" + (list.size() == 1 ? "" : "s");
    if (signed_off.count(day)) head += "   signed off by " + signed_off[day];
    rows.push_back({head, "", ""});
    for (const store::Station* s : list) {
      std::string line = s->code;
      if (s->time.size() >= 16) line += "   " + s->time.substr(11, 5);
      if (const store::Unit* u = m.unit(s->unit)) line += "   " + u->code;
      const size_t n = m.readings_at(s->meta.uuid);
      line += "   " + std::to_string(n) + " reading" + (n == 1 ? "" : "s");
      auto it = flags.find(s->meta.uuid);
      if (it != flags.end())
        line += "   " + severity_label(it->second.worst) +
                (it->second.count > 1 ? " +" + std::to_string(it->second.count - 1) : "");
      rows.push_back({line, s->meta.uuid, s->code});
    }
  }
  return rows;
}

}  // namespace

void draw_logbook(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  const bool writable = m.writable();

  if (button("+ New station", lk.m.tap * 5, writable, true)) new_station(a);
  ImGui::SameLine();
  ImGui::AlignTextToFramePadding();
  text_dim(a.fix.has_position() ? "at the GPS position" : "no GPS fix: you will type the position");

  // Filters.
  {
    std::vector<std::string> people{"everyone"};
    int sel = 0;
    for (size_t i = 0; i < m.people().size(); ++i) {
      people.push_back(m.people()[i].initials);
      if (m.people()[i].meta.uuid == a.logbook.person) sel = static_cast<int>(i) + 1;
    }
    ImGui::AlignTextToFramePadding();
    text("Person");
    ImGui::SameLine();
    ImGui::PushID("person");
    const int hit = chip_row(people, sel);
    ImGui::PopID();
    if (hit >= 0) a.logbook.person = hit == 0 ? "" : m.people()[static_cast<size_t>(hit - 1)].meta.uuid;
  }
  {
    std::vector<std::string> units{"all units"};
    int sel = 0;
    for (size_t i = 0; i < m.units().size(); ++i) {
      units.push_back(m.units()[i].code);
      if (m.units()[i].meta.uuid == a.logbook.unit) sel = static_cast<int>(i) + 1;
    }
    ImGui::AlignTextToFramePadding();
    text("Unit");
    ImGui::SameLine();
    ImGui::PushID("unit");
    const int hit = chip_row(units, sel);
    ImGui::PopID();
    if (hit >= 0) a.logbook.unit = hit == 0 ? "" : m.units()[static_cast<size_t>(hit - 1)].meta.uuid;
  }
  {
    ImGui::AlignTextToFramePadding();
    text("Flags");
    ImGui::SameLine();
    ImGui::PushID("flags");
    const int hit = chip_row({"any", "with flags", "with hazards"}, a.logbook.flags);
    ImGui::PopID();
    if (hit >= 0) a.logbook.flags = hit;
  }

  // The rows (day headings and stations) are built once per change of the
  // project, the check or the filters, and drawn with a list clipper, so a
  // frame costs only the rows on screen.
  // On a worker (background.h): the last rows stay
  // on screen meanwhile.
  auto check = m.check();
  const std::string key = std::to_string(m.revision()) + "|" + std::to_string(check ? check->revision : 0) + "|" +
                          a.logbook.person + "|" + a.logbook.unit + "|" + std::to_string(a.logbook.flags);
  a.logbook.rows.want(
      key,
      [rec = m.records(), check, fl = Filters{a.logbook.person, a.logbook.unit, a.logbook.flags}] {
        return build_rows(*rec, check.get(), fl);
      },
      build_in_frame());
  static const std::vector<Row> none;
  const std::vector<Row>& rows = a.logbook.rows.value() ? *a.logbook.rows.value() : none;

  if (!a.logbook.rows.current()) text_dim("Sorting the stations...");
  if (!a.logbook.rows.error().empty()) error_box("The Logbook could not be sorted: " + a.logbook.rows.error());
  ImGui::BeginChild("days", ImVec2(0, fill_height()), true);
  if (rows.empty() && a.logbook.rows.current())
    text_dim(m.stations().empty() ? "No stations yet. Tap \"+ New station\" at the first outcrop."
                                  : "No station matches these filters.");
  ImGuiListClipper clip;
  clip.Begin(static_cast<int>(rows.size()), lk.m.tap + ImGui::GetStyle().ItemSpacing.y);
  while (clip.Step()) {
    for (int i = clip.DisplayStart; i < clip.DisplayEnd; ++i) {
      const Row& r = rows[static_cast<size_t>(i)];
      if (r.uuid.empty()) {
        ImGui::AlignTextToFramePadding();  // a heading row is one tap high, like a station row
        heading(r.text);
        continue;
      }
      ImGui::PushID(r.uuid.c_str());
      ImGui::PushStyleVar(ImGuiStyleVar_ButtonTextAlign, ImVec2(0.0f, 0.5f));
      if (button(r.text + "##" + r.code, -1)) {
        a.select_station(r.uuid);
        a.go(Screen::Station);
      }
      also_label(r.code);
      ImGui::PopStyleVar();
      ImGui::PopID();
    }
  }
  touch_scroll();
  ImGui::EndChild();
}

}  // namespace cairn::ui
