// `cairn list` and `cairn export` written as the records are read, and the one
// progress line on stderr (issue 16), run as a user runs them.
// Source: the sqlite3 shell's count(*) and GDAL's ogrinfo ("Feature Count") for
// the GeoPackage (OGC 12-128r18), Python's json module for the GeoJSON (RFC
// 7946) and the csv module for `cairn list` (RFC 4180), with the sqlite3 shell's
// own SELECT of the live records for what it lists.
#include "tests/app/cli_test_support.h"

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include "storage/import.h"
#include "storage/project.h"
#include "storage/repository.h"

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;
namespace fs = std::filesystem;

namespace {

class Streamed : public CliTest {
 protected:
  // A project of N stations with a planar reading each (more than the 1000
  // rows between two progress figures), along a line in UTM zone 8N.
  void season(int n) {
    ASSERT_EQ(cairn("new s.cairn --name Streamed --utm 8N").status, 0);
    std::string st = "station,easting,northing,elevation\n", pl = "station,kind,strike,dip\n";
    for (int i = 0; i < n; ++i) {
      const std::string code = "S" + std::to_string(i);
      st += code + "," + std::to_string(400000 + 7 * i) + "," + std::to_string(6500000 + 3 * i) + ",100\n";
      pl += code + ",joint," + std::to_string(i % 360) + "," + std::to_string(10 + i % 80) + "\n";
    }
    write("st.csv", st);
    write("pl.csv", pl);
    Outcome r = cairn("import s.cairn stations st.csv");
    ASSERT_EQ(r.status, 0) << r.err;
    r = cairn("import s.cairn planes pl.csv");
    ASSERT_EQ(r.status, 0) << r.err;
  }
  // What a shell command prints (stdout), run in the test's folder.
  std::string shell(const std::string& cmd) const {
    const std::string full = "cd '" + dir_.string() + "' && " + cmd + " >shell.txt 2>/dev/null";
    EXPECT_EQ(std::system(full.c_str()), 0) << cmd;
    return slurp(file("shell.txt"));
  }
};

}  // namespace

// The demo camp file (with deleted records, lines on named planes, contacts and
// units): every kind lists the live records the sqlite3 shell selects, in the
// same order, and the rows parse as CSV with the header's width.
TEST_F(Streamed, ListOfTheDemoIsItsLiveRecords) {
  fs::copy_file(fs::path(CAIRN_SOURCE_DIR) / "demo_project" / "camp.cairn", file("camp.cairn"));
  const std::pair<const char*, const char*> first_column[] = {
      {"units", "SELECT code FROM units WHERE deleted IS NULL ORDER BY age_rank, code, uuid"},  // by age
      {"contacts", "SELECT name FROM contacts WHERE deleted IS NULL ORDER BY created, rowid"},
      {"stations", "SELECT code FROM stations WHERE deleted IS NULL ORDER BY created, rowid"},
      {"planes",
       "SELECT s.code FROM planes r JOIN stations s ON s.uuid = r.station WHERE r.deleted IS NULL "
       "ORDER BY r.created, r.rowid"},
      {"lines",
       "SELECT s.code FROM lines r JOIN stations s ON s.uuid = r.station WHERE r.deleted IS NULL "
       "ORDER BY r.created, r.rowid"},
      {"points",
       "SELECT c.name FROM points r JOIN contacts c ON c.uuid = r.contact WHERE r.deleted IS NULL "
       "ORDER BY r.created, r.rowid"}};
  for (const auto& [kind, sql] : first_column) {
    const Outcome r = cairn(std::string("list camp.cairn ") + kind);
    ASSERT_EQ(r.status, 0) << r.err;
    EXPECT_EQ(r.err, "") << kind;  // stderr is no terminal here: no progress line unasked
    write("list.csv", r.out);
    const std::string listed = shell(
        "/usr/bin/python3 -c \"import csv; r = list(csv.reader(open('list.csv', newline=''))); "
        "print(len(set(len(x) for x in r))); [print(x[0]) for x in r[1:]]\"");
    const std::string expected = shell(std::string("sqlite3 -readonly camp.cairn \"") + sql + "\"");
    ASSERT_FALSE(expected.empty()) << kind;
    EXPECT_EQ(listed, "1\n" + expected) << kind;
  }
}

