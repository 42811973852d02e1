// GPX 1.1 waypoints read by Cairn's own XML reader.
// Source: the GPX 1.1 schema (http://www.topografix.com/GPX/1/1/gpx.xsd):
// root <gpx> in namespace http://www.topografix.com/GPX/1/1; wptType has
// required attributes lat (latitudeType, -90..90) and lon (longitudeType,
// -180..180) and optional ele, time, name, cmt, desc, sym, extensions. XML
// rules from W3C XML 1.0 (Fifth Edition) and Namespaces in XML 1.0.
#include <gtest/gtest.h>

#include "formats/gpx.h"
#include "storage/import.h"
#include "storage/repository.h"
#include "formats/xml.h"
#include "storage_test_util.h"

using namespace cairn::store;
using namespace cairn::formats;
using cairn::store::testing::read_file;
using cairn::store::testing::TempDir;

namespace {
std::string fixture() { return read_file(std::string(CAIRN_SOURCE_DIR) + "/tests/storage/data/handheld.gpx"); }
}  // namespace

TEST(Gpx, ReadsAHandheldFile) {
  GpxFile g = parse_gpx(fixture(), "handheld.gpx");
  ASSERT_TRUE(g.errors.empty()) << g.errors.front();
  EXPECT_EQ(g.creator, "Example Handheld 60x");
  ASSERT_EQ(g.waypoints.size(), 3u);  // the track point is not a waypoint
  const GpxWaypoint& a = g.waypoints[0];
  EXPECT_DOUBLE_EQ(a.lat, 46.512345);
  EXPECT_DOUBLE_EQ(a.lon, 14.254321);
  ASSERT_TRUE(a.elevation);
  EXPECT_DOUBLE_EQ(*a.elevation, 1211.37);
  EXPECT_EQ(a.time, "2025-06-14T08:15:42Z");
  EXPECT_EQ(a.name, "S101");
  EXPECT_EQ(a.comment, "gneiss knob");
  EXPECT_EQ(a.symbol, "Flag, Blue");
  const GpxWaypoint& b = g.waypoints[1];
  EXPECT_FALSE(b.elevation);  // ele is optional in wptType
  // &amp; and &#x2014; (XML 1.0 section 4.1): "&" and an em dash in UTF-8.
  EXPECT_EQ(b.description, "stream bed & fix lost under trees \xE2\x80\x94 no elevation");
  const GpxWaypoint& c = g.waypoints[2];
  EXPECT_EQ(c.name, "S103 <sea cliff>");  // CDATA section kept literally
  EXPECT_DOUBLE_EQ(c.lon, -179.99995);    // attribute order does not matter
  EXPECT_DOUBLE_EQ(*c.elevation, -12.5);
  EXPECT_EQ(c.line, 35);
}

TEST(Gpx, PrefixedRootNamespaceIsTheSameGpx) {
  // Namespaces in XML 1.0: the prefix is only a local alias for the URI.
  const char* text =
      "<g:gpx xmlns:g=\"http://www.topografix.com/GPX/1/1\" version=\"1.1\" creator=\"x\">"
      "<g:wpt lat=\"1\" lon=\"2\"><g:name>A</g:name></g:wpt>"
      "<wpt lat=\"3\" lon=\"4\"/></g:gpx>";  // unprefixed <wpt> here is in no namespace: not a GPX waypoint
  GpxFile g = parse_gpx(text, "p.gpx");
  ASSERT_TRUE(g.errors.empty());
  ASSERT_EQ(g.waypoints.size(), 1u);
  EXPECT_EQ(g.waypoints[0].name, "A");
}

TEST(Gpx, ErrorsNameLineColumnAndRule) {
  const std::string text =
      "<gpx xmlns=\"http://www.topografix.com/GPX/1/1\" version=\"1.1\" creator=\"x\">\n"
      "  <wpt lat=\"91\" lon=\"10\"><name>A</name></wpt>\n"
      "  <wpt lon=\"10\"><name>B</name></wpt>\n"
      "  <wpt lat=\"1\" lon=\"east\"><ele>high</ele></wpt>\n"
      "  <wpt lat=\"1\" lon=\"1\"><time>14/06/2025</time></wpt>\n"
      "</gpx>\n";
  GpxFile g = parse_gpx(text, "w.gpx");
  const std::vector<std::string> expected = {
      "w.gpx:2:3: lat-range: latitude 91 is outside -90..90 degrees",
      "w.gpx:3:3: required: waypoint has no lat attribute",
      "w.gpx:4:3: number: longitude 'east' is not a number",
      "w.gpx:4:27: number: elevation 'high' is not a number",
      "w.gpx:5:24: time: '14/06/2025' is not an ISO 8601 date or date and time (YYYY-MM-DD or "
      "YYYY-MM-DDThh:mm[:ss][Z|+hh:mm])",
  };
  EXPECT_EQ(g.errors, expected);
  EXPECT_TRUE(g.waypoints.empty());
}

