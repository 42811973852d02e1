// CSV import: the bad-input table (every rule, its exact message, nothing
// written), all-or-nothing files, re-import as a no-op, and list -> import ->
// list round trips.
//
// Outside sources beside the checks: RFC 4180 (CSV), ISO 8601-1:2019 (dates and
// times), WGS84 coordinate ranges, the UTM definition (false easting 500 000 m
// on the central meridian, northing 0 on the equator in the northern
// hemisphere: NGA.STND.0037, "Universal Grids"), the right-hand rule and
// quadrant notation (structural geology textbooks, e.g. Ragan), and the
// issue's own bounds (elevation -500..9000 m, quality 1..5).
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>

#include "storage/import.h"
#include "storage/repository.h"
#include "storage_test_util.h"

using namespace cairn::store;
using cairn::store::testing::quiet;
using cairn::store::testing::TempDir;

namespace {

// A project with two units, a contact, station S1 and a fault plane "f1" at S1.
struct Field {
  TempDir dir;
  Project p;
  explicit Field(const std::string& zone = "33N")
      : p(Project::create(dir.file("f.cairn"), NewProject{"field", zone, North::True, 0}, quiet())) {
    expect_ok(ImportKind::Units, "unit,name,age_rank\nPgs,grey schist,1\nQm,pale marble,2\n");
    expect_ok(ImportKind::Contacts, "contact,lower_unit,upper_unit,type\nPgs-Qm,Pgs,Qm,depositional\n");
    expect_ok(ImportKind::Stations, "station,lat,lon,elevation\nS1,46.5,14.25,1200\n");
    expect_ok(ImportKind::Planes, "station,kind,strike,dip,ref\nS1,fault,090,30,f1\n");
  }
  void expect_ok(ImportKind k, const std::string& csv) {
    auto r = import_csv(p, k, csv, "setup.csv");
    ASSERT_TRUE(r.ok()) << r.errors.front();
  }
  // Rows of every table, and of the audit trail: proof that nothing was written.
  int64_t total() {
    int64_t n = 0;
    for (const char* t : {"people", "units", "contacts", "stations", "planes", "lines", "points", "photos", "audit"})
      n += p.db().query_int(std::string("SELECT count(*) FROM ") + t);
    return n;
  }
};

struct BadCase {
  const char* why;  // the outside source of the rule
  ImportKind kind;
  const char* csv;
  std::vector<std::string> errors;
};

}  // namespace

