// The day tracks as GPX 1.1: one track per person and day, in time order.
#include <map>
#include <vector>

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
  std::vector<formats::GpxTrack> tracks;
  size_t n = 0;
  for (const auto& day : day_tracks(p)) {
    std::vector<formats::GpxTrackPoint> pts;
    for (const auto& t : day.points) pts.push_back({t.lat, t.lon, t.elevation, t.time});
    n += pts.size();
    const auto it = initials.find(day.person);
    const std::string who = it != initials.end() ? it->second
                            : day.person.empty() ? std::string("nobody chosen")
                                                 : day.person;
    tracks.push_back({who + " " + day.day, {std::move(pts)}});
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
