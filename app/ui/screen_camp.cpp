// Camp: import CSV and GPX files, merge other tablets' project files into this
// one, export, edit the project's pick-lists, and run a full check, each on the worker thread with a progress
// bar while the UI keeps drawing. Files are chosen from the project's folder
// by tapping them, so no keyboard is needed.
#include <algorithm>
#include <filesystem>
#include <fstream>

#include "app/cli/project_access.h"
#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "storage/import.h"
#include "app/core/export.h"
#include "app/core/progress.h"
#include "formats/limits.h"
#include "storage/merge.h"
#include "storage/pick_lists.h"
#include "storage/repository.h"
#include <imgui_stdlib.h>

namespace cairn::ui {

namespace fs = std::filesystem;

namespace {

const std::vector<std::string> kKinds{"units", "contacts", "stations", "planes", "lines", "points"};

// A guess of what a CSV holds from its name ("day2_planes.csv" -> planes).
int guess_kind(const std::string& name) {
  std::string l = name;
  for (auto& c : l) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  for (size_t i = 0; i < kKinds.size(); ++i)
    if (l.find(kKinds[i].substr(0, kKinds[i].size() - 1)) != std::string::npos) return static_cast<int>(i);
  return 2;
}

std::string ext_of(const fs::path& p) {
  std::string e = p.extension().string();
  for (auto& c : e) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return e;
}

std::vector<fs::path> files_beside(const std::string& project, const std::vector<std::string>& exts) {
  std::vector<fs::path> out;
  const fs::path dir = fs::absolute(fs::path(project)).parent_path();
  std::error_code ec;
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
    if (!it->is_regular_file()) continue;
    const std::string e = ext_of(it->path());
    if (std::find(exts.begin(), exts.end(), e) == exts.end()) continue;
    if (fs::absolute(it->path()) == fs::absolute(fs::path(project))) continue;
    out.push_back(it->path());
  }
  std::sort(out.begin(), out.end());
  return out;
}

void file_list(App& a, const char* id, const std::vector<fs::path>& files, float height) {
  ImGui::BeginChild(id, ImVec2(0, height), true);
  for (const auto& f : files) {
    const std::string name = f.filename().string();
    ImGui::PushID(f.string().c_str());
    if (chip(name, a.camp.selected == f.string(), true, -1)) {
      a.camp.selected = f.string();
      if (ext_of(f) == ".csv") a.camp.kind = guess_kind(name);
    }
    ImGui::PopID();
  }
  if (files.empty()) text_dim("none in the project's folder");
  touch_scroll();
  ImGui::EndChild();
}

// A text field one tap high with a hint, recorded for the event script under LABEL.
void text_field(const char* label, const char* hint, std::string* value, float width) {
  wrap_if_past_edge(width);
  ImGui::SetNextItemWidth(width);
  ImGui::InputTextWithHint((std::string("##") + label).c_str(), hint, value);
  this_frame().targets.push_back({label, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
  record_box(label);
}

// The project's pick-lists, edited here so that no mapper types a code at the
// outcrop: structure kinds (chips: tap to list or unlist), lithologies (add by
// name, tap one then remove it), units and people (added as records). Every
// change is one undoable action.
void pick_lists(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  CampState& cs = a.camp;
  const bool writable = m.writable();
  auto change = [&](const std::string& label, const std::function<void(store::Project&)>& f,
                    const std::function<void(store::Project&)>& undo) {
    cs.list_error.clear();
    if (!m.act_custom(label, f, undo, &cs.list_error)) return false;
    a.request_check();
    return true;
  };
  heading("Pick-lists");
  text_dim("Structure kinds offered on the Reading pad (none chosen: all of them)");
  {
    std::vector<std::string> kinds;
    for (const std::string& names : {store::names_of_plane_kind(), store::names_of_line_kind()}) {
      size_t at = 0;
      while (at <= names.size()) {
        const size_t comma = names.find(", ", at);
        kinds.push_back(names.substr(at, comma == std::string::npos ? std::string::npos : comma - at));
        if (comma == std::string::npos) break;
        at = comma + 2;
      }
    }
    ImGui::PushID("structures");
    for (size_t i = 0; i < kinds.size(); ++i) {
      const std::string& k = kinds[i];
      const bool listed = std::find(m.structures().begin(), m.structures().end(), k) != m.structures().end();
      ImGui::PushID(static_cast<int>(i));
      if (i > 0) same_line_if_fits(label_width((listed ? "\xE2\x9C\x93 " : "") + k));
      if (chip(k, listed, writable)) {
        if (listed)
          change(
              "unlist " + k, [&](store::Project& p) { store::remove_pick(p, store::PickList::Structure, k); },
              [k](store::Project& p) { store::add_pick(p, store::PickList::Structure, k); });
        else
          change(
              "list " + k, [&](store::Project& p) { store::add_pick(p, store::PickList::Structure, k); },
              [k](store::Project& p) { store::remove_pick(p, store::PickList::Structure, k); });
      }
      ImGui::PopID();
    }
    ImGui::PopID();
  }
  const float field_w = std::min(ImGui::GetContentRegionAvail().x, lk.m.tap * 8);
  text_dim("Lithologies");
  {
    ImGui::PushID("lithologies");
    const auto& lith = m.lithologies();
    int sel = -1;
    for (size_t i = 0; i < lith.size(); ++i)
      if (lith[i] == cs.lithology) sel = static_cast<int>(i);
    const int hit = chip_row(lith, sel, writable);
    if (hit >= 0) cs.lithology = lith[static_cast<size_t>(hit)];
    ImGui::PopID();
    text_field("new lithology", "lithology, e.g. quartz sandstone", &cs.new_lithology, field_w);
    ImGui::SameLine();
    if (button("Add lithology", 0, writable && !cs.new_lithology.empty())) {
      const std::string code = cs.new_lithology;
      if (change(
              "lithology " + code, [&](store::Project& p) { store::add_pick(p, store::PickList::Lithology, code); },
              [code](store::Project& p) { store::remove_pick(p, store::PickList::Lithology, code); }))
        cs.new_lithology.clear();
    }
    if (sel >= 0 && button("Remove " + cs.lithology, 0, writable)) {
      const std::string code = cs.lithology;
      if (change(
              "remove lithology " + code,
              [&](store::Project& p) { store::remove_pick(p, store::PickList::Lithology, code); },
              [code](store::Project& p) { store::add_pick(p, store::PickList::Lithology, code); }))
        cs.lithology.clear();
    }
  }
  std::string units;
  for (const auto& u : m.units()) units += (units.empty() ? "" : ", ") + u.code;
  text_dim("Units, oldest first: " + (units.empty() ? std::string("none yet") : units));
  text_field("unit code", "code, e.g. Kls", &cs.unit_code, field_w * 0.5f);
  ImGui::SameLine();
  text_field("unit name", "name", &cs.unit_name, field_w);
  ImGui::SameLine();
  if (button("Add unit", 0, writable && !cs.unit_code.empty() && !cs.unit_name.empty())) {
    store::Unit u;
    u.code = cs.unit_code;
    u.name = cs.unit_name;
    u.age_rank = 1;
    for (const auto& v : m.units()) u.age_rank = std::max(u.age_rank, v.age_rank + 1);  // the youngest so far
    if (change(
            "unit " + u.code, [&](store::Project& p) { store::add(p, u); }, nullptr)) {
      cs.unit_code.clear();
      cs.unit_name.clear();
    }
  }
  std::string people;
  for (const auto& who : m.people()) people += (people.empty() ? "" : ", ") + who.initials;
  text_dim("People: " + (people.empty() ? std::string("none yet") : people));
  text_field("initials", "initials", &cs.person_initials, field_w * 0.5f);
  ImGui::SameLine();
  text_field("person name", "name", &cs.person_name, field_w);
  ImGui::SameLine();
  if (button("Add person", 0, writable && !cs.person_initials.empty() && !cs.person_name.empty())) {
    store::Person who;
    who.initials = cs.person_initials;
    who.name = cs.person_name;
    if (change(
            "person " + who.initials, [&](store::Project& p) { store::add(p, who); }, nullptr)) {
      cs.person_initials.clear();
      cs.person_name.clear();
    }
  }
  if (!cs.list_error.empty()) error_box(cs.list_error);
}

}  // namespace

void draw_camp(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  CampState& cs = a.camp;
  const bool busy = a.jobs.busy();
  const bool writable = m.writable();
  const std::string project = m.path();

  if (busy) progress(a.jobs.progress().fraction(), a.jobs.name() + ": " + a.jobs.progress().message());

  const float avail = ImGui::GetContentRegionAvail().x;
  const bool two = avail > lk.m.tap * 18;
  const float col_w = two ? (avail - ImGui::GetStyle().ItemSpacing.x) / 2 : avail;
  const float list_h = lk.m.tap * 3.4f;

  ImGui::BeginChild("campleft", ImVec2(col_w, 0), false);
  heading("Import");
  const auto inputs = files_beside(project, {".csv", ".gpx"});
  file_list(a, "inputs", inputs, list_h);
  const bool is_gpx = !cs.selected.empty() && ext_of(cs.selected) == ".gpx";
  const bool is_csv = !cs.selected.empty() && ext_of(cs.selected) == ".csv";
  if (is_csv) {
    text_dim("The file holds");
    ImGui::PushID("kind");
    const int k = chip_row(kKinds, cs.kind);
    ImGui::PopID();
    if (k >= 0) cs.kind = k;
  } else if (is_gpx) {
    text_dim("Its waypoints are");
    std::vector<std::string> opts{"stations"};
    int sel = 0;
    for (size_t i = 0; i < m.contacts().size(); ++i) {
      opts.push_back("points of " + m.contacts()[i].name);
      if (m.contacts()[i].name == cs.contact) sel = static_cast<int>(i) + 1;
    }
    ImGui::PushID("gpxas");
    const int k = chip_row(opts, sel);
    ImGui::PopID();
    if (k >= 0) cs.contact = k == 0 ? "" : m.contacts()[static_cast<size_t>(k - 1)].name;
  }
  if (button("Import " + (cs.selected.empty() || !(is_csv || is_gpx) ? std::string("(choose a file)")
                                                                     : fs::path(cs.selected).filename().string()),
             -1, writable && !busy && (is_csv || is_gpx), true)) {
    const std::string file = cs.selected;
    const int kind = cs.kind;
    const std::string contact = cs.contact;
    Model* model = &m;
    CampState* camp = &cs;
    a.jobs.start("Import", [project, file, kind, contact, is_gpx, model, camp](JobProgress& pr) {
      pr.set(-1.0f, "reading " + fs::path(file).filename().string());
      // A GPX file is read whole, at most kMaxImportBytes (formats/limits.h); a
      // CSV row by row, twice, never held whole (store::import_csv_file), as
      // `cairn import` reads them.
      std::string text;
      if (is_gpx) {
        auto read = formats::read_file_limited(file);
        if (!read) throw std::runtime_error(read.error());
        text = std::move(read.value());
      }
      store::Project p = store::Project::open(project, cli::cli_open_options(false));
      pr.set(-1.0f, "checking and writing every row");
      // The figures of `cairn import`'s progress line (app/core/progress.h).
      const core::RowRate rate;
      auto progress = [&pr, &rate](size_t done, size_t total) {
        pr.set(total ? static_cast<float>(done) / static_cast<float>(total) : -1.0f,
               "checking and writing: " + rate.line(done, total));
      };
      const store::ImportReport r =
          is_gpx
              ? store::import_gpx(p, text, file, contact)
              : store::import_csv_file(p, *store::parse_import_kind(kKinds[static_cast<size_t>(kind)]), file, progress);
      std::vector<std::string> log;
      const std::string name = fs::path(file).filename().string();
      if (r.ok())
        log.push_back(name + ": " + std::to_string(r.added) + " added, " + std::to_string(r.skipped) +
                      " already there");
      else {
        log.push_back(name + ": nothing imported, " + std::to_string(r.errors.size()) + " problem" +
                      (r.errors.size() == 1 ? "" : "s") + ":");
        for (size_t i = 0; i < r.errors.size() && i < 30; ++i) log.push_back("  " + r.errors[i]);
      }
      return std::function<void()>([model, camp, log] {
        model->reload();
        camp->log.insert(camp->log.end(), log.begin(), log.end());
      });
    });
  }

  heading("Merge tablets");
  const auto others = files_beside(project, {".cairn"});
  file_list(a, "others", others, list_h);
  const bool is_cairn = !cs.selected.empty() && ext_of(cs.selected) == ".cairn";
  // A long file name is shortened to the button (the list above shows it whole).
  const std::string merge_label =
      "Merge " + (is_cairn ? fs::path(cs.selected).filename().string() : std::string("(choose a project file)")) +
      " into this project";
  const float merge_room = ImGui::GetContentRegionAvail().x - ImGui::GetStyle().FramePadding.x * 2;
  if (button(fit_to_width(merge_label, merge_room) + "##merge", -1, writable && !busy && is_cairn, true)) {
    const std::string file = cs.selected;
    Model* model = &m;
    CampState* camp = &cs;
    a.jobs.start("Merge", [project, file, model, camp](JobProgress& pr) {
      store::Project target = store::Project::open(project, cli::cli_open_options(false));
      store::MergeOptions mo;
      core::RowRate rate;  // per source, the figures of `cairn merge --progress` (app/core/progress.h)
      std::string rate_source;
      mo.progress = [&pr, &rate, &rate_source](const store::MergeProgress& mp) {
        if (mp.source != rate_source) {
          rate = core::RowRate();
          rate_source = mp.source;
        }
        const float part = mp.total ? static_cast<float>(mp.done) / static_cast<float>(mp.total) : 0.0f;
        const float f =
            (static_cast<float>(mp.source_index) + part) / static_cast<float>(std::max<size_t>(1, mp.sources));
        pr.set(f, fs::path(mp.source).filename().string() + ": " + mp.table + ", " + rate.line(mp.done, mp.total));
      };
      const store::MergeReport rep = store::merge_files(target, {file}, mo);
      std::vector<std::string> log;
      for (const auto& s : rep.sources)
        log.push_back(fs::path(s.path).filename().string() + ": " + std::to_string(s.counts.added) + " added, " +
                      std::to_string(s.counts.updated) + " updated, " + std::to_string(s.counts.skipped) +
                      " skipped, " + std::to_string(s.counts.conflicts) + " conflicts");
      for (const auto& c : rep.conflicts)
        log.push_back("  conflict: " + c.label + " (" + std::to_string(c.fields.size()) + " fields differ)");
      for (const auto& k : rep.clashes)
        log.push_back("  shared code " + k.code + ": stored as " + k.stored_as + ", suggest " + k.suggestion);
      for (const auto& w : rep.warnings) log.push_back("  " + w);
      return std::function<void()>([model, camp, log] {
        model->reload();
        camp->log.insert(camp->log.end(), log.begin(), log.end());
      });
    });
  }
  camp_photos(a);
  touch_scroll();
  ImGui::EndChild();
  if (two) ImGui::SameLine();

  ImGui::BeginChild("campright", ImVec2(0, 0), false);
  heading("Export");
  text_wrapped(
      "GeoPackage and GeoJSON for a GIS (with the fitted contacts and flags), or CSV files in the "
      "columns cairn import reads; written beside the project.");
  const fs::path base = fs::absolute(fs::path(project)).parent_path() / fs::path(project).stem();
  const struct {
    const char* label;
    std::string out;
  } outputs[] = {{"GeoPackage", base.string() + ".gpkg"},
                 {"GeoJSON", base.string() + ".geojson"},
                 {"CSV folder", base.string() + "-export"}};
  for (size_t i = 0; i < 3; ++i) {
    if (i > 0) same_line_if_fits(label_width(std::string("Export ") + outputs[i].label));
    if (button(std::string("Export ") + outputs[i].label, 0, !busy, true)) {
      const std::string out = outputs[i].out;
      CampState* camp = &cs;
      a.jobs.start("Export", [project, out, camp](JobProgress& pr) {
        pr.set(-1.0f, "checking and writing " + fs::path(out).filename().string());
        store::OpenOptions oo = cli::cli_open_options(true);
        oo.backups = false;
        store::Project p = store::Project::open(project, oo);
        core::ExportOptions eo;
        eo.local_declination = wmm_local_declination();
        const core::ExportSummary sum = core::export_project(p, out, eo);
        size_t features = 0;
        for (const auto& l : sum.layers) features += l.count;
        const std::string what =
            sum.format == core::ExportFormat::CsvFolder
                ? std::to_string(sum.layers.size()) + " CSV files"
                : std::to_string(sum.layers.size()) + " layers, " + std::to_string(features) + " features";
        std::vector<std::string> log{"exported " + what + " to " + sum.path};
        return std::function<void()>([camp, log] { camp->log.insert(camp->log.end(), log.begin(), log.end()); });
      });
    }
  }
  heading("Full check");
  text_wrapped("Fits every contact and compares every reading (it also runs by itself after each change).");
  if (button("Run the full check now", -1, !busy && !a.checker.busy())) {
    const std::uint64_t rev = m.revision();
    Model* model = &m;
    CampState* camp = &cs;
    a.jobs.start("Full check", [project, rev, model, camp](JobProgress& pr) {
      auto r = std::make_shared<CheckResult>(
          run_check_on_file(project, rev, [&](float f, const std::string& s) { pr.set(f, s); }));
      return std::function<void()>([model, camp, r] {
        model->set_check(r);
        camp->log.push_back(r->error.empty() ? "full check: " + std::to_string(r->report.fits.size()) + " contacts, " +
                                                   std::to_string(r->report.flags.size()) + " flags"
                                             : "full check failed: " + r->error);
      });
    });
  }
  // Open merge conflicts, read again only when the project changes.
  std::vector<store::MergeConflict>& conflicts = cs.conflicts;
  if (cs.conflicts_rev != m.revision()) {
    cs.conflicts_rev = m.revision();
    try {
      conflicts = store::list_conflicts(m.project());
    } catch (const std::exception&) {
      conflicts.clear();  // a file from before merges existed
    }
  }
  if (!conflicts.empty()) {
    heading(std::to_string(conflicts.size()) + " merge conflict" + (conflicts.size() == 1 ? "" : "s") + " to decide");
    for (size_t i = 0; i < conflicts.size() && i < 20; ++i) text_wrapped(conflicts[i].label);
  }
  pick_lists(a);
  heading("Log");
  if (cs.log.empty()) text_dim("Nothing yet this session.");
  for (const auto& l : cs.log) text_wrapped(l);
  touch_scroll();
  ImGui::EndChild();
}

}  // namespace cairn::ui
