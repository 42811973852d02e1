#include "app/ui/model.h"

#include "storage/pick_lists.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <fmt/format.h>

#include "app/cli/magnetic_source.h"
#include "formats/ids.h"
#include "storage/repository.h"

namespace cairn::ui {

using namespace cairn::formats;  // file formats and value rules (formats/)

Model::Model(store::Project p) : project_(std::move(p)) {
  path_ = project_.path();
  reload();
}

namespace {
template <class T>
void index_by_uuid(const std::vector<T>& v, std::unordered_map<std::string, size_t>& ix) {
  ix.clear();
  ix.reserve(v.size());
  for (size_t i = 0; i < v.size(); ++i) ix[v[i].meta.uuid] = i;
}

template <class T>
const T* lookup(const std::vector<T>& v, const std::unordered_map<std::string, size_t>& ix, const std::string& k) {
  auto it = ix.find(k);
  return it == ix.end() ? nullptr : &v[it->second];
}

// Number at the end of a code ("S12" -> 12), or -1.
long trailing_number(const std::string& s) {
  size_t i = s.size();
  while (i > 0 && s[i - 1] >= '0' && s[i - 1] <= '9') --i;
  if (i == s.size() || s.size() - i > 9) return -1;
  return std::strtol(s.c_str() + i, nullptr, 10);
}
}  // namespace

void Model::reload() {
  info_ = project_.info();
  stations_ = store::list_stations(project_);
  planes_ = store::list_planes(project_);
  lines_ = store::list_lines(project_);
  units_ = store::list_units(project_);
  contacts_ = store::list_contacts(project_);
  people_ = store::list_people(project_);
  points_ = store::list_points(project_);
  photos_ = store::list_photos(project_);
  reviews_ = store::list_flag_reviews(project_);
  signoffs_ = store::list_signoffs(project_);
  try {
    structures_ = store::pick_list(project_, store::PickList::Structure);
    lithologies_ = store::pick_list(project_, store::PickList::Lithology);
  } catch (const std::exception&) {
    structures_.clear();  // a file from before pick-lists, opened read-only
    lithologies_.clear();
  }
  index_by_uuid(stations_, station_ix_);
  index_by_uuid(units_, unit_ix_);
  index_by_uuid(contacts_, contact_ix_);
  index_by_uuid(people_, person_ix_);
  index_by_uuid(planes_, plane_ix_);
  // Revisions are unique across every project opened in this session, so that
  // caches keyed by a revision never mistake one project for another.
  static std::uint64_t last = 0;
  revision_ = ++last;
}

const store::Station* Model::station(const std::string& u) const { return lookup(stations_, station_ix_, u); }
const store::Unit* Model::unit(const std::string& u) const { return lookup(units_, unit_ix_, u); }
const store::Contact* Model::contact(const std::string& u) const { return lookup(contacts_, contact_ix_, u); }
const store::Person* Model::person(const std::string& u) const { return lookup(people_, person_ix_, u); }
const store::PlanarReading* Model::plane(const std::string& u) const { return lookup(planes_, plane_ix_, u); }

std::vector<const store::PlanarReading*> Model::planes_of(const std::string& station) const {
  std::vector<const store::PlanarReading*> v;
  for (const auto& p : planes_)
    if (p.station == station) v.push_back(&p);
  return v;
}

std::vector<const store::LinearReading*> Model::lines_of(const std::string& station) const {
  std::vector<const store::LinearReading*> v;
  for (const auto& l : lines_)
    if (l.station == station) v.push_back(&l);
  return v;
}

std::vector<const store::Photo*> Model::photos_of(const std::string& station) const {
  std::vector<const store::Photo*> v;
  for (const auto& p : photos_)
    if (p.station == station) v.push_back(&p);
  return v;
}

std::string Model::day_of(const store::Station& s) {
  if (s.time.size() >= 10) return s.time.substr(0, 10);
  return s.meta.created.substr(0, 10);
}

std::string Model::next_station_code(const std::string& person) const {
  // Continue the newest code of this person (else of anyone): "BK-22" -> "BK-23".
  const store::Station* last = nullptr;
  for (const auto& s : stations_)
    if (person.empty() || s.observer == person) last = &s;
  if (!last && !stations_.empty()) last = &stations_.back();
  std::string prefix = "S";
  size_t width = 1;
  if (last) {
    size_t i = last->code.size();
    while (i > 0 && last->code[i - 1] >= '0' && last->code[i - 1] <= '9') --i;
    if (i < last->code.size()) {
      prefix = last->code.substr(0, i);
      width = last->code.size() - i;
    }
  }
  long best = 0;
  for (const auto& s : stations_)
    if (s.code.compare(0, prefix.size(), prefix) == 0) best = std::max(best, trailing_number(s.code));
  for (long n = best + 1;; ++n) {
    std::string num = std::to_string(n);
    if (num.size() < width) num.insert(0, width - num.size(), '0');
    const std::string c = prefix + num;
    if (std::none_of(stations_.begin(), stations_.end(), [&](const store::Station& s) { return s.code == c; }))
      return c;
  }
}

std::string Model::next_ref(const std::string& station, bool linear) const {
  long best = 0;
  if (linear) {
    for (const auto& l : lines_)
      if (l.station == station) best = std::max(best, trailing_number(l.ref));
  } else {
    for (const auto& p : planes_)
      if (p.station == station) best = std::max(best, trailing_number(p.ref));
  }
  return std::string(linear ? "L" : "P") + std::to_string(best + 1);
}

bool Model::act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error) {
  return act_custom(label, f, nullptr, error);
}

