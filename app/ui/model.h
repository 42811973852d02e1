// The open project as the UI sees it: the live records, read once after each
// change (not every frame), the newest cross-check result, and the actions
// the user confirms, each saved at once and the last one undoable.
//
// Every change goes through act(); it bumps revision() (unique in the session,
// across projects), which is the key the screens cache derived data (nets,
// plans, groupings) under.
#pragma once
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <unordered_map>
#include <vector>

#include "geomath/crosscheck.h"
#include "app/core/check_input.h"
#include "storage/project.h"
#include "storage/records.h"
#include "storage/reviews.h"

namespace cairn::ui {

// One run of the cross-check engine over a revision of the project.
struct CheckResult {
  std::uint64_t revision = 0;
  core::CheckData data;
  geo::CheckReport report;
  std::string error;  // when the check could not run
  // The magnetic model's validity warning (as `cairn check` prints it), or "".
  std::string warning;
};

// What undo would reverse.
struct LastAction {
  std::string label;
  std::vector<store::AuditEntry> audited;       // audit rows written by the action
  std::function<void(store::Project&)> custom;  // for changes outside the audit trail (reviews)
};

// The live records of one revision of the project, read at once and never
// changed after: screens that build on a worker thread (background.h) hold a
// shared pointer to it while the UI goes on, and a change makes a new one.
struct Records {
  store::ProjectInfo info;
  // In storage's order (stations sorted by time, then code).
  std::vector<store::Station> stations;
  std::vector<store::PlanarReading> planes;
  std::vector<store::LinearReading> lines;
  std::vector<store::Unit> units;
  std::vector<store::Contact> contacts;
  std::vector<store::Person> people;
  std::vector<store::ContactPoint> points;
  std::vector<store::Photo> photos;
  std::vector<store::FlagReview> reviews;
  std::vector<store::DaySignoff> signoffs;
  // The project's structure-kind and lithology pick-lists (storage/pick_lists.h; empty: not restricted).
  std::vector<std::string> structures, lithologies;

  // False while only the first part is read (read_first): the readings and
  // contact points are still to come; stations know how many readings they have.
  bool complete = true;

  // Reads every live record of `p`; `progress(fraction, what)` is told as it goes.
  static std::shared_ptr<const Records> read(store::Project& p,
                                             const std::function<void(float, const std::string&)>& progress = {});
  // The first part, for the first screen: everything but the planar and linear
  // readings and the contact points, which are counted per station instead (a
  // season's 500 000 of them take seconds to read).
  // `counts`, when given, counts the readings per station through a connection
  // of its own (storage's readings_per_station) while this one reads the
  // stations: on a season the count takes as long as the stations (0.45 s),
  // and the two cores are otherwise idle while the first screen waits. (Two
  // read transactions may see different states of a file another program
  // writes meanwhile; the counts are shown only until the readings arrive.)
  static std::shared_ptr<const Records> read_first(
      store::Project& p, std::function<std::unordered_map<std::string, size_t>()> counts = nullptr);

  const store::Station* station(const std::string& uuid) const;
  const store::Unit* unit(const std::string& uuid) const;
  const store::Contact* contact(const std::string& uuid) const;
  const store::Person* person(const std::string& uuid) const;
  const store::PlanarReading* plane(const std::string& uuid) const;
  // A station's readings and photos, in storage's order.
  std::vector<const store::PlanarReading*> planes_of(const std::string& station) const;
  std::vector<const store::LinearReading*> lines_of(const std::string& station) const;
  std::vector<const store::Photo*> photos_of(const std::string& station) const;
  // How many planar and linear readings a station has.
  size_t readings_at(const std::string& station) const;

