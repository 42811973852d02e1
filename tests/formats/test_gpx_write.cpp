// GPX 1.1 track writing, read back by libxml2's xmllint (Debian's
// libxml2-utils), which the project did not write: the document is
// well-formed XML 1.0, its root is `gpx` version 1.1 in the GPX 1.1 namespace,
// and each `trkpt` carries lat/lon with `ele` before `time` (the order of the
// GPX 1.1 schema's wptType sequence; source: GPX 1.1 schema documentation,
// topografix.com, value from memory as the schema file is not bundled).
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