TEST(Import, BadInputTable) {
  const std::vector<BadCase> cases = {
      // ---- header rules (issue: an unknown column is an error) ----
      {"issue: unknown column",
       ImportKind::Units,
       "unit,name,age_rank,shade\nX,x,3,red\n",
       {"bad.csv:1:4: unknown-column: unknown column 'shade' (units takes: unit, name, age_rank, colour)"}},
      {"issue: required column",
       ImportKind::Units,
       "unit,name\nX,x\n",
       {"bad.csv:1:1: missing-column: column 'age_rank' is missing"}},
      {"issue: lat/lon or easting/northing",
       ImportKind::Stations,
       "station,lat,lon,easting,northing\nS5,1,2,3,4\n",
       {"bad.csv:1:4: columns: give lat and lon, or easting and northing, not both"}},
      {"issue: one attitude notation per file",
       ImportKind::Planes,
       "station,kind,strike,dip,attitude\nS1,joint,1,2,3\n",
       {"bad.csv:1:5: columns: give strike and dip, dip_direction and dip, or attitude: only one of them"}},
      {"issue: attitude required",
       ImportKind::Planes,
       "station,kind,dip\nS1,joint,20\n",
       {"bad.csv:1:1: missing-column: the attitude is missing: give strike and dip, dip_direction and dip, or "
        "attitude"}},
      {"RFC 4180: every record has the header's field count",
       ImportKind::Units,
       "unit,name,age_rank\nX,x\n",
       {"bad.csv:2:1: csv: 2 fields, but the header has 3"}},
      // ---- stations ----
      {"issue: code required",
       ImportKind::Stations,
       "station,lat,lon\n,46,14\n",
       {"bad.csv:2:1: required: station is empty"}},
      {"decimal degrees",
       ImportKind::Stations,
       "station,lat,lon\nS5,abc,14\n",
       {"bad.csv:2:2: number: latitude 'abc' is not a number"}},
      {"WGS84: latitude -90..90",
       ImportKind::Stations,
       "station,lat,lon\nS5,90.5,14\n",
       {"bad.csv:2:2: lat-range: latitude 90.5 is outside -90..90 degrees"}},
      {"WGS84: longitude -180..180",
       ImportKind::Stations,
       "station,lat,lon\nS5,46,-181\n",
       {"bad.csv:2:3: lon-range: longitude -181 is outside -180..180 degrees"}},
      {"issue: elevation -500..9000 m",
       ImportKind::Stations,
       "station,lat,lon,elevation\nS5,46,14,9001\n",
       {"bad.csv:2:4: elevation-range: elevation 9001 m is outside -500..9000 m"}},
      {"issue: elevation -500..9000 m",
       ImportKind::Stations,
       "station,lat,lon,elevation\nS5,46,14,-500.5\n",
       {"bad.csv:2:4: elevation-range: elevation -500.5 m is outside -500..9000 m"}},
      {"issue: accuracies >= 0",
       ImportKind::Stations,
       "station,lat,lon,h_accuracy,v_accuracy\nS5,46,14,-2,-0.1\n",
       {"bad.csv:2:4: accuracy-range: h_accuracy -2 m is negative",
        "bad.csv:2:5: accuracy-range: v_accuracy -0.1 m is negative"}},
      {"ISO 8601: month 01..12",
       ImportKind::Stations,
       "station,lat,lon,time\nS5,46,14,2025-13-01\n",
       {"bad.csv:2:4: time: '2025-13-01' is not a calendar date"}},
      {"ISO 8601: hh 00..23",
       ImportKind::Stations,
       "station,lat,lon,time\nS5,46,14,2025-06-14T25:00\n",
       {"bad.csv:2:4: time: '2025-06-14T25:00' is not a time of day"}},
      {"ISO 8601 format",
       ImportKind::Stations,
       "station,lat,lon,time\nS5,46,14,14/06/2025\n",
       {"bad.csv:2:4: time: '14/06/2025' is not an ISO 8601 date or date and time (YYYY-MM-DD or "
        "YYYY-MM-DDThh:mm[:ss][Z|+hh:mm])"}},
      {"issue: position source gps, map, manual (dem: from the terrain)",
       ImportKind::Stations,
       "station,lat,lon,source\nS5,46,14,guess\n",
       {"bad.csv:2:4: choice: source 'guess' is not one of: gps, map, manual, dem"}},
      {"issue: unit must exist",
       ImportKind::Stations,
       "station,lat,lon,unit\nS5,46,14,Zz\n",
       {"bad.csv:2:4: unknown-unit: unit 'Zz' is not in the project's unit list (Pgs, Qm)"}},
      {"issue: station code unique",
       ImportKind::Stations,
       "station,lat,lon\nS5,46,14\nS5,46,14\n",
       {"bad.csv:3:1: duplicate: station 'S5' appears twice in this file (first on line 2)"}},
      {"issue: re-import is a no-op, not an overwrite",
       ImportKind::Stations,
       "station,lat,lon,elevation\nS1,46.5,14.25,1250\n",
       {"bad.csv:2:1: duplicate: station 'S1' already exists with other values (elevation)"}},
      {"UTM: northing beyond the zone",
       ImportKind::Stations,
       "station,easting,northing\nS5,500000,99000000\n",
       {"bad.csv:2:2: utm-range: easting 500000, northing 99000000 is outside the range of UTM zone 33N"}},
      // ---- planar readings ----
      {"issue: the station of a reading exists",
       ImportKind::Planes,
       "station,kind,strike,dip\nS9,bedding,30,40\n",
       {"bad.csv:2:1: unknown-station: no station 'S9' in the project"}},
      {"issue: planar kinds",
       ImportKind::Planes,
       "station,kind,strike,dip\nS1,bedrock,30,40\n",
       {"bad.csv:2:2: choice: kind 'bedrock' is not one of: bedding, foliation, cleavage, joint, fault, vein, "
        "contact, slope"}},
      {"azimuth 0..360, dip 0..90",
       ImportKind::Planes,
       "station,kind,strike,dip\nS1,joint,400,95\n",
       {"bad.csv:2:3: angle: strike 400 is out of range: 0 to 360",
        "bad.csv:2:4: angle: dip 95 is out of range: 0 to 90"}},
      {"azimuth 0..360",
       ImportKind::Planes,
       "station,kind,dip_direction,dip\nS1,joint,-5,40\n",
       {"bad.csv:2:3: angle: dip_direction '-5' is not a number"}},
      {"quadrant notation: the dip quadrant lies across the strike line",
       ImportKind::Planes,
       "station,kind,attitude\nS1,bedding,N30E 40NE\n",
       {"bad.csv:2:3: notation: dip quadrant NE contradicts strike N30E: a plane of that strike dips towards S60E or "
        "N60W"}},
      {"issue: north true or magnetic",
       ImportKind::Planes,
       "station,kind,strike,dip,north\nS1,joint,30,40,grid\n",
       {"bad.csv:2:5: choice: north 'grid' is not one of: true, magnetic"}},
      {"declination only corrects magnetic readings",
       ImportKind::Planes,
       "station,kind,strike,dip,north,declination\nS1,joint,30,40,true,4\n",
       {"bad.csv:2:6: declination: a declination applies only to readings against magnetic north"}},
      {"issue: quality 1-5",
       ImportKind::Planes,
       "station,kind,strike,dip,quality\nS1,joint,30,40,6\n",
       {"bad.csv:2:5: quality-range: quality 6 is outside 1..5"}},
      {"issue: quality 1-5",
       ImportKind::Planes,
       "station,kind,strike,dip,quality\nS1,joint,30,40,good\n",
       {"bad.csv:2:5: integer: quality 'good' is not a whole number"}},
      {"issue: facing upright, overturned, unknown",
       ImportKind::Planes,
       "station,kind,strike,dip,facing\nS1,bedding,30,40,sideways\n",
       {"bad.csv:2:5: choice: facing 'sideways' is not one of: unknown, upright, overturned"}},
      {"issue: the contact exists",
       ImportKind::Planes,
       "station,kind,strike,dip,contact\nS1,contact,30,40,X-Y\n",
       {"bad.csv:2:5: unknown-contact: no contact 'X-Y' in the project"}},
      {"issue: ref unique per station",
       ImportKind::Planes,
       "station,kind,strike,dip,ref\nS1,joint,30,40,f1\n",
       {"bad.csv:2:5: duplicate: station S1 already has a planar reading with ref 'f1'"}},
      // ---- linear readings ----
      {"issue: linear kinds",
       ImportKind::Lines,
       "station,kind,trend,plunge\nS1,axis,30,40\n",
       {"bad.csv:2:2: choice: kind 'axis' is not one of: lineation, fold_axis, slickenline, intersection"}},
      {"plunge 0..90",
       ImportKind::Lines,
       "station,kind,trend,plunge\nS1,lineation,30,91\n",
       {"bad.csv:2:4: angle: plunge 91 is out of range: 0 to 90"}},
      {"issue: rake with plane_ref",
       ImportKind::Lines,
       "station,kind,rake,plane_ref\nS1,slickenline,40,f9\n",
       {"bad.csv:2:4: unknown-plane-ref: station S1 has no planar reading with ref 'f9'"}},
      {"issue: rake with plane_ref",
       ImportKind::Lines,
       "station,kind,trend,plunge,rake,plane_ref\nS1,slickenline,10,20,40,f1\n",
       {"bad.csv:2:5: columns: give trend and plunge, or rake with plane_ref: not both"}},
      {"rake 0..180 from the RHR strike",
       ImportKind::Lines,
       "station,kind,rake,plane_ref\nS1,slickenline,200,f1\n",
       {"bad.csv:2:3: notation: rake 200 is out of range: 0 to 180"}},
      // ---- contact points, units, contacts ----
      {"issue: the contact of a point exists",
       ImportKind::Points,
       "contact,lat,lon\nX-Y,46,14\n",
       {"bad.csv:2:1: unknown-contact: no contact 'X-Y' in the project"}},
      {"issue: point source gps, map, dem",
       ImportKind::Points,
       "contact,lat,lon,source\nPgs-Qm,46,14,gps2\n",
       {"bad.csv:2:4: choice: source 'gps2' is not one of: gps, map, dem"}},
      {"issue: age rank 1 = oldest",
       ImportKind::Units,
       "unit,name,age_rank\nX,x,0\n",
       {"bad.csv:2:3: age-rank: age_rank 0 is below 1 (1 = oldest)"}},
      {"issue: age rank is a rank",
       ImportKind::Units,
       "unit,name,age_rank\nX,x,2.5\n",
       {"bad.csv:2:3: integer: age_rank '2.5' is not a whole number"}},
      {"colour as #RRGGBB (common practice)",
       ImportKind::Units,
       "unit,name,age_rank,colour\nX,x,3,red\n",
       {"bad.csv:2:4: colour: colour 'red' is not of the form #RRGGBB"}},
      {"issue: units of a contact exist",
       ImportKind::Contacts,
       "contact,lower_unit,upper_unit,type\nA-B,Pgs,Zz,fault\n",
       {"bad.csv:2:3: unknown-unit: unit 'Zz' is not in the project's unit list (Pgs, Qm)"}},
      {"issue: contact types",
       ImportKind::Contacts,
       "contact,lower_unit,upper_unit,type\nA-B,Pgs,Qm,sheared\n",
       {"bad.csv:2:4: choice: type 'sheared' is not one of: depositional, unconformity, fault, intrusive"}},
      // ---- text and encoding (formats/utf8.h, formats/csv.h) ----
      {"RFC 3629: Latin-1 text is not UTF-8",
       ImportKind::Stations,
       "station,lat,lon,notes\nS5,46,14,\xE9"
       "boulis\n",
       {"bad.csv:2:10: utf8: invalid UTF-8 (byte 0xE9); save the file as UTF-8"}},
      {"ECMA-48: ESC starts a terminal control sequence",
       ImportKind::Stations,
       "station,lat,lon,notes\nS5,46,14,\"spur\x1B]0;x\x07\"\n",
       {"bad.csv:2:15: control: control character U+001B is not allowed in text"}},
      {"UTF-16 (a spreadsheet's \"Unicode text\")",
       ImportKind::Units,
       "\xFF\xFEu",
       {"bad.csv:1:1: encoding: the file is UTF-16 or UTF-32 text; save it as UTF-8 (\"CSV UTF-8\") and import it "
        "again"}},
      {"RFC 4180: a quoted field ends at its quote",
       ImportKind::Units,
       "unit,name,age_rank\n\"X\" y,x,3\n",
       {"bad.csv:2:1: csv: text after a closing quote (column 1)"}},
  };
  Field f;
  const int64_t before = f.total();
  for (const auto& c : cases) {
    SCOPED_TRACE(std::string(c.why) + "\n" + c.csv);
    ImportReport r = import_csv(f.p, c.kind, c.csv, "bad.csv");
    EXPECT_EQ(r.errors, c.errors);
    EXPECT_EQ(r.added, 0);
    EXPECT_EQ(f.total(), before) << "something was written";
  }
}

