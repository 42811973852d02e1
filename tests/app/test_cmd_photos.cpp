// `cairn photos FILE FOLDER`, run as a user runs it, on photos made for the
// test. Source: exiftool output (the photos' EXIF is written by exiftool,
// Debian's libimage-exiftool-perl, on JPEGs made by Pillow); the SHA-256 of
// each file from coreutils' sha256sum (FIPS 180-4); hand-worked matches in the
// comments (windows: 10 min before a station to the next station of the same
// person, at most 60 min); exit status 0 / 1 / 2 for success, failure, usage
// error (common practice, as in BSD sysexits and GNU tools).
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>

#include "storage/photos.h"
#include "storage/project.h"
#include "storage/repository.h"
#include "tests/app/cli_test_support.h"

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;
namespace store = cairn::store;

namespace {

std::string shell(const std::string& cmd) {
  std::unique_ptr<FILE, int (*)(FILE*)> p(popen((cmd + " 2>/dev/null").c_str(), "r"), pclose);
  std::string out;
  char buf[256];
  while (p && fgets(buf, sizeof buf, p.get())) out += buf;
  return out;
}

class PhotosVerb : public CliTest {
 protected:
  void SetUp() override {
    CliTest::SetUp();
    if (shell("command -v exiftool").empty()) GTEST_SKIP() << "exiftool missing (scripts/install-deps.sh --test)";
    ASSERT_EQ(cairn("new p.cairn --name p --utm 33N").status, 0);
    // AB's day: S1 09:00, S2 09:40; CD's S3 09:45 beside S2.
    write("s.csv",
          "station,lat,lon,observer,time\n"
          "S1,46.50000,14.25000,AB,2026-07-14T09:00:00\n"
          "S2,46.50500,14.25000,AB,2026-07-14T09:40:00\n"
          "S3,46.50500,14.25010,CD,2026-07-14T09:45:00\n");
    ASSERT_EQ(cairn("import p.cairn stations s.csv").status, 0);
    std::filesystem::create_directories(dir_ / "photos" / "day1");
    // a: 08:48:00 at S1 -> +00:02:10 -> 08:50:10, S1's window opens 08:50 -> S1.
    photo("photos/day1/a.jpg", 10,
          "'-DateTimeOriginal=2026:07:14 08:48:00' -GPSLatitude=46.5 -GPSLatitudeRef=N "
          "-GPSLongitude=14.25 -GPSLongitudeRef=E");
    // b: 09:33:00 -> 09:35:10, 11 m south of S2 and 545 m north of S1 -> S2.
    photo("photos/day1/b.jpg", 20,
          "'-DateTimeOriginal=2026:07:14 09:33:00' -GPSLatitude=46.5049 -GPSLatitudeRef=N "
          "-GPSLongitude=14.25 -GPSLongitudeRef=E");
    // c: 10:50:00 -> 10:52:10, after S2's window closed at 10:40 -> not matched.
    photo("photos/day1/c.jpg", 30, "'-DateTimeOriginal=2026:07:14 10:50:00'");
    // d: the same content as a (a copy): recorded once.
    std::filesystem::copy_file(file("photos/day1/a.jpg"), file("photos/day1/d.jpg"));
  }
  void photo(const std::string& name, int shade, const std::string& tags) {
    const std::string f = file(name);
    ASSERT_EQ(std::system(("/usr/bin/python3 -c \"from PIL import Image; Image.new('RGB',(40,30),(90,60," +
                           std::to_string(shade) + ")).save('" + f + "', quality=80)\"")
                              .c_str()),
              0);
    ASSERT_EQ(std::system(("exiftool -q -overwrite_original " + tags + " '" + f + "'").c_str()), 0);
  }
  std::vector<store::Photo> recorded() {
    store::OpenOptions o;
    o.read_only = true;
    auto p = store::Project::open(file("p.cairn"), o);
    return store::list_photos(p);
  }
};

TEST_F(PhotosVerb, ListsThenRecordsOnceInOneTransaction) {
  // Two people's stations and no --person: refused, naming them.
  Outcome r = cairn("photos p.cairn photos --clock-offset +00:02:10");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("several people (AB, CD)"), std::string::npos) << r.err;

