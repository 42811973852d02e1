// GPX 1.1 track writing, read back by libxml2's xmllint (Debian's
// libxml2-utils), which the project did not write: the document is
// well-formed XML 1.0, its root is `gpx` version 1.1 in the GPX 1.1 namespace,
// and each `trkpt` carries lat/lon with `ele` before `time` (the order of the
// GPX 1.1 schema's wptType sequence). The whole document is validated against
// the GPX 1.1 schema itself (source: GPX 1.1 schema, TopoGrafix,
// tests/reference/data/gpx11.xsd) with `xmllint --schema`.
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <memory>
#include <stdexcept>

#include "formats/gpx_write.h"

using namespace cairn::formats;

namespace {

// xmllint's output for an XPath expression on FILE ("" when it fails).
// Whether xmllint finds FILE valid against the GPX 1.1 schema (its messages in *errors).
bool valid_gpx11(const std::string& file, std::string* errors = nullptr) {
  const std::string cmd =
      "xmllint --noout --schema '" + std::string(CAIRN_REFERENCE_DIR) + "/gpx11.xsd' '" + file + "' 2>&1";
  std::unique_ptr<FILE, int (*)(FILE*)> p(popen(cmd.c_str(), "r"), pclose);
  std::string out;
  char buf[256];
  while (p && fgets(buf, sizeof buf, p.get())) out += buf;
  const int rc = pclose(p.release());
  if (errors) *errors = out;
  return rc == 0;
}

std::string xpath(const std::string& file, const std::string& expr) {
  const std::string cmd = "xmllint --xpath \"" + expr + "\" '" + file + "' 2>/dev/null";
  std::unique_ptr<FILE, int (*)(FILE*)> p(popen(cmd.c_str(), "r"), pclose);
  std::string out;
  char buf[256];
  while (p && fgets(buf, sizeof buf, p.get())) out += buf;
  while (!out.empty() && (out.back() == '\n' || out.back() == ' ')) out.pop_back();
  return out;
}

}  // namespace

TEST(GpxWrite, TracksAreWellFormedGpx11InTheSchemasOrder) {
  ASSERT_EQ(std::system("command -v xmllint >/dev/null 2>&1"), 0)
      << "xmllint is missing: scripts/install-deps.sh --test";
  const std::vector<GpxTrack> tracks{
      {"AQ 2026-07-06 <day> & more",
       {{{61.1818333, -135.59, 1012.5, "2026-07-06T17:00:00Z"}, {61.1819, -135.5901, std::nullopt, ""}}}},
      {"BX", {{{-45.5, 179.99999999, std::nullopt, "2026-07-06T18:00:00Z"}}, {{0, -180, 0.0, ""}}}}};
  const std::string path = (std::filesystem::temp_directory_path() / "cairn-gpx-write-test.gpx").string();
  std::ofstream(path) << write_gpx_tracks(tracks, "Cairn \"test\"");
  EXPECT_EQ(std::system(("xmllint --noout '" + path + "'").c_str()), 0);  // well-formed XML 1.0
  const std::string ns = "namespace-uri(/*)";
  EXPECT_EQ(xpath(path, "string(" + ns + ")"), "http://www.topografix.com/GPX/1/1");
  EXPECT_EQ(xpath(path, "string(/*/@version)"), "1.1");
  EXPECT_EQ(xpath(path, "string(/*/@creator)"), "Cairn \"test\"");
  EXPECT_EQ(xpath(path, "count(//*[local-name()='trk'])"), "2");
  EXPECT_EQ(xpath(path, "count(//*[local-name()='trkseg'])"), "3");
  EXPECT_EQ(xpath(path, "count(//*[local-name()='trkpt'])"), "4");
  EXPECT_EQ(xpath(path, "string(//*[local-name()='trk'][1]/*[local-name()='name'])"), "AQ 2026-07-06 <day> & more");
  EXPECT_EQ(xpath(path, "string(//*[local-name()='trkpt'][1]/@lat)"), "61.18183330");
  EXPECT_EQ(xpath(path, "local-name(//*[local-name()='trkpt'][1]/*[1])"), "ele");
  EXPECT_EQ(xpath(path, "local-name(//*[local-name()='trkpt'][1]/*[2])"), "time");
  EXPECT_EQ(xpath(path, "string(//*[local-name()='trkpt'][1]/*[local-name()='ele'])"), "1012.50");
  std::filesystem::remove(path);
  // GPX 1.1: longitude -180 <= lon < 180, latitude -90..90.
  EXPECT_THROW(write_gpx_tracks({{"bad", {{{10, 180, std::nullopt, ""}}}}}, "Cairn"), std::invalid_argument);
  EXPECT_THROW(write_gpx_tracks({{"bad", {{{90.5, 0, std::nullopt, ""}}}}}, "Cairn"), std::invalid_argument);
}

// The writer's documents against the GPX 1.1 schema (tests/reference/data/gpx11.xsd):
// text to escape, points without elevation or time, several segments, the
// corners of the coordinate ranges (latitude -90..90, longitude -180 up to but
// not including 180: the schema's latitudeType and longitudeType), and no track at all.
TEST(GpxWrite, TracksAreValidAgainstTheGpx11Schema) {
  ASSERT_EQ(std::system("command -v xmllint >/dev/null 2>&1"), 0)
      << "xmllint is missing: scripts/install-deps.sh --test";
  const std::string dir = std::filesystem::temp_directory_path().string();
  const std::vector<std::vector<GpxTrack>> docs{
      {{"AQ 2026-07-06 <day> & \"more\" 'x'",
        {{{61.1818333, -135.59, 1012.5, "2026-07-06T17:00:00Z"}, {61.1819, -135.5901, std::nullopt, ""}},
         {{-90, -180, -12.25, "2026-07-06T17:00:01.250Z"}, {90, 179.99999999, std::nullopt, "2026-07-06T18:00:00Z"}}}},
       {"", {{}}}},
      {},
  };
  for (size_t i = 0; i < docs.size(); ++i) {
    const std::string path = dir + "/cairn-gpx-schema-" + std::to_string(i) + ".gpx";
    std::ofstream(path) << write_gpx_tracks(docs[i], "Cairn\ttest\x01");
    std::string errors;
    EXPECT_TRUE(valid_gpx11(path, &errors)) << errors;
    std::filesystem::remove(path);
  }
  // The check bites: `time` before `ele` breaks the schema's order, and a
  // longitude of 180 its range.
  const std::string bad = dir + "/cairn-gpx-schema-bad.gpx";
  for (const char* pt : {"<trkpt lat=\"1\" lon=\"2\"><time>2026-07-06T17:00:00Z</time><ele>3</ele></trkpt>",
                         "<trkpt lat=\"1\" lon=\"180\"/>"}) {
    std::ofstream(bad) << "<?xml version=\"1.0\"?><gpx version=\"1.1\" creator=\"x\" "
                          "xmlns=\"http://www.topografix.com/GPX/1/1\"><trk><trkseg>"
                       << pt << "</trkseg></trk></gpx>";
    EXPECT_FALSE(valid_gpx11(bad)) << pt;
  }
  std::filesystem::remove(bad);
}
