// Crosscheck: the flags of the cross-check, grouped by station and severity
// (worst first), each opening its reading. A flag that carries a field-safety
// caution (every hazard) shows it prominently and cannot be closed, nor left
// for its reading, until the caution has been acknowledged; the
// acknowledgement is saved (storage/reviews.h).
#include <algorithm>
#include <map>
#include <memory>
#include <unordered_map>

#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "app/core/corrections.h"
#include "storage/reviews.h"

namespace cairn::ui {

namespace {

bool acknowledged(const Model& m, const std::string& key) {
  for (const auto& r : m.reviews())
    if (r.flag_key == key && r.status == store::ReviewStatus::Acknowledged) return true;
  return false;
}

// The list of flags at or above `min_severity`, grouped under their stations,
// each with its newest review's status.
FlagList build_list(const Records& m, std::shared_ptr<const CheckResult> c, int min_severity) {
  FlagList out;
  std::unordered_map<std::string, std::string> note;
  for (const auto& r : m.reviews) note[r.flag_key] = store::to_string(r.status);  // newest wins
  std::map<geo::Severity, int> counts;
  for (const auto& f : c->report.flags) ++counts[f.severity];
  out.hazards = counts[geo::Severity::Hazard];
  out.summary = std::to_string(c->report.flags.size()) + " flag" + (c->report.flags.size() == 1 ? "" : "s");
  for (auto s : {geo::Severity::Hazard, geo::Severity::Conflict, geo::Severity::Query, geo::Severity::Note})
    if (counts[s]) out.summary += ",  " + std::to_string(counts[s]) + " " + geo::severity_name(s);
  out.summary += "   (" + std::to_string(c->report.fits.size()) + " contacts fitted)";
  std::string last_station = "\x01";
  for (size_t i = 0; i < c->report.flags.size(); ++i) {
    const auto& f = c->report.flags[i];
    if (static_cast<int>(f.severity) < min_severity) continue;
    if (f.station != last_station) {
      out.rows.push_back({f.station.empty() ? "Contacts and crew" : "Station " + f.station, "", -1});
      last_station = f.station;
    }
    FlagRow r;
    r.flag = static_cast<long>(i);
    r.key = review_key(f);
    r.text = severity_label(f.severity) + "  " + f.rule;
    if (!f.ref.empty()) r.text += "  " + f.ref;
    r.text += "   " + f.message;
    auto it = note.find(r.key);
    if (it != note.end() && !it->second.empty()) r.text += "   [" + it->second + "]";
    out.rows.push_back(std::move(r));
  }
  out.check = std::move(c);
  return out;
}

// The open flag, as a modal window: it cannot be closed by tapping beside it.
// Immediate mode: the window's parts (what, why, cautions, actions) are drawn
// in the order they appear, which is why it is longer than a screen.
void flag_window(App& a, const geo::Flag& f) {
  Model& m = *a.model;
  Look& lk = look();
  CrosscheckState& cs = a.cross;
  const std::string key = review_key(f);
  const bool has_caution = !f.caution.empty();
  const bool acked = cs.acknowledged || acknowledged(m, key);
  const ImVec2 ds = ImGui::GetIO().DisplaySize;
  ImGui::SetNextWindowPos(ImVec2(ds.x * 0.5f, ds.y * 0.5f), ImGuiCond_Always, ImVec2(0.5f, 0.5f));
  ImGui::SetNextWindowSize(ImVec2(std::min(ds.x - lk.m.tap, lk.m.tap * 17), 0), ImGuiCond_Always);
  if (!ImGui::IsPopupOpen("Flag")) ImGui::OpenPopup("Flag");
  if (!ImGui::BeginPopupModal("Flag", nullptr,
                              ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoResize |
                                  ImGuiWindowFlags_AlwaysAutoResize))
    return;
  {
    // A heavy frame sets the flag apart from the dimmed screen behind it.
    const ImVec2 p = ImGui::GetWindowPos(), sz = ImGui::GetWindowSize();
    ImGui::GetForegroundDrawList()->AddRect(p, ImVec2(p.x + sz.x, p.y + sz.y), lk.pal.border, 0, 0, 4);
  }
  ImGui::PushFont(lk.fonts.bold);
  text(severity_label(f.severity) + "   " + f.rule);
  ImGui::PopFont();
  std::string where = !f.readings.empty() ? "crew: " + (f.observer.empty() ? std::string("one device") : f.observer) +
                                                (f.day.empty() ? std::string() : " on " + f.day)
                      : f.station.empty() ? std::string("contact-wide")
                                          : "station " + f.station;
  if (!f.ref.empty()) where += ", reading " + f.ref;
  if (!f.contact.empty()) where += ", contact " + f.contact;
  text_dim(where);
  text_wrapped(f.message);
  if (f.rotation && f.rotation_interval) {
    // A group flag: its rotation and every reading it concerns.
    text("common turn " + geo::format_decimal("%+.1f\xC2\xB0", *f.rotation) + " (95% interval " +
         geo::format_decimal("%+.1f", f.rotation_interval->first) + " to " +
         geo::format_decimal("%+.1f\xC2\xB0", f.rotation_interval->second) + ")");
    std::string list;
    for (size_t i = 0; i < f.readings.size(); ++i)
      list += (i ? ", " : "") + (i < f.stations.size() ? f.stations[i] + " " : std::string()) +
              (i < f.refs.size() ? f.refs[i] : std::string());
    text_wrapped(std::to_string(f.readings.size()) + " readings: " + list);
  }
  if (f.misfit) {
    std::string mf = "misfit " + geo::format_decimal("%.1f\xC2\xB0", *f.misfit);
    if (f.misfit_corrected)
      mf += ", after the suggested correction " + geo::format_decimal("%.1f\xC2\xB0", *f.misfit_corrected);
    text(mf);
  }
  text_wrapped("Action: " + f.action);
  if (has_caution) {
    caution_box(f.severity == geo::Severity::Hazard ? "HAZARD: read before going near this face" : "CAUTION",
                f.caution);
    if (acked) {
      text_colour(lk.pal.ok, "\xE2\x9C\x93 Caution acknowledged");
    } else {
      text_colour(lk.pal.error, "Acknowledge the caution to close this flag.");
      // Off for the moment a change is read back (it is saved after); a
      // read-only file keeps it for the session only.
      if (button("I have read this caution", -1, !m.stale(), true)) {
        store::FlagReview r;
        r.flag_key = key;
        r.rule = f.rule;
        r.station = f.station;
        r.reading = f.reading;
        r.contact = f.contact;
        r.status = store::ReviewStatus::Acknowledged;
        r.person = a.person();
        std::string err;
        // Undo of an acknowledgement withdraws that review.
        auto id = std::make_shared<std::string>();
        const bool ok = m.act_custom(
            "acknowledge caution " + f.rule + (f.ref.empty() ? std::string() : " " + f.ref),
            [&r, id](store::Project& p) { *id = store::add_flag_review(p, r); },
            [id](store::Project& p) { store::withdraw_flag_review(p, *id); }, &err);
        if (ok) {
          cs.acknowledged = true;
          a.notify("Saved: caution acknowledged");
        } else {
          // A read-only file cannot keep the acknowledgement: it still counts for this session.
          cs.acknowledged = true;
          a.notify("Acknowledged for this session (not saved: " + err + ")");
        }
      }
    }
  }
  const bool may_leave = !has_caution || acked || cs.acknowledged;
  if (core::has_correction(f)) {
    // One tap applies the suggested correction as an audited update (undoable);
    // the check then runs again on the changed file.
    if (button("Apply the correction", 0, may_leave)) {
      std::string err;
      auto result = std::make_shared<std::string>();
      if (a.act(
              "correct " + (f.ref.empty() ? f.rule : f.ref),
              [&f, result](store::Project& p) {
                auto r = core::apply_correction(p, f);
                if (!r) throw std::runtime_error(r.error());
                *result = r.value();
              },
              &err)) {
        a.notify("Corrected " + *result);
        cs.open_key.clear();
        ImGui::CloseCurrentPopup();
        ImGui::EndPopup();
        return;
      }
      a.notify("Not corrected: " + err);
    }
    ImGui::SameLine();
  }
  if (!f.reading.empty()) {
    if (button("Open reading", 0, may_leave)) {
      a.select_station(f.station_id);
      a.reading = f.reading;
      cs.open_key.clear();
      ImGui::CloseCurrentPopup();
      a.go(Screen::Station);
    }
    ImGui::SameLine();
  } else if (!f.station_id.empty()) {
    if (button("Open station", 0, may_leave)) {
      a.select_station(f.station_id);
      cs.open_key.clear();
      ImGui::CloseCurrentPopup();
      a.go(Screen::Station);
    }
    ImGui::SameLine();
  }
  if (button("Close", 0, may_leave)) {
    cs.open_key.clear();
    ImGui::CloseCurrentPopup();
  }
  ImGui::EndPopup();
}

}  // namespace

void draw_crosscheck(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  CrosscheckState& cs = a.cross;
  auto c = m.check();
  if (a.checker.busy()) progress(a.checker.progress().fraction(), "Checking: " + a.checker.progress().message());
  if (!c) {
    text("Running the cross-check...");
    return;
  }
  if (!c->error.empty()) {
    error_box("The cross-check could not run: " + c->error);
    return;
  }
  if (!c->warning.empty()) caution_box("Magnetic model", c->warning);
  // The list is built once per check, change of reviews or filter, on a worker
  // (background.h), the last list staying meanwhile.
  cs.list.want(
      std::to_string(c->revision) + "|" + std::to_string(m.revision()) + "|" + std::to_string(cs.min_severity),
      [rec = m.records(), c, min = cs.min_severity] { return build_list(*rec, c, min); }, build_in_frame());
  if (!cs.list.value()) {
    text("Listing the flags...");
    return;
  }
  const FlagList& list = *cs.list.value();
  const auto& flags = list.check->report.flags;
  // The summary and the severity filter share a line when they fit (more rows for the list).
  ImGui::AlignTextToFramePadding();
  heading(list.summary);
  {
    ImGui::SameLine();
    wrap_if_past_edge(ImGui::CalcTextSize("Show from").x + label_width("\xE2\x9C\x93 note") * 2);
    ImGui::AlignTextToFramePadding();
    text_dim("Show from");
    ImGui::SameLine();
    ImGui::PushID("min");
    const int hit = chip_row({"note", "query", "conflict", "hazard"}, cs.min_severity);
    ImGui::PopID();
    if (hit >= 0) cs.min_severity = hit;
  }
  if (list.hazards > 0)
    caution_box(std::to_string(list.hazards) + " hazard flag" + (list.hazards == 1 ? "" : "s"),
                "Open each one and read its caution before working near the face.");
  if (!cs.list.current()) text_dim("Listing the flags...");
  if (!cs.list.error().empty()) error_box("The flags could not be listed: " + cs.list.error());

  // Opened from the command line (--flag RULE): the first flag of that rule.
  if (!a.opts.flag.empty()) {
    for (const auto& f : flags)
      if (f.rule == a.opts.flag) {
        cs.open_key = review_key(f);
        break;
      }
    a.opts.flag.clear();
  }

  ImGui::BeginChild("flags", ImVec2(0, fill_height()), true);
  // A list clipper: a frame costs only the rows on screen.
  ImGuiListClipper clip;
  clip.Begin(static_cast<int>(list.rows.size()), lk.m.tap + ImGui::GetStyle().ItemSpacing.y);
  while (clip.Step()) {
    for (int i = clip.DisplayStart; i < clip.DisplayEnd; ++i) {
      const FlagRow& r = list.rows[static_cast<size_t>(i)];
      if (r.flag < 0) {
        ImGui::AlignTextToFramePadding();  // a heading row is one tap high, like a flag row
        heading(r.text);
        continue;
      }
      const auto& f = flags[static_cast<size_t>(r.flag)];
      ImGui::PushID(static_cast<int>(r.flag));
      ImGui::PushStyleVar(ImGuiStyleVar_ButtonTextAlign, ImVec2(0.0f, 0.5f));
      if (f.severity == geo::Severity::Hazard) {
        ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_bg));
        ImGui::PushStyleColor(ImGuiCol_ButtonHovered, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_bg));
        ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_text));
      }
      // Long messages are cut to the row; the whole text is in the flag's window.
      const std::string shown =
          fit_to_width(r.text, ImGui::GetContentRegionAvail().x - ImGui::GetStyle().FramePadding.x * 2);
      if (button(shown + "##flag", -1)) {
        cs.open_key = r.key;
        cs.acknowledged = false;
      }
      also_label(f.rule + (f.ref.empty() ? std::string() : " " + f.ref));
      if (f.severity == geo::Severity::Hazard) ImGui::PopStyleColor(3);
      ImGui::PopStyleVar();
      ImGui::PopID();
    }
  }
  if (flags.empty()) text("No flags: every compared reading agrees with its contact's fit.");
  touch_scroll();
  ImGui::EndChild();
  // The open flag (it may have been tapped just now); a flag that went away with
  // a new check closes.
  const geo::Flag* open = nullptr;
  if (!cs.open_key.empty())
    for (const auto& r : list.rows)
      if (r.flag >= 0 && r.key == cs.open_key) open = &flags[static_cast<size_t>(r.flag)];
  // A flag filtered out of the list but still in the result stays open.
  if (!cs.open_key.empty() && !open)
    for (const auto& f : flags)
      if (review_key(f) == cs.open_key) open = &f;
  if (open)
    flag_window(a, *open);
  else
    cs.open_key.clear();
}

}  // namespace cairn::ui