 private:
  void read_small(store::Project& p);  // the tables of a few rows
  void index();
  std::unordered_map<std::string, size_t> counted_;  // readings per station, while not complete
  std::unordered_map<std::string, size_t> station_ix_, unit_ix_, contact_ix_, person_ix_, plane_ix_;
  std::unordered_map<std::string, std::vector<size_t>> planes_at_, lines_at_, photos_at_;
};

// Whether the screens build what they derive in the frame that needs it, with
// their pictures through OpenGL, rather than on a worker with pictures drawn
// in pixels there (background.h, soft_raster.h). Only when the environment
// variable CAIRN_BUILD_IN_FRAME is 1: the tests use it for the reference
// rendering. Otherwise no frame waits for a build: a season's 600 000 records
// took seconds per build on the UI thread, and even the demo's Plan with its
// terrain took 70 ms.
bool build_in_frame();

class Model {
 public:
  // A project and its records, read on the opening worker (App::open_project).
  // `checking`: `p` is a read-only connection that showed the records while
  // the file's integrity check runs on another; nothing can be written until
  // checked() hands over the checked connection.
  Model(store::Project p, std::shared_ptr<const Records> r, bool checking = false);

  // Whether the file's integrity check is still running (see the constructor).
  bool checking() const { return checking_; }
  // The connection the opening's check gave (writable, or read-only with its
  // problem() when the file failed the check): the same project state, so the
  // revision stays.
  void checked(store::Project p);

  store::Project& project() { return project_; }
  const std::string& path() const { return path_; }
  const std::string& name() const { return rec_->info.name; }
  const store::ProjectInfo& info() const { return rec_->info; }
  std::uint64_t revision() const { return revision_; }

  // The records of this revision, shared with builds that run on a worker.
  std::shared_ptr<const Records> records() const { return rec_; }
  // Whether the readings and contact points are there (Records::complete).
  bool complete() const { return rec_->complete; }
  // The whole records of an opening whose first part this model was made with
  // (Records::read_first), read on a worker while revision `rev` was current:
  // taken when nothing changed since (the revision stays: it is the same
  // project state, and the check already running belongs to it).
  void completed(std::shared_ptr<const Records> r, std::uint64_t rev);

  // Live records, in storage's order (stations sorted by time, then code).
  const std::vector<store::Station>& stations() const { return rec_->stations; }
  const std::vector<store::PlanarReading>& planes() const { return rec_->planes; }
  const std::vector<store::LinearReading>& lines() const { return rec_->lines; }
  const std::vector<store::Unit>& units() const { return rec_->units; }
  const std::vector<store::Contact>& contacts() const { return rec_->contacts; }
  const std::vector<store::Person>& people() const { return rec_->people; }
  const std::vector<store::ContactPoint>& points() const { return rec_->points; }
  const std::vector<store::Photo>& photos() const { return rec_->photos; }
  const std::vector<store::FlagReview>& reviews() const { return rec_->reviews; }
  const std::vector<store::DaySignoff>& signoffs() const { return rec_->signoffs; }
  const std::vector<std::string>& structures() const { return rec_->structures; }
  const std::vector<std::string>& lithologies() const { return rec_->lithologies; }

  const store::Station* station(const std::string& uuid) const { return rec_->station(uuid); }
  const store::Unit* unit(const std::string& uuid) const { return rec_->unit(uuid); }
  const store::Contact* contact(const std::string& uuid) const { return rec_->contact(uuid); }
  const store::Person* person(const std::string& uuid) const { return rec_->person(uuid); }
  const store::PlanarReading* plane(const std::string& uuid) const { return rec_->plane(uuid); }
  std::vector<const store::PlanarReading*> planes_of(const std::string& s) const { return rec_->planes_of(s); }
  std::vector<const store::LinearReading*> lines_of(const std::string& s) const { return rec_->lines_of(s); }
  std::vector<const store::Photo*> photos_of(const std::string& s) const { return rec_->photos_of(s); }