// `cairn import` shows the same progress line: asked and forced, on stderr with
// the row counts; not asked and not a terminal, nothing; stdout unchanged.
TEST_F(Streamed, ImportProgressWhenAskedNeverOnStdout) {
  ASSERT_EQ(cairn("new s.cairn --name Streamed --utm 8N").status, 0);
  std::string st = "station,easting,northing,elevation\n";
  for (int i = 0; i < 2500; ++i)
    st += "S" + std::to_string(i) + "," + std::to_string(400000 + 7 * i) + "," + std::to_string(6500000 + 3 * i) +
          ",100\n";
  write("st.csv", st);
  const Outcome forced = cairn("import s.cairn stations st.csv --progress", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(forced.status, 0) << forced.err;
  EXPECT_EQ(forced.out, "imported 2500 stations from st.csv\n");
  EXPECT_NE(forced.err.find("importing st.csv: "), std::string::npos) << forced.err;
  EXPECT_NE(forced.err.find("2500 of 2500 rows"), std::string::npos) << forced.err;
  EXPECT_EQ(forced.err.back(), '\n');
  const Outcome again = cairn("import s.cairn stations st.csv", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(again.status, 0) << again.err;
  EXPECT_EQ(again.err, "");
  EXPECT_EQ(again.out, "imported 0 stations from st.csv (2500 already in the project)\n");
}

// Forced (CAIRN_PROGRESS_AFTER=0 and --progress), the progress line goes to
// stderr with the RowRate wording and stdout is byte for byte the same.
TEST_F(Streamed, ListProgressWhenAskedNeverOnStdout) {
  season(2500);
  const Outcome plain = cairn("list s.cairn planes");
  ASSERT_EQ(plain.status, 0) << plain.err;
  EXPECT_EQ(plain.err, "");
  const Outcome forced = cairn("list s.cairn planes --progress", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(forced.status, 0) << forced.err;
  EXPECT_EQ(forced.out, plain.out);
  EXPECT_EQ(forced.err.rfind("listing planes: 1000 of 2500 rows", 0), 0u) << forced.err;
  EXPECT_NE(forced.err.find("listing planes: 2500 of 2500 rows"), std::string::npos) << forced.err;
  EXPECT_EQ(forced.err.back(), '\n');
  // Asked, but not yet 2 s (the default): nothing; not asked and no terminal: nothing.
  EXPECT_EQ(cairn("list s.cairn planes --progress", "CAIRN_PROGRESS_AFTER=3600").err, "");
  EXPECT_EQ(cairn("list s.cairn planes", "CAIRN_PROGRESS_AFTER=0").err, "");
  // 2500 rows and a header: Python's csv module counts them.
  write("out.csv", forced.out);
  EXPECT_EQ(shell("/usr/bin/python3 -c \"import csv; print(len(list(csv.reader(open('out.csv', newline='')))))\""),
            "2501\n");
  const Outcome bad = cairn("list s.cairn planes --progress", "CAIRN_PROGRESS_AFTER=soon");
  EXPECT_NE(bad.status, 0);
  EXPECT_NE(bad.err.find("CAIRN_PROGRESS_AFTER"), std::string::npos) << bad.err;
}

// A project larger than the 1000 features between two progress figures,
// exported feature by feature: the counts in each file are what the sqlite3
// shell, ogrinfo and Python's json module count, and the progress line stays
// on stderr.
TEST_F(Streamed, ExportOfManyFeaturesCountsAsOutsideToolsCount) {
  season(2500);
  const Outcome g = cairn("export s.cairn s.gpkg --progress", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(g.status, 0) << g.err;
  EXPECT_NE(g.out.find("  stations: 2500\n  planar_readings: 2500\n"), std::string::npos) << g.out;
  EXPECT_EQ(g.out.find("rows"), std::string::npos) << g.out;
  // the first line at the start, the last with every feature written
  EXPECT_EQ(g.err.rfind("exporting: 0 of ", 0), 0u) << g.err;
  const std::string last = g.err.substr(g.err.rfind("exporting: "));
  unsigned long done = 0, total = 0;
  ASSERT_EQ(std::sscanf(last.c_str(), "exporting: %lu of %lu rows", &done, &total), 2) << g.err;
  EXPECT_EQ(done, total);
  EXPECT_GE(done, 5000u);
  EXPECT_EQ(shell("sqlite3 s.gpkg 'SELECT count(*) FROM stations; SELECT count(*) FROM planar_readings; "
                  "SELECT count(DISTINCT uuid) FROM planar_readings'"),
            "2500\n2500\n2500\n");
  const std::string ogr = shell("ogrinfo -ro -so -al s.gpkg");
  EXPECT_NE(ogr.find("Layer name: stations\n"), std::string::npos);
  EXPECT_NE(ogr.find("Feature Count: 2500\n"), std::string::npos) << ogr;

  const Outcome j = cairn("export s.cairn s.geojson");
  ASSERT_EQ(j.status, 0) << j.err;
  EXPECT_EQ(j.err, "");
  EXPECT_EQ(shell("/usr/bin/python3 -c \"import json, collections; d = json.load(open('s.geojson')); "
                  "c = collections.Counter(f['properties']['layer'] for f in d['features']); "
                  "print(c['stations'], c['planar_readings'], len(set(f['id'] for f in d['features'] "
                  "if f['properties']['layer'] == 'planar_readings')), len(d['features']))\""),
            "2500 2500 2500 " + std::to_string(done) + "\n");
  // ogrinfo reads the whole collection as one layer
  EXPECT_NE(shell("ogrinfo -ro -so -al s.geojson").find("Feature Count: " + std::to_string(done) + "\n"),
            std::string::npos);
}

// `cairn report` shows its progress line when asked; stdout keeps its one line.
TEST_F(Streamed, ReportProgressWhenAsked) {
  season(1200);
  const Outcome r = cairn("report s.cairn -o r.html --progress", "CAIRN_PROGRESS_AFTER=0");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.rfind("wrote r.html: 1200 stations, ", 0), 0u) << r.out;
  EXPECT_NE(r.err.find("report: 2402 of 2402 rows"), std::string::npos) << r.err;
  EXPECT_EQ(cairn("report s.cairn -o r2.html").err.find("rows"), std::string::npos);
}

// A season on paper: past 1 500 stations the report's plan leaves out the
// station codes and dip values, and a net draws the newest 2 000 poles (both
// said in the captions), so the page stays a size a browser opens. Each pole is
// a filled circle with a rim for bedding (the report's own key); the SVG
// elements (W3C SVG 1.1: circle, text) are counted in the figure's markup.
TEST_F(Streamed, ASeasonReportThinsWhatNoPageCouldShow) {
  ASSERT_EQ(cairn("new s.cairn --name Thinned --utm 8N").status, 0);
  const int n = 6000;
  std::string st = "station,easting,northing,elevation\n", pl = "station,kind,strike,dip\n";
  for (int i = 0; i < n; ++i) {
    const std::string code = "S" + std::to_string(i);
    st +=
        code + "," + std::to_string(400000 + 7 * (i % 100)) + "," + std::to_string(6500000 + 9 * (i / 100)) + ",100\n";
    pl += code + ",bedding," + std::to_string(i % 360) + "," + std::to_string(10 + i % 80) + "\n";
  }
  write("st.csv", st);
  write("pl.csv", pl);
  ASSERT_EQ(cairn("import s.cairn stations st.csv").status, 0);
  ASSERT_EQ(cairn("import s.cairn planes pl.csv").status, 0);
  const Outcome r = cairn("report s.cairn -o r.html");
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string page = slurp(file("r.html"));
  auto figure = [&](const std::string& cls, size_t from) {
    const size_t a = page.find("<figure class=\"" + cls + "\">", from);
    const size_t b = page.find("</figure>", a);
    return a == std::string::npos || b == std::string::npos ? std::string() : page.substr(a, b - a);
  };
  auto count = [](const std::string& s, const std::string& what) {
    size_t k = 0;
    for (size_t at = s.find(what); at != std::string::npos; at = s.find(what, at + 1)) ++k;
    return k;
  };
  const std::string plan = figure("plan", 0);
  ASSERT_FALSE(plan.empty());
  EXPECT_NE(plan.find("With 6000 stations (more than 1500 on one page) the station codes and dip values are left out"),
            std::string::npos);
  EXPECT_EQ(plan.find(">S5999<"), std::string::npos) << "no station code";
  EXPECT_LT(count(plan, "<text"), 100u) << "scale bar and north arrow only";
  const std::string net = figure("net", page.find("<section id=\"nets-units\""));
  ASSERT_FALSE(net.empty());
  EXPECT_NE(net.find("The newest 2000 of the 6000 poles are drawn; the contours and statistics use all of them."),
            std::string::npos);
  const size_t circles = count(net, "<circle");
  EXPECT_GE(circles, 2000u);
  EXPECT_LT(circles, static_cast<size_t>(n)) << "fewer markers than poles";
}

// The report's summary counts each reading under its own day and observer, or
// its station's when it states none, and the contact points under theirs
// (the readings are kept in the report's compact form, the points only
// counted as they are read). Expected rows worked out by hand from the
// records below; common practice for a field day's tally, no published source.
TEST_F(Streamed, TheSummaryCountsEachReadingUnderItsDayAndObserver) {
  using namespace cairn::store;
  ASSERT_EQ(cairn("new s.cairn --name Tally --utm 8N").status, 0);
  {
    OpenOptions o;
    o.backups = false;
    Project p = Project::open(file("s.cairn"), o);
    Person ab, cd;
    ab.initials = "AB", ab.name = "Ada B", cd.initials = "CD", cd.name = "Cy D";
    const std::string a = add(p, ab), c = add(p, cd);
    Unit u1, u2;
    u1.code = "Ua", u1.name = "lower sandstone", u2.code = "Ub", u2.name = "upper shale";
    u1.age_rank = 1, u2.age_rank = 2;
    Contact k;
    k.name = "Ua-Ub", k.lower_unit = add(p, u1), k.upper_unit = add(p, u2);
    const std::string contact = add(p, k);
    Station s;
    s.code = "S1", s.lat = 61.18, s.lon = -135.6, s.observer = a, s.time = "2026-07-01T10:00:00Z";
    const std::string station = add(p, s);
    PlanarReading undated;  // no time, no observer: the station's day and person
    undated.station = station, undated.measured_strike = 30, undated.measured_dip = 40;
    add(p, undated);
    PlanarReading own = undated;  // its own day and person
    own.meta = {}, own.observer = c, own.time = "2026-07-03T09:00:00Z", own.contact = contact;
    add(p, own);
    LinearReading l;  // its own day, the station's person
    l.station = station, l.measured_trend = 120, l.measured_plunge = 20, l.time = "2026-07-02T11:00:00Z";
    add(p, l);
    ContactPoint pt;
    pt.contact = contact, pt.lat = 61.181, pt.lon = -135.601, pt.observer = c, pt.time = "2026-07-02T12:00:00Z";
    add(p, pt);
  }
  const Outcome r = cairn("report s.cairn -o r.html");
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string page = slurp(file("r.html"));
  auto row = [](const std::string& day, const std::string& who, int st, int pl, int li, int pt) {
    auto n = [](int v) { return "<td class=\"num\">" + std::to_string(v) + "</td>"; };
    return "<tr><td class=\"day\">" + day + "</td><td>" + who + "</td>" + n(st) + n(pl) + n(li) + n(pt);
  };
  EXPECT_NE(page.find(row("2026-07-01", "AB (Ada B)", 1, 1, 0, 0)), std::string::npos) << page.substr(0, 6000);
  EXPECT_NE(page.find(row("2026-07-02", "AB (Ada B)", 0, 0, 1, 0)), std::string::npos);
  EXPECT_NE(page.find(row("2026-07-02", "CD (Cy D)", 0, 0, 0, 1)), std::string::npos);
  EXPECT_NE(page.find(row("2026-07-03", "CD (Cy D)", 0, 1, 0, 0)), std::string::npos);
  EXPECT_NE(page.find("3 days (2026-07-01 to 2026-07-03), 2 people: 1 station, 2 planar readings, 1 linear reading, "
                      "1 contact point"),
            std::string::npos);
  // The reading naming the contact is drawn on its net.
  EXPECT_NE(page.find("poles to readings naming it (1)"), std::string::npos);
}
