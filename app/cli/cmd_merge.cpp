// `cairn merge TARGET SOURCE...`: brings every record of the tablets' project
// files into the camp file (storage/merge.h), all or nothing, and reports what
// was added, updated, skipped and conflicting, per device and per person.
// `cairn merge TARGET --conflicts` lists the conflicts still open in TARGET.
// A TARGET that does not exist yet is made with the first source's settings.
//
// Progress goes to stderr (past two seconds, on a terminal or with --progress:
// app/core/progress.h), so stdout stays the report (or the JSON).
// Test hook: the environment variable CAIRN_MERGE_FAIL_AFTER=N makes the merge
// fail after N writes, to show that the target is left as it was.
#include <cstdlib>
#include <filesystem>
#include <iomanip>
#include <memory>
#include <optional>
#include <ostream>
#include <sstream>
#include <stdexcept>
#include <fmt/format.h>

#include "app/cli/command.h"
#include "formats/atomic_file.h"
#include "formats/json.h"
#include "formats/temp_files.h"
#include "app/cli/project_access.h"
#include "app/core/progress.h"
#include "formats/utf8.h"
#include "storage/merge.h"

namespace cairn::cli {

using formats::JsonWriter;
namespace {

std::string plural(int n, const std::string& one, const std::string& many) {
  return std::to_string(n) + " " + (n == 1 ? one : many);
}

std::string counts_text(const store::MergeCounts& c) {
  return std::to_string(c.added) + " added, " + std::to_string(c.updated) + " updated, " + std::to_string(c.skipped) +
         " skipped, " + plural(c.conflicts, "conflict", "conflicts");
}

std::string name_or(const std::map<std::string, std::string>& names, const std::string& id, const std::string& none) {
  if (id.empty()) return none;
  auto it = names.find(id);
  return it == names.end() ? id : it->second;
}

std::string side_text(const store::VersionSide& s) {
  std::string t = s.device_name.empty() ? s.device : s.device_name;
  if (!s.person_name.empty()) t += ", " + s.person_name;
  t += ", " + s.updated;
  if (s.deleted) t += " (deleted)";
  return t;
}

std::string quoted(const std::string& v) { return v.empty() ? "(empty)" : "\"" + v + "\""; }

void conflict_text(std::ostream& out, const store::MergeConflict& c) {
  out << "  " << c.label << "  [" << c.table << " " << c.record << "]\n";
  out << "    current: " << side_text(c.current) << "\n";
  out << "    other:   " << side_text(c.other) << "\n";
  for (const auto& f : c.fields)
    out << "      " << f.field << ": " << quoted(f.current) << " | other: " << quoted(f.other) << "\n";
  out << "    conflict id " << c.id << "\n";
}

void write_text(std::ostream& out, const std::string& target, const store::MergeReport& rep) {
  out << "Merged " << plural(static_cast<int>(rep.sources.size()), "file", "files") << " into " << target
      << (rep.changed ? "" : " (nothing new: the file is unchanged)") << "\n";
  for (const auto& s : rep.sources) {
    out << "\n" << s.path << " (\"" << s.name << "\"): " << counts_text(s.counts);
    if (s.audit_added) out << "; " << plural(s.audit_added, "audit row", "audit rows");
    if (s.devices_added) out << "; " << plural(s.devices_added, "new device", "new devices");
    if (s.track_added || s.track_skipped)
      out << "; day track: " << s.track_added << " new fix" << (s.track_added == 1 ? "" : "es") << ", "
          << s.track_skipped << " already here";
    out << "\n";
    if (!s.by_device.empty()) out << "  by device\n";
    for (const auto& [id, c] : s.by_device)
      out << "    " << std::left << std::setw(24) << name_or(rep.device_names, id, "unknown") << counts_text(c) << "\n";
    if (!s.by_person.empty()) out << "  by person\n";
    for (const auto& [id, c] : s.by_person)
      out << "    " << std::left << std::setw(24) << name_or(rep.person_names, id, "(no person recorded)")
          << counts_text(c) << "\n";
  }
  if (!rep.conflicts.empty()) {
    out << "\nConflicts (" << rep.conflicts.size()
        << "): changed on two devices since they last shared the record. The newer version is current;\n"
           "the other is kept in the file for a person to decide.\n";
    for (const auto& c : rep.conflicts) conflict_text(out, c);
  }
  if (!rep.clashes.empty()) {
    out << "\nShared codes (" << rep.clashes.size() << "): both records are kept, never fused; rename one.\n";
    for (const auto& k : rep.clashes) {
      out << "  " << k.table << " " << k.column << " " << k.code;
      if (!k.scope.empty()) out << " at " << k.scope;
      out << ": kept by the record from " << k.kept_device << "; the one from " << k.renamed_device << " is stored as "
          << k.stored_as;
      if (k.distance_m) {
        out << fmt::format(" ({:.0f} m apart)", *k.distance_m);
      }
      out << "; suggested new code: " << k.suggestion << "\n";
    }
  }
  if (!rep.warnings.empty()) {
    out << "\nWarnings\n";
    for (const auto& w : rep.warnings) out << "  " << formats::terminal_safe(w) << "\n";
  }
}

void side_json(JsonWriter& j, const store::VersionSide& s) {
  j.begin_object();
  j.key("updated").value(s.updated);
  j.key("device").value(s.device);
  j.key("device_name").value(s.device_name);
  j.key("person").value(s.person.empty() ? std::optional<std::string>{} : s.person);
  j.key("person_name").value(s.person_name.empty() ? std::optional<std::string>{} : s.person_name);
  j.key("deleted").value(s.deleted);
  j.end_object();
}

void conflict_json(JsonWriter& j, const store::MergeConflict& c) {
  j.begin_object();
  j.key("id").value(c.id);
  j.key("table").value(c.table);
  j.key("record").value(c.record);
  j.key("label").value(c.label);
  j.key("current");
  side_json(j, c.current);
  j.key("other");
  side_json(j, c.other);
  j.key("fields").begin_array();
  for (const auto& f : c.fields) {
    j.begin_object();
    j.key("field").value(f.field);
    j.key("current").value(f.current);
    j.key("other").value(f.other);
    j.end_object();
  }
  j.end_array();
  if (!c.found_at.empty()) j.key("found_at").value(c.found_at);
  j.end_object();
}

void counts_json(JsonWriter& j, const store::MergeCounts& c) {
  j.key("added").value(c.added);
  j.key("updated").value(c.updated);
  j.key("skipped").value(c.skipped);
  j.key("conflicts").value(c.conflicts);
}

void write_json(std::ostream& out, const std::string& target, const store::MergeReport& rep) {
  JsonWriter j(out);
  j.begin_object();
  j.key("target").value(target);
  j.key("changed").value(rep.changed);
  j.key("sources").begin_array();
  for (const auto& s : rep.sources) {
    j.begin_object();
    j.key("path").value(s.path);
    j.key("file_uuid").value(s.file_uuid);
    j.key("name").value(s.name);
    counts_json(j, s.counts);
    j.key("audit_rows_added").value(s.audit_added);
    j.key("devices_added").value(s.devices_added);
    j.key("track_points_added").value(s.track_added);
    j.key("track_points_skipped").value(s.track_skipped);
    j.key("by_device").begin_array();
    for (const auto& [id, c] : s.by_device) {
      j.begin_object();
      j.key("device").value(id);
      j.key("name").value(name_or(rep.device_names, id, ""));
      counts_json(j, c);
      j.end_object();
    }
    j.end_array();
    j.key("by_person").begin_array();
    for (const auto& [id, c] : s.by_person) {
      j.begin_object();
      j.key("person").value(id.empty() ? std::optional<std::string>{} : id);
      j.key("name").value(id.empty() ? std::optional<std::string>{} : name_or(rep.person_names, id, ""));
      counts_json(j, c);
      j.end_object();
    }
    j.end_array();
    j.end_object();
  }
  j.end_array();
  j.key("conflicts").begin_array();
  for (const auto& c : rep.conflicts) conflict_json(j, c);
  j.end_array();
  j.key("clashes").begin_array();
  for (const auto& k : rep.clashes) {
    j.begin_object();
    j.key("table").value(k.table);
    j.key("column").value(k.column);
    j.key("code").value(k.code);
    j.key("station").value(k.scope.empty() ? std::optional<std::string>{} : k.scope);
    j.key("kept").value(k.kept);
    j.key("kept_device").value(k.kept_device);
    j.key("renamed").value(k.renamed);
    j.key("renamed_device").value(k.renamed_device);
    j.key("stored_as").value(k.stored_as);
    j.key("suggestion").value(k.suggestion);
    j.key("distance_m").value(k.distance_m);
    j.end_object();
  }
  j.end_array();
  j.key("warnings").array(rep.warnings);
  j.end_object();
  out << "\n";
}

int list_open(const std::string& file, bool json, std::ostream& out, std::ostream& err) {
  auto p = open_project(file, true, err);
  const auto conflicts = store::list_conflicts(p);
  if (json) {
    JsonWriter j(out);
    j.begin_object();
    j.key("file").value(file);
    j.key("conflicts").begin_array();
    for (const auto& c : conflicts) conflict_json(j, c);
    j.end_array();
    j.end_object();
    out << "\n";
    return 0;
  }
  out << plural(static_cast<int>(conflicts.size()), "open conflict", "open conflicts") << " in " << file << "\n";
  for (const auto& c : conflicts) conflict_text(out, c);
  return 0;
}

struct MergeArgs {
  std::vector<std::string> files;  // TARGET SOURCE...
  bool json = false, show_progress = false, quiet = false, conflicts = false;
};

int run(const MergeArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string>& args = a.files;
  const bool json = a.json;
  const bool show_progress = a.show_progress;
  const bool quiet = a.quiet;
  if (args.empty()) throw std::invalid_argument("expected TARGET and at least one SOURCE file");
  if (a.conflicts) {
    if (args.size() != 1) throw std::invalid_argument("--conflicts takes the project file only");
    return list_open(args[0], json, out, err);
  }
  if (args.size() < 2) throw std::invalid_argument("expected TARGET and at least one SOURCE file");
  const std::string target = args[0];
  const std::vector<std::string> sources(args.begin() + 1, args.end());

  store::MergeOptions o;
  if (const char* n = std::getenv("CAIRN_MERGE_FAIL_AFTER")) {
    char* end = nullptr;
    const long v = std::strtol(n, &end, 10);
    if (end == n || *end || v < 0) throw std::invalid_argument("CAIRN_MERGE_FAIL_AFTER must be a whole number");
    o.fail_after = v;
  }
  // One progress line per source (app/core/progress.h, as import, list, export
  // and report show theirs): past two seconds on a terminal or with --progress.
  std::optional<core::ProgressLine> line;
  std::string line_source;
  size_t line_done = 0, line_total = 0;
  o.progress = [&](const store::MergeProgress& m) {
    if (quiet) return;
    if (!line || m.source != line_source) {
      if (line) line->finish(line_done, line_total);
      line.emplace(err,
                   "merging " + std::filesystem::path(m.source).filename().string() + " (" +
                       std::to_string(m.source_index + 1) + "/" + std::to_string(m.sources) + ")",
                   show_progress);
      line_source = m.source;
    }
    line_done = m.done;
    line_total = m.total;
    line->update(m.done, m.total);
  };
  // The first evening there is no camp file yet: make one with the first
  // tablet's settings (a file of its own, with its own identity). It is built
  // under a temporary name beside TARGET and renamed into place once the merge
  // has committed, so that a merge killed on the way leaves no camp file at all
  // (formats/temp_files.h removes the temporary one, at once or at the next start).
  namespace fs = std::filesystem;
  std::error_code ec;
  std::unique_ptr<formats::TempPath> fresh;
  std::string into = target;
  if (!fs::exists(target, ec)) {
    for (const auto& s : sources)
      if (!fs::exists(s, ec)) throw std::runtime_error("no project file " + s);
    store::OpenOptions ro;
    ro.read_only = true;
    ro.backups = false;
    store::ProjectInfo info;
    try {
      info = store::Project::open(sources.front(), ro).info();
    } catch (const std::exception& e) {
      throw std::runtime_error(std::string(e.what()) + "; or make " + target + " first with 'cairn new'");
    }
    formats::remove_stale_temp_files(target);
    fresh = std::make_unique<formats::TempPath>(target);
    into = fresh->path();
    store::OpenOptions no_backups = cli_open_options(false);
    no_backups.backups = false;  // a new camp has no earlier state to keep
    store::Project::create(into, store::NewProject{info.name, info.utm_zone, info.north_default, info.declination},
                           no_backups);
  }
  store::MergeReport rep;
  {
    store::OpenOptions oo = cli_open_options(false);
    oo.backups = false;
    auto project = fresh ? store::Project::open(into, oo) : open_project(target, false, err);
    rep = store::merge_files(project, sources, o);
    if (line) line->finish(line_done, line_total);
  }  // closed: its -wal is checkpointed into the file
  if (fresh) {
    fs::rename(into, target, ec);
    if (ec) throw std::runtime_error("cannot name the new camp file " + target + ": " + ec.message());
    fresh->release();
    formats::sync_to_disk(fs::absolute(target).parent_path().string());
    err << "created " << target << " with the settings of " << sources.front() << "\n";
  }
  if (json)
    write_json(out, target, rep);
  else
    write_text(out, target, rep);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<MergeArgs>();
  positionals(app, "TARGET SOURCE...", a->files,
              "the camp file, then the tablets' project files to merge into it (with --conflicts: the camp file only)");
  flag(app, "--conflicts", a->conflicts, "list the open conflicts of TARGET instead of merging");
  flag(app, "--json", a->json, "print JSON");
  flag(app, "--progress", a->show_progress, "report progress on stderr");
  flag(app, "--quiet", a->quiet, "print nothing but errors");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"merge", "merge tablets' project files into a camp file by UUID (all or nothing); list conflicts",
                      define});

}  // namespace cairn::cli
