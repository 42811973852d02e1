// Review: the supervisor's screen, read-only until unlocked. Mark flags
// accepted or resolved with a comment, sign off a field day, and see any
// record's audit trail (who changed what, when, on which tablet).
#include <algorithm>
#include <map>
#include <memory>

#include <imgui.h>
#include <imgui_stdlib.h>

#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "storage/repository.h"
#include "formats/json.h"
#include "storage/reviews.h"

namespace cairn::ui {

namespace {

void flags_tab(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  ReviewState& rs = a.review;
  auto c = m.check();
  if (!c || !c->error.empty()) {
    text_dim(c ? c->error : "Running the cross-check...");
    return;
  }
  const float avail = ImGui::GetContentRegionAvail().x;
  const bool two = avail > lk.m.tap * 18;
  ImGui::BeginChild("rflags", ImVec2(two ? avail * 0.5f : avail, two ? 0 : lk.m.tap * 5), true);
  const geo::Flag* chosen = nullptr;
  for (size_t i = 0; i < c->report.flags.size(); ++i) {
    const auto& f = c->report.flags[i];
    const std::string key = review_key(f);
    std::string status;
    for (const auto& r : m.reviews())
      if (r.flag_key == key) status = store::to_string(r.status);
    if (key == rs.flag_key) chosen = &f;
    std::string line = severity_label(f.severity) + "  " + f.rule + "  " + (f.station.empty() ? f.contact : f.station) +
                       (f.ref.empty() ? std::string() : " " + f.ref) + (status.empty() ? "" : "   [" + status + "]");
    ImGui::PushID(static_cast<int>(i));
    ImGui::PushStyleVar(ImGuiStyleVar_ButtonTextAlign, ImVec2(0.0f, 0.5f));
    // Shortened to the row: the whole flag is shown beside the list.
    if (row_chip(line + "##" + key, key == rs.flag_key)) {
      rs.flag_key = key;
      rs.comment.clear();
      rs.message.clear();
    }
    also_label(f.rule + (f.ref.empty() ? std::string() : " " + f.ref));
    ImGui::PopStyleVar();
    ImGui::PopID();
  }
  if (c->report.flags.empty()) text("No flags to review.");
  touch_scroll();
  ImGui::EndChild();
  if (two) ImGui::SameLine();
  ImGui::BeginChild("rflag", ImVec2(0, 0), false);
  if (!chosen) {
    text_dim("Tap a flag to review it.");
  } else {
    const geo::Flag& f = *chosen;
    heading(severity_label(f.severity) + "  " + f.rule);
    text_wrapped(f.message);
    text_wrapped("Action: " + f.action);
    if (!f.caution.empty()) caution_box("CAUTION", f.caution);
    heading("Reviews");
    bool any = false;
    for (const auto& r : m.reviews()) {
      if (r.flag_key != rs.flag_key) continue;
      any = true;
      const store::Person* p = m.person(r.person);
      text_wrapped(r.meta.created.substr(0, 16) + "  " + store::to_string(r.status) +
                   (p ? " by " + p->initials : std::string()) + (r.comment.empty() ? std::string() : ": " + r.comment));
    }
    if (!any) text_dim("Not reviewed yet.");
    if (rs.unlocked) {
      text("Comment");
      ImGui::InputTextMultiline("##comment", &rs.comment, ImVec2(-1, lk.m.tap * 1.8f));
      this_frame().targets.push_back({"comment", ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
      record_box("comment");
      auto mark = [&](store::ReviewStatus st) {
        store::FlagReview r;
        r.flag_key = rs.flag_key;
        r.rule = f.rule;
        r.station = f.station;
        r.reading = f.reading;
        r.contact = f.contact;
        r.status = st;
        r.comment = rs.comment;
        r.person = a.person();
        auto id = std::make_shared<std::string>();
        std::string err;
        if (m.act_custom(
                "mark " + f.rule + " " + store::to_string(st),
                [&r, id](store::Project& p) { *id = store::add_flag_review(p, r); },
                [id](store::Project& p) { store::withdraw_flag_review(p, *id); }, &err)) {
          rs.comment.clear();
          rs.message = "Saved: marked " + store::to_string(st);
        } else {
          rs.message = err;
        }
      };
      if (button("Mark accepted", 0, m.writable(), true)) mark(store::ReviewStatus::Accepted);
      ImGui::SameLine();
      if (button("Mark resolved", 0, m.writable(), true)) mark(store::ReviewStatus::Resolved);
    }
    if (!rs.message.empty()) {
      if (rs.message.rfind("Saved", 0) == 0)
        text_colour(lk.pal.ok, rs.message);
      else
        error_box(rs.message);
    }
  }
  touch_scroll();
  ImGui::EndChild();
}

void days_tab(App& a) {
  Model& m = *a.model;
  ReviewState& rs = a.review;
  std::map<std::string, int> stations, readings, flags;
  std::map<std::string, std::string> day_of_station;
  for (const auto& s : m.stations()) {
    const std::string d = Model::day_of(s);
    ++stations[d];
    day_of_station[s.meta.uuid] = d;
  }
  for (const auto& p : m.planes()) ++readings[day_of_station[p.station]];
  for (const auto& l : m.lines()) ++readings[day_of_station[l.station]];
  if (auto c = m.check())
    for (const auto& f : c->report.flags)
      if (!f.station_id.empty()) ++flags[day_of_station[f.station_id]];
  ImGui::BeginChild("rdays", ImVec2(0, fill_height()), true);
  for (auto it = stations.rbegin(); it != stations.rend(); ++it) {
    const std::string& day = it->first;
    heading(day + "   " + std::to_string(it->second) + " stations, " + std::to_string(readings[day]) + " readings, " +
            std::to_string(flags[day]) + " flags");
    const store::DaySignoff* so = nullptr;
    for (const auto& s : m.signoffs())
      if (s.day == day) so = &s;
    if (so) {
      const store::Person* p = m.person(so->person);
      text("\xE2\x9C\x93 signed off" + (p ? " by " + p->initials + " (" + p->name + ")" : std::string()) + " at " +
           so->meta.created.substr(0, 16));
    } else if (rs.unlocked) {
      ImGui::PushID(day.c_str());
      if (button("Sign off " + day, 0, m.writable(), true)) {
        store::DaySignoff d;
        d.day = day;
        d.person = a.person();
        auto id = std::make_shared<std::string>();
        std::string err;
        if (m.act_custom(
                "sign off " + day, [&d, id](store::Project& p) { *id = store::sign_off_day(p, d); },
                [id](store::Project& p) { store::withdraw_signoff(p, *id); }, &err))
          rs.message = "Saved: " + day + " signed off";
        else
          rs.message = err;
      }
      ImGui::PopID();
    } else {
      text_dim("not signed off");
    }
  }
  if (stations.empty()) text_dim("No field days yet.");
  if (!rs.message.empty()) {
    if (rs.message.rfind("Saved", 0) == 0)
      text(rs.message);
    else
      error_box(rs.message);
  }
  touch_scroll();
  ImGui::EndChild();
}

void audit_tab(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  ReviewState& rs = a.review;
  const float avail = ImGui::GetContentRegionAvail().x;
  const bool two = avail > lk.m.tap * 18;
  ImGui::BeginChild("rrecords", ImVec2(two ? avail * 0.4f : avail, two ? 0 : lk.m.tap * 5), true);
  ImGui::PushStyleVar(ImGuiStyleVar_ButtonTextAlign, ImVec2(0.0f, 0.5f));
  for (const auto& s : m.stations()) {
    ImGui::PushID(s.meta.uuid.c_str());
    if (row_chip("station " + s.code, rs.record == s.meta.uuid)) rs.record = s.meta.uuid;
    ImGui::Indent();
    for (const auto* p : m.planes_of(s.meta.uuid)) {
      ImGui::PushID(p->meta.uuid.c_str());
      if (row_chip(reading_summary(*p), rs.record == p->meta.uuid)) rs.record = p->meta.uuid;
      ImGui::PopID();
    }
    for (const auto* l : m.lines_of(s.meta.uuid)) {
      ImGui::PushID(l->meta.uuid.c_str());
      if (row_chip(reading_summary(*l), rs.record == l->meta.uuid)) rs.record = l->meta.uuid;
      ImGui::PopID();
    }
    ImGui::Unindent();
    ImGui::PopID();
  }
  ImGui::PopStyleVar();
  touch_scroll();
  ImGui::EndChild();
  if (two) ImGui::SameLine();
  ImGui::BeginChild("rtrail", ImVec2(0, 0), false);
  if (rs.record.empty()) {
    text_dim("Tap a station or a reading to see its audit trail.");
  } else {
    // Read again only when the record or the project changes.
    std::vector<store::AuditEntry>& trail = rs.trail;
    std::map<std::string, std::string>& devices = rs.devices;
    const std::string key = rs.record + "|" + std::to_string(m.revision());
    if (key != rs.trail_key) {
      rs.trail_key = key;
      trail = store::audit_trail(m.project(), rs.record);
      devices.clear();
      for (const auto& d : store::list_devices(m.project())) devices[d.meta.uuid] = d.name;
    }
    heading("Audit trail");
    for (const auto& e : trail) {
      const store::Person* p = m.person(e.person);
      std::string who =
          devices.count(e.device) && !devices[e.device].empty() ? devices[e.device] : e.device.substr(0, 8);
      text(e.at.substr(0, 19) + "  " + e.action + "  on " + who + (p ? " by " + p->initials : std::string()));
      const auto before = formats::flat_json_object(e.old_values), after = formats::flat_json_object(e.new_values);
      // References are shown by their codes and names, not their UUIDs.
      auto shown = [&](const std::string& k, const std::string& v) -> std::string {
        if (k == "unit")
          if (const store::Unit* u = m.unit(v)) return u->code;
        if (k == "observer" || k == "person")
          if (const store::Person* p = m.person(v)) return p->initials;
        if (k == "contact")
          if (const store::Contact* c = m.contact(v)) return c->name;
        if (k == "station")
          if (const store::Station* s = m.station(v)) return s->code;
        return v;
      };
      ImGui::Indent();
      for (const auto& [k, v] : after) {
        if (k == "updated" || k == "created" || k == "device" || k == "uuid") continue;
        auto it = before.find(k);
        if (e.action == "insert") {
          if (!v.empty()) text_dim(k + ": " + shown(k, v));
        } else if (it == before.end() || it->second != v) {
          text_dim(k + ": " + (it == before.end() ? "" : shown(k, it->second)) + " \xE2\x86\x92 " + shown(k, v));
        }
      }
      ImGui::Unindent();
    }
    if (trail.empty()) text_dim("No audit rows for this record.");
  }
  touch_scroll();
  ImGui::EndChild();
}

}  // namespace

void draw_review(App& a) {
  if (!readings_ready(a)) return;
  Model& m = *a.model;
  Look& lk = look();
  ReviewState& rs = a.review;
  ImGui::AlignTextToFramePadding();
  if (!rs.unlocked) {
    text_colour(lk.pal.text_dim, "Read-only. Unlock to mark flags and sign off days.");
    ImGui::SameLine();
    if (button("Unlock reviewing", 0, m.writable() && !a.person().empty())) rs.unlocked = true;
    if (a.person().empty()) {
      ImGui::SameLine();
      ImGui::AlignTextToFramePadding();
      text_dim("(choose who you are in the top bar first)");
    }
  } else {
    const store::Person* p = m.person(a.person());
    text("Reviewing as " + (p ? p->name + " (" + p->initials + ")" : std::string("?")));
    ImGui::SameLine();
    if (button("Lock")) rs.unlocked = false;
  }
  ImGui::PushID("tabs");
  const int t = chip_row({"Flags", "Days", "Audit trail"}, rs.tab);
  ImGui::PopID();
  if (t >= 0 && t != rs.tab) {
    rs.tab = t;
    rs.message.clear();
  }
  if (rs.tab == 0)
    flags_tab(a);
  else if (rs.tab == 1)
    days_tab(a);
  else
    audit_tab(a);
}

}  // namespace cairn::ui
