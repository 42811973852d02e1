// Photos that find their station: each photo's EXIF time (corrected by the
// camera's clock offset) and GPS position are matched to a station of the same
// person. Pure logic: no file, no SQL (the `photos` verb and the Camp screen
// read the files and record the result).
//
// The rules (DEVELOPERS.md, "Photo matching"):
//  1. Corrected time = EXIF DateTimeOriginal + clock offset. Times are
//     compared in UTC when both the photo and the station carry a UTC offset,
//     else as the wall-clock times written (a camera is set to local time).
//  2. Only stations of the photo's person with a time of day count. A
//     station's window runs from `lead` before its time to the next station
//     of the same person (or to `max_gap` after its time, whichever is
//     earlier): photos are taken at the outcrop, a little before the station
//     is recorded and until the mapper walks on.
//  3. Candidates are the stations whose window holds the corrected time. A
//     photo with a GPS position takes the nearest candidate by geodesic
//     distance (WGS84, GeographicLib), refused beyond `max_distance`; a photo
//     without one takes its only candidate, and is left unmatched when there
//     are two (never guessed).
//  4. An unmatched photo comes with its reason.
#pragma once
#include <chrono>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "geomath/result.h"

namespace cairn::core {

struct MatchStation {
  std::string uuid, code;
  std::string observer;  // person UUID ("" = nobody)
  double lat = 0, lon = 0;
  std::string time;  // ISO 8601 as stored
};

struct MatchPhoto {
  std::string name;  // for messages
  std::string time;  // EXIF time as formats::read_exif gives it ("" = none)
  std::optional<double> lat, lon;
};

struct MatchRules {
  std::chrono::seconds clock_offset{0};  // added to each photo's EXIF time
  std::string person;                    // person UUID whose stations count ("" = every station)
  std::chrono::seconds lead{10 * 60};    // a window opens this long before its station's time
  std::chrono::seconds max_gap{60 * 60};
  double max_distance = 250;  // metres
};

struct PhotoMatch {
  std::string station;             // station UUID, "" when unmatched
  std::string code;                // station code, ""
  std::string time;                // corrected time ("" when the photo had none)
  std::optional<double> distance;  // metres from the station (when the photo has a position)
  double seconds_after = 0;        // corrected time minus the station's time
  std::string reason;              // why unmatched ("" when matched)
};

// One result per photo, in the order given.
std::vector<PhotoMatch> match_photos(const std::vector<MatchStation>& stations, const std::vector<MatchPhoto>& photos,
                                     const MatchRules& rules);

// A clock offset "+hh:mm:ss" or "-hh:mm:ss" (sign required, two digits each,
// minutes and seconds below 60).
Result<std::chrono::seconds> parse_clock_offset(std::string_view text);
// "+00:02:10" for 130 s.
std::string clock_offset_text(std::chrono::seconds s);
// The offset from a photo of a clock: SHOWN (the time on the clock, ISO 8601)
// minus the photo's EXIF time.
Result<std::chrono::seconds> clock_offset_from(std::string_view exif_time, std::string_view shown);

// "12 min 5 s", "1 h 02 min" for messages.
std::string duration_text(double seconds);

}  // namespace cairn::core