TEST(Import, ProgressCountsEveryRowUpToTheTotal) {
  // The progress line's numbers: rows checked of the rows RFC 4180 counts in
  // the file (the header is no row), ending at the total.
  TempDir dir;
  Project p = Project::create(dir.file("f.cairn"), NewProject{"field", "", North::True, 0}, quiet());
  std::string csv = "station,lat,lon\n";
  for (int i = 0; i < 2500; ++i) csv += "S" + std::to_string(i) + ",46.5,14.25\n";
  std::vector<std::pair<size_t, size_t>> calls;
  const ImportReport r = import_csv(p, ImportKind::Stations, csv, "many.csv",
                                    [&](size_t done, size_t total) { calls.emplace_back(done, total); });
  ASSERT_TRUE(r.ok());
  ASSERT_FALSE(calls.empty());
  EXPECT_EQ(calls.back(), std::make_pair(size_t{2500}, size_t{2500}));
  for (size_t i = 1; i < calls.size(); ++i) EXPECT_LE(calls[i - 1].first, calls[i].first);
}

TEST(Import, EasternAndNorthingNeedAZone) {
  Field f("");
  ImportReport r = import_csv(f.p, ImportKind::Stations, "station,easting,northing\nS5,500000,0\n", "e.csv");
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0],
            "e.csv:1:2: utm-zone: easting and northing need the project's UTM zone; this project has none "
            "(cairn new --utm ZONE)");
}

