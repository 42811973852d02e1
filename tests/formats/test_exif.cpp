// EXIF time and GPS position of photos (formats/exif.h) against exiftool
// (Debian's libimage-exiftool-perl), which the project did not write.
// Source: exiftool output. The JPEGs are made at test time in a temporary
// folder: the picture by Pillow (Debian's python3-pil), the EXIF tags written
// by exiftool; every expected value is what `exiftool -n` prints for the file
// (its Composite:GPSLatitude/GPSLongitude/GPSAltitude carry the sign of the
// hemisphere and altitude references).
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>

#include "formats/exif.h"
#include "formats/image.h"

using namespace cairn::formats;
namespace fs = std::filesystem;

namespace {

std::string run(const std::string& cmd) {
  std::unique_ptr<FILE, int (*)(FILE*)> p(popen((cmd + " 2>/dev/null").c_str(), "r"), pclose);
  std::string out;
  char buf[256];
  while (p && fgets(buf, sizeof buf, p.get())) out += buf;
  while (!out.empty() && (out.back() == '\n' || out.back() == ' ')) out.pop_back();
  return out;
}

std::string slurp(const fs::path& f) {
  std::ifstream in(f, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class Exif : public ::testing::Test {
 protected:
  void SetUp() override {
    if (run("command -v exiftool").empty()) GTEST_SKIP() << "exiftool missing (scripts/install-deps.sh --test)";
    dir_ = fs::temp_directory_path() / ("cairn-exif-" + std::to_string(::getpid()));
    fs::create_directories(dir_);
  }
  void TearDown() override {
    std::error_code ec;
    fs::remove_all(dir_, ec);
  }
  // A 32x24 JPEG made by Pillow, with TAGS written by exiftool (exiftool arguments).
  fs::path photo(const std::string& name, const std::string& tags) {
    const fs::path f = dir_ / name;
    const std::string py = "/usr/bin/python3 -c \"from PIL import Image; Image.new('RGB',(32,24),(120,90,60)).save('" +
                           f.string() + "', quality=80)\"";
    EXPECT_EQ(std::system(py.c_str()), 0);
    if (!tags.empty()) {
      EXPECT_EQ(std::system(("exiftool -q -overwrite_original " + tags + " '" + f.string() + "'").c_str()), 0);
    }
    return f;
  }
  std::string tool(const fs::path& f, const std::string& tag) {
    return run("exiftool -n -s3 -" + tag + " '" + f.string() + "'");
  }
  fs::path dir_;
};

TEST_F(Exif, TimeAndPositionAsExiftoolReadsThem) {
  const fs::path f = photo("a.jpg",
                           "'-DateTimeOriginal=2026:07:14 10:32:05' -SubSecTimeOriginal=25 -OffsetTimeOriginal=+02:00 "
                           "-GPSLatitude=12.5 -GPSLatitudeRef=S -GPSLongitude=70.254321 -GPSLongitudeRef=W "
                           "-GPSAltitude=123.5 '-GPSAltitudeRef#=1'");
  const auto r = read_exif(slurp(f), "a.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  // exiftool: DateTimeOriginal "2026:07:14 10:32:05", SubSecTimeOriginal 25, OffsetTimeOriginal +02:00.
  EXPECT_EQ(tool(f, "DateTimeOriginal"), "2026:07:14 10:32:05");
  EXPECT_EQ(r->time, "2026-07-14T10:32:05.25+02:00");
  ASSERT_TRUE(r->lat && r->lon && r->altitude);
  EXPECT_NEAR(*r->lat, std::stod(tool(f, "Composite:GPSLatitude")), 1e-9);
  EXPECT_NEAR(*r->lon, std::stod(tool(f, "Composite:GPSLongitude")), 1e-9);
  EXPECT_NEAR(*r->altitude, std::stod(tool(f, "Composite:GPSAltitude")), 1e-9);
  EXPECT_LT(*r->lat, 0);
  EXPECT_LT(*r->altitude, 0);
  EXPECT_TRUE(r->notes.empty());
}

TEST_F(Exif, NorthEastWithoutOffsetOrAltitude) {
  const fs::path f = photo("b.jpg",
                           "'-DateTimeOriginal=2026:02:28 23:59:59' -GPSLatitude=46.5123456 -GPSLatitudeRef=N "
                           "-GPSLongitude=14.25 -GPSLongitudeRef=E");
  const auto r = read_exif(slurp(f), "b.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  EXPECT_EQ(r->time, "2026-02-28T23:59:59");
  ASSERT_TRUE(r->lat && r->lon);
  EXPECT_NEAR(*r->lat, std::stod(tool(f, "Composite:GPSLatitude")), 1e-9);
  EXPECT_NEAR(*r->lon, std::stod(tool(f, "Composite:GPSLongitude")), 1e-9);
  EXPECT_FALSE(r->altitude);
}

TEST_F(Exif, SixtySecondsAsExiftoolRoundsThem) {
  // exiftool writes 61.3 degrees as 61 17 60 (seconds rounded up) and reads it as 61.3.
  const fs::path f = photo("s.jpg", "-GPSLatitude=61.3 -GPSLatitudeRef=N -GPSLongitude=135.6 -GPSLongitudeRef=W");
  const auto r = read_exif(slurp(f), "s.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  ASSERT_TRUE(r->lat && r->lon) << (r->notes.empty() ? "" : r->notes[0]);
  EXPECT_NEAR(*r->lat, std::stod(tool(f, "Composite:GPSLatitude")), 1e-9);
  EXPECT_NEAR(*r->lon, std::stod(tool(f, "Composite:GPSLongitude")), 1e-9);
}

TEST_F(Exif, NoExifIsEmptyNotAnError) {
  const fs::path f = photo("plain.jpg", "");
  EXPECT_EQ(tool(f, "DateTimeOriginal"), "");
  const auto r = read_exif(slurp(f), "plain.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  EXPECT_EQ(r->time, "");
  EXPECT_FALSE(r->lat);
}

TEST_F(Exif, ImpossibleDateIsANoteNotATime) {
  // exiftool writes what it is told in the raw (#) form; 2026 has no 30 February.
  const fs::path f = photo("c.jpg", "'-DateTimeOriginal#=2026:02:30 10:00:00'");
  EXPECT_EQ(tool(f, "DateTimeOriginal"), "2026:02:30 10:00:00");
  const auto r = read_exif(slurp(f), "c.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  EXPECT_EQ(r->time, "");
  ASSERT_EQ(r->notes.size(), 1u);
  EXPECT_NE(r->notes[0].find("DateTimeOriginal"), std::string::npos);
}

TEST_F(Exif, ZeroDenominatorDropsThePosition) {
  const fs::path f = photo("d.jpg", "-GPSLatitude=12.5 -GPSLatitudeRef=N -GPSLongitude=1 -GPSLongitudeRef=E");
  std::string bytes = slurp(f);
  ASSERT_EQ(tool(f, "ExifByteOrder"), "MM");
  // exiftool stores 12.5 degrees as 12/1 30/1 0/1 (big-endian); zero the minutes' denominator.
  const std::string triple("\0\0\0\x0c\0\0\0\x01\0\0\0\x1e\0\0\0\x01", 16);
  const auto at = bytes.find(triple);
  ASSERT_NE(at, std::string::npos);
  bytes[at + 15] = 0;
  const auto r = read_exif(bytes, "d.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  EXPECT_FALSE(r->lat);
  EXPECT_FALSE(r->lon);
  bool named = false;
  for (const auto& n : r->notes) named = named || n.find("zero denominator") != std::string::npos;
  EXPECT_TRUE(named);
}

TEST_F(Exif, MissingReferenceIsNotGuessed) {
  const fs::path f = photo("e.jpg", "-GPSLatitude=12.5 -GPSLongitude=1 -GPSLongitudeRef=E");
  EXPECT_EQ(tool(f, "GPSLatitudeRef"), "");
  const auto r = read_exif(slurp(f), "e.jpg");
  ASSERT_TRUE(r.ok()) << r.error();
  EXPECT_FALSE(r->lat);
}

TEST_F(Exif, NotAJpegOrTooLargeIsRefused) {
  const fs::path png = dir_ / "p.png";
  ASSERT_EQ(
      std::system(("/usr/bin/python3 -c \"from PIL import Image; Image.new('RGB',(4,4)).save('" + png.string() + "')\"")
                      .c_str()),
      0);
  const auto r = read_exif(slurp(png), "p.png");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.error().find("p.png: not a JPEG"), std::string::npos);
  std::string huge(kMaxPhotoBytes + 1, '\0');
  huge[0] = '\xFF', huge[1] = '\xD8', huge[2] = '\xFF';
  EXPECT_FALSE(read_exif(huge, "huge.jpg").ok());
}

TEST_F(Exif, EveryTruncationIsReadWithoutCrashing) {
  const fs::path f = photo("t.jpg",
                           "'-DateTimeOriginal=2026:07:14 10:32:05' -GPSLatitude=12.5 -GPSLatitudeRef=S "
                           "-GPSLongitude=70.25 -GPSLongitudeRef=W");
  const std::string bytes = slurp(f);
  size_t with_time = 0;
  for (size_t n = 0; n <= bytes.size(); ++n) {
    const auto r = read_exif(std::string_view(bytes).substr(0, n), "t.jpg");
    if (r.ok() && !r->time.empty()) ++with_time;
  }
  EXPECT_GT(with_time, 0u);  // the whole file at least
}

// Thumbnails (formats/image.h): Pillow's picture size, and the scaled size worked
// by hand (800 x 600 to a longer side of 256: 256 x 192).
TEST_F(Exif, ThumbnailDecodedAndScaled) {
  const fs::path f = dir_ / "big.jpg";
  ASSERT_EQ(std::system(("/usr/bin/python3 -c \"from PIL import Image; Image.new('RGB',(800,600),(200,40,40)).save('" +
                         f.string() + "', quality=90)\"")
                            .c_str()),
            0);
  const auto pic = decode_jpeg(slurp(f), "big.jpg");
  ASSERT_TRUE(pic.ok()) << pic.error();
  EXPECT_EQ(pic->width, 800);
  EXPECT_EQ(pic->height, 600);
  const Picture t = scale_to_fit(*pic, 256);
  EXPECT_EQ(t.width, 256);
  EXPECT_EQ(t.height, 192);
  EXPECT_NEAR(t.rgb[0], 200, 6);  // Pillow's red survives JPEG and scaling within a few levels
  const fs::path out = dir_ / "thumb.jpg";
  std::ofstream(out, std::ios::binary) << encode_jpeg(t);
  EXPECT_EQ(tool(out, "ImageSize"), "256 192");
  EXPECT_FALSE(decode_jpeg("not a jpeg", "x.jpg").ok());
  std::string truncated = slurp(f).substr(0, 40);
  EXPECT_FALSE(decode_jpeg(truncated, "t.jpg").ok());
}

TEST_F(Exif, WrittenExifReadsBackInExiftool) {
  Picture p;
  p.width = 16, p.height = 12;
  p.rgb.assign(16 * 12 * 3, 128);
  const auto jpeg = write_exif_jpeg(encode_jpeg(p), {"2026-07-14T09:05:30", -33.25, -70.5, 2150.25});
  ASSERT_TRUE(jpeg.ok()) << jpeg.error();
  const fs::path f = dir_ / "w.jpg";
  std::ofstream(f, std::ios::binary) << *jpeg;
  EXPECT_EQ(tool(f, "DateTimeOriginal"), "2026:07:14 09:05:30");
  EXPECT_NEAR(std::stod(tool(f, "Composite:GPSLatitude")), -33.25, 1e-6);
  EXPECT_NEAR(std::stod(tool(f, "Composite:GPSLongitude")), -70.5, 1e-6);
  EXPECT_NEAR(std::stod(tool(f, "Composite:GPSAltitude")), 2150.25, 1e-6);
  EXPECT_EQ(tool(f, "ImageWidth"), "16");
  EXPECT_FALSE(write_exif_jpeg(encode_jpeg(p), {"2026-07-14", {}, {}, {}}).ok());
}

}  // namespace