bool Model::act_custom(const std::string& label, const std::function<void(store::Project&)>& f,
                       std::function<void(store::Project&)> undo, std::string* error) {
  const std::string since = formats::utc_now();
  try {
    f(project_);
  } catch (const std::exception& e) {
    if (error) *error = e.what();
    return false;
  }
  LastAction a;
  a.label = label;
  a.custom = std::move(undo);
  // The audit rows this device wrote since the action began are what undo reverses.
  store::AuditQuery q;
  q.since = since;
  q.device = project_.device();
  a.audited = store::audit_log(project_, q);
  last_ = std::move(a);
  reload();
  return true;
}

bool Model::undo(std::string* error) {
  if (!last_) return false;
  try {
    project_.write([&] {
      if (last_->custom) last_->custom(project_);
      for (auto it = last_->audited.rbegin(); it != last_->audited.rend(); ++it) store::undo(project_, *it);
    });
  } catch (const std::exception& e) {
    if (error) *error = std::string("could not undo: ") + e.what();
    return false;
  }
  last_.reset();
  reload();
  return true;
}

const geo::ContactFit* Model::fit_of(const std::string& contact_uuid) const {
  if (!check_) return nullptr;
  for (const auto& f : check_->report.fits)
    if (f.contact_id == contact_uuid && f.usable && f.fit && f.plane) return &f;
  return nullptr;
}

core::LocalDeclination wmm_local_declination(int* outside) { return cli::wmm_declination(nullptr, outside); }

std::string validity_warning(int outside) {
  const std::string w = cli::outside_validity_warning(outside);
  return w.empty() ? w : w + ".";
}

CheckResult run_check_on_file(const std::string& path, std::uint64_t revision,
                              const std::function<void(float, const std::string&)>& progress) {
  CheckResult r;
  r.revision = revision;
  try {
    progress(0.05f, "opening the project");
    store::OpenOptions oo;
    oo.read_only = true;
    oo.backups = false;
    store::Project p = store::Project::open(path, oo);
    progress(0.2f, "loading records");
    int outside = 0;
    r.data = core::load_check_input(p, wmm_local_declination(&outside));
    r.warning = validity_warning(outside);
    progress(0.45f, "fitting contacts and comparing readings");
    geo::CheckOptions o;
    // The project's settings, as `cairn check` uses them.
    const store::ProjectInfo info = p.info();
    o.nearby_radius = info.nearby_radius;
    o.friction_angle = info.friction_angle;
    o.sliding_window = info.sliding_window;
    o.toppling_window = info.toppling_window;
    r.report = geo::run_crosscheck(r.data.input, o);
    progress(1.0f, "done");
  } catch (const std::exception& e) {
    r.error = e.what();
  }
  return r;
}

}  // namespace cairn::ui
