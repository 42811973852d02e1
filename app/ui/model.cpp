#include "app/ui/model.h"

#include "storage/pick_lists.h"

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <fmt/format.h>
#include <future>
#include <utility>

#include "app/cli/magnetic_source.h"
#include "app/ui/retire.h"
#include "formats/ids.h"
#include "storage/each.h"
#include "storage/repository.h"

namespace cairn::ui {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {
template <class T>
void index_by_uuid(const std::vector<T>& v, std::unordered_map<std::string, size_t>& ix) {
  ix.clear();
  ix.reserve(v.size());
  for (size_t i = 0; i < v.size(); ++i) ix[v[i].meta.uuid] = i;
}

template <class T>
void index_by_station(const std::vector<T>& v, std::unordered_map<std::string, std::vector<size_t>>& ix) {
  ix.clear();
  for (size_t i = 0; i < v.size(); ++i) ix[v[i].station].push_back(i);
}

template <class T>
const T* lookup(const std::vector<T>& v, const std::unordered_map<std::string, size_t>& ix, const std::string& k) {
  auto it = ix.find(k);
  return it == ix.end() ? nullptr : &v[it->second];
}

template <class T>
std::vector<const T*> at_station(const std::vector<T>& v,
                                 const std::unordered_map<std::string, std::vector<size_t>>& ix,
                                 const std::string& station) {
  std::vector<const T*> out;
  auto it = ix.find(station);
  if (it != ix.end())
    for (size_t i : it->second) out.push_back(&v[i]);
  return out;
}

// Number at the end of a code ("S12" -> 12), or -1.
long trailing_number(const std::string& s) {
  size_t i = s.size();
  while (i > 0 && s[i - 1] >= '0' && s[i - 1] <= '9') --i;
  if (i == s.size() || s.size() - i > 9) return -1;
  return std::strtol(s.c_str() + i, nullptr, 10);
}
}  // namespace

void Records::read_small(store::Project& p) {
  info = p.info();
  units = store::list_units(p);
  contacts = store::list_contacts(p);
  people = store::list_people(p);
  photos = store::list_photos(p);
  reviews = store::list_flag_reviews(p);
  signoffs = store::list_signoffs(p);
  try {
    structures = store::pick_list(p, store::PickList::Structure);
    lithologies = store::pick_list(p, store::PickList::Lithology);
  } catch (const std::exception&) {
    structures.clear();  // a file from before pick-lists, opened read-only
    lithologies.clear();
  }
}

std::shared_ptr<const Records> Records::read(store::Project& p,
                                             const std::function<void(float, const std::string&)>& progress) {
  auto tell = [&](float f, const char* what) {
    if (progress) progress(f, what);
  };
  auto r = std::make_shared<Records>();
  r->read_small(p);
  tell(0.05f, "reading stations");
  r->stations = store::list_stations(p);
  tell(0.15f, "reading planar readings");
  r->planes = store::list_planes(p);
  tell(0.6f, "reading linear readings");
  r->lines = store::list_lines(p);
  tell(0.65f, "reading contact points");
  r->points = store::list_points(p);
  tell(0.9f, "indexing");
  r->index();
  return r;
}

std::shared_ptr<const Records> Records::read_first(store::Project& p,
                                                   std::function<std::unordered_map<std::string, size_t>()> counts) {
  auto r = std::make_shared<Records>();
  std::future<std::unordered_map<std::string, size_t>> counting;
  if (counts) counting = std::async(std::launch::async, std::move(counts));
  r->read_small(p);
  r->stations = store::list_stations(p);
  r->counted_ = counting.valid() ? counting.get() : store::readings_per_station(p);
  r->complete = false;
  r->index();
  return r;
}

void Records::index() {
  index_by_uuid(stations, station_ix_);
  index_by_uuid(units, unit_ix_);
  index_by_uuid(contacts, contact_ix_);
  index_by_uuid(people, person_ix_);
  index_by_uuid(planes, plane_ix_);
  index_by_station(planes, planes_at_);
  index_by_station(lines, lines_at_);
  index_by_station(photos, photos_at_);
}

const store::Station* Records::station(const std::string& u) const { return lookup(stations, station_ix_, u); }
const store::Unit* Records::unit(const std::string& u) const { return lookup(units, unit_ix_, u); }
const store::Contact* Records::contact(const std::string& u) const { return lookup(contacts, contact_ix_, u); }
const store::Person* Records::person(const std::string& u) const { return lookup(people, person_ix_, u); }
const store::PlanarReading* Records::plane(const std::string& u) const { return lookup(planes, plane_ix_, u); }

std::vector<const store::PlanarReading*> Records::planes_of(const std::string& s) const {
  return at_station(planes, planes_at_, s);
}
std::vector<const store::LinearReading*> Records::lines_of(const std::string& s) const {
  return at_station(lines, lines_at_, s);
}
std::vector<const store::Photo*> Records::photos_of(const std::string& s) const {
  return at_station(photos, photos_at_, s);
}

size_t Records::readings_at(const std::string& s) const {
  if (!complete) {
    auto c = counted_.find(s);
    return c == counted_.end() ? 0 : c->second;
  }
  auto p = planes_at_.find(s);
  auto l = lines_at_.find(s);
  return (p == planes_at_.end() ? 0 : p->second.size()) + (l == lines_at_.end() ? 0 : l->second.size());
}

bool build_in_frame() {
  static const bool in_frame = [] {
    const char* v = std::getenv("CAIRN_BUILD_IN_FRAME");
    return v && std::string(v) == "1";
  }();
  return in_frame;
}

Model::Model(store::Project p, std::shared_ptr<const Records> r, bool checking)
    : project_(std::move(p)), checking_(checking) {
  path_ = project_.path();
  took(std::move(r));
}

void Model::checked(store::Project p) {
  project_ = std::move(p);
  checking_ = false;
}

void Model::changed() {
  stale_ = true;
  ++changes_;
}

void Model::refreshed(std::shared_ptr<const Records> r, std::uint64_t changes) {
  if (changes != changes_) return;  // read before the last change: the loader reads again
  took(std::move(r));
  stale_ = false;
}

void Model::completed(std::shared_ptr<const Records> r, std::uint64_t rev) {
  if (rev == revision_ && !rec_->complete) retire(std::exchange(rec_, std::move(r)));
}

void Model::took(std::shared_ptr<const Records> r) {
  // The records replaced (a season's, 100 000 stations) are freed off the UI thread.
  retire(std::exchange(rec_, std::move(r)));
  // Revisions are unique across every project opened in this session, so that
  // caches keyed by a revision never mistake one project for another.
  static std::uint64_t last = 0;
  revision_ = ++last;
}

std::string Model::day_of(const store::Station& s) {
  if (s.time.size() >= 10) return s.time.substr(0, 10);
  return s.meta.created.substr(0, 10);
}

std::string Model::next_station_code(const std::string& person) const {
  if (codes_revision_ != revision_) {
    next_codes_.clear();
    codes_revision_ = revision_;
  }
  if (auto it = next_codes_.find(person); it != next_codes_.end()) return it->second;
  return next_codes_[person] = first_free_code(person);
}

std::string Model::first_free_code(const std::string& person) const {
  // Continue the newest code of this person (else of anyone): "BK-22" -> "BK-23".
  const store::Station* last = nullptr;
  for (const auto& s : rec_->stations)
    if (person.empty() || s.observer == person) last = &s;
  if (!last && !rec_->stations.empty()) last = &rec_->stations.back();
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
  for (const auto& s : rec_->stations)
    if (s.code.compare(0, prefix.size(), prefix) == 0) best = std::max(best, trailing_number(s.code));
  for (long n = best + 1;; ++n) {
    std::string num = std::to_string(n);
    if (num.size() < width) num.insert(0, width - num.size(), '0');
    const std::string c = prefix + num;
    if (std::none_of(rec_->stations.begin(), rec_->stations.end(),
                     [&](const store::Station& s) { return s.code == c; }))
      return c;
  }
}

std::string Model::next_ref(const std::string& station, bool linear) const {
  long best = 0;
  if (linear) {
    for (const auto* l : rec_->lines_of(station)) best = std::max(best, trailing_number(l->ref));
  } else {
    for (const auto* p : rec_->planes_of(station)) best = std::max(best, trailing_number(p->ref));
  }
  return std::string(linear ? "L" : "P") + std::to_string(best + 1);
}

bool Model::act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error) {
  return act_custom(label, f, nullptr, error);
}

bool Model::act_custom(const std::string& label, const std::function<void(store::Project&)>& f,
                       std::function<void(store::Project&)> undo, std::string* error) {
  // The controls that write are off meanwhile (writable()).
  if (checking_ || stale_) {
    if (error)
      *error = checking_ ? path_ + " is still being checked; it can be changed in a moment"
                         : "The last change is still being read back; try again in a moment";
    return false;
  }
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
  changed();
  return true;
}

bool Model::undo(std::string* error) {
  if (!last_) return false;
  if (stale_ || checking_) {
    if (error) *error = "The last change is still being read back; undo in a moment";
    return false;
  }
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
  changed();
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

store::Project open_for_worker(const std::string& path) {
  store::OpenOptions oo;
  oo.read_only = true;
  oo.backups = false;
  oo.integrity_checked = true;
  return store::Project::open(path, oo);
}

CheckResult run_check_on_file(const std::string& path, std::uint64_t revision,
                              const std::function<void(float, const std::string&)>& progress) {
  CheckResult r;
  r.revision = revision;
  try {
    progress(0.05f, "opening the project");
    store::Project p = open_for_worker(path);
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
