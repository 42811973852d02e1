#include "app/core/photo_import.h"

#include <algorithm>
#include <filesystem>
#include <map>
#include <set>

#include "formats/limits.h"
#include "formats/sha256.h"
#include "storage/repository.h"

namespace cairn::core {

namespace fs = std::filesystem;

namespace {

bool is_jpeg_name(const fs::path& f) {
  std::string e = f.extension().string();
  std::transform(e.begin(), e.end(), e.begin(), [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  return e == ".jpg" || e == ".jpeg";
}

// JPEG files below DIR (no links followed), sorted; fails beyond the limits.
Result<std::vector<fs::path>> list_jpegs(const fs::path& dir) {
  using R = Result<std::vector<fs::path>>;
  std::vector<fs::path> out;
  std::error_code ec;
  fs::recursive_directory_iterator it(dir, fs::directory_options::none, ec), end;
  if (ec) return R::failure("cannot read the folder " + dir.string() + ": " + ec.message());
  for (; it != end; it.increment(ec)) {
    if (ec) return R::failure("cannot read the folder " + dir.string() + ": " + ec.message());
    if (it->is_symlink(ec)) {
      if (it->is_directory(ec)) it.disable_recursion_pending();
      continue;
    }
    if (it->is_directory(ec)) {
      if (it.depth() + 1 >= kMaxPhotoDepth) it.disable_recursion_pending();
      continue;
    }
    if (!it->is_regular_file(ec) || !is_jpeg_name(it->path())) continue;
    out.push_back(it->path());
    if (out.size() > kMaxPhotoFiles)
      return R::failure(dir.string() + " holds more than " + std::to_string(kMaxPhotoFiles) +
                        " JPEG files; give a folder of one day's photos");
  }
  std::sort(out.begin(), out.end());
  return out;
}

// The person whose photos these are (see plan_photos).
Result<std::pair<std::string, std::string>> whose(store::Project& p, const std::string& initials) {
  using R = Result<std::pair<std::string, std::string>>;
  if (!initials.empty()) {
    const auto who = store::find_person(p, initials);
    if (!who) {
      std::string names;
      for (const auto& q : store::list_people(p)) names += (names.empty() ? "" : ", ") + q.initials;
      return R::failure("no person '" + initials + "' in the project (people: " + (names.empty() ? "none" : names) +
                        ")");
    }
    return std::make_pair(who->meta.uuid, who->initials);
  }
  std::set<std::string> mine, all;
  for (const auto& s : store::list_stations(p)) {
    if (s.observer.empty()) continue;
    all.insert(s.observer);
    if (s.meta.device == p.device()) mine.insert(s.observer);
  }
  const std::set<std::string>& pick = mine.size() == 1 ? mine : all;
  if (pick.empty()) return std::make_pair(std::string(), std::string());
  if (pick.size() > 1) {
    std::set<std::string> initials;  // sorted by initials, so the message is the same every time
    for (const auto& u : pick) {
      const auto q = store::get_person(p, u);
      initials.insert(q ? q->initials : u);
    }
    std::string names;
    for (const auto& i : initials) names += (names.empty() ? "" : ", ") + i;
    return R::failure("the stations are by several people (" + names +
                      "): say whose photos these are with --person INITIALS");
  }
  const auto q = store::get_person(p, *pick.begin());
  return std::make_pair(*pick.begin(), q ? q->initials : std::string());
}

}  // namespace

std::string_view to_string(PhotoStatus s) {
  switch (s) {
    case PhotoStatus::Match: return "match";
    case PhotoStatus::Unmatched: return "unmatched";
    case PhotoStatus::Recorded: return "recorded";
    case PhotoStatus::Unreadable: return "unreadable";
  }
  return "";
}

int PhotoPlan::count(PhotoStatus s) const {
  return static_cast<int>(std::count_if(photos.begin(), photos.end(), [&](const auto& x) { return x.status == s; }));
}

Result<PhotoPlan> plan_photos(store::Project& p, const std::string& folder, const PhotoPlanOptions& o) {
  using R = Result<PhotoPlan>;
  PhotoPlan plan;
  plan.folder = folder;
  std::error_code ec;
  const fs::path base = fs::weakly_canonical(fs::absolute(p.path()).parent_path(), ec);
  const fs::path dir = fs::weakly_canonical(fs::absolute(folder), ec);
  if (ec || !fs::is_directory(dir)) return R::failure(folder + " is not a folder");
  const fs::path rel_dir = dir.lexically_relative(base);
  if (rel_dir.empty() || *rel_dir.begin() == "..")
    return R::failure(folder + " is not inside the project's folder " + base.string() +
                      ": copy the photos into a folder beside the project file (photos are recorded by their path "
                      "relative to it)");

  // The camera's clock offset.
  if (o.clock_offset && !o.clock_photo.empty()) return R::failure("give a clock offset or a clock photo, not both");
  if (o.clock_offset) {
    plan.clock_offset = *o.clock_offset;
    plan.clock_note = "given";
  } else if (!o.clock_photo.empty()) {
    const auto bytes = formats::read_file_limited(o.clock_photo, formats::kMaxPhotoBytes);
    if (!bytes) return R::failure(bytes.error());
    const auto exif = formats::read_exif(*bytes, o.clock_photo);
    if (!exif) return R::failure(exif.error());
    const auto off = clock_offset_from(exif->time, o.shown);
    if (!off) return R::failure(o.clock_photo + ": " + off.error());
    plan.clock_offset = *off;
    plan.clock_note = "from " + o.clock_photo + ": the clock showed " + o.shown + ", the camera wrote " + exif->time;
  }
  const auto person = whose(p, o.person);
  if (!person) return R::failure(person.error());
  plan.person_uuid = person->first;
  plan.person_initials = person->second;

  plan.rules.clock_offset = plan.clock_offset;
  plan.rules.person = plan.person_uuid;
  if (o.max_gap) plan.rules.max_gap = *o.max_gap;
  if (o.lead) plan.rules.lead = *o.lead;
  if (o.max_distance) plan.rules.max_distance = *o.max_distance;

  const auto files = list_jpegs(dir);
  if (!files) return R::failure(files.error());
  const fs::path clock = o.clock_photo.empty() ? fs::path() : fs::weakly_canonical(fs::absolute(o.clock_photo), ec);
  std::vector<MatchPhoto> to_match;
  std::vector<size_t> index;
  for (const auto& f : *files) {
    if (!clock.empty() && f == clock) continue;  // the picture of the clock is not a photo of the outcrop
    PlannedPhoto pp;
    pp.path = f.lexically_relative(base).generic_string();
    const auto bytes = formats::read_file_limited(f.string(), formats::kMaxPhotoBytes);
    auto exif = bytes ? formats::read_exif(*bytes, pp.path) : Result<formats::PhotoExif>::failure(bytes.error());
    if (!exif) {
      pp.status = PhotoStatus::Unreadable;
      pp.match.reason = exif.error();
      plan.photos.push_back(pp);
      continue;
    }
    pp.exif = *exif;
    pp.sha256 = formats::sha256_hex(*bytes);
    if (const auto had = store::find_photo_by_sha256(p, pp.sha256)) {
      pp.status = PhotoStatus::Recorded;
      pp.recorded_as = had->path;
    }
    index.push_back(plan.photos.size());
    to_match.push_back({pp.path, pp.exif.time, pp.exif.lat, pp.exif.lon});
    plan.photos.push_back(pp);
  }

  std::vector<MatchStation> stations;
  for (const auto& s : store::list_stations(p))
    stations.push_back({s.meta.uuid, s.code, s.observer, s.lat, s.lon, s.time});
  const auto matches = match_photos(stations, to_match, plan.rules);
  for (size_t i = 0; i < matches.size(); ++i) {
    PlannedPhoto& pp = plan.photos[index[i]];
    pp.match = matches[i];
    if (pp.status != PhotoStatus::Recorded)
      pp.status = matches[i].station.empty() ? PhotoStatus::Unmatched : PhotoStatus::Match;
  }
  return plan;
}

store::PhotoBatch record_photos(store::Project& p, const PhotoPlan& plan) {
  std::vector<store::Photo> batch;
  for (const auto& pp : plan.photos) {
    if (pp.status != PhotoStatus::Match) continue;
    store::Photo ph;
    ph.station = pp.match.station;
    ph.path = pp.path;
    ph.sha256 = pp.sha256;
    ph.time = pp.match.time;
    batch.push_back(ph);
  }
  return store::add_photos(p, batch);
}

}  // namespace cairn::core