  // The field day of a station: the date its time was written with, else the
  // UTC date it was created.
  static std::string day_of(const store::Station& s);
  // A code for a new station: the newest code of `person` (else of anyone)
  // with its number one higher than any in use with that prefix ("BK-22" ->
  // "BK-23"); "S1" in an empty project.
  // Kept per revision and person: a season's 100 000 codes took 8 ms a frame.
  std::string next_station_code(const std::string& person = "") const;
  // A notebook reference for the next planar ("P3") or linear ("L2") reading of a station.
  std::string next_ref(const std::string& station, bool linear) const;

  // Runs a confirmed change at once. Returns false and sets `error` (the
  // storage message, e.g. a validation error naming the field) when it fails;
  // nothing is then written. On success the action becomes the one undo
  // reverses and the records are stale() until the App's loader has read them
  // again (refreshed()): a season's records take seconds to read, and no frame
  // waits for them. Refused while the records are stale or the file is being
  // checked (writable()): a change built on an older record would write its
  // older fields back.
  bool act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error);
  // The same for a change that writes no audit rows: `undo` reverses it.
  bool act_custom(const std::string& label, const std::function<void(store::Project&)>& f,
                  std::function<void(store::Project&)> undo, std::string* error);
  bool can_undo() const { return last_.has_value(); }
  std::string undo_label() const { return last_ ? last_->label : std::string(); }
  bool undo(std::string* error);

  // The file was changed by another connection (an import job): the records
  // are stale() until they are read again.
  void reload() { changed(); }

  // Whether a change was written that the records do not show yet.
  bool stale() const { return stale_; }
  // How many changes this model has written (or been told of): the loader
  // reads the records again at one count, and refreshed() takes them only if
  // no change came since.
  std::uint64_t changes() const { return changes_; }
  // The records read again after `changes` changes: a new revision.
  void refreshed(std::shared_ptr<const Records> r, std::uint64_t changes);
  // Whether a change can be made now: the file is open for writing, checked,
  // and the records show every change written (act's rule).
  bool writable() const { return !checking_ && !stale_ && !project_.read_only(); }

  // The newest cross-check result (possibly of an older revision while a new one runs).
  std::shared_ptr<const CheckResult> check() const { return check_; }
  void set_check(std::shared_ptr<const CheckResult> c) { check_ = std::move(c); }
  bool check_is_current() const { return check_ && check_->revision == revision_; }
  // The usable fit of a contact (by UUID) in the newest result, or nothing.
  const geo::ContactFit* fit_of(const std::string& contact_uuid) const;

 private:
  void took(std::shared_ptr<const Records> r);                   // the records of a new revision
  void changed();                                                // a change was written
  std::string first_free_code(const std::string& person) const;  // next_station_code, computed
  store::Project project_;
  std::string path_;
  std::uint64_t revision_ = 1;
  bool checking_ = false;
  bool stale_ = false;
  std::uint64_t changes_ = 0;
  std::shared_ptr<const Records> rec_;
  std::optional<LastAction> last_;
  std::shared_ptr<const CheckResult> check_;
  // next_station_code's answers for the current revision, by person.
  mutable std::uint64_t codes_revision_ = 0;
  mutable std::unordered_map<std::string, std::string> next_codes_;
};

// The World Magnetic Model's declination for the cross-check's
// declination-suspect rule; empty when the model cannot be loaded.
// With `outside`, counts the readings dated outside the model's validity.
core::LocalDeclination wmm_local_declination(int* outside = nullptr);
// "N readings are dated outside MODEL's validity (...)" for a count, "" for 0.
std::string validity_warning(int outside);

// A worker's own read-only connection to the file the UI has open: no backup,
// and no second integrity check (the UI's opening runs it on its writable
// connection, before anything is written, and writes through that one only);
// what the worker reads it reads defensively, as every read does.
store::Project open_for_worker(const std::string& path);

// Loads a project file into the cross-check engine and runs it: what the
// check job does on its worker thread, with its own read-only connection.
CheckResult run_check_on_file(const std::string& path, std::uint64_t revision,
                              const std::function<void(float, const std::string&)>& progress);

}  // namespace cairn::ui
