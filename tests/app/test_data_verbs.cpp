// The `cairn new`, `cairn import` and `cairn list` verbs, run as a user runs them.
// Sources: the command descriptions; exit status 0 for success, 1 for
// a failure, 2 for a usage error (common practice for command-line tools, as
// in BSD sysexits and GNU tools); GPX 1.1 schema for the waypoint file.
#include "tests/app/cli_test_support.h"

#include <array>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;

namespace {

class Verbs : public CliTest {};

}  // namespace

TEST_F(Verbs, NewImportList) {
  Outcome r = cairn("new ridge.cairn --name 'Ridge traverse' --utm 33n --north magnetic --declination 4.5");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out, "created ridge.cairn: project 'Ridge traverse', UTM zone 33N, readings default to magnetic north\n");
  EXPECT_EQ(cairn("new ridge.cairn --name again").status, 1);  // never overwrite a project

  write("units.csv", "age_rank,unit,name\n1,Pgs,grey schist\n2,Qm,\"marble, pale\"\n");
  r = cairn("import ridge.cairn units units.csv");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out, "imported 2 units from units.csv\n");
  r = cairn("import ridge.cairn units units.csv");
  EXPECT_EQ(r.out, "imported 0 units from units.csv (2 already in the project)\n");

  r = cairn("list ridge.cairn units");
  ASSERT_EQ(r.status, 0) << r.err;
  // Okabe & Ito (2008) palette for the default colours, by age rank.
  EXPECT_EQ(r.out, "unit,name,age_rank,colour\nPgs,grey schist,1,#E69F00\nQm,\"marble, pale\",2,#56B4E9\n");

  // UTM definition: E 500000 on zone 33's central meridian (15 E), N 0 on the equator.
  write("stations.csv", "station,easting,northing,elevation\nS1,500000,0,10\n");
  ASSERT_EQ(cairn("import ridge.cairn stations stations.csv").status, 0);
  EXPECT_EQ(cairn("list ridge.cairn stations").out,
            "station,lat,lon,elevation,h_accuracy,v_accuracy,source,unit,observer,time,notes\n"
            "S1,0,15,10,,,map,,,,\n");
  write("planes.csv", "station,kind,strike,dip,declination\nS1,bedding,030,40,4.5\n");
  ASSERT_EQ(cairn("import ridge.cairn planes planes.csv").status, 0);
  EXPECT_EQ(cairn("list ridge.cairn planes").out,
            "station,kind,strike,dip,north,declination,contact,quality,facing,ref,time,notes\n"
            "S1,bedding,30,40,magnetic,4.5,,,unknown,,,\n");
}

TEST_F(Verbs, BadImportWritesNothingAndSaysWhere) {
  ASSERT_EQ(cairn("new f.cairn --name f").status, 0);
  write("s.csv", "station,lat,lon\nS1,46.5,14.2\nS2,91,14.2\nS3,46.5,east\n");
  Outcome r = cairn("import f.cairn stations s.csv");
  EXPECT_EQ(r.status, 1);
  EXPECT_EQ(r.err,
            "s.csv:3:2: lat-range: latitude 91 is outside -90..90 degrees\n"
            "s.csv:4:3: number: longitude 'east' is not a number\n"
            "nothing imported: 2 problems in s.csv\n");
  EXPECT_EQ(cairn("list f.cairn stations").out,
            "station,lat,lon,elevation,h_accuracy,v_accuracy,source,unit,observer,time,notes\n");
}

TEST_F(Verbs, Waypoints) {
  ASSERT_EQ(cairn("new w.cairn --name w").status, 0);
  const std::string gpx = std::string(CAIRN_SOURCE_DIR) + "/tests/storage/data/handheld.gpx";
  Outcome r = cairn("import w.cairn waypoints '" + gpx + "'");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out, "imported 3 stations from " + gpx + "\n");
  r = cairn("list w.cairn stations");
  EXPECT_NE(r.out.find("S102,46.5131,14.256,,,,gps,,,2025-06-14T09:03:07Z,"), std::string::npos) << r.out;
}

TEST_F(Verbs, UsageErrors) {
  EXPECT_EQ(cairn("new x.cairn").status, 2);                     // --name is required
  EXPECT_EQ(cairn("new x.cairn --name x --utm 61N").status, 2);  // zones are 1..60
  EXPECT_EQ(cairn("new x.cairn --name x --north grid").status, 2);
  ASSERT_EQ(cairn("new y.cairn --name y").status, 0);
  EXPECT_EQ(cairn("list y.cairn rocks").status, 2);
  EXPECT_EQ(cairn("import y.cairn rocks r.csv").status, 2);
  EXPECT_EQ(cairn("import y.cairn units r.csv --contact A").status, 2);
  Outcome r = cairn("list missing.cairn units");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("no project file missing.cairn"), std::string::npos) << r.err;
}
