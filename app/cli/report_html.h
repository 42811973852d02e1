// The evening report of `cairn report`: one self-contained HTML file (inline CSS
// and SVG, no script, nothing fetched from a network) for the debrief in camp and
// for supervisors. It holds a summary per day and per person, the declination
// used, the flags with their cautions, a plan, the contact fits, and nets per
// unit and per contact, and the photos' thumbnails (embedded as base64 JPEG data:
// URIs, RFC 2397). Print rules fit both A4 and Letter.
//
// The renderer is pure: the verb (cmd_report.cpp) reads the project and runs the
// cross-check; this file only turns the result into HTML.
#pragma once
#include <cstdint>
#include <map>
#include <optional>
#include <unordered_map>
#include <ostream>
#include <string>
#include <vector>

#include "geomath/crosscheck.h"
#include "geomath/stereonet.h"
#include "app/core/check_input.h"
#include "app/plot/plan_scene.h"
#include "geomath/terrain.h"
#include "storage/records.h"

namespace cairn::cli {

// The magnetic model's declination over the project area and dates.
struct DeclinationSummary {
  std::string model;                    // "WMM2025"
  double lat = 0, lon = 0;              // where it was evaluated (mean position of the data)
  std::string first_date, last_date;    // YYYY-MM-DD, the data's date range
  double first = 0, last = 0;           // declination (degrees east) at those dates
  bool dates_from_data = true;          // false: no dated records, evaluated today
  bool in_validity = true;              // both dates inside the model's validity
  double valid_from = 0, valid_to = 0;  // decimal years
};

// A photo reference with its thumbnail (JPEG bytes), or why there is none.
struct ReportPhoto {
  store::Photo photo;
  std::string thumbnail_jpeg;   // "" when the file could not be read
  std::string problem;          // why there is no thumbnail
  bool content_matches = true;  // false: the file is not the one recorded (SHA-256 differs)
};

// What the report needs of a planar or linear reading: a season holds hundreds
// of thousands, so the record's texts are not kept, and its station, contact
// and observer are positions in ReportData's lists (made by ReportIndexer).
struct ReportReading {
  static constexpr int32_t kNone = -1;     // station or contact not among the live ones; observer not stated
  static constexpr int32_t kUnknown = -2;  // observer stated but not among the live people
  store::North north = store::North::True;
  double declination = 0;
  std::string declination_source;
  std::string day;  // YYYY-MM-DD of its own time, "" when undated
  int32_t station = kNone, observer = kNone;
};
struct ReportPlane : ReportReading {
  double strike = 0, dip = 0;
  store::PlaneKind kind = store::PlaneKind::Bedding;
  int32_t contact = ReportReading::kNone;
};
struct ReportLine : ReportReading {
  double trend = 0, plunge = 0;
  store::LineKind kind = store::LineKind::Lineation;
};

// The contact points, counted as they are read (the report draws them from
// the check's input): by day and observer, with the range of their dates.
struct PointTally {
  std::map<std::pair<std::string, std::string>, size_t> by_day_observer;  // (YYYY-MM-DD or "", person UUID)
  std::string first_day, last_day;                                        // "" when none is dated
};

struct ReportData {
  std::string file;       // the project file as named on the command line
  std::string generated;  // "2026-06-14 21:05 UTC"
  store::ProjectInfo info;
  std::vector<store::Person> people;
  std::vector<store::Unit> units;  // oldest first
  std::vector<store::Contact> contacts;
  std::vector<store::Station> stations;
  std::vector<ReportPlane> planes;
  std::vector<ReportLine> lines;
  PointTally points;
  // Sums of the stations' and then the points' latitudes and longitudes, in
  // that order, and how many (the mean position of the data).
  double lat_sum = 0, lon_sum = 0;
  size_t positions = 0;
  core::CheckData check;    // positions in UTM metres, as the engine saw them
  geo::CheckReport result;  // fits and flags
  // The project's terrain in the check's zone (storage/terrain.h), and its stated accuracy.
  std::optional<geo::TerrainGrid> terrain;
  std::optional<double> terrain_sigma;
  std::optional<DeclinationSummary> declination;
  std::string declination_problem;  // why there is no summary ("" when there is one)
  geo::NetKind net = geo::NetKind::EqualArea;
  std::vector<ReportPhoto> photos;  // embedded as data: URIs in the Photos section
  // The day track of the newest day with fixes, drawn on the Plan (app/plot/plan_track.h).
  std::string track_day;
  std::vector<plot::PlanPath> tracks;
};

// Turns records into the report's readings, resolving UUIDs against the
// lists already in `d` (people, contacts, stations: set those first).
class ReportIndexer {
 public:
  explicit ReportIndexer(const ReportData& d);
  ReportPlane plane(const store::PlanarReading& r) const;
  ReportLine line(const store::LinearReading& r) const;
  // Counts a contact point into d.points (and its position into the sums).
  static void count(ReportData& d, const store::ContactPoint& p);

 private:
  template <class Record>
  void fill(ReportReading& r, const Record& rec) const;
  std::unordered_map<std::string, int32_t> station_, contact_, person_;
};

// Writes the report to `o` as it goes (a season's page is hundreds of
// megabytes: it is never held whole).
void write_report_html(std::ostream& o, const ReportData& d);

}  // namespace cairn::cli
