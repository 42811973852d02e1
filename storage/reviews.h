// Reviews of cross-check flags and sign-offs of field days, kept in the
// project file beside the records.
//
// Flags are computed (by the cross-check engine), not stored, so a review
// names its flag by a key made of the flag's rule, station, reading and
// contact (flag_key()); the same finding computed again finds its review.
//
// A review is one of:
//   acknowledged - a field-safety caution was read in the field (hazard flags
//                  cannot be closed without it);
//   accepted     - a supervisor accepts the reading as it stands (e.g. real local
//                  structure), with a comment;
//   resolved     - the cause was found and dealt with (re-measured, corrected).
// A day sign-off records that a supervisor has reviewed one field day.
//
// Tables (a migration step of this module, not of the record schema):
//   flag_reviews (uuid, flag_key, rule, station, reading, contact, status,
//                 comment, person, created, updated, device, deleted)
//   day_signoffs (uuid, day, person, comment, created, updated, device, deleted)
// ensure_review_tables() creates them with CREATE TABLE IF NOT EXISTS the first
// time a review is written, so files that were never reviewed are unchanged and
// older Cairn builds still open every file (they ignore tables they do not know).
// Reading functions return nothing for a file without the tables. Rows are
// append-only apart from the soft delete that withdraws one (undo), so a
// supervisor's earlier decisions stay visible. Reviews carry their own person,
// device and time and write no rows to the record audit trail.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "storage/project.h"
#include "storage/records.h"

namespace cairn::store {

enum class ReviewStatus { Acknowledged, Accepted, Resolved };
std::string to_string(ReviewStatus s);  // "acknowledged", "accepted", "resolved"
std::optional<ReviewStatus> parse_review_status(const std::string& s);

struct FlagReview {
  RecordMeta meta;
  std::string flag_key;  // see flag_key()
  std::string rule;      // the flag's rule id
  std::string station;   // station code ("" for contact-wide flags)
  std::string reading;   // reading UUID ("" when the flag is not about one reading)
  std::string contact;   // contact name ("" when none)
  ReviewStatus status = ReviewStatus::Accepted;
  std::string comment;
  std::string person;  // person UUID or ""
};

struct DaySignoff {
  RecordMeta meta;
  std::string day;  // "YYYY-MM-DD"
  std::string person;
  std::string comment;
};

// "rule|station|reading|contact": stable while the records behind the flag live.
std::string flag_key(const std::string& rule, const std::string& station, const std::string& reading,
                     const std::string& contact);

// Creates the review tables when they are missing (inside Project::write).
void ensure_review_tables(Project& p);

// Adds a review. Validates (ValidationError naming the field): a non-empty flag
// key and rule; accepted and resolved reviews need a comment; a person, when
// given, must be a live person. Fills meta like repository add().
std::string add_flag_review(Project& p, FlagReview& r);
// Every review, oldest first (withdrawn ones only with include_withdrawn).
std::vector<FlagReview> list_flag_reviews(Project& p, bool include_withdrawn = false);
// The newest live review of each status for one flag key, newest first.
std::vector<FlagReview> reviews_of_flag(Project& p, const std::string& key);

// Signs off a day. Validates: "YYYY-MM-DD" of a real date; a person is required
// and must be live; a day can be signed off once (a live sign-off exists: error).
std::string sign_off_day(Project& p, DaySignoff& s);
std::vector<DaySignoff> list_signoffs(Project& p, bool include_withdrawn = false);

// Withdraws (soft-deletes) a review or a sign-off by UUID; false when there is no live one.
bool withdraw_flag_review(Project& p, const std::string& uuid);
bool withdraw_signoff(Project& p, const std::string& uuid);

}  // namespace cairn::store