TEST(Import, UtmPositionsBecomeWgs84) {
  // UTM definition: the central meridian of zone 33 is 15 E, where easting is
  // 500 000 m; the equator has northing 0 in the northern hemisphere.
  Field f;
  ImportReport r = import_csv(f.p, ImportKind::Stations, "station,easting,northing\nE1,500000,0\n", "u.csv");
  ASSERT_TRUE(r.ok()) << r.errors.front();
  auto s = find_station(f.p, "E1");
  EXPECT_NEAR(s->lat, 0.0, 1e-9);
  EXPECT_NEAR(s->lon, 15.0, 1e-9);
  EXPECT_EQ(s->source, PositionSource::Map);
}

TEST(Import, AllOrNothingListsEveryBadRow) {
  Field f;
  const int64_t before = f.total();
  const char* csv =
      "station,lat,lon,elevation,time\n"
      "S10,46.1,14.1,500,2025-06-14\n"
      "S11,95,14.1,500,2025-06-14\n"  // bad latitude
      "S12,46.1,14.1,500,2025-06-14\n"
      "S13,46.1,200,12000,2025-06-31\n"  // three bad cells in one row
      "S14,46.1,14.1,500,2025-06-14\n";
  ImportReport r = import_csv(f.p, ImportKind::Stations, csv, "s.csv");
  const std::vector<std::string> expected = {
      "s.csv:3:2: lat-range: latitude 95 is outside -90..90 degrees",
      "s.csv:5:3: lon-range: longitude 200 is outside -180..180 degrees",
      "s.csv:5:4: elevation-range: elevation 12000 m is outside -500..9000 m",
      "s.csv:5:5: time: '2025-06-31' is not a calendar date",
  };
  EXPECT_EQ(r.errors, expected);
  EXPECT_EQ(r.added, 0);
  EXPECT_EQ(f.total(), before);
  EXPECT_FALSE(find_station(f.p, "S10")) << "a good row of a bad file must not be written";
}

