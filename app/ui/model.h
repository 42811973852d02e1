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

class Model {
 public:
  explicit Model(store::Project p);

  store::Project& project() { return project_; }
  const std::string& path() const { return path_; }
  const std::string& name() const { return info_.name; }
  const store::ProjectInfo& info() const { return info_; }
  std::uint64_t revision() const { return revision_; }

  // Live records, in storage's order (stations sorted by time, then code).
  const std::vector<store::Station>& stations() const { return stations_; }
  const std::vector<store::PlanarReading>& planes() const { return planes_; }
  const std::vector<store::LinearReading>& lines() const { return lines_; }
  const std::vector<store::Unit>& units() const { return units_; }
  const std::vector<store::Contact>& contacts() const { return contacts_; }
  const std::vector<store::Person>& people() const { return people_; }
  const std::vector<store::ContactPoint>& points() const { return points_; }
  const std::vector<store::Photo>& photos() const { return photos_; }
  const std::vector<store::FlagReview>& reviews() const { return reviews_; }
  const std::vector<store::DaySignoff>& signoffs() const { return signoffs_; }
  // The project's structure-kind and lithology pick-lists (storage/pick_lists.h; empty: not restricted).
  const std::vector<std::string>& structures() const { return structures_; }
  const std::vector<std::string>& lithologies() const { return lithologies_; }

  const store::Station* station(const std::string& uuid) const;
  const store::Unit* unit(const std::string& uuid) const;
  const store::Contact* contact(const std::string& uuid) const;
  const store::Person* person(const std::string& uuid) const;
  const store::PlanarReading* plane(const std::string& uuid) const;
  std::vector<const store::PlanarReading*> planes_of(const std::string& station) const;
  std::vector<const store::LinearReading*> lines_of(const std::string& station) const;
  std::vector<const store::Photo*> photos_of(const std::string& station) const;

  // The field day of a station: the date its time was written with, else the
  // UTC date it was created.
  static std::string day_of(const store::Station& s);
  // A code for a new station: the newest code of `person` (else of anyone)
  // with its number one higher than any in use with that prefix ("BK-22" ->
  // "BK-23"); "S1" in an empty project.
  std::string next_station_code(const std::string& person = "") const;
  // A notebook reference for the next planar ("P3") or linear ("L2") reading of a station.
  std::string next_ref(const std::string& station, bool linear) const;

  // Runs a confirmed change at once. Returns false and sets `error` (the
  // storage message, e.g. a validation error naming the field) when it fails;
  // nothing is then written. On success the records are read again and the
  // action becomes the one undo reverses.
  bool act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error);
  // The same for a change that writes no audit rows: `undo` reverses it.
  bool act_custom(const std::string& label, const std::function<void(store::Project&)>& f,
                  std::function<void(store::Project&)> undo, std::string* error);
  bool can_undo() const { return last_.has_value(); }
  std::string undo_label() const { return last_ ? last_->label : std::string(); }
  bool undo(std::string* error);

  // Reads every record again (after a change made by another connection, e.g. an import job).
  void reload();

  // The newest cross-check result (possibly of an older revision while a new one runs).
  std::shared_ptr<const CheckResult> check() const { return check_; }
  void set_check(std::shared_ptr<const CheckResult> c) { check_ = std::move(c); }
  bool check_is_current() const { return check_ && check_->revision == revision_; }
  // The usable fit of a contact (by UUID) in the newest result, or nothing.
  const geo::ContactFit* fit_of(const std::string& contact_uuid) const;

 private:
  store::Project project_;
  std::string path_;
  store::ProjectInfo info_;
  std::uint64_t revision_ = 1;
  std::vector<store::Station> stations_;
  std::vector<store::PlanarReading> planes_;
  std::vector<store::LinearReading> lines_;
  std::vector<store::Unit> units_;
  std::vector<store::Contact> contacts_;
  std::vector<store::Person> people_;
  std::vector<store::ContactPoint> points_;
  std::vector<store::Photo> photos_;
  std::vector<store::FlagReview> reviews_;
  std::vector<store::DaySignoff> signoffs_;
  std::vector<std::string> structures_, lithologies_;
  std::unordered_map<std::string, size_t> station_ix_, unit_ix_, contact_ix_, person_ix_, plane_ix_;
  std::optional<LastAction> last_;
  std::shared_ptr<const CheckResult> check_;
};

// The World Magnetic Model's declination for the cross-check's
// declination-suspect rule; empty when the model cannot be loaded.
// With `outside`, counts the readings dated outside the model's validity.
core::LocalDeclination wmm_local_declination(int* outside = nullptr);
// "N readings are dated outside MODEL's validity (...)" for a count, "" for 0.
std::string validity_warning(int outside);

// Loads a project file into the cross-check engine and runs it: what the
// check job does on its worker thread, with its own read-only connection.
CheckResult run_check_on_file(const std::string& path, std::uint64_t revision,
                              const std::function<void(float, const std::string&)>& progress);

}  // namespace cairn::ui
