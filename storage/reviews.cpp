#include "storage/reviews.h"

#include "formats/ids.h"
#include "formats/iso8601.h"
#include "storage/sqlite.h"

namespace cairn::store {

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// The migration step of this module (see reviews.h). Idempotent.
const char* const kReviewTables = R"SQL(
CREATE TABLE IF NOT EXISTS flag_reviews (
  uuid      TEXT PRIMARY KEY,
  flag_key  TEXT NOT NULL,
  rule      TEXT NOT NULL,
  station   TEXT NOT NULL DEFAULT '',
  reading   TEXT NOT NULL DEFAULT '',
  contact   TEXT NOT NULL DEFAULT '',
  status    TEXT NOT NULL CHECK (status IN ('acknowledged','accepted','resolved')),
  comment   TEXT NOT NULL DEFAULT '',
  person    TEXT REFERENCES people(uuid),
  created   TEXT NOT NULL,
  updated   TEXT NOT NULL,
  device    TEXT NOT NULL,
  deleted   TEXT
);
CREATE INDEX IF NOT EXISTS flag_reviews_key ON flag_reviews(flag_key);
CREATE TABLE IF NOT EXISTS day_signoffs (
  uuid      TEXT PRIMARY KEY,
  day       TEXT NOT NULL,
  person    TEXT NOT NULL REFERENCES people(uuid),
  comment   TEXT NOT NULL DEFAULT '',
  created   TEXT NOT NULL,
  updated   TEXT NOT NULL,
  device    TEXT NOT NULL,
  deleted   TEXT
);
CREATE UNIQUE INDEX IF NOT EXISTS day_signoffs_day ON day_signoffs(day) WHERE deleted IS NULL;
)SQL";

bool has_table(Db& db, const char* name) {
  Stmt s(db, "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?");
  s.bind(1, name);
  return s.step();
}

bool live_person(Db& db, const std::string& uuid) {
  Stmt s(db, "SELECT 1 FROM people WHERE uuid = ? AND deleted IS NULL");
  s.bind(1, uuid);
  return s.step();
}

void fill_meta(Project& p, RecordMeta& m) {
  if (m.uuid.empty()) m.uuid = new_uuid();
  if (m.created.empty()) m.created = utc_now();
  if (m.updated.empty()) m.updated = m.created;
  if (m.device.empty()) m.device = p.device();
}

constexpr const char* kReviewColumns =
    "uuid, flag_key, rule, station, reading, contact, status, comment, person, created, updated, device, deleted";

FlagReview read_review(Stmt& s) {
  FlagReview r;
  r.meta.uuid = s.text(0);
  r.flag_key = s.text(1);
  r.rule = s.text(2);
  r.station = s.text(3);
  r.reading = s.text(4);
  r.contact = s.text(5);
  r.status = parse_review_status(s.text(6)).value_or(ReviewStatus::Accepted);
  r.comment = s.text(7);
  r.person = s.text(8);
  r.meta.created = s.text(9);
  r.meta.updated = s.text(10);
  r.meta.device = s.text(11);
  r.meta.deleted = s.opt_text(12);
  return r;
}

bool withdraw(Project& p, const char* table, const std::string& uuid) {
  if (!has_table(p.db(), table)) return false;
  bool done = false;
  p.write([&] {
    Stmt s(p.db(), std::string("UPDATE ") + table +
                       " SET deleted = ?, updated = ?, device = ? "
                       "WHERE uuid = ? AND deleted IS NULL");
    const std::string now = utc_now();
    s.bind(1, now).bind(2, now).bind(3, p.device()).bind(4, uuid);
    s.run();
    done = p.db().changes() > 0;
  });
  return done;
}

}  // namespace

std::string to_string(ReviewStatus s) {
  switch (s) {
    case ReviewStatus::Acknowledged: return "acknowledged";
    case ReviewStatus::Accepted: return "accepted";
    case ReviewStatus::Resolved: return "resolved";
  }
  return "accepted";
}

std::optional<ReviewStatus> parse_review_status(const std::string& s) {
  if (s == "acknowledged") return ReviewStatus::Acknowledged;
  if (s == "accepted") return ReviewStatus::Accepted;
  if (s == "resolved") return ReviewStatus::Resolved;
  return std::nullopt;
}

std::string flag_key(const std::string& rule, const std::string& station, const std::string& reading,
                     const std::string& contact) {
  return rule + "|" + station + "|" + reading + "|" + contact;
}

void ensure_review_tables(Project& p) {
  p.write([&] { p.db().exec(kReviewTables); });
}