TEST(Import, ReimportIsANoOp) {
  Field f;
  const char* stations = "observer,station,lon,lat\nAE,S2,14.3,46.6\n,S3,14.31,46.61\n";  // any column order
  const char* planes =
      "station,kind,strike,dip,quality,facing\n"
      "S1,bedding,030,40,3,upright\n"
      "S1,bedding,030,40,3,upright\n"  // two identical readings in one file stay two
      "S1,joint,120,85,,\n";
  const char* lines = "station,kind,trend,plunge,rake,plane_ref\nS1,lineation,120,35,,\nS1,slickenline,,,90,f1\n";
  const char* points = "contact,lat,lon,elevation\nPgs-Qm,46.501,14.251,1190\nPgs-Qm,46.502,14.252,1185\n";
  struct Step {
    ImportKind k;
    const char* csv;
    int rows;
  };
  for (const Step& s : {Step{ImportKind::Stations, stations, 2}, Step{ImportKind::Planes, planes, 3},
                        Step{ImportKind::Lines, lines, 2}, Step{ImportKind::Points, points, 2}}) {
    ImportReport first = import_csv(f.p, s.k, s.csv, "r.csv");
    ASSERT_TRUE(first.ok()) << first.errors.front();
    EXPECT_EQ(first.added, s.rows);
    const int64_t after = f.total();
    ImportReport again = import_csv(f.p, s.k, s.csv, "r.csv");
    ASSERT_TRUE(again.ok()) << again.errors.front();
    EXPECT_EQ(again.added, 0);
    EXPECT_EQ(again.skipped, s.rows);
    EXPECT_EQ(f.total(), after);
  }
  EXPECT_EQ(list_planes(f.p).size(), 4u);  // f1 + three
  EXPECT_EQ(find_person(f.p, "AE")->name, "AE");
  // The rake of 90 lies down the dip of fault 090/30: trend 180, plunge 30 (definition of rake).
  auto ls = list_lines(f.p);
  ASSERT_EQ(ls.size(), 2u);
  EXPECT_NEAR(ls[1].trend, 180, 1e-9);
  EXPECT_NEAR(ls[1].plunge, 30, 1e-9);
}

