// The day tracks as GPX 1.1: one track per person and day, in time order.
#include <map>

#include "formats/gpx_write.h"
#include "app/core/export.h"
#include "formats/atomic_file.h"
#include "storage/repository.h"
#include "storage/track.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

ExportSummary export_gpx_tracks(Project& p, const std::string& path) {
  std::map<std::string, std::string> initials;
  for (const auto& who : list_people(p)) initials[who.meta.uuid] = who.initials;
  // (person, day) -> points, in time order (list_track sorts by time).
  std::map<std::pair<std::string, std::string>, std::vector<formats::GpxTrackPoint>> days;
  size_t n = 0;
  for (const auto& t : list_track(p)) {
    days[{t.person, t.time.substr(0, 10)}].push_back({t.lat, t.lon, t.elevation, t.time});
    ++n;
  }
  std::vector<formats::GpxTrack> tracks;
  for (auto& [key, pts] : days) {
    const auto it = initials.find(key.first);
    const std::string who = it != initials.end() ? it->second
                            : key.first.empty()  ? std::string("nobody chosen")
                                                 : key.first;
    tracks.push_back({who + " " + key.second, {std::move(pts)}});
  }
  formats::write_file_atomically(path, formats::write_gpx_tracks(tracks, "Cairn"));
  ExportSummary s;
  s.format = ExportFormat::Gpx;
  s.path = path;
  s.layers.push_back({"day tracks", tracks.size()});
  s.layers.push_back({"track points", n});
  return s;
}

}  // namespace cairn::core