std::string add_flag_review(Project& p, FlagReview& r) {
  if (r.flag_key.empty()) throw ValidationError("flag_key", "required", "the review names no flag");
  if (r.rule.empty()) throw ValidationError("rule", "required", "the review names no rule");
  if (r.status != ReviewStatus::Acknowledged && r.comment.empty())
    throw ValidationError("comment", "required",
                          "a flag marked " + to_string(r.status) + " needs a comment saying why");
  p.write([&] {
    ensure_review_tables(p);
    if (!r.person.empty() && !live_person(p.db(), r.person))
      throw ValidationError("person", "unknown-person", "no person with UUID '" + r.person + "' in the project");
    fill_meta(p, r.meta);
    Stmt s(p.db(),
           std::string("INSERT INTO flag_reviews(") + kReviewColumns + ") VALUES (?,?,?,?,?,?,?,?,?,?,?,?,NULL)");
    s.bind(1, r.meta.uuid).bind(2, r.flag_key).bind(3, r.rule).bind(4, r.station).bind(5, r.reading);
    s.bind(6, r.contact).bind(7, to_string(r.status)).bind(8, r.comment).bind_text_or_null(9, r.person);
    s.bind(10, r.meta.created).bind(11, r.meta.updated).bind(12, r.meta.device);
    s.run();
  });
  return r.meta.uuid;
}

std::vector<FlagReview> list_flag_reviews(Project& p, bool include_withdrawn) {
  std::vector<FlagReview> out;
  if (!has_table(p.db(), "flag_reviews")) return out;
  Stmt s(p.db(), std::string("SELECT ") + kReviewColumns + " FROM flag_reviews" +
                     (include_withdrawn ? "" : " WHERE deleted IS NULL") + " ORDER BY created, rowid");
  while (s.step()) out.push_back(read_review(s));
  return out;
}

std::vector<FlagReview> reviews_of_flag(Project& p, const std::string& key) {
  std::vector<FlagReview> out;
  if (!has_table(p.db(), "flag_reviews")) return out;
  Stmt s(p.db(), std::string("SELECT ") + kReviewColumns +
                     " FROM flag_reviews WHERE flag_key = ? AND deleted IS NULL ORDER BY created DESC, rowid DESC");
  s.bind(1, key);
  bool seen[3] = {false, false, false};
  while (s.step()) {
    FlagReview r = read_review(s);
    const int i = static_cast<int>(r.status);
    if (seen[i]) continue;
    seen[i] = true;
    out.push_back(std::move(r));
  }
  return out;
}

std::string sign_off_day(Project& p, DaySignoff& d) {
  auto t = parse_iso8601(d.day);
  if (d.day.size() != 10 || !t)
    throw ValidationError("day", "bad-date", "'" + d.day + "' is not a date of the form YYYY-MM-DD");
  if (d.person.empty()) throw ValidationError("person", "required", "a day is signed off by a person: choose who");
  p.write([&] {
    ensure_review_tables(p);
    if (!live_person(p.db(), d.person))
      throw ValidationError("person", "unknown-person", "no person with UUID '" + d.person + "' in the project");
    {
      Stmt q(p.db(), "SELECT 1 FROM day_signoffs WHERE day = ? AND deleted IS NULL");
      q.bind(1, d.day);
      if (q.step()) throw ValidationError("day", "signed-off", "the day " + d.day + " is already signed off");
    }
    fill_meta(p, d.meta);
    Stmt s(p.db(),
           "INSERT INTO day_signoffs(uuid, day, person, comment, created, updated, device, deleted) "
           "VALUES (?,?,?,?,?,?,?,NULL)");
    s.bind(1, d.meta.uuid).bind(2, d.day).bind(3, d.person).bind(4, d.comment);
    s.bind(5, d.meta.created).bind(6, d.meta.updated).bind(7, d.meta.device);
    s.run();
  });
  return d.meta.uuid;
}

std::vector<DaySignoff> list_signoffs(Project& p, bool include_withdrawn) {
  std::vector<DaySignoff> out;
  if (!has_table(p.db(), "day_signoffs")) return out;
  Stmt s(p.db(), std::string("SELECT uuid, day, person, comment, created, updated, device, deleted FROM day_signoffs") +
                     (include_withdrawn ? "" : " WHERE deleted IS NULL") + " ORDER BY day, created");
  while (s.step()) {
    DaySignoff d;
    d.meta.uuid = s.text(0);
    d.day = s.text(1);
    d.person = s.text(2);
    d.comment = s.text(3);
    d.meta.created = s.text(4);
    d.meta.updated = s.text(5);
    d.meta.device = s.text(6);
    d.meta.deleted = s.opt_text(7);
    out.push_back(std::move(d));
  }
  return out;
}

bool withdraw_flag_review(Project& p, const std::string& uuid) { return withdraw(p, "flag_reviews", uuid); }
bool withdraw_signoff(Project& p, const std::string& uuid) { return withdraw(p, "day_signoffs", uuid); }

}  // namespace cairn::store