TEST(Gpx, RejectsOtherRootsAndBrokenXml) {
  GpxFile v10 = parse_gpx("<gpx xmlns=\"http://www.topografix.com/GPX/1/0\" version=\"1.0\"/>", "old.gpx");
  ASSERT_EQ(v10.errors.size(), 1u);
  EXPECT_EQ(v10.errors[0],
            "old.gpx:1:1: gpx: the root element is <gpx> in namespace 'http://www.topografix.com/GPX/1/0', not "
            "<gpx> in the GPX 1.1 namespace http://www.topografix.com/GPX/1/1");
  // XML 1.0 well-formedness: end tag must match the start tag.
  GpxFile broken =
      parse_gpx("<gpx xmlns=\"http://www.topografix.com/GPX/1/1\">\n<wpt lat=\"1\" lon=\"2\"></gpx>", "b.gpx");
  ASSERT_EQ(broken.errors.size(), 1u);
  // expat's message and position (the name of the end tag that does not match).
  EXPECT_EQ(broken.errors[0], "b.gpx:2:24: xml: mismatched tag");
  EXPECT_FALSE(parse_xml("<a>&nbsp;</a>", "e.xml"));     // only the five predefined entities exist
  EXPECT_FALSE(parse_xml("<a x='1' x='2'/>", "e.xml"));  // XML 1.0 3.1: unique attribute names
  EXPECT_FALSE(parse_xml("<p:a/>", "e.xml"));            // undeclared prefix
  EXPECT_FALSE(parse_xml("<!DOCTYPE a><a/>", "e.xml"));
}

TEST(Gpx, ImportsWaypointsAsStationsOrContactPoints) {
  TempDir dir;
  OpenOptions o;
  o.backups = false;
  Project p = Project::create(dir.file("g.cairn"), NewProject{"gpx", "", North::True, 0}, o);
  ImportReport r = import_gpx(p, fixture(), "handheld.gpx");
  ASSERT_TRUE(r.ok()) << r.errors.front();
  EXPECT_EQ(r.added, 3);
  auto s = find_station(p, "S102");
  ASSERT_TRUE(s);
  EXPECT_FALSE(s->elevation);
  EXPECT_EQ(s->source, PositionSource::Gps);
  EXPECT_EQ(find_station(p, "S101")->notes, "gneiss knob");
  // Again: a no-op.
  r = import_gpx(p, fixture(), "handheld.gpx");
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.added, 0);
  EXPECT_EQ(r.skipped, 3);
  EXPECT_EQ(list_stations(p).size(), 3u);

  // As contact points of a contact.
  Unit a, b;
  a.code = "A";
  a.name = "a";
  b.code = "B";
  b.name = "b";
  b.age_rank = 2;
  Contact c;
  c.name = "A-B";
  c.lower_unit = add(p, a);
  c.upper_unit = add(p, b);
  add(p, c);
  r = import_gpx(p, fixture(), "handheld.gpx", "A-B");
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.added, 3);
  EXPECT_EQ(import_gpx(p, fixture(), "handheld.gpx", "A-B").skipped, 3);
  EXPECT_EQ(list_points(p).size(), 3u);
  r = import_gpx(p, fixture(), "handheld.gpx", "no such contact");
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0], "handheld.gpx:1:1: unknown-contact: no contact 'no such contact' in the project");

  // A waypoint without a name cannot be a station; nothing of the file is written.
  const std::string unnamed =
      "<gpx xmlns=\"http://www.topografix.com/GPX/1/1\" version=\"1.1\" creator=\"x\">\n"
      "<wpt lat=\"1\" lon=\"1\"><name>S900</name></wpt>\n"
      "<wpt lat=\"1\" lon=\"1\"></wpt>\n</gpx>";
  r = import_gpx(p, unnamed, "u.gpx");
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0], "u.gpx:3:1: required: waypoint has no <name>; a station needs its code there");
  EXPECT_FALSE(find_station(p, "S900"));
}