TEST(Import, ListImportsBackUnchanged) {
  Field f;
  f.expect_ok(ImportKind::Stations,
              "station,lat,lon,elevation,h_accuracy,observer,time,notes,unit\n"
              "S2,46.6,14.3,1250.5,3,AE,2025-06-14T10:00:00+02:00,\"cliff, north side\",Qm\n");
  f.expect_ok(ImportKind::Planes,
              "station,kind,attitude,north,declination,quality,facing,ref,contact,time,notes\n"
              "S2,bedding,N30E 40SE,magnetic,4.5,4,overturned,p1,Pgs-Qm,2025-06-14T10:05:00+02:00,top\n"
              "S2,cleavage,S10W 80W,true,,,,,,,\n");
  f.expect_ok(ImportKind::Lines,
              "station,kind,trend,plunge,north,declination,ref\nS2,fold_axis,10,5,magnetic,4.5,a1\n");
  f.expect_ok(ImportKind::Lines, "station,kind,rake,plane_ref\nS1,slickenline,40,f1\n");
  f.expect_ok(ImportKind::Points, "contact,lat,lon,elevation,source,time\nPgs-Qm,46.601,14.301,1240,dem,2025-06-15\n");

  TempDir other;
  Project q = Project::create(other.file("copy.cairn"), NewProject{"copy", "33N", North::True, 0}, quiet());
  for (ImportKind k : {ImportKind::Units, ImportKind::Contacts, ImportKind::Stations, ImportKind::Planes,
                       ImportKind::Lines, ImportKind::Points}) {
    const std::string listed = list_csv(f.p, k);
    ImportReport r = import_csv(q, k, listed, "listed.csv");
    ASSERT_TRUE(r.ok()) << to_string(k) << ": " << r.errors.front() << "\n" << listed;
    EXPECT_EQ(list_csv(q, k), listed) << to_string(k);
  }
  // The magnetic bedding: quadrant N30E 40SE is strike 030 (RHR); true strike = 030 + 4.5 (NOAA's sign convention).
  auto pl = list_planes(q);
  ASSERT_EQ(pl.size(), 3u);
  EXPECT_NEAR(pl[1].strike, 34.5, 1e-9);
  EXPECT_EQ(pl[1].declination_source, "given");
  // "S10W 80W": strike line S10W = 190; dipping W lies to the right of 190, so RHR strike 190.
  EXPECT_NEAR(pl[2].strike, 190, 1e-9);
  EXPECT_NEAR(pl[2].dip, 80, 1e-9);
}

TEST(Import, AFileIsReadRowByRowWithTheSameRulesAsText) {
  // import_csv_file reads the file twice in pieces (issue 16); what it
  // stores, skips and refuses is what import_csv does with the same text.
  Field f;
  auto write = [&](const std::string& name, const std::string& text) {
    const std::string path = f.dir.file(name);
    std::ofstream(path, std::ios::binary) << text;
    return path;
  };
  // A station code twice in one file (the rule of the bad-input table), far
  // apart so that the first is in an earlier piece of the file.
  std::string twice = "station,lat,lon\n";
  for (int i = 0; i < 5000; ++i) twice += "T" + std::to_string(i) + ",46.5,14.25\n";
  twice += "T7,46.5,14.25\n";  // line 5002; T7 was on line 9
  const int64_t before = f.total();
  const std::string path = write("twice.csv", twice);
  ImportReport r = import_csv_file(f.p, ImportKind::Stations, path);
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0], path + ":5002:1: duplicate: station 'T7' appears twice in this file (first on line 9)");
  EXPECT_EQ(r.errors, import_csv(f.p, ImportKind::Stations, twice, path).errors);
  EXPECT_EQ(f.total(), before) << "a refused file writes nothing";
  // RFC 4180: a malformed last line refuses the whole file before anything is written.
  r = import_csv_file(f.p, ImportKind::Stations, write("short.csv", "station,lat,lon\nT1,46.5,14.25\nT2,46.5\n"));
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_NE(r.errors[0].find("short.csv:3:1: csv: 2 fields, but the header has 3"), std::string::npos) << r.errors[0];
  EXPECT_EQ(f.total(), before);
  // Two identical readings in one file stay two; imported again, both are skipped.
  const std::string planes =
      write("p.csv", "station,kind,strike,dip\nS1,joint,120,85\nS1,joint,120,85\nS1,joint,121,85\n");
  r = import_csv_file(f.p, ImportKind::Planes, planes);
  ASSERT_TRUE(r.ok()) << r.errors.front();
  EXPECT_EQ(r.added, 3);
  r = import_csv_file(f.p, ImportKind::Planes, planes);
  ASSERT_TRUE(r.ok()) << r.errors.front();
  EXPECT_EQ(r.added, 0);
  EXPECT_EQ(r.skipped, 3);
  // The same rows given as text are the same import: skipped too.
  r = import_csv(f.p, ImportKind::Planes, "station,kind,strike,dip\nS1,joint,120,85\nS1,joint,120,85\n", "p.csv");
  EXPECT_EQ(r.skipped, 2);
  EXPECT_EQ(list_planes(f.p).size(), 4u);  // f1 + three
  r = import_csv_file(f.p, ImportKind::Planes, f.dir.file("missing.csv"));
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0].rfind("cannot read " + f.dir.file("missing.csv") + ": ", 0), 0u);
}
