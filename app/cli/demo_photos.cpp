#include "app/cli/demo_photos.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <stdexcept>

#include "app/core/photo_import.h"
#include "formats/exif.h"
#include "formats/image.h"
#include "formats/iso8601.h"

namespace cairn::cli::demo {

namespace fs = std::filesystem;

namespace {

// How many of RO's first-day stations get a photo, and the one photo taken at
// camp in the evening, which matches no station (planted: listed, not guessed).
constexpr int kMatched = 11;
constexpr const char* kCampPhoto = "IMG_0112.JPG";

// A small picture of banded rock: layers tilted by the station's number,
// deterministic noise (a fixed linear congruential generator).
formats::Picture outcrop_picture(int seed) {
  formats::Picture p;
  p.width = 160;
  p.height = 120;
  p.rgb.resize(static_cast<size_t>(p.width) * p.height * 3);
  unsigned state = 12345u + static_cast<unsigned>(seed) * 7919u;
  const double tilt = 0.2 + 0.08 * (seed % 7);
  for (int y = 0; y < p.height; ++y)
    for (int x = 0; x < p.width; ++x) {
      state = state * 1103515245u + 12345u;
      const int noise = static_cast<int>((state >> 16) % 24);
      const double band = std::sin((y + tilt * x) * 0.35 + seed) * 0.5 + 0.5;
      const size_t i = (static_cast<size_t>(y) * p.width + x) * 3;
      p.rgb[i] = static_cast<unsigned char>(90 + 70 * band + noise);
      p.rgb[i + 1] = static_cast<unsigned char>(80 + 55 * band + noise);
      p.rgb[i + 2] = static_cast<unsigned char>(70 + 35 * band + noise);
    }
  return p;
}

// The wall-clock time T (ISO 8601, any offset) moved by S seconds, as YYYY-MM-DDThh:mm:ss.
std::string camera_time(const std::string& t, int s) {
  const auto ft = formats::parse_iso8601(t);
  if (!ft || !ft->time_of_day) throw std::logic_error("demo station time '" + t + "' has no time of day");
  const auto at = date::sys_days(ft->day) + std::chrono::duration_cast<std::chrono::seconds>(*ft->time_of_day) +
                  std::chrono::seconds(s);
  return date::format("%FT%T", date::floor<std::chrono::seconds>(at));
}

void write_photo(const fs::path& f, int seed, const formats::ExifToWrite& w) {
  const auto jpeg = formats::write_exif_jpeg(formats::encode_jpeg(outcrop_picture(seed), 60), w);
  if (!jpeg) throw std::logic_error("demo photo: " + jpeg.error());
  std::ofstream out(f, std::ios::binary);
  out << *jpeg;
  if (!out.flush()) throw std::runtime_error("cannot write " + f.string());
}

}  // namespace

std::string write_demo_photos(const fs::path& dir, const Area& area, store::Project& camp) {
  const fs::path folder = dir / "photos";
  fs::create_directories(folder);
  // RO's stations on tablet A, in time order.
  std::string ro;
  for (const auto& p : area.a.people)
    if (p.initials == "RO") ro = p.meta.uuid;
  std::vector<const store::Station*> st;
  for (const auto& s : area.a.stations)
    if (s.observer == ro && !s.time.empty()) st.push_back(&s);
  std::sort(st.begin(), st.end(), [](const auto* a, const auto* b) { return a->time < b->time; });
  if (st.size() < static_cast<size_t>(kMatched)) throw std::logic_error("the demo has too few stations of RO");

  const int behind = 130;  // kDemoClockOffset in seconds
  for (int i = 0; i < kMatched; ++i) {
    const store::Station& s = *st[static_cast<size_t>(i)];
    formats::ExifToWrite w;
    // Taken 2 to 7 minutes after the station was recorded, by a camera 2 min 10 s behind.
    w.time = camera_time(s.time, 120 + 60 * (i % 6) - behind);
    if (i % 4 != 3) {                           // every fourth photo from a camera without GPS
      w.lat = s.lat + 0.00004 * ((i % 3) - 1);  // a few metres from the station
      w.lon = s.lon + 0.00006 * ((i % 2) ? 1 : -1);
      if (s.elevation) w.altitude = *s.elevation + 1.5;
    }
    write_photo(folder / fmt::format("IMG_{:04d}.JPG", 101 + i), i, w);
  }
  // The evening at camp: the last station's day, 19:40, no station near in time.
  formats::ExifToWrite evening;
  evening.time = camera_time(st[static_cast<size_t>(kMatched - 1)]->time.substr(0, 10) + "T19:40:00", 0);
  write_photo(folder / kCampPhoto, 99, evening);

  core::PhotoPlanOptions o;
  o.clock_offset = *core::parse_clock_offset(kDemoClockOffset);
  o.person = "RO";
  const auto plan = core::plan_photos(camp, folder.string(), o);
  if (!plan) throw std::logic_error("the demo's photos do not match: " + plan.error());
  const auto batch = core::record_photos(camp, *plan);
  return fmt::format(
      "  photos/         {} JPEGs with EXIF (camera clock {} behind), {} matched to RO's stations "
      "and recorded in camp.cairn, {} left unmatched\n",
      kMatched + 1, std::string(kDemoClockOffset).substr(1), batch.added, plan->count(core::PhotoStatus::Unmatched));
}

}  // namespace cairn::cli::demo
