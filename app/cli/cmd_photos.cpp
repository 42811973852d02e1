// `cairn photos FILE FOLDER`: matches the JPEG photos in FOLDER to the stations
// of FILE by their EXIF time (corrected by the camera's clock offset) and GPS
// position (rules in app/core/photo_match.h), lists what it would record, and
// with --yes (or a "y" typed at the prompt) records the photo references
// (path relative to the project file, SHA-256, corrected time) in one audited
// transaction. Photos without a match are listed with the reason, never
// guessed; photos whose content is already recorded are skipped.
#include <fmt/format.h>
#include <unistd.h>

#include <iostream>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "app/core/photo_import.h"
#include "formats/json.h"
#include "formats/utf8.h"

namespace cairn::cli {
namespace {

struct PhotosArgs {
  std::string file, folder;
  std::optional<std::string> clock_offset, clock_photo, shown, person;
  std::optional<double> max_gap, max_distance;
  bool yes = false, json = false;
};

std::string signed_duration(double s) { return (s < 0 ? "-" : "+") + core::duration_text(s); }

void print_plan(const core::PhotoPlan& plan, std::ostream& out) {
  using formats::terminal_safe;
  out << "photos in " << terminal_safe(plan.folder) << ": " << plan.photos.size() << " JPEG files";
  out << ", stations of " << (plan.person_initials.empty() ? "every person" : terminal_safe(plan.person_initials));
  out << ", camera clock offset " << core::clock_offset_text(plan.clock_offset);
  if (!plan.clock_note.empty()) out << " (" << terminal_safe(plan.clock_note) << ")";
  out << "\n";
  for (const auto& p : plan.photos) {
    out << "  " << terminal_safe(p.path);
    switch (p.status) {
      case core::PhotoStatus::Recorded:
        out << ": already recorded (same SHA-256) as " << terminal_safe(p.recorded_as);
        break;
      case core::PhotoStatus::Match:
        out << " -> " << terminal_safe(p.match.code.empty() ? "?" : p.match.code);
        out << ", " << (p.match.distance ? fmt::format("{:.0f} m", *p.match.distance) : std::string("no GPS position"));
        out << ", " << signed_duration(p.match.seconds_after) << " from the station's time";
        break;
      case core::PhotoStatus::Unmatched: out << ": not matched: " << terminal_safe(p.match.reason); break;
      case core::PhotoStatus::Unreadable: out << ": not read: " << terminal_safe(p.match.reason); break;
    }
    out << "\n";
    for (const auto& n : p.exif.notes) out << "      EXIF " << terminal_safe(n) << "\n";
  }
  out << plan.count(core::PhotoStatus::Match) << " to record, " << plan.count(core::PhotoStatus::Unmatched)
      << " not matched, " << plan.count(core::PhotoStatus::Recorded) << " already recorded, "
      << plan.count(core::PhotoStatus::Unreadable) << " not read\n";
}

void json_plan(const core::PhotoPlan& plan, const std::string& file, int recorded, std::ostream& out) {
  formats::JsonWriter j(out);
  j.begin_object();
  j.key("file").value(file);
  j.key("folder").value(plan.folder);
  j.key("person").value(plan.person_initials);
  j.key("clock_offset").value(core::clock_offset_text(plan.clock_offset));
  j.key("clock_offset_source").value(plan.clock_note);
  j.key("photos").begin_array();
  for (const auto& p : plan.photos) {
    j.begin_object();
    j.key("path").value(p.path);
    j.key("status").value(core::to_string(p.status));
    j.key("sha256").value(p.sha256);
    j.key("exif_time").value(p.exif.time);
    j.key("time").value(p.match.time);
    j.key("lat").value(p.exif.lat);
    j.key("lon").value(p.exif.lon);
    j.key("station").value(p.match.code);
    j.key("distance_m").value(p.match.distance);
    j.key("seconds_after").value(p.match.station.empty() ? std::optional<double>() : p.match.seconds_after);
    j.key("reason").value(p.match.reason);
    j.key("exif_notes").array(p.exif.notes);
    j.end_object();
  }
  j.end_array();
  j.key("recorded").value(recorded);
  j.end_object();
  out << "\n";
}

int run(const PhotosArgs& a, std::ostream& out, std::ostream& err) {
  core::PhotoPlanOptions o;
  if (a.clock_offset) {
    const auto off = core::parse_clock_offset(*a.clock_offset);
    if (!off) throw std::invalid_argument("--clock-offset: " + off.error());
    o.clock_offset = *off;
  }
  if (a.clock_photo.has_value() != a.shown.has_value())
    throw std::invalid_argument("--clock-photo and --shown go together: the photo of the clock and the time it showed");
  if (a.clock_offset && a.clock_photo) throw std::invalid_argument("give --clock-offset or --clock-photo, not both");
  o.clock_photo = a.clock_photo.value_or("");
  o.shown = a.shown.value_or("");
  o.person = a.person.value_or("");
  if (a.max_gap) o.max_gap = std::chrono::seconds(static_cast<long long>(*a.max_gap * 60));
  o.max_distance = a.max_distance;

  auto project = open_project(a.file, !a.yes && a.json, err);
  const auto plan = core::plan_photos(project, a.folder, o);
  if (!plan) {
    err << "cairn photos: " << formats::terminal_safe(plan.error()) << "; nothing recorded\n";
    return 1;
  }
  const int n = plan->count(core::PhotoStatus::Match);
  bool go = a.yes;
  if (!a.json) print_plan(*plan, out);
  if (!go && !a.json && n > 0 && isatty(STDIN_FILENO) && isatty(STDOUT_FILENO)) {
    out << "Record " << n << " photo reference(s) in " << formats::terminal_safe(a.file) << "? [y/N] " << std::flush;
    std::string answer;
    std::getline(std::cin, answer);
    go = answer == "y" || answer == "Y" || answer == "yes";
  }
  int recorded = 0;
  if (go && n > 0) {
    if (project.read_only()) return 1;
    const auto batch = core::record_photos(project, *plan);
    recorded = batch.added;
    if (!a.json) out << "recorded " << recorded << " photo reference(s) in one transaction, each in the audit trail\n";
  } else if (!a.json && n > 0) {
    out << "nothing recorded: run again with --yes to record the " << n << " matched photo reference(s)\n";
  }
  if (a.json) json_plan(*plan, a.file, recorded, out);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<PhotosArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "FOLDER", a->folder, "a folder of JPEG photos inside the project's folder");
  option(app, "--clock-offset", a->clock_offset,
         "the camera clock's error to add to each photo's time, +hh:mm:ss or -hh:mm:ss");
  option(app, "--clock-photo", a->clock_photo, "a photo of the tablet's clock (with --shown)");
  option(app, "--shown", a->shown, "the time the clock in --clock-photo showed, e.g. 2026-07-14T10:32:05");
  option(app, "--person", a->person, "initials of the person who took the photos (default: the device's person)");
  number(app, "--max-gap", a->max_gap, 1, 24 * 60, "minutes a station's time window lasts at most (default 60)");
  number(app, "--max-distance", a->max_distance, 1, 100000,
         "metres a photo's GPS position may lie from its station (default 250)");
  flag(app, "--yes", a->yes, "record the matched photos without asking");
  flag(app, "--json", a->json, "print the plan (and what was recorded) as JSON");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{
    "photos", "match a folder of photos to their stations by EXIF time and GPS position, and record them", define});

}  // namespace cairn::cli