  r = cairn("photos p.cairn photos --clock-offset +00:02:10 --person AB");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("photos/day1/a.jpg -> S1, 0 m, -9 min 50 s"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("photos/day1/b.jpg -> S2, 11 m, -4 min 50 s"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("photos/day1/c.jpg: not matched: no station's time window holds 2026-07-14T10:52:10"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("3 to record, 1 not matched"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("nothing recorded: run again with --yes"), std::string::npos) << r.out;
  EXPECT_TRUE(recorded().empty());

  r = cairn("photos p.cairn photos --clock-offset +00:02:10 --person AB --yes --json");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("\"recorded\":2}"), std::string::npos) << r.out;  // d has a's content
  const auto ph = recorded();
  ASSERT_EQ(ph.size(), 2u);
  EXPECT_EQ(ph[0].path, "photos/day1/a.jpg");
  EXPECT_EQ(ph[0].sha256, shell("sha256sum '" + file("photos/day1/a.jpg") + "'").substr(0, 64));
  EXPECT_EQ(ph[0].time, "2026-07-14T08:50:10");
  EXPECT_EQ(ph[0].caption, "");
  EXPECT_EQ(ph[1].path, "photos/day1/b.jpg");
  {
    store::OpenOptions o;
    o.read_only = true;
    auto p = store::Project::open(file("p.cairn"), o);
    EXPECT_EQ(store::get_station(p, ph[1].station)->code, "S2");
    const auto trail = store::audit_trail(p, ph[0].meta.uuid);
    ASSERT_EQ(trail.size(), 1u);
    EXPECT_EQ(trail[0].action, "insert");
  }

  // Again: nothing new.
  r = cairn("photos p.cairn photos --clock-offset +00:02:10 --person AB --yes");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("0 to record, 1 not matched, 3 already recorded"), std::string::npos) << r.out;
  EXPECT_EQ(recorded().size(), 2u);
}

// The GeoPackage's photos layer read back by GDAL (ogr2ogr, reprojecting to
// WGS84 with PROJ): one point per reference at its station's position.
// Merge: a warning per photo file missing beside the camp file.
TEST_F(PhotosVerb, ExportLayerAndMergeWarnings) {
  ASSERT_EQ(cairn("photos p.cairn photos --clock-offset +00:02:10 --person AB --yes").status, 0);
  ASSERT_EQ(cairn("export p.cairn out.gpkg").status, 0);
  const std::string csv =
      shell("ogr2ogr -f CSV /vsistdout/ '" + file("out.gpkg") +
            "' photos -t_srs EPSG:4326 -lco GEOMETRY=AS_XY -select station,path,caption,sha256,time");
  ASSERT_FALSE(csv.empty()) << "ogr2ogr (gdal-bin) missing or failed";
  EXPECT_EQ(csv.substr(0, csv.find('\n')), "X,Y,station,path,caption,sha256,time");
  const std::string sha_a = shell("sha256sum '" + file("photos/day1/a.jpg") + "'").substr(0, 64);
  EXPECT_NE(csv.find("14.25,46.5,S1,photos/day1/a.jpg,," + sha_a + ",2026-07-14T08:50:10"), std::string::npos) << csv;
  EXPECT_NE(csv.find("14.25,46.505,S2,photos/day1/b.jpg,,"), std::string::npos) << csv;

  std::filesystem::create_directories(dir_ / "camp");
  Outcome r = cairn("merge camp/camp.cairn p.cairn --json");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("photo file photos/day1/a.jpg (station S1) is missing beside camp/camp.cairn"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("photo file photos/day1/b.jpg (station S2) is missing"), std::string::npos) << r.out;
  std::filesystem::create_directories(dir_ / "camp" / "photos" / "day1");
  std::filesystem::copy_file(file("photos/day1/a.jpg"), file("camp/photos/day1/a.jpg"));
  r = cairn("merge camp/camp.cairn p.cairn");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.find("photos/day1/a.jpg (station S1) is missing"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("photos/day1/b.jpg (station S2) is missing"), std::string::npos) << r.out;
}

// The report embeds each photo's thumbnail as a JPEG data: URI (RFC 2397);
// Python's base64 and Pillow (outside readers) decode them.
TEST_F(PhotosVerb, ReportEmbedsThumbnails) {
  ASSERT_EQ(cairn("photos p.cairn photos --clock-offset +00:02:10 --person AB --yes").status, 0);
  Outcome r = cairn("report p.cairn -o r.html");
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string py =
      "/usr/bin/python3 -c \"import re,base64,io,sys; from PIL import Image; "
      "t=open(sys.argv[1]).read(); "
      "[print(Image.open(io.BytesIO(base64.b64decode(m))).format, Image.open(io.BytesIO(base64.b64decode(m))).size) "
      "for m in re.findall(r'src=.data:image/jpeg;base64,([A-Za-z0-9+/=]+)', t)]\" '" +
      file("r.html") + "'";
  // Pillow made the photos 40 x 30 pixels; they are below the thumbnail size, so kept as they are.
  EXPECT_EQ(shell(py), "JPEG (40, 30)\nJPEG (40, 30)\n");
  const std::string html = slurp(file("r.html"));
  EXPECT_NE(html.find("<b>S1</b> photos/day1/a.jpg"), std::string::npos);
  EXPECT_EQ(html.find("src=\"http"), std::string::npos);  // nothing fetched
}

TEST_F(PhotosVerb, ClockFromAPhotoOfTheTabletClock) {
  // The camera wrote 10:29:55 while the tablet's clock showed 10:32:05: +00:02:10.
  photo("clock.jpg", 40, "'-DateTimeOriginal=2026:07:14 10:29:55'");
  Outcome r = cairn("photos p.cairn photos --person AB --clock-photo clock.jpg --shown 2026-07-14T10:32:05");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("camera clock offset +00:02:10 (from clock.jpg"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("a.jpg -> S1"), std::string::npos) << r.out;
}

TEST_F(PhotosVerb, BadArgumentsWriteNothing) {
  EXPECT_EQ(cairn("photos p.cairn photos --clock-offset 2:10 --person AB").status, 2);
  EXPECT_EQ(cairn("photos p.cairn photos --clock-photo x.jpg --person AB").status, 2);  // no --shown
  EXPECT_EQ(cairn("photos p.cairn photos --person ZZ --yes").status, 1);
  // A folder outside the project's folder cannot be named relative to it.
  Outcome r = cairn("photos p.cairn / --person AB --yes");
  EXPECT_EQ(r.status, 1);
  EXPECT_NE(r.err.find("is not inside the project's folder"), std::string::npos) << r.err;
  EXPECT_TRUE(recorded().empty());
}

TEST_F(PhotosVerb, BatchIsAllOrNothing) {
  store::OpenOptions o;
  o.backups = false;
  auto p = store::Project::open(file("p.cairn"), o);
  store::Photo good, bad;
  good.path = "photos/day1/a.jpg";
  good.sha256 = std::string(64, 'a');
  bad.path = "../outside.jpg";  // photo-path rule
  bad.sha256 = std::string(64, 'b');
  EXPECT_THROW(store::add_photos(p, {good, bad}), store::ValidationError);
  EXPECT_TRUE(store::list_photos(p).empty());
}

}  // namespace
