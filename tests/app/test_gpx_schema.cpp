// Every GPX file Cairn writes is valid GPX 1.1: the demo's handheld waypoints
// (`cairn demo`) and the day tracks (`cairn export FILE OUT.gpx`), validated
// with libxml2's `xmllint --schema` (Debian libxml2-utils) against the
// published schema; the export holds every fix of the project, one track per
// person and day, counted by the sqlite3 shell (Debian sqlite3) in the project
// file itself.
//
// Source: GPX 1.1 schema, TopoGrafix (tests/reference/data/gpx11.xsd, see the
// README there); the day is the first ten characters of an ISO 8601 UTC time
// (ISO 8601-1:2019 extended format).
#include "tests/app/cli_test_support.h"

using cairn::cli_test::CliTest;

namespace {

class GpxSchema : public CliTest {
 protected:
  // Exit status of xmllint validating FILE against the GPX 1.1 schema; its messages in *errors.
  int validate(const std::string& name, std::string* errors) const {
    const std::string cmd = "xmllint --noout --schema '" + std::string(CAIRN_REFERENCE_DIR) + "/gpx11.xsd' '" +
                            file(name) + "' 2>'" + file("xmllint.txt") + "'";
    const int rc = std::system(cmd.c_str());
    *errors = slurp(file("xmllint.txt"));
    return WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
  }
  std::string shell(const std::string& cmd) const {
    std::system((cmd + " > '" + file("shell.txt") + "' 2>&1").c_str());
    std::string s = slurp(file("shell.txt"));
    while (!s.empty() && (s.back() == '\n' || s.back() == ' ')) s.pop_back();
    return s;
  }
};

}  // namespace

TEST_F(GpxSchema, TheDemosWaypointsAndEveryExportedDayTrackAreValidGpx11) {
  ASSERT_EQ(std::system("command -v xmllint >/dev/null && command -v sqlite3 >/dev/null"), 0)
      << "xmllint or sqlite3 is missing: scripts/install-deps.sh --test";
  ASSERT_EQ(cairn("demo demo").status, 0);
  std::string errors;
  EXPECT_EQ(validate("demo/handheld.gpx", &errors), 0) << errors;

  const auto out = cairn("export demo/camp.cairn tracks.gpx");
  ASSERT_EQ(out.status, 0) << out.err;
  EXPECT_EQ(validate("tracks.gpx", &errors), 0) << errors;

  const std::string db = file("demo/camp.cairn");
  const std::string fixes = shell("sqlite3 -readonly '" + db + "' 'SELECT count(*) FROM track_points'");
  const std::string days =
      shell("sqlite3 -readonly '" + db + "' 'SELECT count(DISTINCT person || substr(time, 1, 10)) FROM track_points'");
  EXPECT_GT(std::stol(fixes), 100) << "the demo's mappers have day tracks";
  auto xpath = [&](const std::string& expr) {
    return shell("xmllint --xpath \"" + expr + "\" '" + file("tracks.gpx") + "'");
  };
  EXPECT_EQ(xpath("count(//*[local-name()='trkpt'])"), fixes);
  EXPECT_EQ(xpath("count(//*[local-name()='trk'])"), days);
  // Every point has its time; and the check bites: a copy with a point moved
  // to longitude 180 (outside the schema's longitudeType) is refused.
  EXPECT_EQ(xpath("count(//*[local-name()='trkpt'][not(*[local-name()='time'])])"), "0");
  std::string text = slurp(file("tracks.gpx"));
  const auto at = text.find("lon=\"");
  ASSERT_NE(at, std::string::npos);
  text.replace(at + 5, text.find('"', at + 5) - at - 5, "180.0");
  write("broken.gpx", text);
  EXPECT_NE(validate("broken.gpx", &errors), 0);
}
